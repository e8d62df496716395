"""Equations in a few unknowns that fix them to finitely many values: X as a family over those values.

When some equations of F involve only a subset V of the unknowns and have finitely many common zeros
in them (an auxiliary algebraic number such as the golden ratio p with p^2 - p - 1 = 0), X is the
disjoint union over those roots r of {r} x X_r, X_r = V(F(r, .)) in the other unknowns. Where the roots
are simple (the block's Jacobian in V has full rank k = |V| at r), the Jacobian of F at (r, q) is block
triangular with an invertible k x k corner, so rank J_F(r, q) = k + rank J_{F(r, .)}(q) and the
codimensions differ by k too: the Jacobian criterion on X is the criterion on each fibre, and X's
components are {r} x (the components of X_r). Solving the block first and working per root keeps every
path away from the set at infinity that the block's equations meet: in P^n a regeneration of
p^2 - p - 1 = 0 together with F has paths ending on {X_0 = 0, p = 0} with high winding numbers
(decision 0061).

This module finds the block, solves it and writes the fibre systems; the decomposition per fibre and its
lift back are in :mod:`numag.witness.decompose`.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 + y^2 - p", "p^2 - 3*p + 2"], ["x", "y", "p"])
>>> finite_block(system)
FiniteBlock(equations=(1,), variables=(2,))
>>> split = solve_block(system, finite_block(system), seed=1)
>>> sorted(np.round(split.roots[:, 0].real, 6).tolist())
[1.0, 2.0]
>>> fibre_system(system, split.block, split.roots[0]).variables
['x', 'y']
"""

from dataclasses import dataclass, field

import numpy as np

from ..system.polynomial import PolynomialSystem, Polynomial
from ..tracking.solve import SolveOptions, solve_system

__all__ = ["FiniteBlock", "BlockSplit", "finite_block", "solve_block", "fibre_system", "EMPTY_FIBRE", "WHOLE_FIBRE"]

#: An equation whose substituted coefficients are this small relative to the sizes of its terms vanishes on
#: the fibre (the root carries double-precision rounding, 1e-16 relative, amplified by the degree).
_VANISHES = 1e-10
#: Above this relative size an equation clearly does not vanish there; between the two the split is not used.
_SURVIVES = 1e-6
#: A coefficient this small beside the terms merged into it is rounding of zero (far below the 1e-7 residual
#: tolerance of witness points, far above the 1e-16 rounding of a root).
_ROUNDING = 1e-12


@dataclass(frozen=True)
class FiniteBlock:
    """Equations (indices into the system) that involve only ``variables``, at least as many as those.

    Attributes
    ----------
    equations : tuple of int
    variables : tuple of int
    """

    equations: tuple
    variables: tuple


@dataclass(frozen=True)
class BlockSplit:
    """The block with its roots, every one simple, and the paths its solve tracked.

    Attributes
    ----------
    block : FiniteBlock
    roots : ndarray, shape (r, k)
        Values of the block's variables, in the order of ``block.variables`` (real ones as real numbers).
    real : ndarray of bool, shape (r,)
    paths : dict
        The block solve's path counts (the ``paths`` block of a solve report).
    """

    block: FiniteBlock
    roots: np.ndarray
    real: np.ndarray
    paths: dict = field(default_factory=dict)


#: What :func:`fibre_system` returns for a root over which some equation is a nonzero constant.
EMPTY_FIBRE = "empty"
#: What :func:`fibre_system` returns for a root over which every other equation vanishes (X_r is all of C^m).
WHOLE_FIBRE = "whole"


def finite_block(system):
    """The smallest closed block: equations in a proper subset V of the unknowns, at least |V| of them.

    Parameters
    ----------
    system : PolynomialSystem
        Affine.

    Returns
    -------
    FiniteBlock or None
        None for projective systems and when no equation's unknowns close such a block. Whether the
        block really has finitely many simple roots is for :func:`solve_block` to find.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> finite_block(parse_system(["x*y - 1", "x^2 - 2"], ["x", "y"]))
    FiniteBlock(equations=(1,), variables=(0,))
    >>> finite_block(parse_system(["x*y - 1", "x + y"], ["x", "y"])) is None
    True
    """
    if system.projective:
        return None
    n = system.n_variables
    # supports as bit masks: "other <= support" is one integer operation (10,000 equations stay quick)
    supports = [sum(1 << int(j) for j in np.nonzero(p.exponents.sum(axis=0))[0]) for p in system.polynomials]
    best, best_size = None, n
    for support in sorted(set(supports), key=lambda mask: bin(mask).count("1")):
        size = bin(support).count("1")
        if not support or size >= best_size:
            continue
        members = tuple(k for k, other in enumerate(supports) if other and other & ~support == 0)
        if len(members) >= size:
            best, best_size = FiniteBlock(equations=members,
                                          variables=tuple(j for j in range(n) if support >> j & 1)), size
    return best


def solve_block(system, block, seed=None):
    """The block's roots when they are finitely many and all simple, else None.

    The block is solved by :func:`~numag.tracking.solve.solve_system` in its own unknowns (random square
    combinations when it has more equations than unknowns, each root then checked against all). A
    failed path, a positive-dimensional or unverified endpoint or a root reached by several paths (a
    multiple root: the Jacobian of F drops rank on its whole fibre) returns None, and the caller works
    on X as a whole.

    Parameters
    ----------
    system : PolynomialSystem
    block : FiniteBlock
    seed : int, optional

    Returns
    -------
    BlockSplit or None
    """
    columns = list(block.variables)
    polynomials = [Polynomial(system.polynomials[k].exponents[:, columns], system.polynomials[k].coefficients,
                              len(columns)) for k in block.equations]
    sub = PolynomialSystem([system.variables[j] for j in columns], polynomials, name="block")
    if _zeros_meet_a_hyperplane(sub, np.random.default_rng(None if seed is None else [int(seed), 61])):
        return None
    square_up = len(polynomials) > len(columns)
    result = solve_system(sub, SolveOptions(square_up=square_up), seed=seed)
    counts = result.path_counts()
    # A path that ended at a singular endpoint reached a multiple root, whether or not the solve kept it as a
    # solution: (x - 1.234)^2 twice, combined at random with rounded coefficients, left no solution and 0 roots,
    # and the fibre over the double root (a point where two components of X meet) was lost (decision 0150)
    if counts["failed"] or counts.get("singular_endpoint", 0) or result.not_isolated or result.unverified or any(
            s.multiplicity != 1 for s in result.solutions):
        return None
    if not result.solutions:
        roots = np.zeros((0, len(columns)), dtype=complex)
    else:
        roots = np.array([s.point.real if s.real else s.point for s in result.solutions], dtype=complex)
    real = np.array([bool(s.real) for s in result.solutions], dtype=bool)
    return BlockSplit(block=block, roots=roots, real=real, paths=counts)


def _zeros_meet_a_hyperplane(block, rng):
    """Whether the block's zeros may meet a random complex affine hyperplane of its unknowns: then they may not
    be finitely many, and the block's own solve would only find that at the end, or not at all. A hyperplane
    solve that cannot show it meets nothing (a failed path, a singular endpoint) counts as meeting.

    Measured (decision 0093): the incidence set of a four-bar with two free lengths closes a block of the
    member's first equation and the minors of J_x, 5 equations in the 4 x-unknowns whose zeros are curves; its
    solve (81 paths, most ending on those curves, each through the Cauchy endgame) took a third of the whole
    decomposition and was then thrown away. On a hyperplane it is 27 paths that mostly end at regular points.
    A block of one unknown is not tested (its hyperplane is a point).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> rng = np.random.default_rng(0)
    >>> _zeros_meet_a_hyperplane(parse_system(["x*y", "x*(y - 1)"], ["x", "y"]), rng)   # the line x = 0
    True
    >>> _zeros_meet_a_hyperplane(parse_system(["x^2 - 2", "y - x", "x*y - 2"], ["x", "y"]), rng)
    False
    """
    k = block.n_variables
    if k < 2:
        return False
    matrix = (rng.standard_normal((k, k - 1)) + 1j * rng.standard_normal((k, k - 1))) / np.sqrt(2 * k)
    offset = (rng.standard_normal(k) + 1j * rng.standard_normal(k)) / np.sqrt(2)
    restricted = [p.numeric().substitute_linear(matrix, offset) for p in block.polynomials]
    if any(p.is_zero() for p in restricted):
        return True
    if any(p.degree == 0 for p in restricted):  # a nonzero constant: no zero on the hyperplane
        return False
    names = [f"y{j + 1}" for j in range(k - 1)]
    on_hyperplane = PolynomialSystem(names, restricted, name="block on a hyperplane")
    result = solve_system(on_hyperplane, SolveOptions(square_up=len(restricted) > k - 1),
                          seed=int(rng.integers(2 ** 32)))
    counts = result.path_counts()
    # A failed path or a singular endpoint proves nothing: it may be the point where a multiple component of
    # the block meets the hyperplane. The 2 x 2 minors of a surface singular along a line, after a rational
    # linear change, closed a block of 5 equations in 3 unknowns whose zeros are that line (multiple); on
    # the hyperplane 6 of 16 paths failed in the endgame and none was a solution, the block's own solve
    # sent all 64 paths to infinity, and the line was lost without a failure counted (decision 0154)
    return bool(result.solutions or result.not_isolated or result.unverified or counts["failed"]
                or counts.get("singular_endpoint", 0))


def fibre_system(system, block, root):
    """X_r: the other equations with the block's unknowns set to ``root``, in the other unknowns.

    Parameters
    ----------
    system : PolynomialSystem
    block : FiniteBlock
    root : ndarray, shape (k,)

    Returns
    -------
    PolynomialSystem, EMPTY_FIBRE, WHOLE_FIBRE or None
        The fibre's system (equations that vanish there dropped); :data:`EMPTY_FIBRE` when an equation
        is a nonzero constant there; :data:`WHOLE_FIBRE` when every equation vanishes there (X_r is the
        whole space of the other unknowns); None when an equation's size there is too close to rounding
        to decide whether it vanishes (then the split is not used).
    """
    indices = list(block.variables)
    block_equations = set(block.equations)
    kept = []
    for k, polynomial in enumerate(system.polynomials):
        if k in block_equations:
            continue  # in the block's unknowns only: zero at every root by construction
        fixed = _fixed_without_rounding(polynomial, indices, root)
        # the sizes of its terms with each block coordinate at least 1 (the system is balanced: 1 is the
        # scale of its unknowns): small beside them, the equation vanishes on the fibre
        sizes = polynomial.absolute().fix_variables(indices, np.maximum(np.abs(root), 1.0))
        size = float(np.linalg.norm(sizes.numeric_coefficients()))
        relative = float(np.linalg.norm(fixed.numeric_coefficients())) / size if size > 0 else 0.0
        if relative <= _VANISHES:
            continue
        if relative < _SURVIVES:
            return None
        if fixed.degree == 0:
            return EMPTY_FIBRE
        kept.append(fixed)
    if not kept:
        return WHOLE_FIBRE
    others = [name for j, name in enumerate(system.variables) if j not in set(indices)]
    return PolynomialSystem(others, kept, name=f"{system.name or 'system'} over a root of its block")


def _fixed_without_rounding(polynomial, indices, root):
    """``polynomial.fix_variables(indices, root)`` without the coefficients that are rounding of zero.

    A coefficient below ``_ROUNDING`` times the sizes of the terms merged into it (block coordinates taken
    at least 1) is zero up to the root's rounding: a root 0 computed as 1e-17 left y^2 - 1e-34 of
    y^2 - x^2 (x + 1) over x = 0, whose point y = 0 then failed its residual in units of its terms.
    """
    fixed = polynomial.fix_variables(indices, root)
    sizes = polynomial.absolute().fix_variables(indices, np.maximum(np.abs(root), 1.0))
    size_of = {tuple(row): abs(value) for row, value in zip(sizes.exponents.tolist(), sizes.numeric_coefficients())}
    keep = np.array([abs(value) > _ROUNDING * size_of[tuple(row)]
                     for row, value in zip(fixed.exponents.tolist(), fixed.numeric_coefficients())], dtype=bool)
    if np.all(keep):
        return fixed
    return Polynomial(fixed.exponents[keep], fixed.numeric_coefficients()[keep], fixed.n_variables)
