"""The project's own error type.

Every rejection of user input raises :class:`HeatloadError` naming the field
(a dotted path such as ``phases[3].speed``), and where known the file and the
line, so the command line can print one clear line instead of a traceback.
"""

from __future__ import annotations


class HeatloadError(ValueError):
    """Invalid input or an impossible request.

    Parameters
    ----------
    message : str
        What is wrong and what was expected.
    field : str, optional
        Field path inside the scenario, e.g. ``"phases[2].speed"``.
    file : str, optional
        File the value came from.
    line : int, optional
        1-based line in that file, where it could be found.
    """

    def __init__(self, message: str, field: str | None = None,
                 file: str | None = None, line: int | None = None):
        self.message = message
        self.field = field
        self.file = file
        self.line = line
        super().__init__(self.one_line())

    def one_line(self) -> str:
        """The error as one line: ``file:line: field: message`` (control
        characters a user's key or value may carry are shown escaped)."""
        where = ""
        if self.file:
            where = f"{self.file}:{self.line}: " if self.line else f"{self.file}: "
        field = f"{self.field}: " if self.field else ""
        return _printable(f"{where}{field}{self.message}")

    def located(self, file: str | None = None, line: int | None = None,
                field_prefix: str | None = None) -> "HeatloadError":
        """A copy of this error with file, line or a field prefix filled in."""
        field = self.field
        if field_prefix:
            field = f"{field_prefix}.{field}" if field else field_prefix
        return HeatloadError(self.message, field=field,
                             file=file if file is not None else self.file,
                             line=line if line is not None else self.line)


def _printable(text: str) -> str:
    return "".join(ch if ch.isprintable() else ch.encode("unicode_escape").decode("ascii")
                   for ch in text)


def require(condition, message: str, field: str | None = None) -> None:
    """Raise :class:`HeatloadError` unless *condition* holds (not an assert:
    it stays active under ``python -O``)."""
    if not condition:
        raise HeatloadError(message, field=field)
