import numpy as np
import pytest
import sympy

from numag.errors import InputError, LimitError
from numag.system.parse import parse_polynomial, parse_system
from numag.system.polynomial import Limits, Polynomial

XY = ["x", "y"]


def to_sympy(p, names):
    symbols = sympy.symbols(names)
    return sympy.expand(sympy.sympify(p.to_text(names).replace("^", "**"), locals=dict(zip(names, symbols))))


def test_arithmetic_matches_sympy():
    # sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ CS 2017) as reference library
    x, y = sympy.symbols("x y")
    f = parse_polynomial("3*x^2*y - 1/2*y + 2", XY)
    g = parse_polynomial("x - 5*y^2 + I", XY)
    fs = 3 * x**2 * y - sympy.Rational(1, 2) * y + 2
    gs = x - 5 * y**2 + sympy.I
    assert sympy.expand(to_sympy(f * g, XY) - sympy.expand(fs * gs)) == 0
    assert sympy.expand(to_sympy(f - g, XY) - (fs - gs)) == 0
    assert sympy.expand(to_sympy(f ** 3, XY) - sympy.expand(fs**3)) == 0
    assert sympy.expand(to_sympy(f.derivative(0), XY) - sympy.diff(fs, x)) == 0


def test_homogenize_and_back():
    f = parse_polynomial("x^3 + x*y - 7", XY)
    h = f.homogenize(0)
    assert h.is_homogeneous() and h.degree == 3 and h.n_variables == 3
    assert h.dehomogenize(0) == f


def test_substitute_linear_matches_direct_evaluation():
    rng = np.random.default_rng(0)
    f = parse_polynomial("x^2*y - 3*y^3 + x - 2", XY)
    matrix = rng.standard_normal((2, 3)) + 1j * rng.standard_normal((2, 3))
    offset = rng.standard_normal(2)
    g = f.substitute_linear(matrix, offset)
    for _ in range(5):
        t = rng.standard_normal(3)
        assert abs(g.evaluate(t) - f.evaluate(matrix @ t + offset)) < 1e-10 * (1 + abs(g.evaluate(t)))


def test_random_combinations_span_the_same_zeros():
    system = parse_system(["x^2 - 1", "y - x"], XY)
    combined = system.random_combinations(2, np.random.default_rng(1))
    for point in ([1, 1], [-1, -1]):
        assert all(abs(p.evaluate(point)) < 1e-12 for p in combined.polynomials)


def test_mixing_exact_and_numeric_gives_numeric():
    f = parse_polynomial("x + 1", XY)
    g = f * 0.5
    assert not g.is_exact and f.is_exact


def test_limits_are_enforced():
    small = Limits(max_degree=10)
    x = Polynomial.variable(0, 2)
    with pytest.raises(LimitError):
        x.power(11, small)
    with pytest.raises(InputError):
        x.power(-1)


def test_power_zero_and_one():
    f = parse_polynomial("x + y + 1", XY)
    assert f.power(0) == Polynomial.constant(1, 2)
    assert f.power(1) == f


def test_prepared_for_numerics_drops_rescales_or_refuses():
    from numag.errors import InputError
    from numag.system.parse import parse_system
    from numag.system.polynomial import prepared_for_numerics
    kept = parse_system(["x^2 - 1"], ["x"])
    assert prepared_for_numerics(kept) == (kept, [])
    system, notes = prepared_for_numerics(parse_system(["0", "1e-300*x^2 - 1e-300"], ["x"]))
    assert system.to_texts() == ["x^2 - 1"] and len(notes) == 2 and "divided by 1e-300" in notes[1]
    with pytest.raises(InputError, match=r"equation 2: the coefficient of x \(about 1e477\)"):
        prepared_for_numerics(parse_system(["x - 1", "3^1000*x - 1"], ["x"]))
    with pytest.raises(InputError, match="every equation is zero"):
        prepared_for_numerics(parse_system(["x - x"], ["x"]))


def test_regeneration_bound_counts_each_stage():
    from numag.system.polynomial import regeneration_bound
    # stages of three quadrics in three unknowns: 2, 4, 8 paths; constants add nothing
    assert regeneration_bound([2, 2, 2, 0], 3) == 14
    assert regeneration_bound([3, 1, 2], 2) == 1 + 2  # lowest degrees first, at most n stages
