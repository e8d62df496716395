"""The validation corpus (tests/corpus.py): a fast sample of it, the generators' self-checks, and invariance
properties over the shared problems (hypothesis draws units, equation scalings, linear changes of
coordinates, translations and seeds).

The full corpus runs in ``benchmarks/bench_validation.py``. Every numag call here runs in a child process
under a time limit (``corpus.run_limited``).
"""

import json
from fractions import Fraction

import numpy as np
import pytest
import sympy
from hypothesis import HealthCheck, Phase, assume, given, settings, strategies as st

import corpus
from corpus import Change, Outcome, Task, Transform
from conftest import DATA

from numag.system.parse import parse_system
from numag.app.reference import _expressions, system_to_plain

TIME_LIMIT = 60.0


def assert_match(problem, task=None, seed=0):
    outcome, differences, _, seconds = corpus.run_limited(problem, task, seed, TIME_LIMIT)
    assert outcome is Outcome.MATCH, f"{problem.name}: {outcome.value} after {seconds:.1f} s: {'; '.join(differences)}"


# --- the text of a problem is exact ------------------------------------------------------------------

def _reread(equations, variables):
    """numag's reading of the text, rebuilt in sympy term by term (no text parsed by sympy)."""
    _, expressions = _expressions(system_to_plain(parse_system(list(equations), list(variables))), sympy)
    return expressions


rationals = st.fractions(min_value=-10**6, max_value=10**6, max_denominator=10**4)
powers = st.integers(-12, 12)


@settings(max_examples=60, derandomize=True, database=None)
@given(st.lists(st.tuples(rationals, powers, st.integers(0, 3), st.integers(0, 3)), min_size=1, max_size=6))
def test_polynomial_text_reads_back_exactly(terms):
    # Coefficients m * 10^k written as "me k" and rationals as "p/q" must be read back exactly by numag's
    # parser (common practice: a transformed problem is only the same problem if no digit is lost).
    x, y = sympy.symbols("x y")
    polynomial = sum(sympy.Rational(c.numerator, c.denominator) * sympy.Integer(10) ** k * x ** a * y ** b
                     for c, k, a, b in terms)
    assume(sympy.expand(polynomial) != 0)
    (reread,) = _reread([corpus.polynomial_text(polynomial, (x, y))], ["x", "y"])
    assert sympy.expand(reread - polynomial) == 0


def test_transformed_equations_are_the_base_equations_moved_exactly():
    # x = A u + t and equation i times 10^r_i, recomputed here independently with sympy.
    (base,) = [c for c in corpus.base_constructions(families=["line_unions"], quick=True)]
    rng = np.random.default_rng(3)
    for kind in (Transform.UNITS, Transform.SCALE, Transform.LINEAR, Transform.TRANSLATE):
        change = corpus.draw_change(kind, base, rng)
        problem = corpus.materialise(base, change)
        u = sympy.Matrix(base.symbols)
        moved = change.matrix * u + change.shift
        want = [sympy.expand(sympy.Integer(10) ** r * f.xreplace(dict(zip(base.symbols, moved))))
                for r, f in zip(change.powers, base.equations)]
        got = _reread(problem.equations, problem.variables)
        assert [sympy.expand(g - w) for g, w in zip(got, want)] == [0] * len(want), kind


def test_small_rational_matrices_are_well_conditioned():
    rng = np.random.default_rng(0)
    for n in (2, 3, 4, 9):
        matrix = corpus.small_rational_matrix(n, rng)
        assert matrix.det() != 0
        assert np.linalg.cond(np.array(matrix, dtype=float)) <= 100
        assert all(abs(v.p) <= 3 and v.q in (1, 2) for v in matrix)


# --- the generators' answers against sympy ----------------------------------------------------------

SELF_CHECKED = ["line_unions/4-lines", "conic_unions/conic-pair-2-real-2-complex", "chebyshev_curves/T3(x)=T4(y)",
                "moved_singularities/curve-A2", "curve_products/node-x-conic", "projective/P4-two-nodes"]


@pytest.fixture(scope="module")
def constructions():
    families = sorted({name.split("/")[0] for name in SELF_CHECKED})
    return {f"{c.family}/{c.label}": c for c in corpus.base_constructions(families=families, quick=False)}


@pytest.mark.parametrize("name", SELF_CHECKED)
def test_generator_answers_agree_with_sympy(name, constructions):
    # The construction's answer (Bezout, Chebyshev critical points, normal forms, products, diagonal
    # pencils) against sympy's Groebner bases (numag.app.reference): dimension and degree of X, distinct and
    # real singular points, scheme length.
    problem = corpus.materialise(constructions[name], corpus.draw_change(Transform.BASE, constructions[name], None))
    status, differences = corpus.self_check(problem, seconds=120)
    assert status == "finished" and differences == []


@pytest.mark.parametrize("name, kind", [("conic_unions/conic-pair-2-real-2-complex", Transform.LINEAR),
                                        ("chebyshev_curves/T3(x)=T4(y)", Transform.UNITS),
                                        ("projective/P4-two-nodes", Transform.LINEAR)])
def test_transformed_answers_agree_with_sympy(name, kind, constructions):
    # Invariance by construction, checked once by sympy: the transformed problem has the base answer.
    problem = corpus.materialise(constructions[name],
                                 corpus.draw_change(kind, constructions[name], np.random.default_rng(4)))
    status, differences = corpus.self_check(problem, seconds=120)
    assert status == "finished" and differences == []


# --- a fast sample of the corpus ----------------------------------------------------------------------

SAMPLE_FAMILIES = ["line_unions", "plane_unions", "conic_unions", "chebyshev_curves", "chebyshev_surfaces",
                   "curve_products", "determinantal", "moved_singularities", "projective", "smooth",
                   "nonreduced_and_nonisolated", "solve"]
#: "problem name:task" pairs of the sample (each must match)
SAMPLE = [
    "line_unions/3-lines/base:singular",
    "line_unions/3-lines/base:check",
    "line_unions/3-lines/units:singular",
    "line_unions/3-lines/units:check",
    "line_unions/3-lines/linear:singular",
    "plane_unions/2-planes/units:singular",
    "plane_unions/2-planes/translate:check",
    "conic_unions/conic-pair-4-real/base:singular",
    "conic_unions/conic-pair-4-real/units:singular",
    "conic_unions/conic-pair-4-real/translate:check",
    "chebyshev_curves/T2(x)=T3(y)/units:singular",
    "chebyshev_curves/T2(x)=T3(y)/linear:check",
    "chebyshev_surfaces/T3-sum=-1/base:singular",
    "chebyshev_surfaces/T3-sum=-1/units:singular",
    "curve_products/node-x-conic/base:singular",
    "curve_products/node-x-conic/linear:check",
    "determinantal/2x2-rank-1/linear:singular",
    "determinantal/2x3-rank-1/base:singular",
    "moved_singularities/curve-A1/units:singular",
    "moved_singularities/curve-A2/base:check",
    "moved_singularities/curve-A2/units:singular",
    "projective/4-lines-P2/base:singular",
    "projective/4-lines-P2/units:singular",
    "smooth/graph-curve-degree-3/base:singular",
    "smooth/graph-curve-degree-3/base:check",
    "nonreduced_and_nonisolated/double-line/linear:singular",
    "nonreduced_and_nonisolated/double-line/units:check",
    "solve/x^7-1/units:solve",
    "solve/x^7-1/translate:solve",
]


@pytest.fixture(scope="module")
def sample_problems():
    problems = corpus.corpus(seed=0, quick=True, families=SAMPLE_FAMILIES,
                             transforms=(Transform.BASE, Transform.UNITS, Transform.SCALE, Transform.LINEAR,
                                         Transform.TRANSLATE))
    return {p.name: p for p in problems}


def _sample_cases():
    for key in SAMPLE:
        name, task = key.rsplit(":", 1)
        yield pytest.param(name, Task(task), id=key)


@pytest.mark.parametrize("name, task", list(_sample_cases()))
def test_corpus_sample(name, task, sample_problems):
    # Source: the problem's `source` (its answer known by construction; see tests/corpus.py).
    assert_match(sample_problems[name], task)


# --- invariance properties over the shared problems ---------------------------------------------------

with open(DATA / "problems.json") as handle:
    SHARED = {entry["name"]: entry for entry in json.load(handle)}
# Shared problems cheap enough for many runs (a second or less each).
CHEAP = ["cusp", "node", "tacnode", "smooth_conic", "four_generic_lines", "chebyshev_T4x_eq_T5y",
         "trifolium_triple_point", "cone_over_smooth_plane_cubic", "whitney_umbrella", "cayley_cubic",
         "kummer_quartic_mu2_eq_2", "twisted_cubic_projective"]
CHEAP_AFFINE = [name for name in CHEAP if not SHARED[name]["projective"]]

PROPERTY = settings(max_examples=8, derandomize=True, database=None, deadline=None,
                    phases=[Phase.explicit, Phase.generate],  # no shrinking: each example is a numag run
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])


@st.composite
def small_rational_matrices(draw, n):
    entries = draw(st.lists(st.lists(st.builds(Fraction, st.integers(-3, 3), st.sampled_from([1, 2])),
                                     min_size=n, max_size=n), min_size=n, max_size=n))
    matrix = sympy.Matrix([[sympy.Rational(v.numerator, v.denominator) for v in row] for row in entries])
    assume(matrix.det() != 0 and np.linalg.cond(np.array(matrix, dtype=float)) <= 100)
    return matrix


@st.composite
def changes(draw, kind, n, m):
    identity, zero = sympy.eye(n), sympy.zeros(n, 1)
    if kind is Transform.UNITS:
        k = draw(st.lists(st.integers(-4, 4), min_size=n, max_size=n).filter(any))
        return Change(kind, sympy.diag(*[sympy.Integer(10) ** v for v in k]), zero, (0,) * m, 0, f"units 1e{k}")
    if kind is Transform.SCALE:
        r = draw(st.lists(st.integers(-8, 8), min_size=m, max_size=m).filter(any))
        return Change(kind, identity, zero, tuple(r), 0, f"equations times 1e{r}")
    if kind is Transform.LINEAR:
        matrix = draw(small_rational_matrices(n))
        return Change(kind, matrix, zero, (0,) * m, 0, f"x = A u, A = {matrix.tolist()}")
    if kind is Transform.TRANSLATE:
        t = draw(st.lists(st.builds(Fraction, st.integers(-9, 9), st.integers(1, 4)), min_size=n, max_size=n))
        return Change(kind, identity, sympy.Matrix([sympy.Rational(v.numerator, v.denominator) for v in t]),
                      (0,) * m, 0, f"x = u + {t}")
    offset = draw(st.integers(1, 10**6))
    return Change(kind, identity, zero, (0,) * m, offset, f"seed offset {offset}")


def _invariance(data, kind, names):
    # Source: the shared problem's verified answer (tests/data/problems.json, its `source` field); the
    # transformed problem has the same answer by construction.
    name = data.draw(st.sampled_from(names), label="problem")
    construction = corpus.shared_construction(SHARED[name])
    change = data.draw(changes(kind, len(construction.symbols), len(construction.equations)), label="change")
    assert_match(corpus.materialise(construction, change), seed=1)


@PROPERTY
@given(st.data())
def test_invariance_under_units(data):
    _invariance(data, Transform.UNITS, CHEAP)


@PROPERTY
@given(st.data())
def test_invariance_under_equation_scaling(data):
    _invariance(data, Transform.SCALE, CHEAP)


@PROPERTY
@given(st.data())
def test_invariance_under_linear_changes_of_coordinates(data):
    _invariance(data, Transform.LINEAR, CHEAP)


@PROPERTY
@given(st.data())
def test_invariance_under_translations(data):
    _invariance(data, Transform.TRANSLATE, CHEAP_AFFINE)


@PROPERTY
@given(st.data())
def test_invariance_under_seeds(data):
    _invariance(data, Transform.SEED, CHEAP)
