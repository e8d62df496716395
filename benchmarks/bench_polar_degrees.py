"""Polar degrees deg P_k of a variety X by monodromy of the Lagrange system, completeness by the trace test (decision 0139).

For X of codimension c (given by m >= c equations F) and a flag Λ_k of dimension c + k - 1, the k-th polar
variety is P_k = closure {x smooth on X : dim(T_x X ∩ Λ_k) >= k}, of codimension k in X (decision 0131).
Its degree is the number of its points on a generic affine space L = p + im B of dimension c + k. Taking
Λ_k = ker [ℓ; the forms vanishing on im B] for a generic form ℓ (so L's directions contain Λ_k: the points of
P_k ∩ L are the critical points of ℓ on X ∩ L), x = p + B y is in P_k ∩ L exactly when some normal covector
mu^T A J(x) (A: c x m random rows) agrees with ℓ on im B:

    R F(p + B y) = 0 (c rows),   mu^T A J(p + B y) B = ℓ^T B (c + k rows),   unknowns y (c + k), mu (c).

A square system. One solution is made by hand (x0 on X by Newton from a random point, mu0 random, p = x0,
ℓ^T B := mu0^T A J(x0) B); if the system's Jacobian there is singular, the map to the parameters (p, ℓ) is
not dominant and deg P_k = 0 (generic smoothness; the point is generic on the incidence). Otherwise
monodromy loops in (p, ℓ) (three parameter homotopies of numag's tracker each) collect the solutions; the
count is accepted when the trace of the x-coordinates is linear as p moves along a line (the slices move
parallel, P_k stays fixed) -- the linear trace test. The loops stay on X's component of {R F = 0}: the
incidence over X's smooth points is irreducible, so the monodromy group is transitive on P_k ∩ L.

Cases: a smooth quadric surface and a quadric cone in C^3 (hand computation below), 3 x 3 rank <= 1 and
rank <= 2 (the Segre P2 x P2 and its dual, the determinant), and 4 x 4 rank <= 2 (issue 19).

Run:  OMP_NUM_THREADS=1 python benchmarks/bench_polar_degrees.py [--cases sphere,cone,3x3r1,3x3r2,4x4r2]
      [--ks 1,2,3] [--seed 1] [--max-loops 40]
"""

import argparse
import itertools
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag first)

from numag.numeric.evaluate import BatchEvaluator
from numag.numeric.refine import project_to_variety
from numag.system.polynomial import Polynomial, PolynomialSystem
from numag.tracking.homotopy import ParameterHomotopy
from numag.tracking.service import track


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
        "4x4r2": (minors_system(4, 4, 2), 4, 12, None, "issue 19"),
    }


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


def start_point(lag, rng):
    """x0 on X, mu0, and the parameters making (y = 0, mu0) a solution.

    x0: Newton from a random point onto X cut by a random affine hyperplane (a generic point of X; on X alone
    the projection of a cone's point can slide to the vertex).
    """
    cx = lambda *shape: rng.standard_normal(shape) + 1j * rng.standard_normal(shape)
    for _ in range(20):
        hyperplane = Polynomial.linear(cx(lag.n), -1.0)
        cut = PolynomialSystem(lag.system.variables, lag.polys + [hyperplane])
        result = project_to_variety(cut, BatchEvaluator(cut.polynomials), cx(1, lag.n))
        if result.converged[0]:
            break
    else:
        raise RuntimeError("no point of X found by Newton")
    x0 = result.points[0]
    mu0 = cx(lag.c)
    J = lag.jacobian_matrix(x0)
    lB = mu0 @ lag.A @ J @ lag.B
    return x0, mu0, lB, J


def square_jacobian_rank(lag, p, lB, point):
    system = lag.system_at(p, lB)
    ev = BatchEvaluator([q for q in system.polynomials])
    _, jac = ev.evaluate(point[None, :])
    s = np.linalg.svd(jac[0], compute_uv=False)
    return int(np.sum(s > s[0] * 1e-9)), s


def move(lag, points, frm, to, rng):
    """Track the solutions ``points`` of the system at parameters ``frm`` to ``to``; return endpoints, failed count."""
    homotopy = ParameterHomotopy.from_systems(lag.system_at(*frm), lag.system_at(*to), rng)
    run = track(homotopy, homotopy.start_solutions_from(points))
    ends = run.affine_endpoints()
    failed = int(np.sum(run.status >= 4))
    return ends, failed


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
    traces, sizes, failed = [], [], 0
    for t in (t1, t2):
        ends, f = move(lag, points, base, (p + t * d, lB), rng)
        failed += f
        if not np.all(np.isfinite(ends)):
            return np.inf, failed
        x = ends[:, :lag.n]
        traces.append(x.sum(axis=0))
        sizes.append(np.abs(x).sum(axis=0))
    x0 = points[:, :lag.n]
    tr0 = x0.sum(axis=0)
    slope1, slope2 = (traces[0] - tr0) / t1, (traces[1] - tr0) / t2
    scale = np.linalg.norm(np.abs(x0).sum(axis=0) + sizes[0] + sizes[1])
    return float(np.linalg.norm(slope1 - slope2) / scale), failed


def polar_degree(system, c, dim, k, seed, max_loops, log):
    rng = np.random.default_rng(seed)
    lag = Lagrange(system, c, dim, k, rng)
    x0, mu0, lB, J = start_point(lag, rng)
    sv = np.linalg.svd(J, compute_uv=False)
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
        q1 = (x0 + cx(lag.n) * np.linalg.norm(x0) / np.sqrt(lag.n), lB + cx(lag.size) * np.linalg.norm(lB) / np.sqrt(lag.size))
        q2 = (x0 + cx(lag.n) * np.linalg.norm(x0) / np.sqrt(lag.n), lB + cx(lag.size) * np.linalg.norm(lB) / np.sqrt(lag.size))
        pts, failed = known, 0
        for frm, to in ((base, q1), (q1, q2), (q2, base)):
            ends, f = move(lag, pts[np.all(np.isfinite(pts), axis=1)], frm, to, rng)
            tracked += len(pts)
            failed += f
            pts = ends
        failed_total += failed
        known, added = merge(known, pts)
        log(f"    k={k} loop {loops}: {len(known)} points (+{added}), {failed} failed paths")
        quiet = quiet + 1 if added == 0 else 0
        if quiet >= 2:
            defect, f = trace_defect(lag, known, base, rng)
            tracked += 2 * len(known)
            failed_total += f
            log(f"    k={k}: trace defect {defect:.1e} with {len(known)} points ({f} failed paths)")
            if defect < 1e-7:
                return len(known), tracked, failed_total, defect
            quiet = 0
    return None, tracked, failed_total, np.nan


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", default="sphere,cone,3x3r1,3x3r2,4x4r2")
    parser.add_argument("--ks", default=None, help="which k (default 1..dim X)")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--max-loops", type=int, default=40)
    args = parser.parse_args()
    table = cases()
    for name in args.cases.split(","):
        system, c, dim, expected, source = table[name]
        ks = [int(k) for k in args.ks.split(",")] if args.ks else list(range(1, dim + 1))
        print(f"{system.name}: n = {system.n_variables}, c = {c}, dim X = {dim}; expected {expected} ({source})",
              flush=True)
        for k in ks:
            start = time.process_time()
            degree, tracked, failed, defect = polar_degree(system, c, dim, k, args.seed, args.max_loops,
                                                           lambda s: print(s, flush=True))
            want = expected[k - 1] if expected and k - 1 < len(expected) else "?"
            print(f"  deg P_{k} = {degree} (expected {want}); {tracked} paths, {failed} failed, "
                  f"trace defect {defect:.1e}, {time.process_time() - start:.1f} CPU s", flush=True)


if __name__ == "__main__":
    main()
