"""Errors the user can act on.

Every error names where the problem is (file, line or element), what was seen and what
was expected.  The command line turns any :class:`LayoutcheckError` into a message and
exit code 2; nothing is written when one is raised.
"""
from __future__ import annotations


class LayoutcheckError(Exception):
    """Root of every error layoutcheck raises on purpose.

    Parameters
    ----------
    message:
        What is wrong and what was expected.
    file:
        The file (or archive member) concerned, if any.
    line:
        1-based line number in that file, if known.
    element:
        An XML element path, record or other locator, if no line applies.
    """

    def __init__(self, message: str, *, file: str | None = None, line: int | None = None,
                 element: str | None = None):
        self.message = message
        self.file = file
        self.line = line
        self.element = element
        super().__init__(self.where_text() + message)

    def where_text(self) -> str:
        parts = []
        if self.file:
            parts.append(str(self.file))
        if self.line is not None:
            parts.append(f"line {self.line}")
        if self.element:
            parts.append(str(self.element))
        return (": ".join([", ".join(parts)]) + ": ") if parts else ""


class InputFileError(LayoutcheckError):
    """A board file is malformed, truncated or inconsistent."""


class UnsupportedFeatureError(InputFileError):
    """A board file uses something that changes the image which we do not implement."""


class ResourceLimitError(InputFileError):
    """A file asks for more than the safety limits allow (sizes, counts, archive bombs)."""


class ProjectFileError(LayoutcheckError):
    """The project file (layoutcheck.toml) is malformed or names something that is not there."""


class UsageError(LayoutcheckError):
    """The command line or API was called with wrong arguments."""
