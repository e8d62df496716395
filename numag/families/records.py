"""Typed results of the family computations and their JSON round trip.

Every result class has ``to_dict`` / ``from_dict`` (plain JSON types: complex numbers as
``[real, imaginary]`` pairs, infinities as the string ``"infinity"``); :func:`numag.save` and
:func:`numag.load` write and read them like every other result (:mod:`numag.app.saved`).

Examples
--------
>>> import numpy as np
>>> decode_complex(encode_complex(np.array([1 + 2j, 3])))
array([1.+2.j, 3.+0.j])
"""

import enum

import numpy as np

from ..errors import InputError

__all__ = ["REAL_TOLERANCE", "MISSED_ON_LINES", "PointKind", "ComponentKind", "encode_complex", "decode_complex", "encode_float", "decode_float"]

#: Relative imaginary part under which a parameter value is real.
REAL_TOLERANCE = 1e-8
#: Key of a discriminant's ``paths``: points of a multiple component that lines missed (failures, decision 0107).
MISSED_ON_LINES = "missed_on_lines"


class PointKind(str, enum.Enum):
    """What a solution of one member is."""

    REGULAR = "regular"          #: J_x has full rank there
    RANK_DROP = "rank drop"      #: J_x drops rank there (the member sits on the discriminant)


class ComponentKind(str, enum.Enum):
    """What a component of the discriminant is."""

    FINITE = "finite"            #: members singular at a finite point x
    AT_INFINITY = "at infinity"  #: members whose closure is singular at a point at infinity in x
    EVERY_MEMBER = "every member"  #: the projection is all of parameter space (no discriminant condition)


def encode_complex(values):
    """Complex array (any shape) -> nested lists of [real, imaginary] pairs."""
    values = np.asarray(values, dtype=complex)
    return np.stack([values.real, values.imag], axis=-1).tolist()


def decode_complex(pairs):
    """The inverse of :func:`encode_complex`."""
    try:
        array = np.asarray(pairs, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"expected [real, imaginary] pairs, got {str(pairs)[:60]}") from None
    if array.ndim == 0 or array.shape[-1] != 2:
        raise InputError(f"expected [real, imaginary] pairs, got {str(pairs)[:60]}")
    values = np.empty(array.shape[:-1], dtype=complex)
    values.real, values.imag = array[..., 0], array[..., 1]  # not re + 1j * im: that turns -0.0 into 0.0
    return values


def decode_complex_rows(pairs, columns):
    """Rows of ``columns`` complex numbers from :func:`encode_complex` (an empty list gives no rows of that width).

    Examples
    --------
    >>> decode_complex_rows([], 3).shape
    (0, 3)
    >>> decode_complex_rows([[[1.0, 2.0]]], 1)
    array([[1.+2.j]])
    """
    if len(pairs) == 0:
        return np.zeros((0, int(columns)), dtype=complex)
    return decode_complex(pairs).reshape(-1, int(columns))


def encode_float(value):
    value = float(value)
    return "infinity" if value == float("inf") else value


def decode_float(value):
    return float("inf") if value == "infinity" else float(value)
