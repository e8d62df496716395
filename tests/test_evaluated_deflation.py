"""Deflation minors evaluated inside the witness pipeline (numag.witness.decompose.holding_rows, CombinedRows).

The same decompositions and membership answers with the deflation minors evaluated (forced by a zero
expansion limit) as with them expanded, on varieties whose components are known in closed form.
"""

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.witness import decompose as decompose_module
from numag.witness.decompose import HeldEquations, components_through, decompose, holding_rows


def test_holding_rows_evaluates_large_minors_only(monkeypatch):
    # A doubled sphere: rank J = 0 on it, so one 1 x 1 minor (a random combination of the partials) deflates it.
    double = parse_system(["(x^2 + y^2 + z^2 - 1)^2"], ["x", "y", "z"])
    point = np.array([[0.6, 0.8, 0.0]])
    small = holding_rows(double, 1, point, np.random.default_rng(0))
    assert small.deflated and small.minors is None and len(small.polynomials) == 2
    monkeypatch.setattr(decompose_module, "EXPANSION_MONOMIALS", 0)
    large = holding_rows(double, 1, point, np.random.default_rng(0))
    assert isinstance(large, HeldEquations) and large.deflated and large.minors.count == 1
    # the evaluated minor is the expanded one (same draws): same values and Jacobian rows at the point
    small_values, small_jacobian = small.evaluator()[0].evaluate(point)
    large_values, large_jacobian = large.evaluator()[0].evaluate(point)
    scale = np.abs(small.polynomials[1].numeric_coefficients()).max()
    assert np.allclose(small_values[0, 1] * np.linalg.norm(small.polynomials[1].numeric_coefficients()),
                       large_values[0, 1], atol=1e-12)
    assert np.linalg.matrix_rank(large_jacobian[0], tol=1e-8 * scale) == 1


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("limit", [0, decompose_module.EXPANSION_MONOMIALS])
def test_doubled_sphere_and_line_decompose_alike(monkeypatch, seed, limit):
    # X = V(q^2 x, q^2 y), q = x^2 + y^2 + z^2 - 1: the unit sphere counted twice (irreducible, degree 2) and
    # the line x = y = 0 (degree 1) (common practice, no source). The sphere needs deflation to be held:
    # with the limit 0 its minors are evaluated, with the default one expanded; the answers must agree.
    monkeypatch.setattr(decompose_module, "EXPANSION_MONOMIALS", limit)
    evaluated = []
    original = decompose_module.holding_rows

    def spy(*args, **kwargs):
        held = original(*args, **kwargs)
        evaluated.append(held.minors is not None)
        return held

    monkeypatch.setattr(decompose_module, "holding_rows", spy)
    system = parse_system(["(x^2 + y^2 + z^2 - 1)^2 * x", "(x^2 + y^2 + z^2 - 1)^2 * y"], ["x", "y", "z"])
    result = decompose(system, seed=seed)
    assert any(evaluated) == (limit == 0)
    assert sorted((c.dimension, c.degree) for c in result.components) == [(1, 1), (2, 2)]
    # membership through the held rows: a point of the sphere off the line, a point of the line off the sphere
    on_sphere = components_through(result, np.array([0.6, 0.0, 0.8]), seed=seed)
    on_line = components_through(result, np.array([0.0, 0.0, 3.0]), seed=seed)
    assert [c.dimension for c in on_sphere] == [2]
    assert [c.dimension for c in on_line] == [1]
