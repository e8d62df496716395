"""Clean output: counts in the right number, no rounding noise, true messages, digits that match distances."""

import io
import math
import re

import pytest

from numag.app.cli import main

UMBRELLA = 'name = "umbrella"\nvariables = ["x", "y", "z"]\nequations = ["x^2 - y^2*z"]\n'
DOUBLE_CIRCLE = 'variables = ["x", "y"]\nequations = ["(x^2 + y^2 - 1)^2"]\n'
AXES = 'variables = ["x", "y", "z"]\nequations = ["x*y", "x*z", "y*z", "x*y*z"]\n'
NODAL = 'name = "nodal"\nvariables = ["x", "y"]\nequations = ["y^2 - x^2*(x + 1)"]\n'

#: A coordinate printed with a tiny part: what rounding noise looks like when it is not cleaned away.
NOISE = re.compile(r"[=+-]\d(\.\d+)?e-(1[0-9]|[2-9][0-9])")


def run(tmp_path, text, argv, seed="1"):
    path = tmp_path / "system.toml"
    path.write_text(text)
    out = io.StringIO()
    code = main([argv[0], str(path)] + argv[1:] + ["--seed", seed], out=out)
    return code, out.getvalue()


@pytest.mark.parametrize("seed", ["1", "5"])
def test_the_whitney_umbrella_reads_cleanly(tmp_path, seed):
    # The Whitney umbrella x^2 = y^2 z is singular along the z-axis, a line that reaches infinity at one
    # point (common practice, no source)
    code, text = run(tmp_path, UMBRELLA, ["singular"], seed)
    assert "1 equation in 3 variables" in text and "equation(s)" not in text
    assert "1 piece of positive dimension, non-reduced or undecided" in text and "0 singular points" in text
    assert "reaches infinity" in text and "positive-dimensional set at infinity" not in text
    assert not NOISE.search(text)
    assert text.count("are printed as 0") <= 1


def test_lowest_dimension_is_named_beside_the_counts_it_affects(tmp_path):
    # the three coordinate axes (common practice, no source)
    code, text = run(tmp_path, AXES, ["decompose", "--lowest-dimension", "1"])
    assert "3 irreducible components (dimensions below 1 not searched: --lowest-dimension 1)" in text
    code, text = run(tmp_path, UMBRELLA, ["singular", "--lowest-dimension", "1"])
    assert "0 singular points, 0 real (not searched: --lowest-dimension 1)" in text
    assert text.count("--lowest-dimension 1") == 3  # X's components, the points, the larger pieces
    code, text = run(tmp_path, UMBRELLA, ["singular"])
    assert "--lowest-dimension" not in text


def test_non_reduced_components_show_their_multiplicity_only_above_one(tmp_path):
    # (x^2 + y^2 - 1)^2 = 0 is the circle counted twice: two paths end at each witness point
    # (common practice, no source)
    code, text = run(tmp_path, DOUBLE_CIRCLE, ["decompose"])
    assert "non-reduced (multiplicity 2)" in text and "multiplicity 1" not in text
    assert "1 irreducible component\n" in text


def test_digits_of_agreement_match_the_distance_shown(tmp_path):
    # numag beside sympy (a general-purpose reference library) on the nodal cubic
    pytest.importorskip("sympy")
    code, text = run(tmp_path, NODAL, ["compare"])
    found = re.search(r"coordinates agree to (every digit|[0-9.]+ digits): largest relative distance (\S+)", text)
    assert code == 0 and found
    distance = float(found.group(2))
    if distance == 0:
        assert found.group(1) == "every digit"
    else:
        assert float(found.group(1).split()[0]) == pytest.approx(-math.log10(distance), abs=0.051)


TRIPLE = 'variables = ["x", "y", "z"]\nequations = ["y - x^2", "z - x*y", "z - 3*x^2 + 3*x - 1"]\n'


@pytest.mark.parametrize("seed", ["1", "2", "3"])
def test_a_triple_root_is_printed_without_digits_below_its_accuracy(tmp_path, seed):
    # y = x^2, z = x^3 turn the third equation into (x - 1)^3 = 0: the one solution (1, 1, 1) is a triple root
    # (by hand, common practice, no source). It is known only to about eps^(1/3), so no printed coordinate may
    # carry a digit that departs from 1 (the report had printed x=1.000000002 at one seed).
    code, out = run(tmp_path, TRIPLE, ["solve"], seed=seed)
    assert code == 0
    line = next(line for line in out.splitlines() if "multiplicity 3" in line)
    assert re.search(r"x=(\S+), y=(\S+), z=(\S+)$", line).groups() == ("1", "1", "1")
