"""The driver behind every certificate: ``_certify_zero(required, point, options, claim, pinned)`` raises
the precision while undecided; per precision it locates a proved box (with deflation), accounts for
every equation of the claim over it, tries the exact routes, and retries inside the subspace where
coordinates whose box holds 0 vanish exactly.
"""

import mpmath
import numpy as np

from ..errors import InputError
from ..system.display import counted
from .deflation import _locate
from .equations import _is_constant, _is_rational, _restrict
from .intervals import _holds_zero, _iv_box
from .recognition import (_ExactOutcome, _apply_exact, _exact_at_point, _exact_route, _separation,
                          _short_rationals)
from .records import Certificate, Kind, Recognition, Status, _float_up, _guarded, _text, alpha_zero, working_digits
from .square import _account, _publish, _refute


def _undecided(claim, point, digits, reason, **extra):
    return Certificate(status=Status.UNDECIDED, kind=Kind.NUMERICAL, claim=claim,
                       center=np.asarray(point, dtype=complex), center_text=[_text(v, 17) for v in point],
                       radius=None, digits=digits, reason=reason, **extra)


def _certify_zero(required, point, options, claim, pinned=(), exact_check=True, squares=None, want_exact=None):
    """Certify a zero of ``required`` near ``point`` (affine coordinates), raising the precision while needed.

    ``pinned`` equations (slices through the point) are always in the square subsystem and are no part
    of the claim. ``squares`` caches square subsystems across the points of one system. With
    ``want_exact`` a numerical certificate with equations outside its square subsystem (only a backward
    error for them) is retried at higher precision for an exact one; by default whenever ``max_digits``
    is above ``digits`` (the caller asked for the decision to be proved).
    """
    if want_exact is None:
        want_exact = options.limit > options.digits
    options = options.validated()
    point = np.asarray(point, dtype=complex)
    n = required[0].n_variables if required else len(point)
    if point.shape != (n,):
        raise InputError(f"the point has {point.shape[0] if point.ndim == 1 else point.shape} "
                         f"coordinates, the equations {n} variables")
    if not np.all(np.isfinite(point)):
        raise InputError("the point has non-finite coordinates")
    digits, tried = options.digits, []
    while True:
        certificate, wanted = _certify_zero_at(required, point, options, claim, digits, tuple(pinned),
                                               exact_check, squares)
        tried.append(digits)
        inexact = (want_exact and certificate.certified and certificate.kind != Kind.EXACT
                   and certificate.backward_error is not None and exact_check)
        if inexact and wanted is None:
            wanted = 2 * digits
        open_question = certificate.status == Status.UNDECIDED or inexact
        if not open_question or wanted is None or digits >= options.limit:
            break
        digits = min(options.limit, max(int(wanted), 2 * digits))
    certificate.digits_tried = tried
    if certificate.status == Status.UNDECIDED and wanted is not None:
        if options.limit > options.digits:
            certificate.reason += f" (still undecided at the limit of {options.limit} digits)"
        else:
            certificate.reason += (f" (at {digits} digits; more precision may decide it: "
                                   f"{'max_digits' if options.max_digits is not None else 'raise max_digits'} "
                                   f"{max(int(wanted), 2 * digits)})")
    return certificate


def _certify_zero_at(required, point, options, claim, digits, pinned, exact_check, squares,
                     allow_restriction=True):
    """One attempt at ``digits``. Returns (certificate, digits that might decide it or None)."""
    reach = options.match_radius * (1 + float(np.max(np.abs(point), initial=0.0)))
    threshold = 10.0 ** (-(digits - options.guard_digits))

    def failed(reason, wanted=None, **extra):
        # coordinates inside the reach of 0 are rounding of exact zeros more often than not (a point at 1e-49
        # after a change of coordinates, where the numerical routes fail): the point with them snapped to 0 is
        # tried exactly before anything is refuted (decision 0098)
        snapped = np.where(np.abs(point) <= reach, 0, point)
        if exact_check and options.exact and not pinned and np.any(snapped != point):
            exact = _exact_at_point(required, snapped, claim, digits, threshold)
            if exact is not None:
                exact.distance = float(np.max(np.abs(snapped - point)))
                exact.notes.append("coordinates within the reach of 0 were taken as exact zeros")
                return exact, None
        if exact_check and options.exact and not pinned:
            # decision 0133: rationals of short denominators within the reach (a triple point at -215000/147 in
            # mm, where deflated Newton fails), each proved or dropped by exact substitution
            for rational, values in _short_rationals(point, reach):
                exact = _exact_at_point(required, values, claim, digits, threshold, exact=rational)
                if exact is not None:
                    exact.distance = float(np.max(np.abs(values - point)))
                    exact.notes.append("the coordinates, read as rationals of short denominators within the reach, "
                                       "are an exact zero")
                    return exact, None
        # a box of the reach around the point, or one of the match radius relative to each coordinate
        # (a coordinate of size 1e-4 beside one of 1e4 would otherwise get a box that holds 0)
        magnitudes = np.abs(point)
        relative = [float(options.match_radius * max(a, 1e-8 * magnitudes.max(initial=0.0), 1e-300))
                    for a in magnitudes]
        boxes = [[reach] * len(point)]
        # the relative box is no refutation of the claim where the point, with every coordinate inside the
        # reach snapped to 0, is itself a zero: a point of size 1e-49 stands for the origin, and a box of
        # 1e-55 around it proves nothing about the zero the computation approximated
        if not np.any(snapped != point) or _refute(required, snapped, 0.0, max(digits, 20)) is not None:
            boxes.append(relative)
        for radii in boxes:
            refuting = _refute(required, point, radii, max(digits, 20))
            if refuting is not None:
                size = "{:.3g}".format(reach) if radii[0] == reach and len(set(radii)) == 1 else \
                    f"{options.match_radius:.3g} of each coordinate's size"
                return Certificate(status=Status.REFUTED, kind=Kind.NUMERICAL, claim=claim, center=point,
                                   center_text=[_text(v, 17) for v in point], radius=max(radii),
                                   digits=digits, method="interval exclusion", threshold=threshold,
                                   radii=list(radii), reason=f"no zero within {size} of the point: equation "
                                   f"{refuting + 1} of the claim is nonzero over that box; before that: {reason}",
                                   **extra), None
        return _undecided(claim, point, digits, reason, threshold=threshold, **extra), wanted

    if exact_check and options.exact and not pinned:
        exact = _exact_at_point(required, point, claim, digits, threshold)
        if exact is not None:
            return exact, None
    found, problem, wanted, deflations = _locate(required, pinned, point, options, digits, squares, reach, False)
    if found is None and deflations:
        # the deflations used the rank in units of the point; try again with the rank in absolute units,
        # which sees a zero at the origin that the other one cannot
        again = _locate(required, pinned, point, options, digits, None, reach, True)
        if again[0] is not None:
            found, problem, wanted, deflations = again
    if found is None:
        if deflations and problem:
            problem += f" (after {counted(deflations, 'round')} of isosingular deflation)"
        return failed(problem, wanted, deflations=deflations)
    box, rows, deflations, square, chosen = found
    return _settle(required, point, options, claim, digits, pinned, exact_check, box, rows, deflations, square,
                   chosen, reach, threshold, allow_restriction)


def _settle(required, point, options, claim, digits, pinned, exact_check, box, rows, deflations, square, chosen,
            reach, threshold, allow_restriction):
    """Account for every equation of the claim over the proved box; exact routes; the certificate."""
    mp, iv = mpmath.mp, mpmath.iv
    n = len(point)
    w = _guarded(digits)
    with working_digits(w):
        alpha, beta = square.alpha(box.center)
        alpha_ok = alpha is not None and alpha < mp.mpf(alpha_zero(iv).a)
        rest_index = [k for k in range(len(required)) if k not in rows]
        rest = [required[k] for k in rest_index]
        interval_box = _iv_box(box.center, box.radii)
        accounting = _account(rest, interval_box)
        distance = float(max((abs(complex(c) - p) for c, p in zip(box.center, point)), default=0.0))
        texts, radii = _publish(square, box, digits)
        common = dict(deflations=deflations, square_equations=[int(k) for k in rows],
                      alpha=None if alpha is None else float(alpha), alpha_certified=bool(alpha_ok),
                      alpha_radius=None if beta is None else float(2 * beta), threshold=threshold,
                      radii=radii, distance=distance)
        certificate = Certificate(
            status=Status.CERTIFIED, kind=Kind.NUMERICAL, claim=claim,
            center=np.array([complex(c) for c in box.center]), center_text=texts,
            radius=max(radii, default=0.0), digits=digits,
            method=box.method, real=box.real,
            backward_error=None if accounting.backward is None else _float_up(accounting.backward),
            residual_bound=None if accounting.residual is None else _float_up(accounting.residual), **common)
        if deflations:
            certificate.notes.append(f"{counted(deflations, 'round')} of isosingular deflation made the zero regular; "
                                     "every equation of the claim is still accounted for; numerically, this is an "
                                     "exact multiple zero of equations within the backward error, and the given "
                                     "ones may have a cluster of simple zeros here instead (more digits, or an "
                                     "exact certificate, tell them apart)")
        # Only when the square subsystem consists of equations of the claim is every zero of the claim in
        # the box a zero of it, so that its unique zero speaks for the whole box; deflation minors and
        # slices through the point are not met by every zero of the claim.
        pure = not pinned and all(k < len(required) for k in rows)
        if accounting.excluded:
            k = rest_index[accounting.excluded[0]]
            refuting = _refute(required, point, reach, max(digits, 20))
            if pure or refuting is not None:
                certificate.status = Status.REFUTED
                certificate.reason = (f"the box holds exactly one zero of the square subsystem, and equation "
                                      f"{k + 1} of the claim does not vanish anywhere on it: the box holds no zero "
                                      "of the claim" if pure else
                                      f"equation {refuting + 1} of the claim does not vanish anywhere within "
                                      f"{reach:.3g} of the given point")
                if pure and refuting is not None:
                    certificate.reason += f"; nor does any point within {reach:.3g} of the given point"
                if not pure:  # the box written is the one around the given point
                    certificate.center_text = [_text(v, 17) for v in point]
                    certificate.center = np.asarray(point, dtype=complex)
                    certificate.radii, certificate.radius = [reach] * n, reach
                    certificate.method = "interval exclusion"
                return certificate, None
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"equation {k + 1} of the claim does not vanish at the zero of the square "
                                  "subsystem (which has deflation minors or slices through the point, so other "
                                  "zeros of the claim may lie in the box)")
            return certificate, 2 * digits
        wanted = None
        if accounting.backward is not None and not accounting.backward <= threshold:
            k = rest_index[accounting.worst]
            certificate.status = Status.UNDECIDED
            if accounting.backward == mp.inf:
                certificate.reason = (f"equation {k + 1} of the claim: its terms can all vanish in the box, so its "
                                      f"bound {float(accounting.uppers[accounting.worst]):.2g} over the box cannot "
                                      "be compared with their size")
            else:
                certificate.reason = (f"equation {k + 1} of the claim is bounded by "
                                      f"{float(accounting.uppers[accounting.worst]):.2g} over the box, "
                                      f"{float(accounting.backward):.2g} of the size of its terms: not below "
                                      f"10^-{digits - options.guard_digits} (a near miss, or too few digits)")
            wanted = 2 * digits
        exact_allowed = exact_check and options.exact and all(p.is_exact for p in required + list(chosen))
        if exact_allowed:
            outcome = _exact_route(square, required, list(chosen), box.center, box.radii, options, digits)
            if outcome.outcome is Recognition.REFUTED and not pure:
                outcome = _ExactOutcome(Recognition.NONE, note="the exact zero of the deflated square subsystem is not a zero "
                                                     "of the claim (other zeros of the claim may lie in the box)")
            _apply_exact(certificate, outcome)
            if outcome.outcome is not Recognition.NONE:
                return certificate, None
        if exact_allowed and rest and _is_rational(required + list(chosen)):
            proved, needed, note = _separation(list(chosen), rest, accounting)
            certificate.notes.append(note)
            if proved:
                certificate.status, certificate.kind = Status.CERTIFIED, Kind.EXACT
                certificate.exact_method, certificate.reason = "root separation", ""
                certificate.backward_error = 0.0  # an exact zero of every equation
                return certificate, None
            if certificate.status == Status.UNDECIDED and needed is not None:
                wanted = max(wanted or 0, needed)
            elif certificate.certified and needed is not None:
                wanted = needed  # a caller that wants exactness may raise the precision
        if certificate.status == Status.UNDECIDED and allow_restriction:
            zero = [j for j in range(n) if _holds_zero(interval_box[j])]
            if zero:
                restricted = _restricted(required, point, zero, options, claim, digits, exact_check, pinned)
                if restricted is not None:
                    return restricted, None
        return certificate, wanted


def _restricted(required, point, zero, options, claim, digits, exact_check, pinned=()):
    """Certify inside the subspace where the coordinates ``zero`` vanish exactly; the certificate lifted
    back (those coordinates exactly 0), or None. Slices through the point are restricted too."""
    n = len(point)
    reach = options.match_radius * (1 + float(np.max(np.abs(point), initial=0.0)))
    if any(abs(point[j]) > reach for j in zero):
        return None
    restricted = [_restrict(p, zero) for p in required]
    if any(_is_constant(p) and not p.is_zero() for p in restricted):
        return None  # the zero (if any) is not in that subspace
    live = [k for k, p in enumerate(restricted) if not p.is_zero()]
    keep = [j for j in range(n) if j not in zero]
    threshold = 10.0 ** (-(digits - options.guard_digits))
    if not live:
        with working_digits(_guarded(digits)):
            center = [mpmath.mp.mpc(0) if j in zero else mpmath.mp.mpc(point[j]) for j in range(n)]
        certificate = Certificate(
            status=Status.CERTIFIED, kind=Kind.EXACT, claim=claim, center=np.array([complex(c) for c in center]),
            center_text=["0" if j in zero else _text(center[j], 17) for j in range(n)], radius=0.0, digits=digits,
            method="exact substitution", threshold=threshold, radii=[0.0] * n, zero_coordinates=list(zero),
            backward_error=0.0, residual_bound=0.0,
            exact_method="identically zero", distance=float(np.max(np.abs(point - np.array(
                [complex(c) for c in center])), initial=0.0)),
            exact_coordinates=None if keep else ["0"] * n)
        certificate.notes.append("every equation of the claim vanishes identically where coordinates "
                                 f"{', '.join(str(j + 1) for j in zero)} are 0"
                                 + ("" if not keep else ": the point lies on a set of such zeros (not isolated)"))
        return certificate
    sub_point = point[keep]
    slices = tuple(_restrict(s, zero) for s in pinned)
    if len(slices) >= len(keep) or any(_is_constant(s) for s in slices):
        return None
    sub, _ = _certify_zero_at([restricted[k] for k in live], sub_point, options, claim, digits, slices,
                              exact_check, None, allow_restriction=False)
    if sub.status != Status.CERTIFIED:
        return None
    lifted = _insert_zeros(sub, zero, n, live)
    lifted.distance = max(lifted.distance or 0.0, float(max(abs(point[j]) for j in zero)))
    return lifted


def _insert_zeros(certificate, zero, n, numbering=None):
    """Put coordinates that are exactly 0 back into a certificate made in the subspace where they vanish."""
    keep = [j for j in range(n) if j not in zero]
    center = np.zeros(n, dtype=complex)
    center[keep] = certificate.center
    texts = ["0"] * n
    for position, j in enumerate(keep):
        texts[j] = certificate.center_text[position] if position < len(certificate.center_text) else ""
    certificate.center, certificate.center_text = center, texts
    if certificate.radii is not None:
        radii = [0.0] * n
        for position, j in enumerate(keep):
            radii[j] = certificate.radii[position]
        certificate.radii = radii
        certificate.radius = max(radii, default=0.0)
    if certificate.exact_coordinates is not None:
        coordinates = ["0"] * n
        for position, j in enumerate(keep):
            coordinates[j] = certificate.exact_coordinates[position]
        certificate.exact_coordinates = coordinates
    if numbering is not None:
        certificate.square_equations = [numbering[k] for k in certificate.square_equations]
    certificate.zero_coordinates = sorted(set(certificate.zero_coordinates) | set(zero))
    certificate.notes.append(f"certified where coordinates {', '.join(str(j + 1) for j in sorted(zero))} are "
                             "exactly 0: the equations restricted there have the certified zero")
    return certificate
