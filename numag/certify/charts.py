"""Charts of projective space and points at infinity: a projective point is certified in the affine
chart of its largest coordinate and the chart coordinate put back; a point at infinity (w = 0) is
certified on the top-degree forms with w = 0 exactly. Per-system caches of equations and charts are
kept weakly (dropped with the system).
"""

import weakref

import numpy as np

from ..errors import InputError
from .records import ClaimCheck, ClaimStatus, Status
from .zeros import _insert_zeros


def _chart(polynomials, point, charts=None):
    """Dehomogenise at the coordinate of largest modulus; returns (polynomials, affine point, index)."""
    point = np.asarray(point, dtype=complex)
    k = int(np.argmax(np.abs(point)))
    if abs(point[k]) == 0:
        raise InputError("the zero vector is not a projective point")
    affine = np.delete(point / point[k], k)
    if charts is None:
        return [p.dehomogenize(k) for p in polynomials], affine, k
    if k not in charts:
        charts[k] = [p.dehomogenize(k) for p in polynomials]
    return charts[k], affine, k


def _lift(certificate, k):
    """Put the chart coordinate (exactly 1) back into the certificate's centre and coordinates."""
    certificate.chart = k
    certificate.center = np.insert(np.asarray(certificate.center, dtype=complex), k, 1.0)
    certificate.center_text = list(certificate.center_text[:k]) + ["1"] + list(certificate.center_text[k:])
    if certificate.radii is not None:
        certificate.radii = list(certificate.radii[:k]) + [0.0] + list(certificate.radii[k:])
    certificate.zero_coordinates = [j + (j >= k) for j in certificate.zero_coordinates]
    if certificate.exact_coordinates is not None:
        certificate.exact_coordinates = (list(certificate.exact_coordinates[:k]) + ["1"]
                                         + list(certificate.exact_coordinates[k:]))
    return certificate


#: Per system: the singularity equations, their charts and square subsystems (dropped with the system).
_SYSTEM_CACHE = weakref.WeakKeyDictionary()


def _in_chart(polynomials, point, projective, run, charts=None):
    if not projective:
        return run(list(polynomials), np.asarray(point, dtype=complex))
    chart_polys, affine, k = _chart(polynomials, point, charts)
    return _lift(run(chart_polys, affine), k)


def _at_infinity(polynomials, point, run, charts=None, reach=1e-6):
    """Certify at a point (w : x) of the hyperplane at infinity: in the chart of x's largest coordinate,
    with w = 0 exactly (``polynomials`` are already restricted to w = 0, homogeneous in x)."""
    point = np.asarray(point, dtype=complex)
    given_w = point[0]
    certificate = _in_chart(polynomials, point[1:], True, run, charts)
    certificate = _insert_zeros(certificate, [0], len(point))
    certificate.chart = None if certificate.chart is None else certificate.chart + 1
    certificate.at_infinity = True
    scale = abs(point[1:][certificate.chart - 1]) if certificate.chart is not None else 1.0
    w = abs(given_w) / scale if scale else float("inf")
    certificate.distance = max(certificate.distance or 0.0, w)
    status = {Status.CERTIFIED: ClaimStatus.PROVED, Status.REFUTED: ClaimStatus.REFUTED}.get(
        certificate.status, ClaimStatus.UNVERIFIED)
    if w > reach:
        status = ClaimStatus.CONTRADICTED
        if certificate.certified:
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"the given point has w = {w:.3g} in the chart, not 0: it is not the point at "
                                  "infinity certified here")
    found = {ClaimStatus.PROVED: True, ClaimStatus.REFUTED: False}.get(status)
    certificate.claim_checks.append(ClaimCheck("at infinity", True, found, status,
                                               "a zero of the top-degree forms (F^h with w = 0) in the chart"))
    return certificate


def _chart_center(certificate, chart):
    center = np.asarray(certificate.center, dtype=complex)
    return center if chart is None else np.delete(center, chart)


def _rank_polynomials(system, certificate, projective, at_infinity):
    """F in the coordinates of the certificate's box (the chart for projective points), and the chart."""
    if at_infinity:
        homogenized = [p.homogenize(0) for p in system.polynomials]
        return [p.dehomogenize(certificate.chart) for p in homogenized], certificate.chart
    if projective:
        return [p.dehomogenize(certificate.chart) for p in system.polynomials], certificate.chart
    return list(system.polynomials), None
