"""Certificates: boxes that provably hold one zero, every equation accounted for, rank bounds, exactness.

What can be proved, and how (each certificate says which kind it is):

* **A regular zero of a square system** S(x) = 0. Krawczyk's operator in
  interval arithmetic (Krawczyk, Computing 1969; Moore, "Interval Analysis",
  1966): for a box X around x~ and Y close to J_S(x~)^-1,
  K(X) = x~ - Y S(x~) + (I - Y J_S(X)) (X - x~). K(X) inside X proves exactly
  one zero in X, and that it is regular; K(X) disjoint from X proves none.
  Complex boxes are rectangles in each coordinate (convex, so the mean-value
  form holds), with one half-width per coordinate (``radii``: a coordinate of
  size 1e-4 beside one of size 1e4 gets a box of its own size). A box symmetric
  under conjugation proves, for real S, that the zero is real. Beside it,
  Smale's alpha test: alpha = beta * gamma with beta = |J^-1 S(x)| and gamma
  bounded from the Bombieri-Weyl norm of S; alpha < (13 - 3 sqrt(17))/4 proves
  that Newton's method converges quadratically from x to a zero within 2 beta
  (Blum, Cucker, Shub, Smale, "Complexity and Real Computation", Springer 1998;
  the gamma bound from the Bombieri-Weyl norm: Shub & Smale, "Complexity of
  Bezout's theorem I", J. AMS 1993 -- from memory).
* **Every equation is accounted for.** The square subsystem is chosen from the
  equations of the claim (F, F with the c x c minors of J for a singular point,
  F^h with the homogenising coordinate 0 for a point at infinity); a zero that
  even these leave singular is first made regular by isosingular deflation,
  which adds minors (Hauenstein & Wampler, "Isosingular sets and deflation",
  Found. Comput. Math. 2013) and never removes an equation. Every equation of
  the claim outside the square subsystem is then evaluated over the box in
  interval arithmetic: if an enclosure excludes 0 the box holds no zero of the
  claim (``refuted``); the largest enclosure, divided by a lower bound of the
  size of that equation's terms over the box (sum |c_k| |x^a_k|), is the
  ``backward_error``: the zero in the box is an exact zero of equations whose
  coefficients differ from the given ones by at most that much, relatively,
  coefficient by coefficient. Only when it is below 10^-(digits - guard) is the
  certificate ``certified``; otherwise ``undecided`` with the reason (a near
  miss looks like this). Coordinates whose box holds 0 are tried once more
  inside the subspace where they vanish exactly (the origin of a cusp, the
  hyperplane at infinity), where the terms that vanish there are gone.
* **Exact** (rational or sqrt-rational coefficients), two routes. (1) The
  coordinates are recognised as polynomials in a primitive element
  t = sum c_j x_j over the coefficient field K, t a root of a polynomial p over
  K (integer relations found by mpmath's PSLQ), every equation is reduced
  exactly modulo p, and a root of p is enclosed by the interval Newton test and
  mapped into the box: the box holds that exact common zero (or, when the
  square subsystem vanishes there and another equation does not, provably no
  zero of the claim). (2) Root separation, for rational coefficients: the
  unique zero z of the square subsystem G in the box is a regular, hence
  isolated, zero, so for every other equation g, (z, g(z)) is an isolated zero
  of the square integer system (G, y - g(x)) in n + 1 unknowns, and by Canny's
  gap theorem either g(z) = 0 or |g(z)| > (3 d c)^-((n+1) d^(n+1)) (d the
  largest degree, c above the largest integer coefficient; J. Canny,
  "Generalized characteristic polynomials", J. Symbolic Comput. 1990 -- from
  memory; the route is that of Akoglu, Hauenstein and Szanto, "Certifying
  solutions to overdetermined and singular polynomial systems over Q",
  J. Symbolic Comput. 2018). A box over which every |g| stays below that bound
  holds an exact zero of the whole system.
* **Rank of J.** Over a box, rank J >= r is proved by an interval lower bound
  on sigma_r (sigma_r(J) >= sigma_min of an r x r submatrix M, and
  sigma_min(M) >= (1 - |I - Y M|) / |Y| for every M in the box). That the rank
  drops to r at the exact point is proved by an exact certificate (either
  route) of a zero of F and every (r + 1)-minor of J.
* **A smooth point**: a box that holds exactly one point of V(F) cut by slices
  through the point (c equations of F in the square subsystem, the others
  accounted for as above) and rank J >= c over the whole box. Smoothness is an
  open condition, so this is a proof about the exact variety when F has c
  equations (Krull: every component of V(F) has codimension at most c, and
  the tangent space has dimension at most n - c); with more equations it rests
  on the local dimension (the certificate says so, and checks it against
  sampled points of X).

A report's claims (codimension, multiplicity, a point being at infinity) are
hypotheses: each is checked against F and the outcome is listed in
``claim_checks`` (:class:`ClaimCheck`). Precision is raised from
``digits`` up to ``max_digits`` while a decision stays open for lack of it;
``digits_tried`` lists what was used.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 - 2", "y - x"], ["x", "y"])
>>> certificate = certify_regular_zero(system, [1.41421356, 1.41421356], CertifyOptions(digits=30))
>>> certificate.status, certificate.real, certificate.radius < 1e-25, certificate.multiplicity
('certified', True, True, 1)
"""

from dataclasses import replace
from fractions import Fraction
import itertools
import math

import mpmath
import numpy as np

from ..errors import InputError
from ..system.exact import ExactCoefficient, exact_rank
from ..system.parse import parse_constant
from ..system.polynomial import Polynomial, PolynomialSystem
from ..tracking.infinity import top_forms
from .charts import _SYSTEM_CACHE, _at_infinity, _chart_center, _in_chart, _rank_polynomials
from .equations import _minor_equations, _restrict, singularity_equations
from .intervals import _bounds, _iv_box
from .rank import (_box_around, _chart_view, _dual_multiplicity, _hull_view, _numerical_ranks, _proved_rank,
                   _sampled_codimension)
from .recognition import _SUBSTITUTION_TERMS, _exact_box
from .records import (Certificate, CertifyOptions, Claim, ClaimCheck, ClaimStatus, CodimensionNeed, Kind, Status,
                      _float_up, _guarded, _parse_center, _text, working_digits)
from .square import _gauss_newton_double
from .zeros import _certify_zero

__all__ = ["certify_regular_zero", "certify_singular_point", "certify_smooth_point", "certify_rank",
           "overlapping_pairs"]



def _exact_given(point):
    """The point's exact coordinates when every one is given exactly (an int, a Fraction, an
    ``ExactCoefficient`` or text in the equation grammar such as ``"37/60"``), else None (numbers in
    floating point are approximations of the point the caller means)."""
    if isinstance(point, np.ndarray) and point.dtype != object:
        return None
    coordinates = list(point)
    if not coordinates or not all(isinstance(c, (int, Fraction, ExactCoefficient, str)) and not isinstance(c, bool)
                                  for c in coordinates):
        return None
    exact = []
    for c in coordinates:
        if isinstance(c, str):
            exact.append(parse_constant(c))
        elif isinstance(c, ExactCoefficient):
            exact.append(c)
        else:
            exact.append(ExactCoefficient.rational(Fraction(c)))
    return exact


def _at_exact_point(system, exact, claim, options):
    """F and the rank of J at an exact point in exact arithmetic, as a certificate for ``claim``.

    Refuted (kind exact) when an equation of F does not vanish there: the point is not on X. Otherwise
    certified with ``rank_lower`` = ``rank_upper`` = the exact rank of J; the caller holds the claim
    against that rank. None where exact arithmetic does not apply (inexact or large equations, a
    projective system).
    """
    polynomials = list(system.polynomials)
    if (system.projective or len(exact) != system.n_variables or not all(p.is_exact for p in polynomials)
            or sum(p.n_terms for p in polynomials) > _SUBSTITUTION_TERMS):
        return None
    powers = [[ExactCoefficient.rational(1)] for _ in exact]
    values = [p.evaluate_exact(exact, powers) for p in polynomials]
    digits = options.digits
    texts, radii = _exact_box(exact, digits)
    center = np.array([complex(q) for q in exact], dtype=complex)
    certificate = Certificate(status=Status.CERTIFIED, kind=Kind.EXACT, claim=claim, center=center,
                              center_text=texts, radius=max(radii, default=0.0), radii=radii, digits=digits,
                              method="exact substitution", threshold=10.0 ** (-(digits - options.guard_digits)),
                              backward_error=0.0, residual_bound=0.0, distance=0.0,
                              exact_method="exact substitution",
                              exact_coordinates=[q.to_text() for q in exact],
                              real=all(q.is_real() for q in exact))
    certificate.digits_tried = [digits]
    nonzero = [k for k, v in enumerate(values) if not v.is_zero()]
    if nonzero:
        certificate.status = Status.REFUTED
        certificate.reason = (f"the given point is not on X: equation {nonzero[0] + 1} of F is "
                              f"{values[nonzero[0]].to_text()} there in exact arithmetic, not 0")
        return certificate
    rank = exact_rank([[d.evaluate_exact(exact, powers) for d in row] for row in system.jacobian_polynomials()])
    certificate.rank_lower = certificate.rank_upper = rank
    certificate.notes.append(f"decided in exact arithmetic at the given point: F vanishes there and J has rank "
                             f"{rank}")
    return certificate


def _regular(certificate):
    """Whether the certificate proves a regular zero (Krawczyk or alpha on the claim's own equations)."""
    return (certificate.method in ("Krawczyk", "alpha") and certificate.deflations == 0
            and not certificate.zero_coordinates)


def _check_multiplicity(certificate, polynomials, reported):
    """Multiplicity of a certified zero: 1 when regular (proved), else the dual space (numerical)."""
    if not certificate.certified:
        return
    if _regular(certificate):
        certificate.multiplicity, certificate.multiplicity_method = 1, "regular zero (proved)"
    else:
        with working_digits(_guarded(certificate.digits)):
            center = [_parse_center(v) for v in certificate.center_text]
            found = _dual_multiplicity(polynomials, center)
        certificate.multiplicity = found
        certificate.multiplicity_method = "dual space (numerical)" if found is not None else "unknown"
    if reported is None:
        return
    found = certificate.multiplicity
    if found is None:
        status = ClaimStatus.UNVERIFIED
    elif found == reported:
        status = ClaimStatus.PROVED if found == 1 and certificate.deflations == 0 else ClaimStatus.NUMERICAL
    elif certificate.deflations == 0:
        status = ClaimStatus.REFUTED
    else:
        status = ClaimStatus.CONTRADICTED
    certificate.claim_checks.append(ClaimCheck("multiplicity", int(reported), found, status,
                                               certificate.multiplicity_method))


def certify_regular_zero(system, point, options=None, projective=None, at_infinity=False, multiplicity=None):
    """Certify a solution of ``system`` near ``point`` (square, or overdetermined: every equation accounted for).

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
        Affine coordinates, or homogeneous ones for a projective system (certified in the chart
        of the largest coordinate); with ``at_infinity``, (w, x) for an affine system.
    options : CertifyOptions, optional
    projective : bool, optional
        Defaults to ``system.projective``.
    at_infinity : bool, default False
        The point is claimed to lie at infinity (w = 0): certified as a zero of F^h with w = 0
        exactly (the top-degree forms of F), in the chart of x's largest coordinate.
    multiplicity : int, optional
        A reported multiplicity, checked (``claim_checks``).

    Returns
    -------
    Certificate
        Claim "regular zero" (a singular zero is deflated first and then claimed as "zero"), with
        ``multiplicity``.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> c = certify_regular_zero(parse_system(["x^2 + 1"], ["x"]), [1j], CertifyOptions(digits=20))
    >>> c.status, c.kind, c.exact_coordinates
    ('certified', 'exact', ['I'])
    >>> c = certify_regular_zero(parse_system(["x^2"], ["x"]), [1e-9], CertifyOptions(digits=20))
    >>> c.status, c.claim, c.multiplicity
    ('certified', 'zero', 2)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective

    def run(polynomials, affine):
        certificate = _certify_zero(polynomials, affine, options, Claim.REGULAR_ZERO)
        if certificate.certified and not _regular(certificate):
            certificate.claim = Claim.ZERO
        if not at_infinity:
            _check_multiplicity(certificate, polynomials, multiplicity)
        return certificate

    if at_infinity:
        if projective:
            raise InputError("points at infinity belong to affine systems (a projective system has none)")
        point = np.asarray(point, dtype=complex)
        if point.shape != (system.n_variables + 1,):
            raise InputError(f"a point at infinity has {system.n_variables + 1} homogeneous coordinates (w first)")
        top = top_forms(system.polynomials)
        return _at_infinity(top, point, run, reach=2 * options.match_radius)
    return _in_chart(system.polynomials, point, projective, run)


def _codimension_check(polynomials, certificate, codimension, claim_needs):
    """Hold a claimed codimension against what is proved (None when nothing proved settles it)."""
    m = len(polynomials)
    nonzero = any(not p.is_zero() for p in polynomials)
    if codimension == 0 and nonzero:
        return ClaimCheck("codimension", 0, None, ClaimStatus.REFUTED,
                          "F has a nonzero equation, so X has codimension at least 1 at every point")
    if codimension > m:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED,
                          f"Krull's principal ideal theorem: every component of V(F) has codimension at most {m}")
    if certificate.rank_lower is not None and certificate.rank_lower > codimension:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED,
                          f"rank J >= {certificate.rank_lower} is proved on the box, so X has codimension at least "
                          f"{certificate.rank_lower} there")
    if claim_needs is CodimensionNeed.AT_LEAST and codimension == 1 and nonzero:
        return ClaimCheck("codimension", 1, 1, ClaimStatus.PROVED,
                          "F has a nonzero equation: codimension at least 1")
    if claim_needs is CodimensionNeed.EXACTLY and codimension == m and certificate.rank_lower is not None \
            and certificate.rank_lower >= m:
        return ClaimCheck("codimension", codimension, m, ClaimStatus.PROVED,
                          f"rank J >= {m} on the box and Krull's theorem (at most {m})")
    return None


def _sampled_check(polynomials, affine_center, codimension, seed):
    found = _sampled_codimension(polynomials, affine_center, seed)
    if found is None:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.UNVERIFIED,
                          "sampled points of X near the point did not settle it")
    status = ClaimStatus.NUMERICAL if found == codimension else ClaimStatus.CONTRADICTED
    return ClaimCheck("codimension", codimension, found, status,
                      "least rank of J at points of X sampled near the point (numerical)")


def certify_singular_point(system, point, codimension=None, options=None, projective=None, slices=0,
                           at_infinity=False):
    """Certify that X = V(F) is singular at a point near ``point``: a zero of F and the c x c minors of J.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int, optional
        The rank a smooth point would need (the codimension of X's components through the
        point); defaults to 1 for a hypersurface, else required. A claim: checked against F.
    options : CertifyOptions, optional
    projective : bool, optional
    slices : int, default 0
        For a witness point of a positive-dimensional singular component: that many random
        linear equations through the point are added (kind stays numerical).
    at_infinity : bool, default False
        For an affine system and a point (w, x) at infinity: a singular point of the projective
        closure V(F^h) with w = 0 exactly.

    Returns
    -------
    Certificate
        Claim "singular point" (or "point of the singular locus" with slices), with ``rank_upper``
        = c - 1 when the zero of the minors is exact, ``rank_lower`` the rank proved over the box,
        and the codimension's check in ``claim_checks`` (proved for c = 1; for c >= 2 against
        sampled points of X); when certified, the hypothesis "reduced at the point" there as well,
        unverified (the variety, not only the equations, is singular there only under it).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> c = certify_singular_point(parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0])
    >>> c.status, c.kind, c.rank_upper
    ('certified', 'exact', 0)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    if codimension is None:
        if system.n_equations != 1:
            raise InputError("the codimension is needed for a system of several equations")
        codimension = 1
    codimension = int(codimension)
    claim = Claim.SINGULAR_POINT if not slices else Claim.SINGULAR_LOCUS_POINT
    ambient = system.n_variables - (1 if projective else 0)
    exact = _exact_given(point)
    if exact is not None:
        point = [complex(q) for q in exact]
    point = np.asarray(point, dtype=complex)
    if codimension < 1 or codimension > min(system.n_equations, ambient):
        reason = (f"the claimed codimension {codimension} is impossible here: a singular point needs rank J < c "
                  f"with 1 <= c <= {min(system.n_equations, ambient)} (c <= the number of equations by Krull's "
                  "theorem)")
        certificate = Certificate(status=Status.REFUTED, kind=Kind.NUMERICAL, claim=claim, center=point,
                                  center_text=[_text(v, 17) for v in point], radius=None, digits=options.digits,
                                  reason=reason)
        certificate.claim_checks.append(ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED, reason))
        return certificate
    polynomials = list(system.polynomials)
    certificate = None
    if exact is not None and not (slices or at_infinity):
        # an exact point is decided by exact arithmetic: F at it and the rank of J there (decision 0133)
        certificate = _at_exact_point(system, exact, claim, options)
    if certificate is not None:
        if certificate.status == Status.REFUTED:
            return certificate
        jacobian_polys, chart = polynomials, None
        if certificate.rank_upper >= codimension:
            certificate.status = Status.REFUTED
            certificate.reason = (f"rank J = {certificate.rank_upper} >= {codimension} at the given point in exact "
                                  f"arithmetic: J does not drop below the claimed codimension {codimension} there")
            return certificate
    else:
        target = system
        if at_infinity:
            if projective:
                raise InputError("points at infinity belong to affine systems (a projective system has none)")
            target = PolynomialSystem(["(w)"] + list(system.variables),
                                      [p.homogenize(0) for p in system.polynomials], projective=True)
        cache = _SYSTEM_CACHE.setdefault(system, {})
        key = (codimension, options.max_minors, options.seed, bool(at_infinity))
        if key not in cache:  # the minors, their charts and square subsystems serve every point of the system
            equations, complete = singularity_equations(target, codimension, options.max_minors, options.seed)
            if at_infinity:
                equations = [q for q in (_restrict(p, [0]) for p in equations) if not q.is_zero()]
            cache[key] = (equations, complete, {}, {})
        equations, complete, charts, squares = cache[key]

        def run(chart_polynomials, affine):
            pinned = []
            if slices:
                rng = np.random.default_rng(options.seed + 1)
                n = len(affine)
                for _ in range(slices):
                    weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
                    pinned.append(Polynomial.linear(weights, -complex(weights @ affine)))
            certificate = _certify_zero(chart_polynomials, affine, options, claim, pinned=pinned,
                                        exact_check=not slices, squares=None if slices else squares)
            if certificate.kind == Kind.EXACT and not complete:
                certificate.kind = Kind.NUMERICAL
                certificate.notes.append("the exact check covered random combinations of the minors, not every "
                                         "minor: kind stays numerical")
            return certificate

        if at_infinity:
            certificate = _at_infinity(equations, point, run, charts, reach=2 * options.match_radius)
        else:
            certificate = _in_chart(equations, point, projective, run, charts)
        if not certificate.certified:
            return certificate
        # the rank of J: proved below on the box, dropping below c at the exact point when the zero is exact
        jacobian_polys, chart = _rank_polynomials(system, certificate, projective, at_infinity)
        certificate.rank_lower, bound = _proved_rank(jacobian_polys, _chart_view(certificate, chart),
                                                     min(codimension - 1, _numerical_ranks(
                                                         jacobian_polys, _chart_center(certificate, chart))[1]))
        certificate.lower_singular_value = None if bound is None or bound == mpmath.mp.inf else _float_up(bound)
        if certificate.kind == Kind.EXACT:
            certificate.rank_upper = codimension - 1
    check = _codimension_check(polynomials, certificate, codimension, CodimensionNeed.AT_LEAST)
    if check is None and at_infinity:
        check = ClaimCheck("codimension", codimension, None, ClaimStatus.UNVERIFIED,
                           "points at infinity: no points of the closure are sampled")
    elif check is None:
        check = _sampled_check(jacobian_polys, _chart_center(certificate, chart), codimension, options.seed)
    certificate.claim_checks.append(check)
    if check.status == ClaimStatus.REFUTED:
        certificate.status, certificate.reason = Status.REFUTED, f"the codimension claim fails: {check.how}"
    elif check.status == ClaimStatus.CONTRADICTED:
        certificate.status = Status.UNDECIDED
        certificate.reason = (f"rank J < {codimension} holds at the point, but X seems to have codimension "
                              f"{check.found} there ({check.how}): the singular claim rests on codimension "
                              f"{codimension}")
    elif codimension >= 2:
        certificate.notes.append(f"rank J <= {codimension - 1} is what is proved; X is singular there because its "
                                 f"codimension there is {codimension} ({check.status}: {check.how})")
    if certificate.status == Status.CERTIFIED:
        # Decision 0096: rank J < c at an exact point of V(F) makes the point singular for the equations as
        # written; the variety is singular there only where they define it with multiplicity 1. On a doubled
        # component (x^2 (z - 1) = 0 along x = 0) the rank drops at every point, smooth ones of the plane too.
        certificate.claim_checks.append(ClaimCheck(
            "reduced", "at the point", None, ClaimStatus.UNVERIFIED,
            "the Jacobian criterion proves the variety singular only where F defines it with multiplicity 1; "
            "on a generically non-reduced component rank J < c everywhere: not proved here, the report's "
            "sampling of nearby points is the evidence"))
    return certificate


#: At most this many (r + 1)-minors are written out to prove that the rank drops to r.
_MAX_RANK_MINORS = 2000


def _with_rising_precision(attempt, options):
    """Run ``attempt(options)`` -> (certificate, more digits might help) from ``options.digits``, doubling up
    to ``options.limit`` while it is undecided for a reason precision can fix; ``digits_tried`` lists all."""
    digits, tried = options.digits, []
    while True:
        current = replace(options, digits=digits, max_digits=max(options.limit, digits))
        certificate, more = attempt(current)
        tried.extend(d for d in (certificate.digits_tried or [digits]) if d not in tried)
        if certificate.status != Status.UNDECIDED or not more or digits >= options.limit:
            break
        digits = min(options.limit, 2 * max(digits, certificate.digits))
    certificate.digits_tried = sorted(tried)
    if certificate.status == Status.UNDECIDED and more and options.limit > options.digits:
        certificate.reason += f" (still undecided at the limit of {options.limit} digits)"
    return certificate


def certify_smooth_point(system, point, codimension, options=None, projective=None):
    """Prove that X is smooth at a point near ``point``: one point of X in a box, rank J >= c over the box.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int
        The codimension of X at the point (n minus the local dimension): a claim, checked
        against F (0 is refuted for a nonzero F; more than the number of equations by Krull's
        theorem; less than a rank proved on the box).
    options : CertifyOptions, optional
    projective : bool, optional

    Returns
    -------
    Certificate
        Claim "smooth point", with ``rank_lower`` = c and ``lower_singular_value`` the interval
        lower bound on sigma_c(J) over the box. Kind "exact" when F has c equations (then the box
        provably holds a point of X where X is smooth); otherwise "numerical": the box holds a zero
        of c equations of F with the others accounted for, and that X has codimension c there is
        checked against sampled points of X.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> c = certify_smooth_point(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), [0.6, 0.8], 1)
    >>> c.status, c.kind, c.lower_singular_value > 1, c.rank_lower
    ('certified', 'exact', True, 1)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    c = int(codimension)
    ambient = system.n_variables - (1 if projective else 0)
    exact = _exact_given(point)
    if exact is not None:
        point = [complex(q) for q in exact]
    point = np.asarray(point, dtype=complex)
    polynomials = list(system.polynomials)
    m = len(polynomials)
    refusal = None
    if not 0 <= c <= ambient:
        refusal = f"a codimension is between 0 and the dimension {ambient}"
    elif c == 0 and any(not p.is_zero() for p in polynomials):
        refusal = "F has a nonzero equation, so X has codimension at least 1 at every point"
    elif c > m:
        refusal = f"Krull's principal ideal theorem: every component of V(F) has codimension at most {m}"
    if refusal is not None:
        certificate = Certificate(status=Status.REFUTED, kind=Kind.NUMERICAL, claim=Claim.SMOOTH_POINT,
                                  center=point, center_text=[_text(v, 17) for v in point], radius=None,
                                  digits=options.digits, reason=f"the claimed codimension {c} does not hold: {refusal}")
        certificate.claim_checks.append(ClaimCheck("codimension", c, None, ClaimStatus.REFUTED, refusal))
        return certificate

    def run(chart_polynomials, affine):
        n = len(affine)
        rng = np.random.default_rng(options.seed + 2)
        slices = []
        for _ in range(n - c):
            weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
            slices.append(Polynomial.linear(weights, -complex(weights @ affine)))
        # no deflation: a point where F and the slices meet singularly is no point to prove smooth, and a
        # deflated subsystem would put the box at a zero of a nearby system, beside X (a node's neighbour)
        certificate = _certify_zero(chart_polynomials, affine, replace(options, max_deflations=0),
                                    Claim.SMOOTH_POINT, pinned=slices, exact_check=False)
        if not certificate.certified or c == 0:
            return certificate
        certificate.rank_lower, bound = _proved_rank(chart_polynomials, certificate,
                                                     min(c + 1, len(chart_polynomials), n))
        certificate.lower_singular_value = None if bound is None else _float_up(bound)
        return certificate

    def attempt(current):
        nonlocal options
        saved, options = options, current
        try:
            certificate = _in_chart(polynomials, point, projective, run)
        finally:
            options = saved
        if certificate.certified and c > 0 and (certificate.rank_lower is None or certificate.rank_lower < c):
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"the box holds a point of X, but sigma_{c}(J) could not be bounded away from 0 "
                                  f"over it at {certificate.digits} digits")
            return certificate, True
        return certificate, False

    # an exact point is decided by exact arithmetic: F at it and the rank of J there (decision 0133)
    certificate = None if exact is None else _at_exact_point(system, exact, Claim.SMOOTH_POINT, options)
    decided_exactly = certificate is not None
    if certificate is not None and certificate.certified and certificate.rank_upper != c:
        certificate.status = Status.REFUTED
        certificate.reason = (
            f"rank J = {certificate.rank_upper} < {c} at the given point in exact arithmetic: the Jacobian criterion "
            f"fails there for codimension {c}" if certificate.rank_upper < c else
            f"rank J = {certificate.rank_upper} > {c} at the given point in exact arithmetic: X has codimension at "
            f"least {certificate.rank_upper} there")
    if certificate is None:
        certificate = _with_rising_precision(attempt, options)
    if not certificate.certified:
        return certificate
    check = _codimension_check(polynomials, certificate, c, CodimensionNeed.EXACTLY)
    if check is None:
        check = _sampled_check(_rank_polynomials(system, certificate, projective, False)[0],
                               _chart_center(certificate, certificate.chart), c, options.seed)
    certificate.claim_checks.append(check)
    if check.status == ClaimStatus.REFUTED:
        certificate.status = Status.REFUTED
        certificate.reason = f"the claimed codimension {c} does not hold: {check.how}"
        return certificate
    if check.status == ClaimStatus.CONTRADICTED:
        certificate.status = Status.UNDECIDED
        certificate.reason = (f"rank J >= {c} is proved on the box, but X seems to have codimension {check.found} "
                              f"there ({check.how})")
        return certificate
    certificate.rank_lower = min(certificate.rank_lower, c) if c else 0
    if decided_exactly and check.status != ClaimStatus.PROVED:
        certificate.kind = Kind.NUMERICAL  # the rank is exact; the codimension it is held against is not
    if decided_exactly:
        if check.status == ClaimStatus.PROVED:
            certificate.notes.append(f"proved: F vanishes at the given point and rank J = {c} = codimension there "
                                     "(exact arithmetic)")
        else:
            certificate.notes.append(f"rank J = {c} at the given point in exact arithmetic; that X is smooth there "
                                     f"rests on its codimension {c}, {check.status}: {check.how}")
    elif check.status == ClaimStatus.PROVED and m == c and certificate.backward_error is None:
        certificate.kind = Kind.EXACT
        certificate.exact_method = "implicit function theorem"
        certificate.notes.append(f"proved: the box holds exactly one point of X on the slices, and rank J >= {c} = "
                                 "codimension over the whole box")
    else:
        certificate.notes.append(f"rank J >= {c} over the box is proved and the box holds a point of X (every "
                                 f"equation accounted for); that X is smooth there rests on its local dimension "
                                 f"{ambient - c} (codimension {c}), {check.status}: {check.how}")
    return certificate


def certify_rank(system, point, options=None, projective=None):
    """Prove the rank of J at ``point``: rank >= r over a box that holds the point, and = r at a point of X there.

    An exactly given point (ints, Fractions, texts such as ``"37/60"``) is decided in exact arithmetic:
    refuted when F does not vanish there, else certified with the exact rank of J. A point in floating
    point stands for the numbers its rounding covers: the rank is proved over a box that holds it and the
    point of X found, and a drop of the rank proved at a point of X outside that box is no certificate for
    it (undecided, decision 0133).

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex, or of exact numbers
    options : CertifyOptions, optional
        ``max_digits`` above ``digits`` lets the precision rise until the rank is proved.
    projective : bool, optional

    Returns
    -------
    Certificate
        Claim "rank": ``rank_lower`` (rank J >= it at every point of the box, proved by an interval
        bound ``lower_singular_value`` on that singular value) and ``rank_upper`` (rank J <= it at the
        exact point of X in the box, proved by an exact certificate of the zero of F and the minors of
        one size more; None when only numerical). Certified when the two meet (or the rank is full,
        with the point on X); otherwise undecided with what was proved.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    >>> c = certify_rank(node, ["0", "0"])
    >>> c.status, c.rank_lower, c.rank_upper, c.kind
    ('certified', 0, 0, 'exact')
    >>> certify_rank(node, [1e-12, 0.0]).status  # the node's rank 0 is no statement about this point
    'undecided'
    >>> c = certify_rank(node, [3.0, 6.0])
    >>> c.status, c.rank_lower, c.rank_upper
    ('certified', 1, 1)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    polynomials = list(system.polynomials)
    exact = _exact_given(point)
    if exact is not None:
        # an exact point is decided by exact arithmetic: F at it and the rank of J there (decision 0133)
        certificate = _at_exact_point(system, exact, Claim.RANK, options)
        if certificate is not None:
            return certificate
        point = [complex(q) for q in exact]
    point = np.asarray(point, dtype=complex)

    def run(chart_polynomials, affine, current):
        n = len(affine)
        located = _gauss_newton_double(chart_polynomials, affine)
        full = min(len(chart_polynomials), n)
        low, high = (min(r, full) for r in _numerical_ranks(chart_polynomials, located))
        # the point a rank certificate speaks about is the most special one near the given point: a drop
        # of the rank is tried first, from the lowest rank the numbers allow
        certificate = None
        for r in range(low, high + 1):
            certificate = _rank_at(chart_polynomials, affine, r, full, current)
            if certificate.certified or r == high:
                break
        return certificate

    def attempt(current):
        certificate = _in_chart(polynomials, point, projective, lambda f, a: run(f, a, current))
        return certificate, certificate.status == Status.UNDECIDED and certificate.rank_lower is not None

    return _with_rising_precision(attempt, options)


def _rank_at(chart_polynomials, affine, r, full, options):
    """The rank certificate for rank r (see :func:`certify_rank`)."""
    n = len(affine)
    notes = []
    if r < full and math.comb(len(chart_polynomials), r + 1) * math.comb(n, r + 1) <= _MAX_RANK_MINORS:
        minors, _ = _minor_equations(chart_polynomials, r + 1, n, _MAX_RANK_MINORS, np.random.default_rng(0))
        certificate = _certify_zero(chart_polynomials + minors, affine, options, Claim.RANK, want_exact=True)
    else:
        if r < full:
            notes.append(f"the ({r + 1})-minors are too many to write out: the drop of the rank is not proved")
        rng = np.random.default_rng(options.seed + 3)
        slices = []
        for _ in range(n - r):
            weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
            slices.append(Polynomial.linear(weights, -complex(weights @ affine)))
        certificate = _certify_zero(chart_polynomials, affine, replace(options, max_deflations=0), Claim.RANK,
                                    pinned=slices, exact_check=False)
    certificate.claim = Claim.RANK
    certificate.notes.extend(notes)
    if certificate.status == Status.REFUTED:
        certificate.reason = f"no point of X with rank J <= {r} near the point: {certificate.reason}"
        return certificate
    on_x = certificate.certified
    holds = False
    if on_x:
        # the rank is proved on a box that holds the given point (and its rounding) as well as the point of X
        # found: a lower rank within that reach (a singular line beside a smooth point 2e-16 away) is not
        # bounded away, and the claim stays open (decision 0133)
        box, holds = _hull_view(certificate, affine)
    else:
        box = _box_around(affine, certificate.digits)
    certificate.rank_lower, bound = _proved_rank(chart_polynomials, box, r)
    certificate.lower_singular_value = None if bound is None or bound == mpmath.mp.inf else _float_up(bound)
    if not on_x:
        certificate.status = Status.UNDECIDED
        certificate.center_text, certificate.radii = box.center_text, box.radii
        certificate.radius = max(box.radii, default=0.0)
        certificate.reason = (f"rank J >= {certificate.rank_lower} is proved on a box around the given point; "
                              f"no point of X with rank J <= {r} could be certified there: {certificate.reason}")
        return certificate
    if r == full:
        certificate.rank_upper = r  # no larger rank exists
    elif certificate.kind == Kind.EXACT:
        certificate.rank_upper = r
    if certificate.rank_lower == r and certificate.rank_upper == r:
        if r < full and not holds:
            # a drop of the rank proved at another point is no statement about the given one (decision 0133)
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"rank J = {r} is proved at a point of X {certificate.distance or 0.0:.2g} from the "
                                  "given point, in a box that does not hold the given point: no proof for it")
            return certificate
        if r < full or certificate.backward_error is None:
            certificate.kind = Kind.EXACT
        if not holds:
            certificate.notes.append(f"rank J >= {r} is proved over a box that holds the given point and the point "
                                     "of X found")
        return certificate
    certificate.status = Status.UNDECIDED
    certificate.reason = (f"rank J >= {certificate.rank_lower} is proved on a box holding the given point and the "
                          f"point of X found; rank {r} "
                          + ("could not be bounded below there (a point of lower rank may lie within that reach)"
                             if certificate.rank_lower < r else
                             "is not proved exact at the point (no exact certificate of the minors)")
                          + f" at {certificate.digits} digits")
    return certificate


def _radii(certificate):
    radii = certificate.radii if certificate.radii is not None else [certificate.radius] * len(certificate.center)
    return np.asarray(radii, dtype=float)


def _box_meets(a, b):
    """Whether the certified boxes of a and b (same chart) can share a point."""
    gap = np.maximum(np.abs(a.center.real - b.center.real), np.abs(a.center.imag - b.center.imag))
    # rounding the centres to double costs up to 1e-16 relative: pad before comparing
    slack = 1e-15 * np.maximum(np.abs(a.center), np.abs(b.center)) + 1e-300
    return bool(np.all(gap <= _radii(a) + _radii(b) + slack))


def _meets_across_charts(a, b):
    """Whether boxes in two charts of projective space can hold the same point (interval test).

    A common point, written x in a's chart (x in A, x_ka = 1), has x_kb != 0 and x / x_kb
    in B; so every x_j lies in A_j and in B_j * A_kb. An empty intersection for some j
    proves the boxes disjoint.
    """
    iv = mpmath.iv
    with working_digits(30):
        def box_of(c):
            pads = 1e-15 * np.abs(c.center) + 1e-300
            box = _iv_box([mpmath.mp.mpc(v) for v in c.center], [mpmath.mp.mpf(r) for r in _radii(c) + pads])
            box[c.chart] = iv.mpc(1)
            return box

        box_a, box_b = box_of(a), box_of(b)
        scale = box_a[b.chart]
        for j in range(len(box_a)):
            re_lo, re_hi, im_lo, im_hi = _bounds(box_b[j] * scale)
            a_lo, a_hi, ai_lo, ai_hi = _bounds(box_a[j])
            if re_hi < a_lo or re_lo > a_hi or im_hi < ai_lo or im_lo > ai_hi:
                return False
        return True


def overlapping_pairs(certificates):
    """Pairs (i, j) of certified boxes that may share a point; sets ``distinct`` on each certified one.

    Two certified boxes that do not meet hold different zeros, so a list without
    overlapping pairs proves that its certified points are pairwise distinct. Boxes in
    different charts of projective space are compared after mapping one into the other's
    chart in interval arithmetic.

    Examples
    --------
    >>> a = Certificate(status="certified", kind="numerical", claim="zero", center=np.array([0j]),
    ...                 center_text=["0"], radius=1e-3, digits=20)
    >>> b = Certificate(status="certified", kind="numerical", claim="zero", center=np.array([1 + 0j]),
    ...                 center_text=["1"], radius=1e-3, digits=20)
    >>> overlapping_pairs([a, b]), a.distinct
    ([], True)
    """
    boxes = [(k, c) for k, c in enumerate(certificates) if c is not None and c.certified]
    pairs = []
    for (i, a), (j, b) in itertools.combinations(boxes, 2):
        if len(a.center) != len(b.center):
            continue
        if a.chart == b.chart:
            meets = _box_meets(a, b)
        else:
            meets = _meets_across_charts(a, b) and _meets_across_charts(b, a)
        if meets:
            pairs.append((i, j))
    touched = {k for pair in pairs for k in pair}
    for k, c in boxes:
        c.distinct = k not in touched
    return pairs
