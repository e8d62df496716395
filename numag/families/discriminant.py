"""The discriminant of a family: the parameter values p where the member X_p is singular.

It is the projection to parameter space of the incidence singular set

    S = {(x, p) : F(x, p) = 0, rank J_x F(x, p) < c}

(c the codimension of a generic member, J taken in x only), written with the singular locus's
minors formulation (:func:`numag.singular.locus.minors_system` with the columns of x) and decomposed
into irreducible components (:func:`numag.witness.decompose.decompose`). The image of an
irreducible component of S is irreducible; its dimension is the rank of the projection on the
component's tangent space, and its degree is counted on a witness set *of the projection*: the
component's witness points are moved (parameter homotopy) to D random real hyperplanes in parameter
space only (D the image's dimension) and, where the fibre is positive-dimensional, random
hyperplanes in x only; the distinct projections of the endpoints are the image's witness points.
Images of several components that coincide are merged. Real hyperplanes make real witness points
real samples of the discriminant.

For one parameter the discriminant is a set of points; the real ones, sorted, cut the parameter
line into regions, and one sample per region is solved: its real solutions (isolated members) or
real branches (curve members; :mod:`numag.families.branches`). For two parameters the plane is cut
by vertical lines at evenly spaced values of the first parameter (over its ``[ranges]`` interval),
each line treated as a one-parameter family (cells: line, interval, count); the real discriminant
curve is traced, its cusps and nodes found, and the cells merged into regions of the plane
(:mod:`numag.families.plane`).

Members whose closure is singular at infinity in x give components told apart (kind "at infinity"),
from the same computation on the hyperplane at infinity (x homogenised, X_0 = 0, in a random chart).

Examples
--------
>>> from numag.system.parse import parse_system
>>> from numag.system.family import Family
>>> family = Family(parse_system(["x^2 - p"], ["x", "p"]), ("p",))
>>> result = discriminant(family, seed=2)
>>> [(c.dimension, c.degree, c.kind.value) for c in result.components]
[(0, 1, 'finite')]
>>> [(r.low, r.high, r.count.solutions) for r in result.regions]
[(-inf, 0.0, 0), (0.0, inf, 2)]
"""

from dataclasses import dataclass, field
import itertools
import math
import time

import numpy as np

from ..errors import InputError, LimitError
from ..system.display import counted, short_point
from ..system.exact import ExactCoefficient
from ..system.family import Family, ParameterRange
from ..system.polynomial import Polynomial, PolynomialSystem, combined_minor, determinant
from ..numeric.cluster import cluster_labels, groups
from ..numeric.evaluate import BatchEvaluator
from ..numeric.refine import project_to_variety
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from ..tracking.service import add_path_counts
from ..tracking.solve import solve_system
from ..tracking.tracker import FAILURE_LABELS
from ..witness.cascade import combine_equations, linear_form, track_moves
from ..witness.decompose import DecomposeOptions, decompose, holding_equations
from ..singular.locus import minors_system
from .branches import RealCount, real_counts
from .centring import centred_family, locate
from .lines import discriminant_on_lines
from .plane import (CurvePoint, CurvePointKind, DiscriminantCurve, PlaneRegion, SingularIncidence, _box as plane_box,
                    _nodes, classify_join, clipped, conjugate_pair_points, merge_cells, reach_box, snapped_ends,
                    trace_discriminant_curve)
from .records import MISSED_ON_LINES, REAL_TOLERANCE, ComponentKind, decode_complex, decode_float, encode_complex, encode_float

__all__ = ["DiscriminantOptions", "DiscriminantComponent", "Region", "Discriminant", "discriminant"]


@dataclass(frozen=True)
class DiscriminantOptions:
    """Options of :func:`discriminant` (defaults declared once).

    Attributes
    ----------
    decompose : DecomposeOptions
    max_exact_minors : int
        All c x c minors of J_x when there are at most this many, else random combinations.
    regions : bool
        Solve one sample per region (one parameter) or per cell (two parameters).
    lines : int
        Two parameters: vertical lines across the first parameter's range.
    at_infinity : bool
        Also look for members singular at infinity in x (a second computation of the same size).
    curve : bool
        Two parameters: trace the real discriminant curve, find its cusps and nodes, merge the cells.
    trace_lines : int
        Two parameters, members that are not finite sets of points: parallel lines across which the curve is
        traced (:mod:`numag.families.lines`).
    components : bool
        Decompose the incidence set into the discriminant's components (the most expensive step of a family
        of curves with two parameters; the curve and the regions do not need it).
    isolated_points : bool
        Two parameters, with the curve: also solve for isolated real points of the discriminant over conjugate
        pairs of singular points (:func:`numag.families.plane.conjugate_pair_points`; x^4 + a x^2 + b x + 1:
        144 paths, about 4 minutes at load 10 on the shared machine, hence off by default).
    """

    decompose: DecomposeOptions = DecomposeOptions()
    max_exact_minors: int = 24
    regions: bool = True
    lines: int = 7
    at_infinity: bool = True
    curve: bool = True
    trace_lines: int = 60
    components: bool = True
    isolated_points: bool = False


@dataclass
class DiscriminantComponent:
    """One irreducible component of the discriminant.

    Attributes
    ----------
    dimension, degree : int
        Of the image in parameter space.
    points : ndarray, shape (degree, m)
        Witness points of the image on :attr:`slice_rows` (for dimension 0, the point itself).
    real : ndarray of bool
        Real witness points (real samples of the discriminant, the slices being real).
    slice_rows : ndarray, shape (dimension, m + 1)
        Real hyperplanes a . (1, p) = 0 of the witness points.
    kind : ComponentKind
    fibre_dimension : int
        Dimension of the set of singular points x over a point of the component.
    multiplicity : int
        Dimension 0: the paths that met at the incidence point; a root where m paths meet is known to about
        eps^(1/m) only, and is printed at that accuracy (images merged as one point add theirs up).
    """

    dimension: int
    degree: int
    points: np.ndarray
    real: np.ndarray
    slice_rows: np.ndarray
    kind: ComponentKind
    fibre_dimension: int = 0
    multiplicity: int = 1

    def to_dict(self):
        return {"dimension": int(self.dimension), "degree": int(self.degree), "points": encode_complex(self.points),
                "real": [bool(r) for r in self.real], "slice_rows": self.slice_rows.real.tolist(),
                "kind": self.kind.value, "fibre_dimension": int(self.fibre_dimension),
                "multiplicity": int(self.multiplicity),
                "slice_columns": int(self.slice_rows.shape[1]) if self.slice_rows.ndim == 2 else 0}

    @classmethod
    def from_dict(cls, data):
        return cls(int(data["dimension"]), int(data["degree"]), decode_complex(data["points"]),
                   np.array(data["real"], dtype=bool), np.array(data["slice_rows"], dtype=float).reshape(
                       int(data["dimension"]), -1) if data["slice_rows"] else
                   np.zeros((0, int(data.get("slice_columns", 0)))),
                   ComponentKind(data["kind"]), int(data["fibre_dimension"]), int(data.get("multiplicity", 1)))


@dataclass
class Region:
    """An interval of a parameter line between real discriminant points, with its sample's real count.

    Attributes
    ----------
    low, high : float
        The interval (-inf / inf at the ends).
    sample : ndarray of float, shape (m,)
        The parameter value solved.
    count : RealCount
    line : float or None
        Two parameters: the value of the first parameter on this line (the interval is in the second).
    """

    low: float
    high: float
    sample: np.ndarray
    count: RealCount
    line: object = None

    def to_dict(self):
        return {"low": encode_float(self.low) if self.low != -math.inf else "-infinity",
                "high": encode_float(self.high), "sample": [float(v) for v in self.sample],
                "count": self.count.kind.value,
                "real_solutions": self.count.solutions, "real_branches": self.count.branches,
                "failed": int(self.count.failed), "undecided": int(self.count.undecided), "line": self.line}

    @classmethod
    def from_dict(cls, data):
        low = -math.inf if data["low"] == "-infinity" else decode_float(data["low"])
        return cls(low, decode_float(data["high"]), np.array(data["sample"], dtype=float),
                   RealCount(data["real_solutions"], data["real_branches"], int(data["failed"]),
                             int(data.get("undecided", 0))), data["line"])


@dataclass
class Discriminant:
    """Result of :func:`discriminant`.

    Attributes
    ----------
    variables, parameters : tuple of str
    equations : list of str
    codimension : int
        Codimension of a generic member (the rank J_x must reach).
    components : list of DiscriminantComponent
        Finite ones first, by dimension (highest first).
    real_points : ndarray of float
        One parameter: the real discriminant points (finite kind), sorted.
    regions : list of Region
        One parameter: intervals of the line; two: cells (line, interval).
    curve : DiscriminantCurve or None
        Two parameters: the traced real discriminant curve, its cusps and nodes.
    plane_regions : list of PlaneRegion
        Two parameters: the cells merged into regions of the plane, each with one solved sample.
    paths : dict
        Tracked paths by status over every homotopy.
    notes : list of str
    seed : int
    seconds : float
    """

    variables: tuple
    parameters: tuple
    equations: list
    codimension: int
    components: list
    real_points: np.ndarray
    regions: list
    paths: dict
    notes: list
    seed: int
    seconds: float
    curve: object = None
    plane_regions: list = field(default_factory=list)

    def to_dict(self):
        return {"kind": "discriminant", "curve": None if self.curve is None else self.curve.to_dict(),
                "plane_regions": [r.to_dict() for r in self.plane_regions], "variables": list(self.variables),
                "parameters": list(self.parameters),
                "equations": list(self.equations), "codimension": int(self.codimension),
                "components": [c.to_dict() for c in self.components],
                "real_points": [float(v) for v in self.real_points], "regions": [r.to_dict() for r in self.regions],
                "paths": dict(self.paths), "notes": list(self.notes), "seed": int(self.seed),
                "seconds": encode_float(self.seconds)}

    @classmethod
    def from_dict(cls, data):
        return cls(tuple(data["variables"]), tuple(data["parameters"]), list(data["equations"]),
                   int(data["codimension"]), [DiscriminantComponent.from_dict(c) for c in data["components"]],
                   np.array(data["real_points"], dtype=float), [Region.from_dict(r) for r in data["regions"]],
                   dict(data["paths"]), list(data["notes"]), int(data["seed"]), decode_float(data["seconds"]),
                   DiscriminantCurve.from_dict(data["curve"]) if data.get("curve") else None,
                   [PlaneRegion.from_dict(r) for r in data.get("plane_regions", [])])


def discriminant(family, options=None, seed=None, progress=None, *, _balanced=False, _located=False,
                 _shown_factors=None):
    """The discriminant of a family: components with dimension, degree, samples; regions with real counts.

    Parameters
    ----------
    family : Family
        One or more parameters; members are taken to be complete intersections (codimension the
        number of equations).
    options : DiscriminantOptions, optional
    seed : int, optional
    progress : callable, optional
        ``progress(message)``.

    Returns
    -------
    Discriminant

    Raises
    ------
    InputError
        For a family without parameters or with more equations than variables.
    """
    options = options or DiscriminantOptions()
    if not isinstance(family, Family) or not family.parameters:
        raise InputError("a discriminant needs a family with parameters")
    n, m = family.n_variables, family.n_parameters
    codimension = family.system.n_equations
    if codimension > n:
        raise InputError(f"the family has {counted(codimension, 'equation')} in {counted(n, 'variable')}: its members are empty for "
                         "generic parameters")
    seed, rng = random_state(seed)
    if not (_balanced or _located):
        # features far from the origin are cancellations double precision cannot see: locate them, and work in
        # x-coordinates centred there (exact; nothing in parameter space moves; decision 0082)
        found = locate(family, codimension, seed=int(np.random.default_rng([seed, 82]).integers(2 ** 63)),
                       max_exact_minors=options.max_exact_minors)
        try:
            centred = None if found.centring is None else centred_family(family, found.centring)
        except LimitError:  # too large to write out about another origin: computed where it is, as before
            centred = None
        if centred is not None:
            if progress is not None:
                progress(f"working in x-coordinates centred at {short_point(found.x_centre)}")
            computed = discriminant(centred, options, seed=seed, progress=progress, _located=True)
            computed.variables, computed.equations = family.variables, family.system.to_texts()
            computed.notes.append(f"Computed in x-coordinates centred at {short_point(found.x_centre)} (written "
                                  "exactly): the members' singular points lie far from the origin compared with "
                                  "their distances.")
            return computed
    scaling = Scaling.balancing(family.system, fixed=_range_units(family))
    # once: balancing the balanced family need not give the identity (a coefficient of 1e-3 beside ones
    # moves a power of ten again), and asking again would never end
    if not _balanced and not scaling.is_identity:
        # every tolerance below is relative to numbers of order one: compute in balanced units (powers of ten
        # of x and p together; exact input stays exact) and report in the user's (decision 0002)
        factors = scaling.variable_factors[n:]
        ranges = {name: ParameterRange(name, r.low / factors[family.parameters.index(name)],
                                       r.high / factors[family.parameters.index(name)])
                  for name, r in family.ranges.items()}
        computed = discriminant(Family(scaling.scale_system(family.system), family.parameters, ranges), options,
                                seed=seed, progress=progress, _balanced=True, _located=True,
                                _shown_factors=factors)
        return _in_user_units(computed, factors, family)
    started = time.perf_counter()
    paths, notes = {}, []
    components = []
    if options.components:
        components = _finite_components(family, codimension, options, rng, paths, notes, progress)
    else:
        notes.append("The components of the discriminant were not computed (asked for): no dimensions, degrees or "
                     "witness points.")
    if options.at_infinity and options.components:
        components += _components_at_infinity(family, codimension, options, rng, paths, notes, progress)
    if any(c.kind == ComponentKind.EVERY_MEMBER for c in components):
        notes.append("Every member is singular somewhere (at infinity in x, or at a finite point): a component of "
                     "the incidence set projects onto all of parameter space. That is no condition on the "
                     "parameters; it is listed as 'every member' and left out of the regions.")
    real_points = np.zeros(0)
    regions = []
    if m == 1:
        real_points = _real_values(components, ComponentKind.FINITE)
        if options.regions:
            # solutions that run off to infinity change the real count too: those values cut the line as well
            cuts = np.union1d(real_points, _real_values(components, ComponentKind.AT_INFINITY))
            regions = _regions_on_line(family, cuts, rng, lambda value: np.array([value]), None)
    curve, plane_regions = None, []
    # members that are not finite sets of points (curves): the curve and the cells from lines (decision 0060)
    on_lines = m == 2 and codimension != n and (options.curve or options.regions)
    if on_lines:
        curve, regions = _curve_and_cells_on_lines(family, codimension, options, rng, paths, notes, progress)
    elif m == 2 and options.curve:
        curve = _traced_curve(family, codimension, options, rng, notes, progress)
    if m == 2 and options.regions:
        if not on_lines:
            regions = _regions_on_lines(family, options, rng, notes, progress, _shown_factors)
        if curve is not None:
            merged = merge_cells(regions, curve)
            plane_regions = merged.regions
            notes += merged.notes()
    if curve is not None:
        # a real member singular only at non-real points is singular at a conjugate pair: two conditions, so
        # such parameter values are isolated points of the real plane, off the traced real incidence set
        _isolated_points(family, codimension, options, seed, curve, paths, notes)
    if m > 2 and options.regions:
        notes.append("Regions are given for one or two parameters; with more, sweep a grid instead.")
    # the blocks added up come with and without a total of failures: the total is the sum of its reasons
    paths["failed"] = sum(paths.get(label, 0) for label in FAILURE_LABELS)
    return Discriminant(family.variables, family.parameters, family.system.to_texts(), codimension, components,
                        real_points, regions, paths, notes, seed, time.perf_counter() - started, curve, plane_regions)


def _range_units(family):
    """Each parameter with a range: its power of ten from the range (the larger end, rounded in log10; decision
    0102), so that the terms do not set it (an off-centre cubic family put a in units of 1e-3 and b of 1e-5, where
    its cuts on a < 0 were not found).

    Examples
    --------
    >>> from numag.system.files import family_from_mapping
    >>> family = family_from_mapping({"variables": ["x"], "parameters": ["a", "b"], "equations": ["x^2 - a*x - b"],
    ...                               "ranges": {"a": [-3, 3], "b": [0, 20000]}})
    >>> _range_units(family)
    {1: 0, 2: 4}
    """
    n = len(family.system.variables) - len(family.parameters)
    units = {}
    for name, r in family.ranges.items():
        largest = max(abs(float(r.low)), abs(float(r.high)))
        if largest > 0 and math.isfinite(largest):
            units[n + family.parameters.index(name)] = int(round(math.log10(largest)))
    return units


def _in_user_units(result, factors, family):
    """A discriminant computed in balanced units, with its parameter values multiplied back by ``factors``."""
    scale = np.asarray(factors, dtype=float)
    for component in result.components:
        component.points = component.points * scale
        if component.slice_rows.size:  # a . (1, p / f) = 0  <=>  (a_0, a / f) . (1, p) = 0
            component.slice_rows = np.column_stack([component.slice_rows[:, :1], component.slice_rows[:, 1:] / scale])
    result.real_points = result.real_points * scale[0] if len(scale) == 1 else result.real_points
    along = scale[-1]  # the regions' intervals are in the last parameter (the only one, or the second of two)
    for region in result.regions:
        region.low, region.high = region.low * along, region.high * along
        region.sample = region.sample * scale
        if region.line is not None:
            region.line = float(region.line * scale[0])
    for region in result.plane_regions:
        region.sample = region.sample * scale
    if result.curve is not None:
        result.curve.arcs = [arc * scale for arc in result.curve.arcs]
        result.curve.box = tuple(corner * scale for corner in result.curve.box)
        for point in result.curve.special:
            point.point = point.point * scale
    result.variables, result.equations = family.variables, family.system.to_texts()
    return result


def _curve_and_cells_on_lines(family, codimension, options, rng, paths, notes, progress):
    """Two parameters, members not finite: the curve traced across lines and the cells of vertical lines.

    One sweep of the null-vector system on lines (:mod:`numag.families.lines`); the cells' samples are
    counted together in one call.
    """
    low, high, missing = plane_box(family)
    if missing:
        notes.append(f"No [ranges] interval for {', '.join(missing)}: the curve is traced and the cells are on "
                     "lines for -1 to 1 there.")
    verticals = np.linspace(low[0], high[0], options.lines) if options.regions else []
    # without the curve (--no-curve) two trace lines are the least the sweep takes; their links are dropped
    trace_lines = options.trace_lines if options.curve else 2
    if progress is not None:
        progress(f"the discriminant on {trace_lines + len(verticals)} lines across the plane")
    found = discriminant_on_lines(family, codimension, (low, high), verticals, trace_lines, rng)
    add_path_counts(paths, found.paths)
    if found.missed_multiple:
        # lines that miss points of a multiple component (decision 0107): failures, like failed paths
        paths[MISSED_ON_LINES] = paths.get(MISSED_ON_LINES, 0) + found.missed_multiple
    notes += found.notes
    notes.append("The discriminant was met on lines of the parameter plane (the members are not finite sets of "
                 "points)" + ("; cusps and crossings that Newton could not refine (e.g. on a multiple component) are "
                              "given at the traced accuracy (within about a line spacing)." if options.curve else "."))
    special, refining, n = [], None, family.n_variables
    if options.curve:
        # refined like the traced curve's (one place: plane.SingularIncidence); the traced positions are within
        # about a line spacing, so Newton may move them that far
        refining = SingularIncidence.of(family, codimension, options.max_exact_minors)
        reach = 2.0 * found.spacing
        # a join's middle is not a point of the curve: Newton tells a cusp from a fold (not reported) (decision 0079)
        joins = [classify_join(refining, lift, ends, n, reach)
                 for lift, ends in zip(found.cusp_lifts, found.cusp_ends)]
        special = _nodes(refining, found.lifts, n, float(np.linalg.norm(high - low)), reach, span=high - low) \
            + [point for point in joins if point is not None]
        special = _settled_crossings(found, special, notes)
    # failed paths of the sweep and arc ends that could be neither continued nor joined: where the picture may
    # miss a piece (counted like the stalled arc ends of the other tracer)
    # cut to where the regions are merged; the ends cut from a chord are put back on the curve, except on a multiple
    # component (G vanishes to second order there: a small residual is no sign of being on it)
    lifts, sources = clipped(found.lifts, *reach_box(low, high))
    on_multiple = [bool(found.multiple_arcs[k]) if found.multiple_arcs else False for k in sources]
    arcs = [(lift if multiple else snapped_ends(refining, lift, *reach_box(low, high)))[:, n:]
            for lift, multiple in zip(lifts, on_multiple)]
    curve = DiscriminantCurve(arcs, (low, high), special, found.failed + found.lost_links,
                              multiple=on_multiple if found.multiple_arcs else []) \
        if options.curve else None
    cells = []
    if options.regions:
        if progress is not None:
            progress("counting the real branches of one member per cell")
        cells = _cells(family, found.cuts, rng)
    return curve, cells


def _settled_crossings(found, special, notes):
    """Crossings located on circles of line offsets (lines.CrossingCircle, decision 0093); those that stay
    undecided are named with their reason in a note.

    Newton's nodes too: on a double line (a length 0) the node's system has a curve of solutions (the member has
    two singular points all along it), and Gauss-Newton stopped on it 5e-9 from the crossing, calling a meeting a
    node (measured: the four-bar with two lengths, seed 1, at (0, 6) and (-6, 0)). Where the circle cannot settle
    a node Newton refined, Newton's answer stays.
    """
    kept, reasons = [], {}
    for point in special:
        undecided = point.kind == CurvePointKind.UNDECIDED and point.candidate == CurvePointKind.NODE
        if undecided or point.kind == CurvePointKind.NODE:
            settled, reason = found.settled(point)
            if reason is None:
                point = settled
            elif undecided:  # the points are in computed units here: the reasons are counted, not placed
                reasons[reason] = reasons.get(reason, 0) + 1
        kept.append(point)
    if reasons:
        notes.append("Crossings of the curve left undecided (neither Newton nor a circle of lines around them located "
                     "them; more --trace-lines may separate them): "
                     + "; ".join(f"{reason} ({count})" for reason, count in reasons.items()) + ".")
    return kept


def _isolated_points(family, codimension, options, seed, curve, paths, notes):
    """Isolated real points over conjugate pairs of singular points, added to the curve's special points."""
    searched = None
    if options.isolated_points:
        incidence = SingularIncidence.of(family, codimension, options.max_exact_minors)
        if incidence is not None:
            # its own generator: the draws of the rest of the computation stay as without the search
            searched, counts = conjugate_pair_points(incidence, np.random.default_rng([int(seed), 70]))
            add_path_counts(paths, counts)
    if searched is None:
        reason = "not searched (asked for with isolated_points)" if not options.isolated_points \
            else "not searched (too many paths, or minors not all expanded)"
        notes.append("Isolated real points of the discriminant whose singular points are not real (a member with "
                     f"a conjugate pair of singular points) were {reason}; the real counts do not change there.")
        return
    curve.special += [CurvePoint(CurvePointKind.ISOLATED, point, True) for point in searched]
    notes.append(f"Isolated real points of the discriminant over conjugate pairs of singular points: {len(searched)} "
                 "(they do not cut regions: the real counts do not change there).")


def _traced_curve(family, codimension, options, rng, notes, progress):
    """The real discriminant curve of two parameters (None, with a note, where it cannot be traced)."""
    if family.system.n_equations != family.n_variables:
        # measured: a four-bar with two free lengths had not been traced after 13 minutes (decision 0054)
        notes.append("The real discriminant curve is traced for square members only (isolated solutions); for "
                     "members of positive dimension the regions are the cells on lines.")
        return None
    if progress is not None:
        progress("tracing the real discriminant curve")
    try:
        curve = trace_discriminant_curve(family, codimension, options.max_exact_minors, options.lines, rng)
    except InputError as err:
        notes.append(f"The real discriminant curve was not traced: {err}.")
        return None
    notes += curve.notes
    return curve


def _real_values(components, kind):
    """The real parameter values of the isolated components of one kind (one parameter), sorted."""
    values = [c.points[0, 0] for c in components if c.kind == kind and c.dimension == 0]
    return np.sort(np.array([z.real for z in values if abs(z.imag) <= REAL_TOLERANCE * (1 + abs(z))]))


def _finite_components(family, codimension, options, rng, paths, notes, progress):
    """Images of the components of the incidence singular set S (J in x only)."""
    n = family.n_variables
    try:
        incidence, kind = minors_system(family.system, codimension, rng, options.max_exact_minors, n_columns=n)
    except LimitError as err:
        raise InputError(f"the minors of J_x are too large to expand ({err})") from None
    if progress is not None:
        progress(f"decomposing the incidence set ({kind}: {incidence.n_equations} equations in "
                 f"{incidence.n_variables} unknowns)")
    return _images(incidence, n, family.n_parameters, ComponentKind.FINITE, options, rng, paths, notes)


def _images(incidence, n, m, kind, options, rng, paths, notes, offset=0):
    """Decompose an incidence system in (x, p) and project its components to p (the last m unknowns)."""
    total = incidence.n_variables
    if incidence.n_equations == total:
        # square (one parameter, a hypersurface member): total degree and the isolation test suffice, and
        # they do not depend on the regeneration's choices of which paths go to infinity
        solved = solve_system(incidence, seed=int(rng.integers(2 ** 63)))
        add_path_counts(paths, solved.path_counts())
        if not solved.not_isolated:
            images = [DiscriminantComponent(0, 1, s.point[None, total - m:], _real_rows(s.point[None, total - m:]),
                                            np.zeros((0, m + 1)), kind, multiplicity=int(s.multiplicity))
                      for s in solved.solutions]
            return _merged(images)
    decomposition = decompose(incidence, options.decompose, seed=int(rng.integers(2 ** 32)))
    add_path_counts(paths, decomposition.paths)
    if decomposition.unconfirmed:
        unconfirmed = len(decomposition.unconfirmed)
        verb, images = (("was", "its image may be a union") if unconfirmed == 1
                        else ("were", "their images may be unions"))
        notes.append(f"{counted(unconfirmed, 'component')} of the incidence set {verb} not confirmed by the trace "
                     f"test: {images}.")
    slices = {}  # image dimension -> real rows a . (1, p) = 0 shared by all components of that dimension
    images = []
    for component in decomposition.components:
        dimension, fibre, tangent = _projected_dimension(incidence, component, total, m, rng)
        if dimension == m:
            images.append(DiscriminantComponent(m, 1, component.points[:1, total - m:], np.zeros(1, bool),
                                                np.zeros((0, m + 1)), ComponentKind.EVERY_MEMBER, fibre))
            continue
        if dimension == 0:
            point, multiplicity = _sharpened(incidence, component, rng)
            point = point[:, total - m:]
            images.append(DiscriminantComponent(0, 1, point, _real_rows(point), np.zeros((0, m + 1)), kind, fibre,
                                                multiplicity))
            continue
        if dimension not in slices:
            rows = rng.standard_normal((dimension, m + 1))
            slices[dimension] = rows / np.linalg.norm(rows, axis=1, keepdims=True)
        points = _image_witness_points(incidence, component, total, m, slices[dimension], fibre, rng, options,
                                       paths)
        images.append(DiscriminantComponent(dimension, len(points), points, _real_rows(points),
                                            slices[dimension].copy(), kind, fibre))
    return _merged(images)


def _sharpened(incidence, component, rng):
    """A component's first witness point and the paths that met there; an isolated multiple point sharpened on
    deflated equations.

    Over b = 0 the four-bar has two double points: the endgame knows them to about 1e-11; with random
    minors added until the Jacobian has full rank (isosingular deflation) Gauss-Newton gets 1e-13 or better.
    """
    point = component.points[:1]
    if component.dimension or (component.reduced and component.multiplicity == 1):
        return point, 1
    equations, _ = holding_equations(incidence, incidence.n_variables, point, rng)
    moved = project_to_variety(PolynomialSystem(incidence.variables, equations), BatchEvaluator(equations), point)
    # the paths that met stay its count: Newton on deflated equations that converged is no bound on the error (a double
    # point at 0 came out at 4.6e-10 of 800 after it)
    return (moved.points if bool(moved.converged[0]) else point), max(2, int(component.multiplicity))


def _real_rows(points):
    return np.all(np.abs(points.imag) <= REAL_TOLERANCE * (1 + np.abs(points)), axis=1)


def _projected_dimension(incidence, component, total, m, rng):
    """(dimension of the image in p, dimension of the fibre, tangent basis) at the first witness point."""
    if component.dimension == 0:
        return 0, 0, None
    codim = total - component.dimension
    equations, _ = holding_equations(incidence, codim, component.points, rng)
    _, jacobian = BatchEvaluator(equations).evaluate(component.points[:1])
    _, values, vh = np.linalg.svd(jacobian[0])
    rank = int(np.sum(values > 1e-8 * max(values.max(initial=0), 1)))
    tangent = vh[rank:].conj().T
    projected = int(np.linalg.matrix_rank(tangent[total - m:], tol=1e-6)) if tangent.size else 0
    return projected, component.dimension - projected, tangent


def _image_witness_points(incidence, component, total, m, p_rows, fibre, rng, options, paths):
    """Move the component's witness points to slices in p only (and in x only for the fibre); project."""
    codim = total - component.dimension
    equations, _ = holding_equations(incidence, codim, component.points, rng)
    target_rows = np.zeros((len(p_rows) + fibre, total + 1), dtype=complex)
    target_rows[:len(p_rows), 0] = p_rows[:, 0]
    target_rows[:len(p_rows), 1 + total - m:] = p_rows[:, 1:]
    if fibre:
        x_rows = rng.standard_normal((fibre, total - m + 1)) + 1j * rng.standard_normal((fibre, total - m + 1))
        target_rows[len(p_rows):, :total - m + 1] = x_rows
    held = combine_equations([p.homogenize(0) for p in equations], codim, rng)
    run = track_moves(held + [linear_form(r) for r in component.slice_rows],
                      held + [linear_form(r) for r in target_rows], component.points, rng,
                      options.decompose.witness.tracker)
    run.counts.add_to(paths)
    ends = run.affine_endpoints()
    ends = ends[np.all(np.isfinite(ends), axis=1)][:, total - m:]
    if len(ends) == 0:
        return np.zeros((0, m), dtype=complex)
    return np.array([ends[g[0]] for g in groups(cluster_labels(ends, 1e-6))])


def _merged(images):
    """Images of several components that are one set (same dimension, same witness points on the same slice)."""
    merged = []
    for image in images:
        for kept in merged:
            if kept.kind == image.kind == ComponentKind.EVERY_MEMBER:
                break  # all of parameter space, whichever component of the incidence set
            if (kept.dimension == image.dimension and kept.kind == image.kind and kept.degree == image.degree
                    and _same_points(kept.points, image.points)):
                if kept.dimension == 0:
                    # paths that met there: a double root of the square incidence system came out as two "simple"
                    # roots 7e-9 apart (condition 3e7); its merged value is known to sqrt(eps) only. Where two
                    # distinct singular points lie over one value this is coarser than need be, never finer
                    kept.multiplicity += image.multiplicity
                break
        else:
            merged.append(image)
    merged.sort(key=lambda c: (c.kind != ComponentKind.FINITE, -c.dimension,
                               tuple(np.round(c.points[0].real, 9)) if len(c.points) else ()))
    return merged


def _same_points(a, b):
    if a.shape != b.shape:
        return False
    if len(a) == 0:
        return True
    labels = cluster_labels(np.vstack([a, b]), 1e-6)
    return sorted(labels[:len(a)].tolist()) == sorted(labels[len(a):].tolist())


def _components_at_infinity(family, codimension, options, rng, paths, notes, progress):
    """Members whose closure is singular at a point at infinity in x.

    x is homogenised alone (the parameters stay affine), X_0 is set to 0 and a random chart
    X = base + N y of the hyperplane at infinity is taken; the rank of the full Jacobian in (X_0, X)
    at such points is asked to drop below c.
    """
    n, m = family.n_variables, family.n_parameters
    homogeneous = []
    for polynomial in family.system.polynomials:
        p = polynomial.numeric()
        x_degrees = p.exponents[:, :n].sum(axis=1)
        top = int(x_degrees.max())
        homogeneous.append(Polynomial(np.column_stack([top - x_degrees, p.exponents]), p.numeric_coefficients(),
                                      p.n_variables + 1))
    # rows of the Jacobian in (X_0, X), then X_0 = 0
    size = n + 1 + m
    at_zero = np.eye(size)[:, 1:]  # drops X_0: (X_0, X, p) = (0, X, p)
    gradients = [[h.derivative(j).substitute_linear(at_zero) for j in range(n + 1)] for h in homogeneous]
    values = [h.substitute_linear(at_zero) for h in homogeneous]
    if all(v.is_zero() for v in values):
        return []
    # a random chart of the hyperplane at infinity: X = base + N y, y in C^(n - 1)
    base = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    directions = rng.standard_normal((n, n - 1)) + 1j * rng.standard_normal((n, n - 1))
    chart = np.zeros((n + m, n - 1 + m), dtype=complex)
    chart[:n, :n - 1] = directions
    chart[n:, n - 1:] = np.eye(m)
    offset = np.concatenate([base, np.zeros(m)])
    equations = [v.substitute_linear(chart, offset) for v in values]
    jacobian_rows = [[g.substitute_linear(chart, offset) for g in row] for row in gradients]
    names = [f"y{k + 1}" for k in range(n - 1)] + list(family.parameters)
    incidence = PolynomialSystem(names, [e for e in equations if not e.is_zero()] or equations, name="at infinity")
    minors = _minors_of(jacobian_rows, codimension, rng, options.max_exact_minors)
    if minors is None:
        notes.append("The minors at infinity are too large to expand: members singular at infinity were not "
                     "searched.")
        return []
    system = PolynomialSystem(names, list(incidence.polynomials) + minors, name="at infinity")
    if progress is not None:
        progress(f"decomposing the incidence set at infinity ({system.n_equations} equations in "
                 f"{system.n_variables} unknowns)")
    if any(p.degree == 0 and not p.is_zero() for p in system.polynomials):
        return []  # a nonzero constant: no member meets infinity there
    return _images(system, n - 1, m, ComponentKind.AT_INFINITY, options, rng, paths, notes)


def _minors_of(rows, codimension, rng, max_exact):
    """The c x c minors of a matrix of polynomials (all when few, else random combinations det(A J B))."""
    k, columns = len(rows), len(rows[0])
    if codimension > min(k, columns):
        return []
    minors = []
    if math.comb(k, codimension) * math.comb(columns, codimension) <= max_exact:
        for chosen_rows in itertools.combinations(range(k), codimension):
            for chosen_cols in itertools.combinations(range(columns), codimension):
                minor = determinant([[rows[i][j] for j in chosen_cols] for i in chosen_rows])
                if not minor.is_zero():
                    minors.append(minor * (1.0 / minor.coefficient_norm()))
        return minors
    for _ in range(columns - codimension + 1):
        a = rng.standard_normal((codimension, k)) + 1j * rng.standard_normal((codimension, k))
        b = rng.standard_normal((columns, codimension)) + 1j * rng.standard_normal((columns, codimension))
        minor = combined_minor(rows, a, b)
        if not minor.is_zero():
            minors.append(minor * (1.0 / minor.coefficient_norm()))
    return minors


def _intervals(real_points, fraction=0.5):
    """The intervals of a line between its real discriminant points and one sample inside each.

    A bounded interval's sample is at ``fraction`` of its length from its lower end.
    """
    points = np.asarray(real_points, dtype=float)
    cuts = [-math.inf] + points.tolist() + [math.inf]
    width = max(1.0, float(np.ptp(points)) / 2 if len(points) else 1.0)
    intervals, samples = [], []
    for low, high in zip(cuts[:-1], cuts[1:]):
        if math.isinf(low) and math.isinf(high):
            sample = 0.0
        elif math.isinf(low):
            sample = high - width
        elif math.isinf(high):
            sample = low + width
        else:
            sample = low + fraction * (high - low)
        intervals.append((low, high))
        samples.append(sample)
    return intervals, samples


#: Where in a cell of a vertical line its sample is taken (from the lower end, as a fraction of its length).
_CELL_FRACTION = 0.4


def _regions_on_line(family, real_points, rng, embed, line):
    """Regions of a one-parameter family between its real discriminant points; their samples solved together."""
    intervals, samples = _intervals(real_points)
    counts = real_counts(family, np.array(samples)[:, None], seed=int(rng.integers(2 ** 63)))
    return [Region(low, high, embed(sample), count, line)
            for (low, high), sample, count in zip(intervals, samples, counts)]


def _cells(family, cuts, rng):
    """Cells of vertical lines p_1 = v cut at real discriminant values of p_2; all samples counted together."""
    cells, samples = [], []
    for value, points in cuts:
        # off the middle: where a parameter enters only squared, the discriminant line p_2 = 0 (a length 0) lies
        # exactly in the middle of the cell around it if its deflated moves failed (decision 0060; 0069)
        intervals, along = _intervals(points, _CELL_FRACTION)
        cells += [(value, low, high) for low, high in intervals]
        samples += [[value, sample] for sample in along]
    counts = real_counts(family, np.array(samples).reshape(-1, 2), seed=int(rng.integers(2 ** 63)))
    return [Region(low, high, np.array(sample), count, value)
            for (value, low, high), sample, count in zip(cells, samples, counts)]


def _regions_on_lines(family, options, rng, notes, progress, shown_factors=None):
    """Two parameters: each vertical line p_1 = v as a one-parameter family, its regions as cells.

    ``shown_factors`` are the parameters' units when the family was balanced: progress is told in the user's.
    """
    shown = 1.0 if shown_factors is None else float(shown_factors[0])
    first = family.parameters[0]
    interval = family.ranges.get(first)
    low, high = (interval.low, interval.high) if interval else (-1.0, 1.0)
    if interval is None:
        notes.append(f"No [ranges] interval for {first}: the cells are on lines from -1 to 1.")
    regions = []
    for value in np.linspace(low, high, options.lines):
        line = family.restricted(0, ExactCoefficient.from_complex(float(value)))
        if progress is not None:
            progress(f"line {first} = {value * shown:.6g}")
        inner = DiscriminantOptions(options.decompose, options.max_exact_minors, regions=False,
                                    at_infinity=False, curve=False)
        along = discriminant(line, inner, seed=int(rng.integers(2 ** 63)), _located=True)
        regions += _regions_on_line(line, along.real_points, rng,
                                    lambda sample, value=value: np.array([value, sample]), float(value))
    return regions
