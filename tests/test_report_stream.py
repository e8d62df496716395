"""Reports written entry by entry (``json_chunks``, ``write_json``) and solve's lazy report (issue 19, item 5)."""

import io
import json
import math

import numpy as np
import pytest

from numag.app.report import (EncodedSequence, certify_report, dumps, solve_report_to_dict, solve_report_from_dict,
                              write_json)
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions, solve_system


def _report_like(rng):
    """Nested values of every JSON kind, as reports hold them (points, counts, texts, empty containers)."""
    return {"command": "solve", "seed": int(rng.integers(1 << 30)), "empty_list": [], "empty_dict": {},
            "text": 'quote " backslash \\ tab \t unicode \u00e9', "none": None, "flag": True,
            "numbers": [float(v) for v in rng.standard_normal(5)] + [0, -3],
            "points": [[[float(a), float(b)] for a, b in rng.standard_normal((3, 2))] for _ in range(4)],
            "solutions": [{"point": [[1.0, 0.0]], "paths": [1, 2], "nested": {"a": []}} for _ in range(3)],
            "equations": ["x^2 - 1", "y - 2"], "inner": {"deeper": {"list": [{"k": 1}], "value": 1e-300}}}


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_chunks_read_back_as_the_json_module_writes_them(seed):
    # reference: Python's json module (json.dumps / json.loads); common practice, no source
    data = _report_like(np.random.default_rng(seed))
    text = dumps(data)
    assert json.loads(text) == json.loads(json.dumps(data, indent=2)) == data
    stream = io.StringIO()
    write_json(data, stream)
    assert stream.getvalue() == text + "\n"


def test_chunks_refuse_what_strict_json_refuses():
    # reference: json.dumps(..., allow_nan=False) raises ValueError on NaN and infinities
    for bad in (math.nan, math.inf):
        with pytest.raises(ValueError):
            json.dumps([bad], allow_nan=False)
        for data in ({"a": bad}, {"a": [[bad]]}, {"a": [{"b": bad}]}):
            with pytest.raises(ValueError):
                dumps(data)


def test_an_encoded_sequence_is_written_as_the_list_it_stands_for():
    items = [np.array([1.5, -2.0]), np.array([3.0, 0.25])]
    lazy = EncodedSequence(items, lambda v: {"point": [float(x) for x in v]})
    eager = [{"point": [float(x) for x in v]} for v in items]
    assert lazy == eager and len(lazy) == 2 and lazy[1] == eager[1] and lazy[:1] == eager[:1]
    assert dumps({"s": lazy}) == dumps({"s": eager})
    assert dumps({"s": EncodedSequence([], dict)}) == dumps({"s": []}) == '{\n  "s": []\n}'


def test_lazy_solve_report_is_the_eager_one():
    # four regular solutions (+-1, +-2): a worked example (common practice, no source)
    system = parse_system(["x^2 - 1", "y^2 - 4"], ["x", "y"])
    options = SolveOptions()
    result = solve_system(system, options, seed=3)
    lazy, eager = solve_report_to_dict(result, options, lazy=True), solve_report_to_dict(result, options)
    assert dumps(lazy) == dumps(eager)
    read = json.loads(dumps(lazy))
    points = sorted((round(s["point"][0][0]), round(s["point"][1][0])) for s in read["solutions"])
    assert points == [(-1, -2), (-1, 2), (1, -2), (1, 2)]
    back = solve_report_from_dict(read)[0]
    assert len(back.solutions) == 4
    # certification reads a lazy report as the list it stands for
    certified_lazy, certified_eager = certify_report(lazy), certify_report(eager)
    for certified in (certified_lazy, certified_eager):
        certified["certification"].pop("seconds")
    assert dumps(certified_lazy) == dumps(certified_eager)
    assert [s["certificate"]["status"] for s in certified_lazy["solutions"]] == ["certified"] * 4
