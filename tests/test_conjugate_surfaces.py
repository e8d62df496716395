"""Nodes of conjugate surfaces given with the number field's generator as an unknown (issue 19, decision 0066).

Two conjugate Cayley cubics: 4 a (x^2 + y^2 + z^2) + 16 x y z - 2 a = 0 with a^2 = 2. The pair is the cheap
version of the benchmark's four conjugate Togliatti quintics (benchmarks/bench_scale.py, section conjugates):
the block a^2 - 2 is solved first and each conjugate surface is handled in x, y, z (decision 0061).
"""

import itertools

import numpy as np
import pytest

from numag.singular.locus import SingularOptions, singular_locus
from numag.system.parse import parse_system

sympy = pytest.importorskip("sympy")


def exact_nodes():
    """The eight nodes, worked out by hand and checked exactly with sympy.

    With x = u / sqrt 2 (and y, z alike) the equation is +-2 sqrt 2 (u^2 + v^2 + w^2 -+ 2 u v w - 1), the
    Cayley cubic (A. Cayley 1869, "A memoir on cubic surfaces", Phil. Trans. R. Soc. 159; from memory: a
    cubic surface has at most four nodes, and this one has them at u, v, w in {1, -1} with u v w = -+1). So
    the nodes are (u, v, w) / sqrt 2 with a = -sqrt 2 u v w.
    """
    x, y, z, a = sympy.symbols("x y z a")
    polynomials = [4 * a * (x**2 + y**2 + z**2) + 16 * x * y * z - 2 * a, a**2 - 2]
    jacobian = sympy.Matrix([[sympy.diff(f, s) for s in (x, y, z, a)] for f in polynomials])
    nodes = []
    for u, v, w in itertools.product((1, -1), repeat=3):
        point = {x: u / sympy.sqrt(2), y: v / sympy.sqrt(2), z: w / sympy.sqrt(2), a: -sympy.sqrt(2) * u * v * w}
        assert all(sympy.simplify(f.subs(point)) == 0 for f in polynomials)
        assert jacobian.subs(point).applyfunc(sympy.simplify).rank() < 2  # singular: rank below the codimension
        nodes.append([complex(point[s]) for s in (x, y, z, a)])
    return np.array(nodes)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("formulation", ["auto", "minors"])
def test_two_conjugate_cayley_cubics_have_eight_nodes(seed, formulation):
    system = parse_system(["4*a*(x^2 + y^2 + z^2) + 16*x*y*z - 2*a", "a^2 - 2"], ["x", "y", "z", "a"])
    locus = singular_locus(system, SingularOptions(formulation=formulation), seed=seed)
    expected = exact_nodes()
    found = np.array([c.points[0] for c in locus.components if not c.at_infinity])
    assert all(c.dimension == 0 for c in locus.components)
    assert len(found) == len(expected) == 8
    distances = np.abs(found[:, None, :] - expected[None, :, :]).max(axis=2)
    assert sorted(distances.argmin(axis=1).tolist()) == list(range(8))  # each exact node once
    assert distances.min(axis=1).max() < 1e-8
    failed = sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                           "endgame_unsettled", "batch_failed"))
    assert failed == 0
