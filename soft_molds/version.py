"""Single source of the tool version written into every manifest."""

__version__ = "0.1.0"
