"""Entry points: the anatomy of X at a point, along a singular component, and over a whole singular locus.

Everything is computed in balanced units (:class:`~numag.numeric.scaling.Scaling`) and reported in the
user's: points, tangent directions, angle rates.

Examples
--------
>>> import numag
>>> system = numag.parse_system(["y^2 - x^2 - x^3"], ["x", "y"])
>>> anatomy = point_anatomy(system, [0, 0], seed=1)
>>> anatomy.hypersurface.type.label, anatomy.multiplicity, anatomy.real_branches
('A1', 2, 2)
>>> anatomy.sentence
'two real branches cross transversally: the mechanism can switch branch here'
"""

import dataclasses
import itertools
import time
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..system.polynomial import PolynomialSystem, determinant
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from ..witness.decompose import decompose
from .hypersurface import anatomy_in_frame, hessian_evidence
from .local import LocalOptions, LocalPicture, hypersurface_witness, local_picture, orbit_tangent
from .records import Branch, ComponentAnatomy, Family, Motion, PointAnatomy, SingularityType, TypeTest

__all__ = ["AnatomyOptions", "LocusAnatomy", "point_anatomy", "component_anatomy", "locus_anatomy",
           "check_anatomy"]

#: Radius of the local slices in a local frame (units of the singularity's own scale).
_FRAME_RADIUS = 1e-2
#: Imaginary parts below this (relative to 1 + |x|) make a point real.
_REAL = 1e-8


@dataclass
class AnatomyOptions:
    """Options of the anatomy.

    Attributes
    ----------
    local : LocalOptions
        Radii, loop steps and tracker of the local witness sets.
    special_points : bool
        Search the points where the transversal type changes along singular components.
    """

    local: LocalOptions = field(default_factory=LocalOptions)
    special_points: bool = True


@dataclass
class LocusAnatomy:
    """The anatomy of every singular point and positive-dimensional singular component of a locus.

    Attributes
    ----------
    points : dict
        Singular component id (isolated points) -> PointAnatomy.
    components : dict
        Singular component id (dimension > 0) -> ComponentAnatomy.
    seconds : float
    notes : list of str
    """

    points: dict
    components: dict
    seconds: float
    notes: list = field(default_factory=list)

    def incomplete(self):
        """Ids of the points and components whose anatomy is incomplete (a failure to report)."""
        return sorted([k for k, v in self.points.items() if v.incomplete]
                      + [k for k, v in self.components.items()
                         if v.transversal.incomplete or any(p.incomplete for p in v.special_points)])

    def to_dict(self):
        return {"points": {str(k): v.to_dict() for k, v in self.points.items()},
                "components": {str(k): v.to_dict() for k, v in self.components.items()},
                "seconds": self.seconds, "notes": list(self.notes)}

    @classmethod
    def from_dict(cls, data):
        return cls({int(k): PointAnatomy.from_dict(v) for k, v in data["points"].items()},
                   {int(k): ComponentAnatomy.from_dict(v) for k, v in data["components"].items()},
                   float(data["seconds"]), list(data["notes"]))


def _is_real(point):
    point = np.asarray(point, dtype=complex)
    return bool(np.all(np.abs(point.imag) <= _REAL * (1 + np.abs(point))))


def _balanced(system):
    if system.projective:
        raise InputError("the anatomy is computed for affine systems; give the system in an affine chart")
    scaling = Scaling.balancing(system)
    computed = scaling.scale_system(system)
    return scaling, [p.numeric() for p in computed.polynomials]


def _to_user_direction(scaling, tangent):
    """A tangent in computed units -> unit tangent in the user's (x = 10^c y), phase as in orbit_tangent."""
    vector = np.asarray(tangent, dtype=complex) * scaling.variable_factors
    vector = vector / np.linalg.norm(vector)
    largest = vector[int(np.argmax(np.abs(vector)))]
    return vector * (abs(largest) / largest)


def _angle_rates(point, tangent, angles):
    """Rate of each angle along a real tangent, in degrees per degree of the fastest one."""
    rates = {}
    for label, (c, s) in angles.items():
        cos, sin = point[c].real, point[s].real
        rates[label] = float((cos * tangent[s].real - sin * tangent[c].real) / (cos * cos + sin * sin))
    largest = max((abs(v) for v in rates.values()), default=0.0)
    return {k: (v / largest if largest > 0 else 0.0) + 0.0 for k, v in rates.items()}


def _motion(real_point, branches):
    if not real_point:
        return Motion.COMPLEX
    real = [b for b in branches if b.real]
    if len(real) >= 2:
        return Motion.SWITCH
    if len(real) == 1:
        return Motion.DEAD_POINT if real[0].multiplicity > 1 else Motion.PASS
    return Motion.LOCKED


def _picture_anatomy(picture, scaling, computed_point, user_point, local_dimension, angles, real, frame=None):
    """PointAnatomy fields from a local picture (multiplicity, branches, motion); with a local ``frame`` the
    picture is in its coordinates u (x = p + M u) and tangents are mapped through M."""
    anatomy = PointAnatomy(np.asarray(user_point, dtype=complex), local_dimension, picture.multiplicity,
                           notes=list(picture.notes))
    if picture.orbits is not None:
        branches = []
        for k, orbit in enumerate(picture.orbits):
            tangent = orbit_tangent(picture, orbit, computed_point)
            tangent = _to_user_direction(scaling, tangent if frame is None else frame.to_ambient(tangent))
            is_real = bool(picture.real_orbits[k]) if picture.real_orbits is not None else False
            rates = _angle_rates(anatomy.point, tangent, angles) if (angles and is_real) else {}
            branches.append(Branch(len(orbit), tangent, is_real, rates))
        anatomy.branches = branches
        if real and picture.real_orbits is None:
            anatomy.notes.append("the reality of the branches was not decided")
        else:
            anatomy.motion = _motion(real, branches)
    return anatomy


def point_anatomy(system, point, seed=None, decomposition=None, angles=None, local_dimension=None, options=None):
    """The anatomy of X = V(F) at a point: multiplicity, hypersurface invariants and type, curve branches.

    Parameters
    ----------
    system : PolynomialSystem
        Affine.
    point : array_like, shape (n,)
        A point of X (user's units), normally a singular one.
    seed : int, optional
    decomposition : Decomposition, optional
        The components of X (several equations); computed when missing.
    angles : dict, optional
        label -> (index of the cosine variable, index of the sine variable): branch directions are
        also given as angle rates.
    local_dimension : int, optional
        The dimension of X at the point, when known.
    options : AnatomyOptions, optional

    Returns
    -------
    PointAnatomy
    """
    started = time.perf_counter()
    options = options or AnatomyOptions()
    _, rng = random_state(seed)
    point = np.asarray(point, dtype=complex).reshape(-1)
    if len(point) != system.n_variables:
        raise InputError(f"the point has {len(point)} coordinates, the system {system.n_variables} variables")
    scaling, polynomials = _balanced(system)
    computed = scaling.to_computed(point)
    real = _is_real(point) and system.has_real_coefficients
    if system.n_equations == 1:
        anatomy = _hypersurface_point(polynomials[0], computed, point, scaling, rng, real, angles, options)
    else:
        anatomy = _system_point(system, polynomials, computed, point, scaling, rng, real, angles, seed,
                                decomposition, local_dimension, options)
    anatomy.seconds = time.perf_counter() - started
    return anatomy


def _hypersurface_point(polynomial, computed, user_point, scaling, rng, real, angles, options):
    n = polynomial.n_variables
    # the local witness set in the local frame too: its radius is then in units of the singularity's own
    # scale (in the computed units a change of condition 1e3 put it outside the cusp of A4: two branches)
    hypersurface, frame = anatomy_in_frame(polynomial, computed)
    local = frame.polynomial
    origin = np.zeros(n, dtype=complex)
    points, rows = hypersurface_witness(local, rng)
    # in the frame the singularity's terms have size one: a radius of 1e-2 stays in the asymptotic regime (the
    # shrink check tests it) and keeps the points of a high branch apart (A6: 2 eps^3.5, 6e-11 at eps = 1e-3)
    in_frame = dataclasses.replace(options.local, radius=max(options.local.radius, _FRAME_RADIUS))
    picture = local_picture([local], 1, origin, points, rows, rng, real=real, options=in_frame)
    anatomy = _picture_anatomy(picture, scaling, origin, user_point, n - 1, angles, real, frame)
    anatomy.hypersurface = hypersurface
    expected = _plane_branches(anatomy.hypersurface.type) if n == 2 else None
    if expected is not None and anatomy.branches is not None:
        found = sorted(b.multiplicity for b in anatomy.branches)
        if found != expected:
            # two independent computations (the frame's dual spaces, the local monodromy) disagree: neither
            # is reported as the type
            anatomy.notes.append(f"the type {anatomy.hypersurface.type.label} has branches of multiplicities "
                                 f"{expected}, the local monodromy found {found}: type undecided")
            anatomy.hypersurface.type = SingularityType(Family.UNDECIDED, None)
            anatomy.hypersurface.decided_by = TypeTest.BRANCHES_DISAGREE
    if anatomy.hypersurface.corank == 0 and anatomy.multiplicity not in (None, 2):
        anatomy.notes.append(f"a Morse point has multiplicity 2, the local witness set counted {anatomy.multiplicity}")
    return anatomy


def _plane_branches(kind):
    """Multiplicities of the local branches of a simple plane curve singularity (sorted), None otherwise.

    From the normal forms (Arnold 1972): y^2 = x^(k+1) has two smooth branches for odd k, one cusp-like
    branch of multiplicity 2 for even k; x^2 y + y^(k-1) a smooth branch y = 0 and the branches of
    x^2 + y^(k-2); E6 and E8 one branch of multiplicity 3; E7 = x (x^2 + y^3) a line and a cusp.

    Examples
    --------
    >>> _plane_branches(SingularityType(Family.D, 5)), _plane_branches(SingularityType(Family.E, 7))
    ([1, 2], [1, 2])
    """
    if kind.family is Family.A:
        return [1, 1] if kind.index % 2 else [2]
    if kind.family is Family.D:
        return [1, 1, 1] if kind.index % 2 == 0 else [1, 2]
    if kind.family is Family.E:
        return [1, 2] if kind.index == 7 else [3]
    return None


def _system_point(system, polynomials, computed, user_point, scaling, rng, real, angles, seed, decomposition,
                  local_dimension, options):
    n = system.n_variables
    if decomposition is None:
        decomposition = decompose(system, seed=seed)
    # the decomposition is in the user's units: its points and slices into the balanced ones
    in_computed = decomposition.in_units(scaling, scaling.scale_system(system), to_user=False)
    notes = []
    dimensions = sorted({c.dimension for c in in_computed.components if c.dimension > 0}, reverse=True)
    if local_dimension is not None:
        dimensions = [d for d in dimensions if d == local_dimension]
    for d in dimensions:
        chosen = [c for c in in_computed.components if c.dimension == d]
        if any(c.multiplicity > 1 or not c.reduced for c in chosen):
            notes.append(f"components of dimension {d} that are not reduced are left out of the local witness set")
            chosen = [c for c in chosen if c.multiplicity == 1 and c.reduced]
        if not chosen:
            continue
        # each component on its own slices: multiplicities add up, and a branch lies on one component
        picture = None
        for c in chosen:
            part = local_picture(polynomials, n - d, computed, c.points, c.slice_rows, rng, real=real,
                                 options=options.local)
            picture = part if picture is None else _joined(picture, part)
        if picture is not None and picture.multiplicity:
            anatomy = _picture_anatomy(picture, scaling, computed, user_point, d, angles, real)
            anatomy.notes = notes + anatomy.notes
            return anatomy
    anatomy = PointAnatomy(np.asarray(user_point, dtype=complex), local_dimension or 0, None,
                           notes=notes + ["no component of positive dimension of X passes through the point "
                                          "(or its local witness set was lost)"])
    return anatomy


def _joined(first, second):
    """Two components' local pictures at one point: multiplicities added, branches of both (curves)."""
    offset = len(first.local_points)
    orbits = None if first.orbits is None or second.orbits is None else \
        first.orbits + [[k + offset for k in o] for o in second.orbits]
    real = None if first.real_orbits is None or second.real_orbits is None else first.real_orbits + second.real_orbits
    return LocalPicture(first.multiplicity + second.multiplicity, np.vstack([first.local_points, second.local_points]),
                        np.vstack([first.near_points, second.near_points]), orbits, real,
                        first.lost + second.lost, first.notes + second.notes, first.shrink)


# --- along positive-dimensional singular components (hypersurfaces) -----------------------------------

def _normal_slice(polynomial, point, dimension, rng):
    """f restricted to a random affine space of dimension n - k through the point (a normal slice)."""
    n = polynomial.n_variables
    frame = rng.standard_normal((n, n - dimension)) + 1j * rng.standard_normal((n, n - dimension))
    frame, _ = np.linalg.qr(frame)
    return polynomial.substitute_linear(frame, point)


def _slice_anatomy(polynomial, computed, user_point, dimension, rng, options):
    """The anatomy of the normal slice of f = 0 at a point of a singular component of dimension k."""
    restricted = _normal_slice(polynomial, computed, dimension, rng)
    restricted = restricted - complex(restricted.evaluate(np.zeros(restricted.n_variables)))
    origin = np.zeros(restricted.n_variables, dtype=complex)
    identity = Scaling.identity(PolynomialSystem([f"u{j}" for j in range(restricted.n_variables)], [restricted]))
    # the slice's coordinates are complex: no real branches to tell, no angles
    anatomy = _hypersurface_point(restricted, origin, np.asarray(user_point, dtype=complex), identity, rng, False,
                                  None, options)
    anatomy.local_dimension = restricted.n_variables - 1
    anatomy.motion = None
    return anatomy


def _hessian_jump_system(polynomial, rank):
    """f, grad f and the (rank + 1)-minors of the Hessian: where the Hessian's rank drops below ``rank``+1."""
    n = polynomial.n_variables
    gradient = polynomial.gradient()
    hessian = [[g.derivative(j) for j in range(n)] for g in gradient]
    minors = []
    size = rank + 1
    for rows in itertools.combinations(range(n), size):
        for cols in itertools.combinations(range(n), size):
            minor = determinant([[hessian[i][j] for j in cols] for i in rows])
            if not minor.is_zero():
                minors.append(minor)
    return [polynomial] + [g for g in gradient if not g.is_zero()] + minors


def component_anatomy(system, component, seed=None, options=None, special_candidates=None):
    """Transversal type of a hypersurface along a singular component, and the points where it changes.

    The transversal type is the anatomy of f restricted to a random normal slice (an affine space of
    complementary dimension) at a witness point of the component. The special points are the points
    where the Hessian's rank drops below its value at the generic point (the pinch points of a double
    line): the isolated points of V(f, grad f, the minors of the Hessian one size larger than that
    rank), each with the anatomy of its own normal slice. A change of mu at constant Hessian rank
    (A2 -> A3 along a cuspidal edge) is not searched for.

    Parameters
    ----------
    system : PolynomialSystem
        One equation (a hypersurface).
    component : SingularComponent
        Of positive dimension (user's units).
    seed : int, optional
    options : AnatomyOptions, optional
    special_candidates : ndarray, optional
        Points (user's units) to use as the special points instead of searching them.

    Returns
    -------
    ComponentAnatomy

    Examples
    --------
    >>> import numag
    >>> umbrella = numag.parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    >>> locus = numag.singular_locus(umbrella, seed=2)
    >>> line = [c for c in locus.components if c.dimension == 1][0]
    >>> anatomy = component_anatomy(umbrella, line, seed=2)
    >>> anatomy.transversal.hypersurface.type.label, [p.hypersurface.type.label for p in anatomy.special_points]
    ('A1', ['A2'])
    """
    options = options or AnatomyOptions()
    seed, rng = random_state(seed)
    if system.n_equations != 1:
        raise InputError("the transversal type along a component is computed for hypersurfaces (one equation)")
    scaling, polynomials = _balanced(system)
    f = polynomials[0]
    k = component.dimension
    generic_user = np.asarray(component.points[0], dtype=complex)
    generic = scaling.to_computed(generic_user)
    transversal = _slice_anatomy(f, generic, generic_user, k, rng, options)
    notes = []
    special = []
    if special_candidates is not None:
        candidates = np.atleast_2d(special_candidates)
    elif options.special_points:
        evidence, _, unclear = hessian_evidence(f, generic)
        if unclear:
            notes.append("the Hessian's rank at the generic point is unclear: special points not searched")
            candidates = np.zeros((0, system.n_variables))
        elif evidence.rank == 0:
            candidates = np.zeros((0, system.n_variables))
            notes.append("the Hessian vanishes along the component: no rank can drop, special points not searched")
        else:
            jump = PolynomialSystem(list(system.variables), _hessian_jump_system(f, evidence.rank - 1))
            found = decompose(jump, seed=seed)
            candidates = scaling.to_user(np.array([c.points[0] for c in found.components if c.dimension == 0])
                                         .reshape(-1, system.n_variables))
    else:
        candidates = np.zeros((0, system.n_variables))
    for candidate in candidates:
        special.append(_slice_anatomy(f, scaling.to_computed(candidate), candidate, k, rng, options))
    return ComponentAnatomy(component.id, k, transversal, special, notes)


# --- over a locus, over checked points -----------------------------------------------------------------

def locus_anatomy(locus, seed=None, angles=None, options=None):
    """The anatomy of every isolated singular point and every singular component of a singular locus.

    Parameters
    ----------
    locus : SingularLocus
    seed : int, optional
        Defaults to the locus's seed.
    angles : dict, optional
    options : AnatomyOptions, optional

    Returns
    -------
    LocusAnatomy
    """
    started = time.perf_counter()
    options = options or AnatomyOptions()
    seed, _ = random_state(locus.seed if seed is None else seed)
    system = locus.system
    points, components, notes = {}, {}, []
    if system.projective:
        return LocusAnatomy({}, {}, 0.0, ["the anatomy is computed for affine systems"])
    for c in locus.components:
        if c.at_infinity or c.kind != "singular":
            continue
        if c.dimension == 0:
            points[c.id] = point_anatomy(system, c.points[0], seed=seed + c.id, decomposition=locus.variety,
                                         angles=angles, options=options)
        elif system.n_equations == 1:
            positive = [d for d in locus.components if d.dimension > 0 and not d.at_infinity and d.kind == "singular"]
            options_here = options if len(positive) == 1 else AnatomyOptions(options.local, special_points=False)
            components[c.id] = component_anatomy(system, c, seed=seed + c.id, options=options_here)
            if len(positive) > 1 and options.special_points:
                components[c.id].notes.append("several singular components: the special points were not searched "
                                              "(they could not be told apart by component)")
        else:
            notes.append(f"component {c.id}: the transversal type is computed for hypersurfaces only")
    return LocusAnatomy(points, components, time.perf_counter() - started, notes)


def check_anatomy(report, decomposition=None, angles=None, options=None):
    """The anatomy at every singular point of a :class:`~numag.singular.smoothness.CheckReport`.

    Returns
    -------
    dict
        Index of the point -> PointAnatomy.
    """
    result = {}
    for verdict in report.points:
        if verdict.verdict != "singular" or report.system.projective:
            continue
        result[verdict.index] = point_anatomy(report.system, verdict.point, seed=report.seed + verdict.index,
                                              decomposition=decomposition, angles=angles,
                                              local_dimension=verdict.local_dimension, options=options)
    return result
