from fractions import Fraction

from hypothesis import given, settings, strategies as st
import numpy as np
import pytest

from numag.errors import NumagError, ParseError, InputError
from numag.system.exact import ExactCoefficient
from numag.system.parse import parse_constant, parse_polynomial, parse_system

XY = ["x", "y"]


def coefficient(p, exponent):
    rows = np.all(p.exponents == np.array(exponent), axis=1)
    return p.coefficients[rows][0] if rows.any() else ExactCoefficient.zero()


def test_numbers_are_exact():
    p = parse_polynomial("0.1*x + 3/4*y + 1.5e-3 + .5", XY)
    assert coefficient(p, [1, 0]) == Fraction(1, 10)
    assert coefficient(p, [0, 1]) == Fraction(3, 4)
    assert coefficient(p, [0, 0]) == Fraction(3, 2000) + Fraction(1, 2)


def test_precedence_and_unary_minus():
    # -x^2 is -(x^2); 2*3^2 = 18 (common practice, no source)
    p = parse_polynomial("-x^2 + 2*3^2 - -y", XY)
    assert coefficient(p, [2, 0]) == -1
    assert coefficient(p, [0, 0]) == 18
    assert coefficient(p, [0, 1]) == 1


def test_double_star_and_equals():
    assert parse_polynomial("y**2 = x**3", XY) == parse_polynomial("y^2 - x^3", XY)


def test_imaginary_and_sqrt():
    p = parse_polynomial("(1 + sqrt(5))/2*x - I*y", XY)
    phi = (ExactCoefficient.rational(1) + ExactCoefficient.square_root(5)) / 2
    assert coefficient(p, [1, 0]) == phi
    assert coefficient(p, [0, 1]) == -ExactCoefficient.imaginary_unit()
    assert parse_constant("sqrt(8)/sqrt(2)") == 2


def test_expansion_binomial():
    # (x + y)^5 has binomial coefficients 1 5 10 10 5 1 (common practice, no source)
    p = parse_polynomial("(x + y)^5", XY)
    assert [coefficient(p, [5 - k, k]) for k in range(6)] == [1, 5, 10, 10, 5, 1]


@pytest.mark.parametrize("text, column, fragment", [
    ("2x", 2, "implicit multiplication"),
    ("x^2^3", 4, "chained powers"),
    ("x +", 4, "the end of the text"),
    ("(x + 1", 7, "to close the '('"),
    ("x + 1)", 6, "unbalanced"),
    ("x $ y", 3, "unexpected character"),
    ("z + 1", 1, "unknown variable 'z'"),
    ("x^-2", 3, "non-negative integer exponent"),
    ("x^1000000000", 3, "degree limit"),
    ("1/x", 3, "division by a polynomial"),
    ("1/(2-2)", 3, "division by zero"),
    ("sqrt(-1)", 1, "negative"),
    ("sqrt(x)", 1, "constant"),
    ("I = x", None, None),
])
def test_errors_name_the_column(text, column, fragment):
    if fragment is None:  # "I = x" is a valid equation (x - I = 0)
        parse_polynomial(text, XY)
        return
    with pytest.raises(ParseError) as info:
        parse_polynomial(text, XY)
    assert info.value.column == column
    assert fragment in str(info.value)


def test_system_errors_name_the_equation():
    with pytest.raises(ParseError) as info:
        parse_system(["x + y", "x + * y"], XY)
    assert info.value.equation == 2 and info.value.column == 5
    assert str(info.value).startswith("equation 2, column 5:")


def test_huge_power_fails_fast_without_expanding():
    with pytest.raises(ParseError):
        parse_polynomial("(x + y + 1)^999999999", XY)
    with pytest.raises(ParseError):  # a large but allowed degree with too many terms
        parse_polynomial("(x + y + 1)^900 * (x + y + 1)^100", XY)


def test_constant_blowup_is_limited():
    with pytest.raises(NumagError):
        parse_polynomial("(10^1000)^1000", XY)


def test_variable_names_checked():
    with pytest.raises(InputError):
        parse_system(["x"], ["x", "I"])
    with pytest.raises(InputError):
        parse_system(["x"], ["x", "2y"])
    with pytest.raises(InputError):
        parse_system(["x", "y"], ["x", "x"])


def test_projective_needs_homogeneous():
    with pytest.raises(InputError, match="equation 1 is not homogeneous"):
        parse_system(["x^2 + y"], XY, projective=True)


_coefficients = st.one_of(
    st.integers(-50, 50).map(str),
    st.fractions(min_value=-10, max_value=10, max_denominator=50).map(lambda q: f"({q})"),
    st.sampled_from(["sqrt(2)", "(1 + sqrt(5))/2", "I", "(2 - 3*I)", "sqrt(3/4)"]),
)
_terms = st.tuples(_coefficients, st.integers(0, 4), st.integers(0, 4)).map(
    lambda t: f"{t[0]}*x^{t[1]}*y^{t[2]}")


@settings(max_examples=150, deadline=None, derandomize=True)
@given(st.lists(_terms, min_size=1, max_size=6))
def test_round_trip_text_system_text(terms):
    text = " + ".join(terms)
    first = parse_polynomial(text, XY)
    written = first.to_text(XY)
    second = parse_polynomial(written, XY)
    assert second == first
    assert second.to_text(XY) == written


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.text(alphabet=st.characters(codec="utf-8"), max_size=40)
       | st.text(alphabet="xy0123456789+-*/^()I .=sqrte", max_size=30))
def test_arbitrary_text_raises_only_our_errors(text):
    try:
        parse_polynomial(text, XY)
    except NumagError:
        pass


def test_nesting_tokens_and_length_limits_name_the_limit():
    from numag.system.parse import MAX_EQUATION_LENGTH, MAX_NESTING, MAX_TOKENS
    assert parse_polynomial("(" * MAX_NESTING + "x" + ")" * MAX_NESTING, ["x"]).to_text(["x"]) == "x"
    with pytest.raises(ParseError, match=f"nested more than {MAX_NESTING}"):
        parse_polynomial("(" * (MAX_NESTING + 1) + "x" + ")" * (MAX_NESTING + 1), ["x"])
    with pytest.raises(ParseError, match=f"nested more than {MAX_NESTING}"):
        parse_polynomial("sqrt(" * (MAX_NESTING + 1) + "2" + ")" * (MAX_NESTING + 1), ["x"])
    assert parse_polynomial("-" * 5001 + "x", ["x"]).to_text(["x"]) == "-x"  # a loop, not recursion
    with pytest.raises(ParseError, match=f"more than {MAX_TOKENS}"):
        parse_polynomial("x+" * MAX_TOKENS + "x", ["x"])
    with pytest.raises(ParseError, match="longer than"):
        parse_polynomial(" " * (MAX_EQUATION_LENGTH + 1), ["x"])


def _random_expression(rng, names, symbols):
    """Our text and the same expression built directly in sympy: a long flat sum with repeated and
    cancelling monomials, plus products of sums and powers of sums (what the reader must expand)."""
    import sympy
    texts, parts = [], []
    for _ in range(1500):  # flat terms; exponents 0..3 in three variables, so monomials repeat often
        numerator, denominator = int(rng.integers(-50, 51)), int(rng.integers(1, 7))
        powers = rng.integers(0, 4, size=len(names))
        factors = [f"{name}^{k}" for name, k in zip(names, powers) if k]
        texts.append("*".join([f"({numerator}/{denominator})"] + factors))
        parts.append(sympy.Rational(numerator, denominator)
                     * sympy.Mul(*[symbol ** int(k) for symbol, k in zip(symbols, powers)]))
    for _ in range(6):  # (a + b*x + c*y)^k * (d - e*z)
        a, b, c, d, e = (int(v) for v in rng.integers(-9, 10, size=5))
        k = int(rng.integers(1, 5))
        texts.append(f"({a} + {b}*{names[0]} - {-c}*{names[1]})^{k}*({d} - {e}*{names[2]})")
        parts.append((a + b * symbols[0] + c * symbols[1]) ** k * (d - e * symbols[2]))
    return " + ".join(texts), sympy.Add(*parts)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_a_long_sum_reads_as_sympy_expands_it(seed):
    # Reference: sympy's expand and Poly.as_dict (a general-purpose computer algebra library; common
    # practice, no source). Counts and every coefficient must agree exactly.
    sympy = pytest.importorskip("sympy")
    names = ["x", "y", "z"]
    symbols = sympy.symbols(names)
    text, expression = _random_expression(np.random.default_rng(seed), names, symbols)
    ours = parse_polynomial(text, names)
    reference = sympy.Poly(sympy.expand(expression), *symbols).as_dict()
    assert ours.n_terms == len(reference)
    for exponent, value in reference.items():
        assert coefficient(ours, list(exponent)) == Fraction(int(value.p), int(value.q))
