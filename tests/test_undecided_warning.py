"""Every exit 3 of `singular` has its warning line: an undecided piece is said among the warnings too.

The Viviani curve with its cylinder moved off the sphere by 1e-12: x^2 + y^2 + z^2 = 8,
x^2 - 2 sqrt(2) x + y^2 + 10^-12 = 0. Its 2 x 2 minors force y = 0 and z (x - sqrt 2) = 0, where the equations have
no common zero: the curve is smooth (checked with sympy below: Meurer et al., "SymPy: symbolic computing in Python",
PeerJ Computer Science, 2017). The untouched curve has its node at (2 sqrt 2, 0, 0), 1e-12 away, which double
precision cannot tell apart: numag lists an undecided piece there (exit 3), and its report's `warnings` were empty.
"""

import io
import json

import pytest
import sympy

from numag.app.cli import main

X, Y, Z = sympy.symbols("x y z")
EQUATIONS = [X ** 2 + Y ** 2 + Z ** 2 - 8, X ** 2 - 2 * sympy.sqrt(2) * X + Y ** 2 + sympy.Rational(1, 10 ** 12)]
TEXT = ('variables = ["x", "y", "z"]\nequations = ["x^2 + y^2 + z^2 - 8", '
        '"x^2 - 2*sqrt(2)*x + y^2 + 1/1000000000000"]\n')


def test_reference_the_curve_is_smooth():
    jacobian = sympy.Matrix(EQUATIONS).jacobian([X, Y, Z])
    minors = [jacobian.extract([0, 1], list(columns)).det() for columns in ((0, 1), (0, 2), (1, 2))]
    basis = sympy.groebner(EQUATIONS + minors, X, Y, Z, order="grevlex", extension=sympy.sqrt(2))
    assert list(basis.exprs) == [1]


@pytest.mark.parametrize("seed", ["1", "2", "3"])
def test_exit_3_has_a_warning_and_no_singular_point_is_claimed(tmp_path, seed):
    path = tmp_path / "viviani_moved.toml"
    path.write_text(TEXT)
    out = io.StringIO()
    code = main(["singular", str(path), "--seed", seed, "--json"], out=out)
    data = json.loads(out.getvalue())
    assert code in (0, 3)
    assert not [c for c in data["components"] if c["kind"] == "singular"]  # the curve is smooth
    if code == 3:
        assert data["warnings"]
    undecided = [c for c in data["components"] if c["kind"] == "undecided"]
    assert not undecided or any("undecided" in w for w in data["warnings"])
