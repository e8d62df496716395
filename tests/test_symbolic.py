"""sympy interoperability: System.from_sympy and system.to_sympy keep coefficients exact.

sympy (a general-purpose reference library) is the reference: what comes back must be equal to what
went in as sympy sees it, and numag's parser must read the same polynomials from text.
"""

import pytest

sympy = pytest.importorskip("sympy")

import numag  # noqa: E402
from numag.errors import InputError  # noqa: E402

x, y, z = sympy.symbols("x y z")

EXACT_CASES = [
    # rationals, I, square roots of rationals and their products (each written as numag's grammar reads it)
    ([y**2 - x**2 * (x + 1)], ["y^2 - x^2*(x + 1)"]),
    ([sympy.Rational(2, 7) * x**3 - sympy.I * y + sympy.Rational(-5, 3)], ["2/7*x^3 - I*y - 5/3"]),
    ([sympy.sqrt(2) * x * y - sympy.sqrt(sympy.Rational(3, 5)) * z**2, x + sympy.I * sympy.sqrt(7)],
     ["sqrt(2)*x*y - sqrt(3/5)*z^2", "x + I*sqrt(7)"]),
    ([(1 + sympy.sqrt(5)) / 2 * x**2 + (3 - 2 * sympy.I) * sympy.sqrt(6) * y - 1 / sympy.sqrt(2)],
     ["(1 + sqrt(5))/2*x^2 + (3 - 2*I)*sqrt(6)*y - 1/sqrt(2)"]),
]


@pytest.mark.parametrize("expressions, texts", EXACT_CASES)
def test_round_trip_is_exact_and_matches_the_parser(expressions, texts):
    symbols = sorted(set().union(*(e.free_symbols for e in expressions)), key=str)
    names = [s.name for s in symbols]
    system = numag.System.from_sympy(expressions, symbols)
    assert system.is_exact
    assert system.to_texts() == numag.parse_system(texts, names).to_texts()
    back, back_symbols = system.to_sympy()
    assert [s.name for s in back_symbols] == names
    for original, returned in zip(expressions, back):
        assert sympy.expand(original - returned) == 0  # exactly equal as sympy sees it


def test_equations_and_python_numbers():
    system = numag.System.from_sympy([sympy.Eq(y**2, x**3), sympy.Integer(0) * x + x - 1], [x, y])
    assert system.to_texts() == ["-x^3 + y^2", "x - 1"]
    assert numag.System.from_sympy([x**2 - sympy.Float("0.1")], [x]).to_texts() == ["x^2 - 1/10"]


def test_a_system_from_sympy_is_judged_like_its_text():
    # The node of y^2 = x^2 (x + 1) is where sympy finds F = dF/dx = dF/dy = 0 (sympy, a general-purpose reference)
    f = y**2 - x**2 * (x + 1)
    nodes = sympy.solve([f, sympy.diff(f, x), sympy.diff(f, y)], [x, y], dict=True)
    system = numag.System.from_sympy([f], [x, y])
    points = [[node[x], node[y]] for node in nodes]
    assert [v.verdict for v in numag.check_points(system, [[complex(c) for c in p] for p in points] + [[3, 6]],
                                                  seed=1).points] == ["singular"] * len(nodes) + ["smooth"]


@pytest.mark.parametrize("expressions, fragment", [
    ([x**2 - sympy.pi], "equation 1: the coefficient pi"),
    ([x + 1, x**2 - sympy.cbrt(2)], "equation 2: the coefficient 2\\*\\*\\(1/3\\)"),
    ([x - 1 / y], "equation 1: not a polynomial"),
    ([x - z], "equation 1: z is not among the variables"),
    (["x - 1"], "expected a sympy expression, got str"),
    ([sympy.sqrt(x) - 1], "not a polynomial"),
])
def test_what_numag_cannot_keep_exactly_is_refused_naming_the_equation(expressions, fragment):
    with pytest.raises(InputError, match=fragment):
        numag.System.from_sympy(expressions, [x, y])


def test_names_outside_the_grammar_are_refused():
    with pytest.raises(InputError, match="variable 2"):
        numag.System.from_sympy([x], [x, sympy.Symbol("y'")])
    with pytest.raises(InputError, match="variable 1"):
        numag.System.from_sympy([x], [sympy.Symbol("I")])


def test_inexact_coefficients_stay_inexact():
    system = numag.parse_system(["x^2 - 2"], ["x"]).random_combinations(1, __import__("numpy").random.default_rng(0))
    (expression,), _ = system.to_sympy()
    assert any(isinstance(a, sympy.Float) for a in sympy.preorder_traversal(expression))
