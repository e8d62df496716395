"""Two components meeting at a point, in a system `auto` gives the null-vector formulation (decision 0153).

X = {d = a^3, e = b^3} union {a = b = c = 0} in C^5, cut out by the six products of the two components'
generators. The two components pass through the origin, so X is singular there: a regular local ring is a domain
(Atiyah and Macdonald, "Introduction to Commutative Algebra", 1969, chapter 11), and the local ring of X at a point
on two components is not. The equations generate the intersection of the two prime ideals (checked with sympy:
Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017, by the elimination of Cox,
Little and O'Shea, "Ideals, Varieties, and Algorithms", 4th ed. 2015, chapter 4, section 3, theorem 11).

With six equations and codimension 2, `auto` picks the null-vector formulation, whose candidate set on the
three-dimensional component is a surface of smooth points through the origin: the origin is no candidate of its
own. It must be listed, or the answer flagged (never "0 singular points" with no warning).
"""

import numpy as np
import pytest
import sympy

from numag.app.report import completeness_warnings, singular_to_dict
from numag.singular.kinds import PieceKind
from numag.singular.locus import SingularOptions, singular_locus

from test_check_far import system_of

A, B, C, D, E = VARIABLES = sympy.symbols("a b c d e")


def components(power, shift):
    """The equations and the two components' generators, in coordinates moved by ``shift`` (the origin there)."""
    a, b, c, d, e = (v - s for v, s in zip(VARIABLES, shift))
    first, second = [d - a ** power, e - b ** power], [a, b, c]
    return [sympy.expand(f * g) for f in first for g in second], first, second


SHIFTS = {"origin": (0, 0, 0, 0, 0), "moved": (3, -2, 5, 1, -4)}


@pytest.mark.parametrize("shift", sorted(SHIFTS))
def test_reference_the_equations_cut_out_the_union(shift):
    equations, first, second = components(3, SHIFTS[shift])
    at = dict(zip(VARIABLES, SHIFTS[shift]))
    assert all(sympy.expand(g).subs(at) == 0 for g in first + second)  # the point lies on both components
    t = sympy.Symbol("t")
    both = sympy.groebner([t * f for f in first] + [(1 - t) * g for g in second], t, *VARIABLES, order="lex",
                          domain=sympy.QQ)
    meet = [g for g in both.exprs if not g.has(t)]
    ours, theirs = (sympy.groebner(g, *VARIABLES, order="grevlex", domain=sympy.QQ) for g in (equations, meet))
    assert all(ours.contains(g) for g in meet) and all(theirs.contains(f) for f in equations)


# seed 2 gave "0 singular points", exit 0, in both frames before decision 0153 (each run about 25 CPU s)
@pytest.mark.parametrize("shift, seed", [("origin", 1), ("origin", 2), ("moved", 2), ("moved", 3)])
def test_the_meeting_point_is_listed_or_flagged(shift, seed):
    equations, _, _ = components(3, SHIFTS[shift])
    options = SingularOptions()
    locus = singular_locus(system_of(equations, VARIABLES), options, seed=seed)
    meet = np.array(SHIFTS[shift], dtype=complex)
    found = any(c.dimension == 0 and np.linalg.norm(c.points[0] - meet) <= 1e-6 * (1 + np.linalg.norm(meet))
                and c.kind is not PieceKind.EMBEDDED for c in locus.components)
    assert found or completeness_warnings(singular_to_dict(locus, options))
