"""The one error type users see: bad input, reported as a single line."""

from __future__ import annotations


class InputError(ValueError):
    """A value in a case file, data file or option that the program cannot accept.

    The message is one line: where, which key, the value, and what is allowed.

    >>> str(InputError("steel.c", -0.1, "a number from 0 to 2.1 (wt%)", source="bar.toml"))
    'bar.toml: steel.c = -0.1: allowed is a number from 0 to 2.1 (wt%)'
    """

    def __init__(self, key: str, value: object, allowed: str, source: str | None = None):
        self.key, self.value, self.allowed, self.source = key, value, allowed, source
        super().__init__(self._line())

    def _line(self) -> str:
        where = f"{self.source}: " if self.source else ""
        shown = repr(self.value)
        if len(shown) > 80:
            shown = shown[:77] + "..."
        return f"{where}{self.key} = {shown}: allowed is {self.allowed}"

    def with_source(self, source: str) -> "InputError":
        return InputError(self.key, self.value, self.allowed, source=source)


class SolverError(RuntimeError):
    """The time integration could not finish a case (names the case and the time reached)."""
