"""Reading what users give numag: system files (TOML) and points.

A system file is TOML (an open standard) with these keys:

``variables``
    list of names (letters, digits, ``_``; not ``I`` or ``sqrt``).
``equations``
    list of strings in the equation grammar (see :mod:`numag.system.parse`);
    ``"lhs = rhs"`` means ``lhs - rhs = 0``.
``projective``
    boolean, default false: the equations are homogeneous and meant in
    projective space. Homogeneous equations are *not* switched to projective
    by themselves.
``name``, ``description``
    optional text for reports.
``angles``
    optional table ``label = ["c", "s"]`` naming variables that are the cosine and
    sine of an angle (a mechanism's joint angles): reports of real points then also
    give the angle in degrees.
``parameters``
    optional list of names: the file is then a *family* F(x; p), its equations use the
    variables and the parameters (see :mod:`numag.system.family`). Commands solve one member
    (``--at b=3``) or study the family (``numag discriminant``, ``numag sweep``).
``ranges``
    optional table ``b = [low, high]`` giving parameters a real interval.
``groups``
    optional list of lists of variable names, ``groups = [["x", "y"], ["l"]]``: the variable
    groups of a multihomogeneous start (``--start multihomogeneous``); every variable in one group.

Points are written ``x=1, y=2+I/2`` (values in the equation grammar), or
read from a JSON file: a list whose items are objects ``{"x": "1/3", "y": 2}``
or lists of coordinates in variable order (numbers, strings, or
``[real, imaginary]`` pairs, the shape numag's reports use); a single object
``{"x": 0, "y": 1}`` is one point. Saved reports work too: the ``points`` of
``check``, the ``solutions`` of ``solve`` and the affine points of every component
of ``singular`` (points at infinity are left out: they have one more coordinate).

Examples
--------
>>> system = system_from_mapping({"variables": ["x", "y"], "equations": ["y^2 = x^3"]})
>>> system.to_texts()
['-x^3 + y^2']
>>> [complex(c) for c in parse_point_assignment("x=1, y=1+I", system.variables)]
[(1+0j), (1+1j)]
"""

import json
import math
import os

from ..errors import ParseError, PointError, SystemFileError, InputError
from .exact import ExactCoefficient
from .family import Family, ParameterRange
from .parse import parse_constant, parse_system
from .safeio import MAX_INPUT_BYTES, loads_json, read_limited

try:  # Python >= 3.11
    import tomllib as _toml
except ModuleNotFoundError:  # pragma: no cover - older Pythons get the backport from setup.cfg
    import tomli as _toml

__all__ = ["SYSTEM_KEYS", "load_system", "load_family", "family_from_mapping", "system_from_mapping",
           "parse_point_assignment", "load_points", "points_from_json", "load_angles", "angles_from_mapping",
           "load_groups", "groups_from_mapping"]

#: Keys a system file may contain.
SYSTEM_KEYS = ("variables", "equations", "projective", "name", "description", "angles", "parameters", "ranges",
               "groups")


def _read_toml(path):
    path = os.fspath(path)
    raw = read_limited(path, MAX_INPUT_BYTES, "system file")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as err:
        raise SystemFileError(f"is not UTF-8 text (byte {err.start})", path) from None
    if not text.strip():
        raise SystemFileError("is empty: expected the keys 'variables' and 'equations'", path)
    try:
        return _toml.loads(text)
    except _toml.TOMLDecodeError as err:
        raise SystemFileError(f"is not valid TOML: {err}", path) from None
    except RecursionError:
        raise SystemFileError("is nested too deeply to be a system file", path) from None


def angles_from_mapping(data, variables, path=None):
    """The ``angles`` table: label -> (index of the cosine variable, index of the sine variable).

    Examples
    --------
    >>> angles_from_mapping({"angles": {"crank": ["c", "s"]}}, ["c", "s"])
    {'crank': (0, 1)}
    """
    table = data.get("angles", {})
    if not isinstance(table, dict):
        raise SystemFileError("'angles' must be a table: label = [\"cosine variable\", \"sine variable\"]", path,
                              "angles")
    result = {}
    for label, pair in table.items():
        if (not isinstance(pair, list) or len(pair) != 2 or not all(isinstance(v, str) for v in pair)):
            raise SystemFileError(f"angle '{label}' must be a pair of variable names [cosine, sine]", path, "angles")
        missing = [v for v in pair if v not in variables]
        if missing:
            raise SystemFileError(f"angle '{label}' names {missing[0]!r}, which is not a variable", path, "angles")
        result[label] = (variables.index(pair[0]), variables.index(pair[1]))
    return result


def load_angles(path, variables):
    """The ``angles`` table of a system file (empty when there is none); see :func:`angles_from_mapping`."""
    return angles_from_mapping(_read_toml(path), list(variables), os.fspath(path))


def groups_from_mapping(data, variables, path=None):
    """The ``groups`` list: a tuple of tuples of variable names, or None without one.

    Examples
    --------
    >>> groups_from_mapping({"groups": [["x", "y"], ["l"]]}, ["x", "y", "l"])
    (('x', 'y'), ('l',))
    """
    if "groups" not in data:
        return None
    groups = data["groups"]
    if not isinstance(groups, list) or not groups or not all(
            isinstance(g, list) and g and all(isinstance(name, str) for name in g) for g in groups):
        raise SystemFileError("'groups' must be a list of non-empty lists of variable names", path, "groups")
    seen = set()
    for g, group in enumerate(groups, 1):
        for name in group:
            if name not in variables:
                raise SystemFileError(f"group {g} names {name[:40]!r}, which is not a variable", path, "groups")
            if name in seen:
                raise SystemFileError(f"variable {name!r} is in two groups", path, "groups")
            seen.add(name)
    missing = [name for name in variables if name not in seen]
    if missing:
        raise SystemFileError(f"variable {missing[0]!r} is in no group: every variable must be in one", path,
                              "groups")
    return tuple(tuple(g) for g in groups)


def load_groups(path, variables):
    """The ``groups`` of a system file (None when there are none); see :func:`groups_from_mapping`."""
    return groups_from_mapping(_read_toml(path), list(variables), os.fspath(path))


def load_system(path):
    """Read a system file.

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    PolynomialSystem

    Raises
    ------
    SystemFileError
        For unreadable files, invalid TOML, unknown or missing keys, wrong
        types; equation errors name the equation and column.
    """
    path = os.fspath(path)
    return system_from_mapping(_read_toml(path), path=path)


def load_family(path):
    """Read a system file as a family (no ``parameters`` key: a family of no parameters).

    Returns
    -------
    Family
        Its ``system`` has the variables, then the parameters.
    """
    path = os.fspath(path)
    return family_from_mapping(_read_toml(path), path=path)


def family_from_mapping(data, path=None):
    """The family of a system file's keys (already parsed); see :func:`system_from_mapping`.

    Examples
    --------
    >>> family = family_from_mapping({"variables": ["x"], "parameters": ["p", "q"],
    ...                               "equations": ["x^3 + p*x + q"], "ranges": {"p": [-3, 3]}})
    >>> family.parameters, family.ranges["p"].high
    (('p', 'q'), 3.0)
    """
    system = system_from_mapping(data, path=path, allow_parameters=True)
    parameters = tuple(data.get("parameters", ()))
    return Family(system, parameters, _ranges(data, parameters, path))


def _parameter_names(data, path):
    parameters = data.get("parameters", [])
    if not isinstance(parameters, list) or not all(isinstance(item, str) for item in parameters):
        raise SystemFileError("'parameters' must be a list of strings", path, "parameters")
    clash = sorted(set(parameters) & set(data.get("variables", [])))
    if clash:
        raise SystemFileError(f"{clash[0]!r} is both a variable and a parameter", path, "parameters")
    if len(set(parameters)) != len(parameters):
        raise SystemFileError("a parameter is named twice", path, "parameters")
    return parameters


def _ranges(data, parameters, path):
    """The ``[ranges]`` table: parameter -> ParameterRange (finite, low < high)."""
    table = data.get("ranges", {})
    if not isinstance(table, dict):
        raise SystemFileError("'ranges' must be a table: parameter = [low, high]", path, "ranges")
    result = {}
    for name, pair in table.items():
        if name not in parameters:
            raise SystemFileError(f"range {name!r} names no parameter ({', '.join(parameters) or 'none declared'})",
                                  path, "ranges")
        if (not isinstance(pair, list) or len(pair) != 2
                or not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in pair)
                or not all(math.isfinite(v) and abs(v) <= MAX_COORDINATE for v in pair) or not pair[0] < pair[1]):
            raise SystemFileError(f"range {name!r} must be [low, high] with finite numbers, low < high", path,
                                  "ranges")
        result[name] = ParameterRange(name, float(pair[0]), float(pair[1]))
    return result


def system_from_mapping(data, path=None, allow_parameters=False):
    """Build a system from the keys of a system file (already parsed into a dict).

    A file with ``parameters`` describes a family: with ``allow_parameters`` the system is returned
    in the variables and then the parameters (see :func:`family_from_mapping`); without, it is
    refused with a message asking for their values (``--at``).

    Raises
    ------
    SystemFileError
        Naming the key that is unknown, missing or of the wrong type.
    """
    if not isinstance(data, dict):
        raise SystemFileError("must be a table of keys", path)
    unknown = sorted(set(data) - set(SYSTEM_KEYS))
    if unknown:
        raise SystemFileError(f"unknown key{'s' if len(unknown) > 1 else ''} {', '.join(map(repr, unknown))}; "
                              f"allowed keys: {', '.join(SYSTEM_KEYS)}", path, unknown[0])
    for key in ("variables", "equations"):
        if key not in data:
            raise SystemFileError(f"missing key '{key}'", path, key)
        value = data[key]
        if not isinstance(value, list) or not all(isinstance(item, str) for item in value):
            raise SystemFileError(f"'{key}' must be a list of strings", path, key)
        if not value:
            raise SystemFileError(f"'{key}' is empty: the system needs at least one", path, key)
    projective = data.get("projective", False)
    if not isinstance(projective, bool):
        raise SystemFileError("'projective' must be true or false", path, "projective")
    for key in ("name", "description"):
        if key in data and not isinstance(data[key], str):
            raise SystemFileError(f"'{key}' must be a string", path, key)
    name = data.get("name") or (os.path.splitext(os.path.basename(path))[0] if path else None)
    angles_from_mapping(data, data["variables"], path)  # validated here, read by load_angles
    parameters = _parameter_names(data, path)
    _ranges(data, parameters, path)
    if parameters and projective:
        raise SystemFileError("a projective family is not supported: write the family in an affine chart", path,
                              "parameters")
    if parameters and not allow_parameters:
        raise SystemFileError(f"describes a family with parameters {', '.join(parameters)}: give their values "
                              f"(--at {parameters[0]}=...)", path, "parameters")
    groups_from_mapping(data, data["variables"], path)  # validated here, read by load_groups
    try:
        return parse_system(data["equations"], list(data["variables"]) + parameters, projective=projective, name=name)
    except ParseError as err:
        raise SystemFileError(str(err), path, "equations") from None
    except InputError as err:
        raise SystemFileError(str(err), path) from None


def parse_point_assignment(text, variables, index=None, partial=False):
    """Read ``"x=1, y=2+I"`` into exact coordinates in variable order.

    With ``partial``, variables may be left out: a dictionary of the given ones (name -> value) is returned.

    Raises
    ------
    PointError
        For a malformed item, an unknown, repeated or missing variable, or a bad value.
    """
    if not isinstance(text, str) or not text.strip():
        raise PointError("is empty; write it as name=value pairs such as x=0,y=1", index)
    values = {}
    for item in text.split(","):
        name, sep, value = item.partition("=")
        name = name.strip()
        if not sep or not name or not value.strip():
            raise PointError(f"'{item.strip()}' is not of the form name=value", index)
        if name not in variables:
            raise PointError(f"'{name}' is not a variable of the system ({', '.join(variables)})", index)
        if name in values:
            raise PointError(f"'{name}' is given twice", index)
        values[name] = _coordinate(value, name, index)
    if partial:
        return {v: values[v] for v in variables if v in values}
    missing = [v for v in variables if v not in values]
    if missing:
        raise PointError(f"no value for {', '.join(missing)}", index)
    return [values[v] for v in variables]


#: Largest modulus of a point's coordinate: the double range (about 1e308) less room for the powers
#: and products of numerical work.
MAX_COORDINATE = 1e100


def _coordinate(value, name, index):
    """One coordinate from text, a number, or a [real, imaginary] pair, within :data:`MAX_COORDINATE`."""
    coordinate = _read_coordinate(value, name, index)
    try:
        size = abs(complex(coordinate))
    except OverflowError:
        size = math.inf
    if size > MAX_COORDINATE:
        raise PointError(f"value of {name} is beyond the range numerical work can use (modulus above "
                         f"{MAX_COORDINATE:.0e})", index)
    return coordinate


def _read_coordinate(value, name, index):
    if isinstance(value, bool):
        raise PointError(f"value of {name} must be a number, got {value!r}", index)
    if isinstance(value, str):
        try:
            return parse_constant(value.strip())  # with what its decimals say (decision 0132)
        except ParseError as err:
            raise PointError(f"value of {name}: {err.reason} (column {err.column})", index) from None
    if isinstance(value, int):
        return ExactCoefficient.rational(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise PointError(f"value of {name} is not finite", index)
        return complex(value)
    if (isinstance(value, list) and len(value) == 2
            and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value)):
        if not all(math.isfinite(v) for v in value):
            raise PointError(f"value of {name} is not finite", index)
        if all(isinstance(v, int) for v in value):
            return ExactCoefficient.rational(value[0], value[1])
        return complex(value[0], value[1])
    raise PointError(f"value of {name} must be a number, a string or a [real, imaginary] pair, "
                     f"got {json.dumps(value)[:40]}", index)


#: Where the points of each saved report are: a function of the report giving its list of points.
_REPORT_POINTS = {
    "check": lambda report: report.get("points"),
    "solve": lambda report: report.get("solutions"),
    # each point with the relative accuracy its report states (the tolerance it was judged singular at,
    # decision 0110); reports written before it was saved state none (UNSTATED: the reader supplies it)
    "singular": lambda report: [{"point": point, "point_tolerance": component.get("point_tolerance", UNSTATED)}
                                for component in _listed(report.get("components"))
                                if isinstance(component, dict) and component.get("at_infinity") is False
                                for point in _listed(component.get("points"))],
}


#: The ``point_tolerance`` of a point of a saved ``singular`` report that states none (written before decision
#: 0110): its points are numerical all the same, so the reader's ``unstated_tolerance`` stands for it.
UNSTATED = object()  # not a JSON value: a report cannot state it


def _listed(value):
    return value if isinstance(value, list) else []


def _report_points(data, variables):
    """The points of a saved report of check, solve or singular; refused when its variables differ."""
    command = data.get("command")
    if not isinstance(command, str) or command not in _REPORT_POINTS:
        raise PointError(f"a report of 'numag {str(command)[:20]}' holds no points to check (use a report of "
                         "check, solve or singular)")
    system = data.get("system")
    named = system.get("variables") if isinstance(system, dict) else None
    if named is not None and (not isinstance(named, list) or named != list(variables)):
        raise PointError(f"the report's variables ({str(named)[:80]}) differ from the "
                         f"system's ({', '.join(variables)})")
    points = _REPORT_POINTS[command](data)
    if not isinstance(points, list):
        raise PointError(f"the report of 'numag {command}' has no list of points")
    return points


def points_from_json(data, variables, accuracies=None, unstated_tolerance=None):
    """Points from decoded JSON (see the module documentation for the accepted shapes).

    ``accuracies``: a list to which each point's stated relative accuracy is appended (an item's
    ``point_tolerance``, as a saved report of ``singular`` gives it; None where not stated).
    ``unstated_tolerance``: the accuracy of the points of a saved ``singular`` report that states none (one
    written before the reports stated it): its points were computed, never exact, whatever digits they carry.

    Examples
    --------
    >>> [[complex(c) for c in p] for p in points_from_json({"x": 0, "y": 1.5}, ["x", "y"])]
    [[0j, (1.5+0j)]]
    """
    if isinstance(data, dict):
        if "command" in data and "numag_version" in data:
            data = _report_points(data, variables)
        elif "points" in data:
            data = data["points"]
        elif data and set(data) <= set(variables):
            data = [data]  # a single point {"x": 0, "y": 1}
        else:
            raise PointError("the JSON object is neither a point (keys: the variables), nor has a 'points' list, "
                             "nor is a saved report of check, solve or singular")
    if not isinstance(data, list):
        raise PointError("expected a list of points")
    points = []
    for index, item in enumerate(data, 1):
        accuracy = None
        if isinstance(item, dict) and "point" in item and not set(item) <= set(variables):
            stated = item.get("point_tolerance")
            accuracy = unstated_tolerance if stated is UNSTATED else _stated_accuracy(stated, index)
            item = item["point"]
        if accuracies is not None:
            accuracies.append(accuracy)
        if isinstance(item, dict):
            unknown = [k for k in item if k not in variables]
            if unknown:
                raise PointError(f"'{unknown[0]}' is not a variable of the system ({', '.join(variables)})",
                                 index)
            missing = [v for v in variables if v not in item]
            if missing:
                raise PointError(f"no value for {', '.join(missing)}", index)
            points.append([_coordinate(item[v], v, index) for v in variables])
        elif isinstance(item, list):
            if len(item) != len(variables):
                raise PointError(f"has {len(item)} coordinates, the system has {len(variables)} variables", index)
            points.append([_coordinate(v, name, index) for v, name in zip(item, variables)])
        else:
            raise PointError("must be an object of name: value pairs or a list of coordinates", index)
    return points


def _stated_accuracy(value, index):
    """A point's stated relative accuracy: None, or a number in (0, 1)."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 < value < 1:
        raise PointError(f"point_tolerance must be a number in (0, 1), got {json.dumps(value)[:40]}", index)
    return float(value)


def load_points(path, variables, accuracies=None, unstated_tolerance=None):
    """Read points from a JSON file (see :func:`points_from_json`, also for ``accuracies`` and
    ``unstated_tolerance``)."""
    data = loads_json(read_limited(path, MAX_INPUT_BYTES, "points file"), os.fspath(path))
    try:
        return points_from_json(data, variables, accuracies, unstated_tolerance)
    except PointError as err:
        raise PointError(f"{os.fspath(path)}: {err}") from None
