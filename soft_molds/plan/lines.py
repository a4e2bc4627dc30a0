"""Source lines of recipe fields, for problems the plan stage finds."""

from __future__ import annotations

from collections.abc import Callable, Mapping

LineOf = Callable[[str], "int | None"]


def line_finder(lines: Mapping[str, int]) -> LineOf:
    """``line(path)``: the line of the field, else of its nearest enclosing block."""
    def line(path: str) -> int | None:
        while path and path not in lines:
            path = path.rsplit(".", 1)[0] if "." in path else ""
        return lines.get(path)
    return line
