"""Typed results of the family computations and their JSON round trip.

Every result class has ``to_dict`` / ``from_dict`` (plain JSON types: complex numbers as
``[real, imaginary]`` pairs, infinities as the string ``"infinity"``); :func:`save_result` and
:func:`load_result` write and read them (atomic write, strict bounded read).

Examples
--------
>>> import numpy as np
>>> decode_complex(encode_complex(np.array([1 + 2j, 3])))
array([1.+2.j, 3.+0.j])
"""

import enum
import json
import os

import numpy as np

from ..errors import InputError
from ..system.safeio import MAX_INPUT_BYTES, atomic_write_bytes, loads_json, read_limited

__all__ = ["PointKind", "ComponentKind", "encode_complex", "decode_complex", "encode_float", "decode_float",
           "save_result", "load_result"]


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
    return array[..., 0] + 1j * array[..., 1]


def encode_float(value):
    value = float(value)
    return "infinity" if value == float("inf") else value


def decode_float(value):
    return float("inf") if value == "infinity" else float(value)


def save_result(result, path):
    """Write a result (anything with ``to_dict``) as JSON, atomically."""
    atomic_write_bytes(os.fspath(path), (json.dumps(result.to_dict(), indent=1, allow_nan=False) + "\n").encode())


def load_result(path):
    """Read a result written by :func:`save_result` (the class is named in the file)."""
    from .discriminant import Discriminant  # the result classes live beside their computations
    from .sweep import SweepResult

    data = loads_json(read_limited(os.fspath(path), MAX_INPUT_BYTES, "result file"), os.fspath(path))
    kinds = {"sweep": SweepResult, "discriminant": Discriminant}
    if not isinstance(data, dict) or data.get("kind") not in kinds:
        raise InputError(f"{os.fspath(path)}: not a saved sweep or discriminant (no 'kind' of "
                         f"{', '.join(kinds)})")
    try:
        return kinds[data["kind"]].from_dict(data)
    except (KeyError, TypeError, ValueError) as err:
        raise InputError(f"{os.fspath(path)}: a damaged {data['kind']} result ({type(err).__name__}: "
                         f"{str(err)[:80]})") from None
