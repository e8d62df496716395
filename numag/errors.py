"""The exception hierarchy of numag.

Every error numag raises on purpose derives from :class:`NumagError`, so a
caller (and the command line) can tell "the input or the request was wrong"
from a programming error. Exceptions carry the data that explains them.

Examples
--------
>>> from numag.errors import ParseError
>>> err = ParseError("unexpected character '$'", equation=2, column=5,
...                  text="x + $y")
>>> print(err)
equation 2, column 5: unexpected character '$'
    x + $y
        ^
"""

import numbers

__all__ = [
    "NumagError",
    "InputError",
    "ParseError",
    "LimitError",
    "SystemFileError",
    "PointError",
    "one_line",
    "require_option",
    "is_number",
    "is_integer",
]


def one_line(message):
    """A message on one line: the display of the text under a caret is left out, other lines joined.

    Examples
    --------
    >>> one_line("equation 1, column 3: found 'x'\\n    2 x\\n      ^")
    "equation 1, column 3: found 'x'"
    """
    lines = [line for line in str(message).splitlines() if line.strip() and not line.startswith("    ")]
    return "; ".join(line.strip() for line in lines) or str(message).strip()


class NumagError(Exception):
    """Root of every error numag raises on purpose."""


class InputError(NumagError, ValueError):
    """The user's input (a file, an option, a point) is not acceptable."""


def require_option(condition, name, requirement, value):
    """Raise InputError ``"<name> must be <requirement>, got <value>"`` unless ``condition`` holds.

    Options are checked on construction (``__post_init__`` of the options dataclasses) with this one
    message form, so that a bad value is refused where it is given, naming the option.

    Examples
    --------
    >>> require_option(0 < 2 < 1, "point_tolerance", "in (0, 1)", 2)
    Traceback (most recent call last):
    ...
    numag.errors.InputError: point_tolerance must be in (0, 1), got 2
    """
    if not condition:
        raise InputError(f"{name} must be {requirement}, got {value!r}")


def is_number(value):
    """A real number that is not a bool (options compare it with bounds).

    Examples
    --------
    >>> is_number(0.5), is_number(True), is_number("1")
    (True, False, False)
    """
    return isinstance(value, numbers.Real) and not isinstance(value, bool)


def is_integer(value):
    """An integer that is not a bool (numpy integers included).

    Examples
    --------
    >>> is_integer(3), is_integer(3.0), is_integer(False)
    (True, False, False)
    """
    return isinstance(value, numbers.Integral) and not isinstance(value, bool)


class LimitError(InputError):
    """A configured size limit (degree, terms, variables, digits) was exceeded.

    Parameters
    ----------
    message : str
        What was too large.
    limit_name : str
        Name of the limit, as in :class:`numag.system.polynomial.Limits`.
    limit : int
        Its value.
    """

    def __init__(self, message, limit_name=None, limit=None):
        super().__init__(message)
        self.limit_name = limit_name
        self.limit = limit


class ParseError(InputError):
    """A polynomial or number could not be read.

    Parameters
    ----------
    message : str
        What was found and what was expected.
    equation : int or None
        1-based number of the equation (None for text that is not an equation).
    column : int or None
        1-based column of the offending character.
    text : str or None
        The text that was being read, shown with a caret under the column.
    """

    def __init__(self, message, equation=None, column=None, text=None):
        self.reason = message
        self.equation = equation
        self.column = column
        self.text = text
        super().__init__(self._format())

    def _format(self):
        where = []
        if self.equation is not None:
            where.append(f"equation {self.equation}")
        if self.column is not None:
            where.append(f"column {self.column}")
        head = (", ".join(where) + ": " if where else "") + self.reason
        if self.text is None or self.column is None or len(self.text) > 200:
            return head
        shown = self.text.replace("\t", " ").replace("\n", " ").replace("\r", " ")
        return f"{head}\n    {shown}\n    {' ' * (self.column - 1)}^"

    def located(self, equation=None, text=None):
        """Return a copy that also names the equation (and its text)."""
        return ParseError(self.reason, equation=equation if equation is not None else self.equation,
                          column=self.column, text=text if text is not None else self.text)


class SystemFileError(InputError):
    """A system file is unreadable or does not describe a valid system.

    Parameters
    ----------
    message : str
        What is wrong.
    path : str or None
        The file concerned.
    key : str or None
        The key of the file concerned, when there is one.
    """

    def __init__(self, message, path=None, key=None):
        self.path = path
        self.key = key
        prefix = f"{path}: " if path else ""
        super().__init__(prefix + message)


class PointError(InputError):
    """A point given by the user cannot be used (malformed, wrong variables, not on X).

    Parameters
    ----------
    message : str
        What is wrong.
    index : int or None
        1-based number of the point in the order given.
    """

    def __init__(self, message, index=None):
        self.index = index
        prefix = f"point {index}: " if index is not None else ""
        super().__init__(prefix + message)
