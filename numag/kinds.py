"""Kinds and verdicts as types: the base of numag's text-valued enums.

A member of a :class:`TextEnum` *is* its text (a ``str``), so JSON, f-strings and comparisons with
text read from a report all see the value, while code compares members (``verdict is
Verdict.SMOOTH``) rather than sentences. Each package defines its own enums on this base (the
certificate statuses in :mod:`numag.certify.records`, the verdicts and formulations in
:mod:`numag.singular.kinds`); this module sits below every package, beside :mod:`numag.errors`.

Examples
--------
>>> class Colour(TextEnum):
...     LIGHT_RED = "light red"
>>> Colour.parse("light red", "colour") is Colour.LIGHT_RED, f"{Colour.LIGHT_RED}", Colour.LIGHT_RED == "light red"
(True, 'light red', True)
>>> Colour.parse("blue", "colour")
Traceback (most recent call last):
    ...
numag.errors.InputError: unknown colour 'blue'; choose one of light red
"""

from enum import Enum

from .errors import InputError

__all__ = ["TextEnum"]


class TextEnum(str, Enum):
    """An enum whose members are their text (JSON and f-strings print the value)."""

    __str__ = str.__str__
    __format__ = str.__format__

    def __repr__(self):
        return repr(self.value)

    @classmethod
    def texts(cls):
        """The members' texts, in declaration order (e.g. the choices of a command-line option)."""
        return tuple(member.value for member in cls)

    @classmethod
    def parse(cls, value, option):
        """The member whose text is ``value`` (a member passes through); InputError naming ``option`` otherwise."""
        try:
            return cls(value)
        except ValueError:
            raise InputError(f"unknown {option} {value!r}; choose one of {', '.join(cls.texts())}") from None
