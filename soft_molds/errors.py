"""One exception family for the whole tool.

Every error raised on purpose by soft_molds derives from :class:`SoftMoldsError`, so a
caller (the CLI, an overnight sweep script) can catch exactly the problems that are the
user's to fix and let genuine bugs surface as tracebacks.
"""

from __future__ import annotations

from dataclasses import dataclass


class SoftMoldsError(Exception):
    """Root of every error soft_molds raises deliberately."""


@dataclass(frozen=True)
class Problem:
    """One thing wrong with a recipe.

    ``path`` is the field path inside the recipe (``voids[1].pitch_mm``; ``""`` for the
    document itself), ``line`` the 1-based source line (``None`` when unknown), ``value``
    what was found and ``allowed`` what would have been accepted.
    """

    path: str
    message: str
    line: int | None = None
    value: object = None
    allowed: str = ""

    def format(self, source: str = "recipe") -> str:
        where = f"{source}:{self.line}" if self.line is not None else source
        field = f" {self.path}:" if self.path else ""
        text = f"{where}:{field} {self.message}"
        if self.value is not None:
            text += f" (got {self.value!r})"
        if self.allowed:
            text += f"; allowed: {self.allowed}"
        return text


class RecipeError(SoftMoldsError):
    """A recipe could not be read or is invalid; carries every problem found at once.

    ``recipe`` is the recipe as read when every field was valid and only its geometry was
    not (so later rules can still be checked and reported in the same breath), else None.
    """

    def __init__(self, problems: list[Problem] | tuple[Problem, ...], source: str = "recipe",
                 recipe: object | None = None):
        self.problems: tuple[Problem, ...] = tuple(problems)
        self.source = source
        self.recipe = recipe
        super().__init__("\n".join(p.format(source) for p in self.problems))

    def lines(self) -> list[str]:
        """One line per problem, ready to print."""
        return [p.format(self.source) for p in self.problems]


class GeometryError(SoftMoldsError):
    """The geometry kernel failed; names the variant, the part and the step."""

    def __init__(self, step: str, detail: str, part: str = "", variant: str = ""):
        self.step = step
        self.detail = detail
        self.part = part
        self.variant = variant
        super().__init__(self._text())

    def _text(self) -> str:
        who = " ".join(x for x in (f"variant {self.variant}" if self.variant else "",
                                   f"part {self.part}" if self.part else "") if x)
        lead = f"geometry failed for {who}" if who else "geometry failed"
        return f"{lead} at step '{self.step}': {self.detail}"

    def with_variant(self, variant: str) -> GeometryError:
        return GeometryError(self.step, self.detail, self.part, variant)


class MeshIntegrityError(SoftMoldsError):
    """A tessellated part failed its closure/volume checks (never only a warning)."""

    def __init__(self, part: str, failures: list[str], variant: str = ""):
        self.part = part
        self.failures = tuple(failures)
        self.variant = variant
        lead = f"variant {variant} " if variant else ""
        super().__init__(f"{lead}part {part}: mesh integrity failed: " + "; ".join(failures))
