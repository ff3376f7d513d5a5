"""Exceptions raised by recoup.

Every error of the library is a ``RecoupError``; bad input is also a
``ValueError``, so code that already catches ``ValueError`` keeps working.
A ``ParseError`` carries the one-based ``line`` and ``column`` of the
mistake.
"""


class RecoupError(Exception):
    """Any error reported by recoup."""

    kind = "error"

    def __init__(self, message, line=None, column=None):
        super().__init__(message)
        self.message = message
        self.line = line
        self.column = column


class InputError(RecoupError, ValueError):
    """Well-formed input that recoup refuses (values out of range or of the
    wrong parity, conflicting declarations, unsupported forms)."""

    kind = "input"


class ParseError(InputError):
    """Text that is not in recoup's language; ``line`` and ``column`` say
    where."""

    kind = "parse"


class LimitError(RecoupError):
    """A limit on the size or the time of the work was reached."""

    kind = "limit"


class InternalError(RecoupError):
    """A defect in recoup (please report it with the input)."""

    kind = "internal"
