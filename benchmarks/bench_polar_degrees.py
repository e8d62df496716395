"""Polar degrees deg P_k of a variety X: monodromy of the Lagrange system and a trace test (decision 0139).

For X of codimension c (given by m >= c equations F) and a flag Λ_k of dimension c + k - 1, the k-th polar
variety is P_k = closure {x smooth on X : dim(T_x X ∩ Λ_k) >= k}, of codimension k in X (decision 0131).
Its degree is the number of its points on a generic affine space L = p + im B of dimension c + k. Taking
Λ_k = ker [ℓ; C] for a generic form ℓ, where C x = C p cuts out L (so L's directions contain Λ_k: the points of
P_k ∩ L are the critical points of ℓ on X ∩ L), x is in P_k ∩ L exactly when some normal covector
mu^T A J(x) (A: c x m random rows) agrees with ℓ on im B:

    R F(x) = 0 (c rows),   C x = C p (n - c - k rows),   mu^T A J(x) B = ℓ^T B (c + k rows),   unknowns x, mu.

A square system whose coefficients are linear in the parameters (p, ℓ^T B), so that the straight segments of a
parameter homotopy stay in the family. One solution is made by hand (x0 a smooth point of X's witness set,
mu0 random, p = x0, ℓ^T B := mu0^T A J(x0) B); if the system's Jacobian there is singular, the map to the
parameters is not dominant and deg P_k = 0 (generic smoothness; the point is generic on the incidence).
Otherwise monodromy loops in (p, ℓ^T B) (three parameter homotopies of numag's tracker each) collect the
solutions, each endpoint kept only if it is on X by all m equations with J of rank c (R F = 0 has other
components; a jumped path lands there). The count is accepted after 5 loops without a new point and a linear
trace test: the x-trace linear as p moves along a line (the slices move parallel, P_k stays fixed). The trace
test passes on any union of P_k's components (a cone's polar curve made of lines passes with one of them) and
is empty at k = dim X (P_k finite, L the whole space: nothing moves); there the count is printed as a lower
bound. Hence also the quiet loops: the incidence over X's smooth points is irreducible, so the monodromy group
is transitive on P_k ∩ L.

Cases: a smooth quadric surface and a quadric cone in C^3 (hand computation below), 2 x 3 rank <= 1, 3 x 3 rank
<= 1 and rank <= 2 (the Segre P1 x P2, P2 x P2 and its dual, the determinant), and 4 x 4 rank <= 2 (issue 19).

Run:  OMP_NUM_THREADS=1 python benchmarks/bench_polar_degrees.py [--cases sphere,cone,2x3r1,3x3r1,3x3r2,4x4r2]
      [--ks 1,2,3] [--seed 1] [--max-loops 40]
"""

import argparse
import itertools
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag first)

from numag.numeric.evaluate import BatchEvaluator, TermSizes
from numag.numeric.refine import largest_scaled_residual
from numag.system.polynomial import Polynomial, PolynomialSystem
from numag.tracking.homotopy import ParameterHomotopy
from numag.tracking.service import track
from numag.witness.cascade import WitnessOptions, witness_supersets


def quadric(signs, name):
    """sum signs_i x_i^2 + signs[-1] (a constant) = 0 in C^3."""
    n = len(signs) - 1
    total = Polynomial.constant(signs[-1], n)
    for i in range(n):
        total = total + Polynomial.variable(i, n) * Polynomial.variable(i, n) * signs[i]
    return PolynomialSystem([f"x{i}" for i in range(n)], [total], name=name)


def minors_system(rows, cols, rank):
    """The (rank + 1)-minors of a generic rows x cols matrix."""
    n = rows * cols
    entries = [[Polynomial.variable(i * cols + j, n) for j in range(cols)] for i in range(rows)]

    def det(r, c):
        if len(r) == 1:
            return entries[r[0]][c[0]]
        total = None
        for k, col in enumerate(c):
            term = entries[r[0]][col] * det(r[1:], c[:k] + c[k + 1:]) * (1 if k % 2 == 0 else -1)
            total = term if total is None else total + term
        return total
    minors = [det(list(r), list(c)) for r in itertools.combinations(range(rows), rank + 1)
              for c in itertools.combinations(range(cols), rank + 1)]
    return PolynomialSystem([f"m{i}" for i in range(n)], minors, name=f"{rows} x {cols} rank <= {rank}")


# name: (system, codimension c, dimension of X, expected polar degrees deg P_1.. (None: not known here), source)
def cases():
    return {
        # x^2 + y^2 + z^2 = 1: P_1 = the plane section {grad . v = 0}, a conic (2 points on a line);
        # P_2 = {grad parallel to a normal n}: x = t n, 2 points. Hand computation.
        "sphere": (quadric([1, 1, 1, -1], "sphere"), 1, 2, [2, 2], "hand computation"),
        # x^2 + y^2 - z^2 = 0: P_1 two lines (2); P_2: grad parallel to n forces x = 0, the vertex: no smooth point.
        "cone": (quadric([1, 1, -1, 0], "cone"), 1, 2, [2, 0], "hand computation"),
        # the Segre P2 x P2: polar degrees 6, 12, 12, 6, 3 (generic ED degree 39), from memory (J. Draisma,
        # E. Horobet, G. Ottaviani, B. Sturmfels, R. Thomas, "The Euclidean distance degree of an algebraic
        # variety", 2016); its dual is the determinant (dual defect 3), whose polar degrees are reversed.
        "3x3r1": (minors_system(3, 3, 1), 4, 5, [12, 12, 6, 3, 0], "from memory (Draisma et al. 2016)"),
        "3x3r2": (minors_system(3, 3, 2), 1, 8, [6, 12, 12, 6, 0, 0, 0, 0], "from memory, the reversal of 3x3r1"),
        # the Segre P1 x P2 is its own dual, of dual defect 1: its top polar variety (P_3 here) is empty, from memory
        # (the dual of the m x n matrices of rank <= r is those of rank <= min(m, n) - r)
        "2x3r1": (minors_system(2, 3, 1), 2, 4, [None, None, 0, 0], "from memory (P_3 empty: dual defect 1)"),
        "4x4r2": (minors_system(4, 4, 2), 4, 12, None, "issue 19"),
    }


def in_frame(system, frame):
    """The same X in other units (x = 1000 y or y / 1000) or after a rational linear change (x = M y, M exact)."""
    from fractions import Fraction
    n = system.n_variables
    if frame == "plain":
        return system
    if frame in ("x1000", "x1e-3"):
        factor = Fraction(1000) if frame == "x1000" else Fraction(1, 1000)
        matrix = [[factor if i == j else 0 for j in range(n)] for i in range(n)]
    else:  # unit lower triangular plus halves above: invertible, no coordinate left alone
        matrix = [[Fraction(1) if i == j else Fraction((i + 2 * j) % 5 - 2, 2 if j > i else 1) if (j > i or j == i - 1)
                   else 0 for j in range(n)] for i in range(n)]
    polys = [p.substitute_linear(np.array(matrix, dtype=object)) for p in system.polynomials]
    return PolynomialSystem(system.variables, polys, name=f"{system.name} ({frame})")


class Lagrange:
    """The square system of one polar degree: fixed random R, A, B; parameters p (n,) and the row lB = ℓ^T B."""

    def __init__(self, system, c, dim, k, rng):
        self.system, self.c, self.k = system, c, k
        self.n = system.n_variables
        self.size = c + k                       # dim L = c + k unknowns y
        polys = [p.numeric() for p in system.polynomials]
        m = len(polys)
        cx = lambda *shape: rng.standard_normal(shape) + 1j * rng.standard_normal(shape)
        self.R, self.A = cx(c, m), cx(c, m)
        self.B = cx(self.n, self.size) / np.sqrt(self.n)
        self.combined = [self._combine(polys, row) for row in self.R]          # R F, in x
        jac = [[p.derivative(j) for j in range(self.n)] for p in polys]
        AJ = [[self._combine([jac[i][j] for i in range(m)], self.A[r]) for j in range(self.n)] for r in range(c)]
        # (A J B)_{r, s}, quadrics in x when F is cubic
        self.AJB = [[self._combine([AJ[r][j] for j in range(self.n)], self.B[:, s]) for s in range(self.size)]
                    for r in range(c)]
        self.evaluator = BatchEvaluator(polys)
        self.sizes = TermSizes(polys, projective=False)
        self.polys, self.jac = polys, jac
        self.names = [f"x{i}" for i in range(self.n)] + [f"mu{i}" for i in range(c)]
        # L = p + im B is cut out by C x = C p, with C's rows spanning the forms vanishing on im B
        self.C = np.linalg.svd(self.B.T)[2][self.size:].conj()
        self.lifted = [[self._pad(q) for q in row] for row in self.AJB]

    def _combine(self, polys, weights):
        total = Polynomial.zero(self.n)
        for w, p in zip(weights, polys):
            if w != 0 and not p.is_zero():
                total = total + p.scaled(complex(w))
        return total

    def _pad(self, poly):
        """A polynomial in x as one in (x, mu)."""
        extra = np.zeros((poly.n_terms, self.c), dtype=np.int64)
        return Polynomial(np.hstack([poly.exponents, extra]), poly.coefficients, n_variables=self.n + self.c)

    def system_at(self, p, lB):
        """The rows at parameters (p, lB): coefficients linear in them, so that a parameter homotopy's straight
        segment stays in the family (substituting x = p + B y would make them cubic in p)."""
        nv = self.n + self.c
        rows = [self._pad(q) for q in self.combined]
        rows += [Polynomial.linear(np.append(row, np.zeros(self.c)), -complex(row @ p)) for row in self.C]
        for s in range(self.size):
            row = Polynomial.constant(-complex(lB[s]), nv)
            for r in range(self.c):
                row = row + self.lifted[r][s] * Polynomial.variable(self.n + r, nv)
            rows.append(row)
        return PolynomialSystem(self.names, rows, name="lagrange")

    def jacobian_matrix(self, x):
        return np.array([[q.evaluate(x) if not q.is_zero() else 0 for q in row] for row in self.jac], dtype=complex)


def generic_point(system, c, dim, seed):
    """A point of X's top-dimensional witness set (numag's regeneration) where J has rank c: a generic point.

    (Newton from a random point is no substitute: on the 4 x 4 minors it slides onto the rank-1 matrices,
    Sing X, where the residual vanishes to higher order.)
    """
    supersets = witness_supersets(system, WitnessOptions(lowest_dimension=dim), seed=seed)
    witness = supersets.of_dimension(dim)
    evaluator = BatchEvaluator([p.numeric() for p in system.polynomials])
    _, jacobians = evaluator.evaluate(witness.points)
    for point, jac in zip(witness.points, jacobians):
        s = np.linalg.svd(jac, compute_uv=False)
        if len(s) >= c and s[c - 1] > 1e-6 * s[0] and (len(s) == c or s[c] < 1e-9 * s[0]):
            return point, len(witness.points)
    raise RuntimeError("no smooth witness point of X")


def start_point(lag, x0, rng):
    """mu0 and the parameters making (x0, mu0) a solution (p = x0, lB = mu0^T A J(x0) B)."""
    mu0 = rng.standard_normal(lag.c) + 1j * rng.standard_normal(lag.c)
    J = lag.jacobian_matrix(x0)
    lB = mu0 @ lag.A @ J @ lag.B
    return x0, mu0, lB, J


def square_jacobian_rank(lag, p, lB, point):
    system = lag.system_at(p, lB)
    ev = BatchEvaluator([q for q in system.polynomials])
    _, jac = ev.evaluate(point[None, :])
    # rows and columns equilibrated first: the rank is the same, and the threshold then does not depend on the
    # units of x (cubic rows 1e9 times larger in units x1000) or on mu's size
    jac = jac[0]
    for _ in range(3):
        jac = jac / np.linalg.norm(jac, axis=1, keepdims=True)
        jac = jac / np.linalg.norm(jac, axis=0, keepdims=True)
    s = np.linalg.svd(jac, compute_uv=False)
    return int(np.sum(s > s[0] * 1e-9)), s


def move(lag, points, frm, to, rng):
    """Track the solutions ``points`` of the system at parameters ``frm`` to ``to``; return endpoints, failed count."""
    homotopy = ParameterHomotopy.from_systems(lag.system_at(*frm), lag.system_at(*to), rng)
    run = track(homotopy, homotopy.start_solutions_from(points))
    ends = run.affine_endpoints()
    failed = int(np.sum(run.status >= 4))
    return ends, failed


def on_x(lag, points):
    """Rows that are points of X (every one of the m equations, in units of its terms) where J has rank c.

    R F = 0 is X and other components of the same dimension; a path that jumps onto one of them is junk, removed
    by all m rows (decision 0131's filter).
    """
    keep = np.all(np.isfinite(points), axis=1)
    x = points[keep, :lag.n]
    if len(x):
        ok = largest_scaled_residual(lag.sizes, lag.evaluator, x) < 1e-8
        _, jacobians = lag.evaluator.evaluate(x)
        s = np.linalg.svd(jacobians, compute_uv=False)
        ok &= s[:, lag.c - 1] > 1e-6 * s[:, 0]
        keep[np.flatnonzero(keep)[~ok]] = False
    return points[keep], int(np.sum(np.all(np.isfinite(points), axis=1)) - keep.sum())


def merge(known, new, tolerance=1e-6):
    """Add the finite rows of ``new`` not already in ``known`` (relative distance)."""
    added = 0
    for row in new:
        if not np.all(np.isfinite(row)):
            continue
        if len(known):
            d = np.linalg.norm(known - row, axis=1) / (1 + np.linalg.norm(row))
            if d.min() < tolerance:
                continue
        known = np.vstack([known, row]) if len(known) else row[None, :]
        added += 1
    return known, added


def trace_defect(lag, points, base, rng):
    """The linear trace test: the y-traces at p + t d for t = 0, t1, t2; 0 when the witness set is complete."""
    p, lB = base
    d = (rng.standard_normal(lag.n) + 1j * rng.standard_normal(lag.n)) * np.linalg.norm(p) / np.sqrt(lag.n)
    t1, t2 = 0.37 + 0.21j, -0.43 + 0.17j
    moved, failed = [], 0
    for t in (t1, t2):
        ends, f = move(lag, points, base, (p + t * d, lB), rng)
        failed += f
        if not np.all(np.isfinite(ends)):
            return np.inf, False, failed
        moved.append(ends[:, :lag.n])
    x0 = points[:, :lag.n]
    slope1, slope2 = (moved[0] - x0) / t1, (moved[1] - x0) / t2
    scale = np.linalg.norm(np.abs(x0).sum(axis=0) + np.abs(moved[0]).sum(axis=0) + np.abs(moved[1]).sum(axis=0))
    defect = float(np.linalg.norm(slope1.sum(axis=0) - slope2.sum(axis=0)) / scale)
    # each point's own trace linear: every point on a line (P_k a cone over points): the test certifies nothing
    each = np.linalg.norm(slope1 - slope2, axis=1) / np.linalg.norm(np.abs(x0) + np.abs(moved[0]) + np.abs(moved[1]),
                                                                  axis=1)
    return defect, bool(np.all(each < 1e-7)), failed


def polar_degree(system, c, dim, k, seed, max_loops, log, x0):
    rng = np.random.default_rng(seed)
    lag = Lagrange(system, c, dim, k, rng)
    x0, mu0, lB, J = start_point(lag, x0, rng)
    point = np.concatenate([x0, mu0])
    rank, s = square_jacobian_rank(lag, x0, lB, point)
    if rank < len(point):
        log(f"    k={k}: Jacobian of the square system rank {rank} < {len(point)} at a generic point "
            f"(sigma min/max {s[-1] / s[0]:.1e}): not dominant, deg P_{k} = 0")
        return 0, 0, 0, 0.0
    base = (x0, lB)
    known = point[None, :]
    failed_total, tracked, quiet, loops = 0, 0, 0, 0
    while loops < max_loops:
        loops += 1
        cx = lambda *shape: rng.standard_normal(shape) + 1j * rng.standard_normal(shape)
        # parameters as far from the base as the base is from 0 (a loop around a share of the branch points)
        q1, q2 = [(x0 + cx(lag.n) * np.linalg.norm(x0) / np.sqrt(lag.n),
                   lB + cx(lag.size) * np.linalg.norm(lB) / np.sqrt(lag.size)) for _ in range(2)]
        pts, failed = known, 0
        for frm, to in ((base, q1), (q1, q2), (q2, base)):
            ends, f = move(lag, pts[np.all(np.isfinite(pts), axis=1)], frm, to, rng)
            tracked += len(pts)
            failed += f
            pts = ends
        failed_total += failed
        pts, junk = on_x(lag, pts)
        known, added = merge(known, pts)
        log(f"    k={k} loop {loops}: {len(known)} points (+{added}), {failed} failed paths, {junk} off X or "
            "singular dropped")
        quiet = quiet + 1 if added == 0 else 0
        if quiet >= 5 and not len(lag.C):  # k = dim X: P_k finite, L the whole space, no slice to move
            log(f"    k={k}: P_k is finite (no slice to move): the count is a lower bound from the loops")
            return f">= {len(known)}", tracked, failed_total, np.nan
        if quiet >= 5:  # a trace test passes on any union of P_k's components (a cone's lines each): loops first
            defect, lines, f = trace_defect(lag, known, base, rng)
            tracked += 2 * len(known)
            failed_total += f
            log(f"    k={k}: trace defect {defect:.1e} with {len(known)} points ({f} failed paths)")
            if defect < 1e-7:
                if lines:
                    log(f"    k={k}: each point's own trace is linear (P_k made of lines, or finite at k = dim X: "
                        "nothing to move): the count is a lower bound from the loops, not certified")
                    return f">= {len(known)}", tracked, failed_total, defect
                return len(known), tracked, failed_total, defect
            quiet = 0
    return None, tracked, failed_total, np.nan


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", default="sphere,cone,2x3r1,3x3r1,3x3r2,4x4r2")
    parser.add_argument("--ks", default=None, help="which k (default 1..dim X)")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--max-loops", type=int, default=40)
    parser.add_argument("--frame", default="plain", choices=["plain", "x1000", "x1e-3", "linear"],
                        help="the same X in other units or after a rational linear change")
    args = parser.parse_args()
    table = cases()
    for name in args.cases.split(","):
        system, c, dim, expected, source = table[name]
        system = in_frame(system, args.frame)
        ks = [int(k) for k in args.ks.split(",")] if args.ks else list(range(1, dim + 1))
        print(f"{system.name}: n = {system.n_variables}, c = {c}, dim X = {dim}; expected {expected} ({source})",
              flush=True)
        start = time.process_time()
        x0, degree_x = generic_point(system, c, dim, args.seed)
        print(f"  deg X = deg P_0 = {degree_x} (X's witness set, {time.process_time() - start:.1f} CPU s)", flush=True)
        degrees, cpu, paths = [degree_x], 0.0, 0
        for k in ks:
            start = time.process_time()
            degree, tracked, failed, defect = polar_degree(system, c, dim, k, args.seed, args.max_loops,
                                                           lambda s: print(s, flush=True), x0)
            want = expected[k - 1] if expected and k - 1 < len(expected) else "?"
            cpu, paths = cpu + time.process_time() - start, paths + tracked
            degrees.append(degree)
            print(f"  deg P_{k} = {degree} (expected {want}); {tracked} paths, {failed} failed, "
                  f"trace defect {defect:.1e}, {time.process_time() - start:.1f} CPU s", flush=True)
        if all(isinstance(d, int) for d in degrees):
            top = max(p.degree for p in system.polynomials)
            print(f"  polar degrees {degrees}, sum {sum(degrees)}; the polar-flag route's paths c (D - 1) x sum = "
                  f"{c * (top - 1) * sum(degrees)} (decision 0131); this measurement: {paths} paths in {cpu:.1f} "
                  f"CPU s ({1e3 * cpu / max(paths, 1):.1f} ms per path)", flush=True)


if __name__ == "__main__":
    main()
