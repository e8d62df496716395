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

from ..errors import InputError, LimitError
from ..system.polynomial import Polynomial, PolynomialSystem, determinant
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.linalg import widest_gap_rank
from ..numeric.refine import largest_scaled_residual
from ..numeric.scaling import Scaling
from ..system.display import counted
from ..numeric.seeds import random_state
from ..system.centred import CENTRED_BALANCING_FLOOR, centre_in_region, centre_near, centred_system, translated_terms
from ..tracking.tracker import FAILURE_LABELS
from ..witness.decompose import CENTRING_TERMS, centred_decomposition, decompose
from ..witness.eliminant import MatrixDeterminant, curve_meets_hypersurface
from .frame import cube_root_direction, frame_hessian, kernel_cubic
from .hypersurface import anatomy_in_frame, corank_jump_shift, hessian_evidence, higher_a_shift, morse_alpha, \
    MORSE_ALPHA, HESSIAN_ZERO
# the Jacobian's rank along a component is read with the Hessian's thresholds (scaled values, widest gap)
from .hypersurface import _CLEAR_DECADES, _KEPT as _KEPT_JACOBIAN
from .deflation import DeflationOutcome, ROUNDING_MOVE, onto_singular_point
from .intersection import complete_intersection_milnor, curve_delta
from ..witness.local import LocalOptions, LocalPicture, hypersurface_witness, local_picture, order_radius, orbit_tangent
from .records import Branch, ComponentAnatomy, Family, Motion, PointAnatomy, SingularityType, TypeTest

__all__ = ["AnatomyOptions", "LocusAnatomy", "point_anatomy", "component_anatomy", "locus_anatomy",
           "check_anatomy", "infinity_chart"]

#: Radius of the local slices in a local frame (units of the singularity's own scale).
_FRAME_RADIUS = 1e-2
#: The local slices of a hypersurface stay within this share of the radius where the higher forms of the frame
#: polynomial overtake its lowest one (``local.order_radius``).
_ORDER_SHARE = 0.5
#: Terms of a normal slice at most this times its largest are within the witness point's error.
_SLICE_ROUNDING = 1e-13
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
    onto_singular_point : bool
        Move a hypersurface's point onto the singular point by deflation before its type and picture are read
        (decision 0068); off, the point is taken as exact.
    """

    local: LocalOptions = field(default_factory=LocalOptions)
    special_points: bool = True
    onto_singular_point: bool = True


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
    special_points_asked : bool
        Whether special points along the components were asked for (``AnatomyOptions.special_points``): then a
        component where they were not searched is incomplete.
    not_given : list of int
        Ids of singular pieces with no anatomy at all (projective input; pieces at infinity of several equations
        or of positive dimension): asked and not answered, so counted with the incomplete ones (decision 0147).
    """

    points: dict
    components: dict
    seconds: float
    notes: list = field(default_factory=list)
    special_points_asked: bool = True
    not_given: list = field(default_factory=list)

    def incomplete(self):
        """Ids of the points and components whose anatomy is incomplete (a failure to report).

        A component whose special points were not searched is incomplete too: where the transversal type
        changes along it was asked and not answered (several singular components, a surface, an unclear rank).
        """
        return sorted([k for k, v in self.points.items() if v.incomplete] + list(self.not_given)
                      + [k for k, v in self.components.items()
                         if v.transversal.incomplete or v.undecided_candidates
                         or (self.special_points_asked and not v.special_points_searched)
                         or any(p.incomplete for p in v.special_points)])

    def to_dict(self):
        return {"points": {str(k): v.to_dict() for k, v in self.points.items()},
                "components": {str(k): v.to_dict() for k, v in self.components.items()},
                "seconds": self.seconds, "notes": list(self.notes),
                "special_points_asked": self.special_points_asked, "not_given": list(self.not_given)}

    @classmethod
    def from_dict(cls, data):
        return cls({int(k): PointAnatomy.from_dict(v) for k, v in data["points"].items()},
                   {int(k): ComponentAnatomy.from_dict(v) for k, v in data["components"].items()},
                   float(data["seconds"]), list(data["notes"]), bool(data.get("special_points_asked", True)),
                   [int(k) for k in data.get("not_given", [])])


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
        # a real branch of multiplicity m is x = t^m along its tangent, real t (from memory, the real branch's
        # standard parametrisation): for m even the tangent coordinate keeps one sign and the motion turns back
        # (y^2 = x^3); for m odd it changes sign and the motion passes (y^3 = x^4, the graph y = |x|^(4/3))
        if real[0].multiplicity == 1:
            return Motion.PASS
        return Motion.DEAD_POINT if real[0].multiplicity % 2 == 0 else Motion.SINGULAR_PASS
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
            # at a point that is not real no branch is real; at a real one without a real slice it is undecided
            is_real = bool(picture.real_orbits[k]) if picture.real_orbits is not None else (None if real else False)
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
    real = _is_real(point) and system.has_real_coefficients
    if real:
        # a real point given with rounding in its imaginary parts (a computed singular point) is the real
        # point: the local frame and the slices are real only at an exactly real point, and without them the
        # reality of the branches would be decided on complex slices (x^4 - y^4 read as 0 or 4 real branches)
        point = point.real.astype(complex)
    scaling, polynomials = _balanced(system)
    computed = scaling.to_computed(point)
    centred = _exactly_centred(system, point) if system.n_equations == 1 else None
    if centred is not None:
        # exact f read in coordinates centred exactly at a rational next to the point (decision 0091): expanded
        # about the origin, its coefficients' rounding (|p|^d eps) dwarfs the features of a far singularity
        local_scaling, local, centre = centred
        here = local_scaling.to_computed((point - centre)[None, :])[0]
        if np.linalg.norm(here) <= ROUNDING_MOVE:
            # the point is the exact centre to rounding (deflation's rule, now in the units of the features around
            # it): read there. Read at the offset itself, exact f has the Taylor terms of a point 1e-25 off a D5
            # (a computed singular point at the origin), whose Hessian of size 1e-25 is "regular": undecided
            here = np.zeros_like(here)
        anatomy = _hypersurface_point(local, here, point, local_scaling, rng, real, angles, options,
                                      lambda rows: local_scaling.to_user(rows) + centre[None, :])
    elif system.n_equations == 1:
        anatomy = _hypersurface_point(polynomials[0], computed, point, scaling, rng, real, angles, options,
                                      scaling.to_user)
    else:
        anatomy = _system_point(system, polynomials, computed, point, scaling, rng, real, angles, seed,
                                decomposition, local_dimension, options)
    anatomy.seconds = time.perf_counter() - started
    return anatomy


def _exactly_centred(system, point):
    """An exact single equation written in coordinates centred exactly at a rational within 1e-12 (1 + |p|) of
    ``point`` and balanced anew: (scaling, numeric polynomial in its units, the centre as complex numbers); None for
    double coefficients (their rounding at |p| is part of the equation: decision 0086), projective systems and
    systems too large to translate."""
    if (system.projective or type(system) is not PolynomialSystem or not system.polynomials[0].is_exact
            or translated_terms(system) > CENTRING_TERMS or not np.all(np.isfinite(point))):
        return None
    centring = centre_near(point, 0.0)
    centred = centred_system(system, centring)
    # The units are fitted to the terms of degree 2 and more: at a point next to a singular point the constant and
    # linear terms are the offset's (deflation removes them). Terms below the floor (1e-8 of the largest) are left
    # out as judged in the previous balancing's units, from one without the floor, until the set settles: in the
    # user's units coefficients of different degrees differ by the unit to that degree (A4 in units of 1e3 lost its
    # x^5 terms, 1e-15 beside y^2's 1e-6), and fitted, the offset's terms of 1e-15 set the units (A4 given 1e-8 of
    # its size off balanced to units 1e-8 and 1e-6: no local picture). Each step moves with a power-of-ten unit.
    f = centred.polynomials[0]
    high = f.exponents.sum(axis=1) >= 2
    if not np.any(high):
        return None
    own = PolynomialSystem(list(centred.variables), [Polynomial(f.exponents[high], f.coefficients[high],
                                                                f.n_variables)])
    scaling = Scaling.balancing(own)
    kept = np.ones(int(np.sum(high)), dtype=bool)
    for _ in range(_FLOOR_PASSES):
        sizes = np.abs(scaling.scale_system(own).polynomials[0].numeric_coefficients())
        below = sizes < CENTRED_BALANCING_FLOOR * float(np.max(sizes))
        if np.array_equal(~below, kept):
            break
        kept = ~below
        scaling = Scaling.balancing(PolynomialSystem(list(centred.variables), [
            Polynomial(own.polynomials[0].exponents[kept], own.polynomials[0].coefficients[kept], f.n_variables)]))
    return scaling, scaling.scale_system(centred).polynomials[0].numeric(), centring.point


#: Balancings of a centred equation without its terms below the floor in the previous one's units (they settle
#: in one or two).
_FLOOR_PASSES = 4


def _hypersurface_point(polynomial, computed, user_point, scaling, rng, real, angles, options, to_user):
    """The anatomy of f = 0 at ``computed`` (f's own coordinates); ``to_user`` maps rows of points in f's
    coordinates to the user's, which for a normal slice are the ambient space's (more coordinates than f's):
    a point moved onto the singular point is reported there, and its move measured there."""
    n = polynomial.n_variables
    deflation = None
    if options.onto_singular_point:
        # read at a point off the singular point, the Taylor coefficients are those of a neighbouring function
        # (a cusp read 1e-10 off is a node): the type and the picture are read at the point deflation finds
        deflation = onto_singular_point(polynomial, computed)  # its own fixed seed: the slices draw as before
        if deflation.moved:
            moved = to_user(deflation.point[None, :])[0]
            moved_by = float(np.linalg.norm(moved - user_point))
            computed, user_point = deflation.point, moved
    # the local witness set in the local frame too: its radius is then in units of the singularity's own
    # scale (in the computed units a change of condition 1e3 put it outside the cusp of A4: two branches)
    hypersurface, frame = anatomy_in_frame(polynomial, computed)
    along_kernel = None
    if deflation is not None and not deflation.moved and deflation.outcome is not DeflationOutcome.ALREADY_THERE:
        # deflation stopped short (A5 and beyond need 4 steps and more); an A_k read here may be a higher A next
        # to the point: move along the kernel to where it fits and read again (decision 0073)
        along_kernel = _onto_higher_corank(polynomial, computed, hypersurface, frame, real) \
            or _along_the_kernel(polynomial, computed, hypersurface, frame, real)
        if along_kernel is not None:
            computed, hypersurface, frame = along_kernel
            moved = to_user(computed[None, :])[0]
            moved_by = float(np.linalg.norm(moved - user_point))
            user_point = moved
    local = frame.polynomial
    origin = np.zeros(n, dtype=complex)
    if local.is_zero():
        # every Taylor term of degree 2 and more was at rounding level (E8 after a change of condition 1e3, read
        # 1e-10 off): there is nothing to slice, and the multiplicity and branches are not counted
        anatomy = PointAnatomy(np.asarray(user_point, dtype=complex), n - 1, None,
                               notes=["every Taylor term at the point is at rounding level: no local picture"])
    else:
        anatomy = _local_anatomy(local, frame, origin, user_point, scaling, rng, real, angles, options)
    anatomy.hypersurface = hypersurface
    if along_kernel is not None:
        anatomy.moved_by = moved_by
        anatomy.notes.append(f"moved onto the singular point by {moved_by:.2g} to where a more degenerate point fits "
                             f"(deflation had stopped: {deflation.outcome.value})")
    elif deflation is not None:
        if deflation.moved:
            anatomy.moved_by = moved_by
            if deflation.steps:
                # a move below the rounding of the reported coordinates (centred exactly, decision 0091) shows as 0
                by = f"{moved_by:.2g}" if moved_by > 0 else "less than the rounding of its coordinates"
                anatomy.notes.append(f"moved onto the singular point by {by} ({deflation.steps} "
                                     f"deflation step{'s' if deflation.steps > 1 else ''})")
        elif deflation.outcome is not DeflationOutcome.ALREADY_THERE:
            anatomy.notes.append(f"read at the given point: {deflation.outcome.value}")
    if along_kernel is None and deflation is not None and deflation.kept_off and anatomy.hypersurface.corank > 0:
        # read off the singular point, mu, tau and the type are those of a neighbouring function (an A5 read 1e-10
        # off is an A4): none of them is reported (a Morse point, corank 0, is stable under the offset)
        _undecided(anatomy.hypersurface, TypeTest.POINT_OFF)
        anatomy.notes.append(f"the point is off the singular point (scaled residual of (f, grad f) "
                             f"{deflation.residual_before:.1e}) and was not moved onto it: type, mu and tau undecided")
    evidence = anatomy.hypersurface.hessian
    if anatomy.hypersurface.corank == 0 and min(evidence.singular_values, default=1.0) <= evidence.tolerance:
        # the rank was not read from the values (a node with a neighbour 2e-4 away has one of 2e-9): say why
        alpha = morse_alpha(polynomial, computed).alpha
        anatomy.notes.append(f"a Morse point by Smale's alpha ({alpha:.1e}, below {MORSE_ALPHA:g}): its small "
                             "Hessian values are genuine, not zero")
    kind = anatomy.hypersurface.type
    if along_kernel is None and deflation is not None and not deflation.moved \
            and deflation.outcome is not DeflationOutcome.ALREADY_THERE \
            and kind.family is Family.A and kind.index >= 2 and higher_a_shift(frame, kind.index) is not None:
        # the deflation stopped short (A5 and beyond need more steps) and the residual of (f, grad f) can be at
        # rounding 1e-10 off (term sizes at |p| of 1e2 dwarf the offset's terms): an A5 read there is an A4
        # with a tiny v^5 term, and next to it the data fit a higher A_k as well (scale-free, in the frame)
        _undecided(anatomy.hypersurface, TypeTest.POINT_OFF)
        anatomy.notes.append(f"the point may be off the singular point: an {kind.label} read there is, to within "
                             "rounding, also a more degenerate singularity next to it; type, mu and tau undecided")
    kind = anatomy.hypersurface.type
    if along_kernel is None and deflation is not None and not deflation.moved \
            and deflation.outcome is not DeflationOutcome.ALREADY_THERE and n == 2 and anatomy.branches is None \
            and anatomy.multiplicity != 2 and kind.family is Family.A and kind.index >= 2:
        # corank one read where deflation stopped short, and nothing independent confirms it: no count by paths
        # (corank one has none), no branches and no multiplicity 2 (a plane curve point of multiplicity 2 has a
        # Hessian of rank one at least: corank one; D, E and J10 have 3). Read next to a point of higher corank the
        # Hessian keeps a value of the offset's size (a J10 = y^3 + x^6 read 1e-10 off was typed A7, mu 7 beside a
        # doubt flag): the type, mu and tau are not stated (decision 0120)
        _undecided(anatomy.hypersurface, TypeTest.POINT_OFF)
        anatomy.notes.append(f"read where deflation stopped ({deflation.outcome.value}), an {kind.label} is not "
                             "confirmed by the branches (not counted): next to a point of higher corank the Hessian "
                             "keeps a value of the offset's size; type, mu and tau undecided")
    expected = _plane_branches(anatomy.hypersurface.type) if n == 2 else None
    if expected is not None and anatomy.branches is not None:
        found = sorted(b.multiplicity for b in anatomy.branches)
        if found != expected:
            # two independent computations (the frame's dual spaces, the local monodromy) disagree: neither
            # is reported as the type
            anatomy.notes.append(f"the type {anatomy.hypersurface.type.label} has branches of multiplicities "
                                 f"{expected}, the local monodromy found {found}: type undecided")
            # mu and tau were read by the same frame that gave the contradicted type: not reported either
            _undecided(anatomy.hypersurface, TypeTest.BRANCHES_DISAGREE)
    if anatomy.hypersurface.type.family is Family.UNDECIDED and anatomy.motion is not None:
        # the branches are one of two independent readings of the point, and the other one did not settle
        # (the type is undecided): what they allow a mechanism (switch, pass, locked) is not said
        anatomy.motion = None
        anatomy.notes.append("the type is undecided, so what the branches allow (switch, pass, locked) is not said")
    if anatomy.hypersurface.corank == 0 and anatomy.multiplicity not in (None, 2):
        anatomy.notes.append(f"a Morse point has multiplicity 2, the local witness set counted {anatomy.multiplicity}")
    if anatomy.hypersurface.type.family is Family.UNDECIDED:
        # an undecided reading states no value as fact (decision 0120): mu and tau are kept as what was read,
        # and a plane curve's branches, one of two independent readings that the other did not confirm, are
        # kept as read, their number and reality undecided (a D5 far out read as 1 branch, 0 real)
        _undecided(anatomy.hypersurface, anatomy.hypersurface.decided_by)
        if n == 2 and anatomy.branches is not None:
            # the multiplicity is the same local witness set's count (the branches are its orbits): read too
            anatomy.branches_read, anatomy.branches = anatomy.branches, None
            anatomy.multiplicity_read, anatomy.multiplicity = anatomy.multiplicity, None
    return anatomy


#: Moves along the kernel (each a first-order step: the error after it is about its square, frame units).
_KERNEL_MOVES = 4


def _along_the_kernel(polynomial, computed, hypersurface, frame, real):
    """Move a point read as A_k onto the higher A_j next to it, if one fits (:func:`higher_a_shift`).

    Read d off an A_j, the point looks like an A_(j-1) with a small v^j term; the first-order position s of the
    A_j on the kernel axis is where the v^j coefficient of the reduced function vanishes, a regular zero (the
    rank of the kernel is kept, unlike the deflation's doubling systems, which A5 needed 4 steps and 55 s for).
    The point is moved to p + M s and read again, up to ``_KERNEL_MOVES`` times, until no higher A fits next to
    it. The move is kept only when the reading there is an A of higher index than the given one and no higher
    A fits next to it any more: the two readings then agree on where the singular point is. No length enters.

    Returns
    -------
    (computed point, HypersurfaceAnatomy, LocalFrame) or None
        None when no higher A fits next to the point or the moves did not settle.
    """
    kind = hypersurface.type
    if kind.family is not Family.A or kind.index is None or kind.index < 2:
        return None
    start_index = kind.index
    for _ in range(_KERNEL_MOVES):
        shift = higher_a_shift(frame, kind.index)
        if shift is None:
            return (computed, hypersurface, frame) if kind.index > start_index else None
        step = frame.matrix @ shift
        computed = _onto_range_critical(polynomial, computed + (step.real.astype(complex) if real else step),
                                        frame.matrix[:, :frame.rank], real)
        hypersurface, frame = anatomy_in_frame(polynomial, computed)
        kind = hypersurface.type
        if kind.family is not Family.A or kind.index is None or kind.index < start_index:
            return None
    return (computed, hypersurface, frame) if higher_a_shift(frame, kind.index) is None \
        and kind.index > start_index else None


#: Readings that name no type: a move onto a point of higher corank is not kept for them.
_NOT_A_TYPE = (Family.UNDECIDED, Family.NOT_ISOLATED)


def _onto_higher_corank(polynomial, computed, hypersurface, frame, real):
    """Move a point whose Hessian has a small value next to a point of higher corank onto it, if one fits
    (:func:`corank_jump_shift`), and read again there.

    Kept only when the reading there is decided, of higher corank, and no further jump fits next to it (the two
    readings agree on where the singular point is); the Hessian's other range directions are then solved for
    by Newton (:func:`_onto_range_critical`). D4 x^3 + y^3 after a change of condition 1e3, read 1e-10 off with
    a Hessian value of 1.3e-11 (kept by the rank rule), was typed A4.

    Returns
    -------
    (computed point, HypersurfaceAnatomy, LocalFrame) or None
    """
    if hypersurface.corank == 0 or hypersurface.type.family is Family.UNDECIDED:
        return None
    shift = corank_jump_shift(frame)
    if shift is None:
        return None
    step = frame.matrix @ shift
    moved = computed + (step.real.astype(complex) if real else step)
    again, moved_frame = anatomy_in_frame(polynomial, moved)
    # a decided type there, simple or not (a J10 = y^3 + x^6 read 1e-10 off was typed A7, decision 0120)
    if again.corank <= hypersurface.corank or again.type.family in _NOT_A_TYPE:
        return None
    moved = _onto_range_critical(polynomial, moved, moved_frame.matrix[:, :moved_frame.rank], real)
    again, moved_frame = anatomy_in_frame(polynomial, moved)
    if again.corank <= hypersurface.corank or again.type.family in _NOT_A_TYPE \
            or corank_jump_shift(moved_frame) is not None:
        return None
    return moved, again, moved_frame


#: Newton steps on the range part of the gradient after a move along the kernel (quadratic: the whitened range
#: Hessian is about the identity).
_RANGE_STEPS = 2


def _onto_range_critical(polynomial, point, range_directions, real):
    """Newton on the gradient's components along the Hessian's range, R^T grad f(p + R w) = 0 in w.

    The frame drops f's linear terms, so a move along the kernel leaves an offset across it (A5 read 1e-10 off
    kept that offset); along the range the zero is regular (R^T H R is the whitened identity).
    """
    if range_directions.shape[1] == 0:
        return point
    gradient = [q.numeric() for q in polynomial.gradient()]
    for _ in range(_RANGE_STEPS):
        values = np.array([complex(q.evaluate(point)) if not q.is_zero() else 0j for q in gradient])
        block = range_directions.T @ frame_hessian(polynomial, point) @ range_directions
        try:
            w = -np.linalg.solve(block, range_directions.T @ values)
        except np.linalg.LinAlgError:
            return point
        step = range_directions @ w
        point = point + (step.real.astype(complex) if real else step)
    return point


def _local_anatomy(local, frame, origin, user_point, scaling, rng, real, angles, options):
    """The local picture of the frame polynomial g at u = 0 (multiplicity, branches) as a PointAnatomy."""
    n = local.n_variables
    points, rows = hypersurface_witness(local, rng)
    # in the frame the singularity's terms have size one: a radius of 1e-2 stays in the asymptotic regime (the
    # shrink check tests it) and keeps the points of a high branch apart (A6: 2 eps^3.5, 6e-11 at eps = 1e-3)
    # and it stays within half the radius where g's higher forms overtake its lowest (decision 0056)
    in_frame = dataclasses.replace(options.local, radius=max(options.local.radius, _FRAME_RADIUS),
                                   ceiling=_ORDER_SHARE * order_radius(local))
    # with what is unknown about g at the local points (rounding, a point off the singular point) weighed
    # against its terms there: widened slices where the smallest one cannot tell (decision 0056)
    picture = local_picture([local], 1, origin, points, rows, rng, real=real, options=in_frame,
                            unresolved=frame.unresolved)
    return _picture_anatomy(picture, scaling, origin, user_point, n - 1, angles, real, frame)


def _undecided(hypersurface, test):
    """Set a hypersurface reading to undecided by ``test``: no type, and no mu, tau or quasi-homogeneity (the
    counts read are kept as evidence, ``milnor_read`` and ``tjurina_read``, decision 0120)."""
    hypersurface.type = SingularityType(Family.UNDECIDED, None)
    hypersurface.decided_by = test
    if hypersurface.milnor_read is None and hypersurface.tjurina_read is None:
        hypersurface.milnor_read, hypersurface.tjurina_read = hypersurface.milnor, hypersurface.tjurina
    hypersurface.milnor = hypersurface.tjurina = hypersurface.quasi_homogeneous = None


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
    # The local slices in coordinates centred exactly at the point and balanced anew (decision 0091): their radius
    # is a share of 1 + |point| in balanced units, and in the system's own units that is set by where the point
    # sits, not by the size of the features around it (two parabolas of size one crossing at (1213, 2141, 2850)
    # were sliced 4.5 units out, where each looked like one branch of multiplicity 2 through the point).
    centred = centred_decomposition(decomposition, user_point)
    local_scaling, local_polynomials, local_point = scaling, polynomials, computed
    if centred is not None:
        decomposition, centring = centred
        local_scaling = decomposition.scaling
        local_polynomials = [p.numeric() for p in local_scaling.scale_system(decomposition.system).polynomials]
        local_point = local_scaling.to_computed((np.asarray(user_point, dtype=complex) - centring.point)[None, :])[0]
    # the decomposition is in the user's units (centred or not): its points and slices into the balanced ones
    in_computed = decomposition.in_units(local_scaling, local_scaling.scale_system(decomposition.system),
                                         to_user=False)
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
            part = local_picture(local_polynomials, n - d, local_point, c.points, c.slice_rows, rng, real=real,
                                 options=options.local)
            picture = part if picture is None else _joined(picture, part)
        if picture is not None and picture.multiplicity != 0:  # a count, or None: undecided, said in its notes
            anatomy = _picture_anatomy(picture, local_scaling, local_point, user_point, d, angles, real)
            anatomy.notes = notes + anatomy.notes
            if len(polynomials) == n - d >= 2:
                anatomy.intersection = _intersection_milnor(polynomials, computed, anatomy, seed)
            return anatomy
    anatomy = PointAnatomy(np.asarray(user_point, dtype=complex), local_dimension or 0, None,
                           notes=notes + ["no component of positive dimension of X passes through the point "
                                          "(or its local witness set was lost)"])
    return anatomy


def _intersection_milnor(polynomials, computed, anatomy, seed):
    """mu of a complete intersection at the point (Le-Greuel), checked against a curve's counted branches: mu + r - 1
    = 2 delta must be even and non-negative (Buchweitz and Greuel 1980); if not, mu is undecided."""
    reading = complete_intersection_milnor(polynomials, computed, seed=0 if seed is None else seed)
    if reading.decided and anatomy.local_dimension == 1 and anatomy.branches is not None:
        reading.delta = curve_delta(reading.milnor, len(anatomy.branches))
        if reading.delta is None:
            reading.notes.append(f"mu = {reading.milnor} and {len(anatomy.branches)} branches do not fit "
                                 "mu = 2 delta - r + 1: mu undecided")
            reading.milnor = None
    return reading


def _joined(first, second):
    """Two components' local pictures at one point: multiplicities added, branches of both (curves)."""
    offset = len(first.local_points)
    orbits = None if first.orbits is None or second.orbits is None else \
        first.orbits + [[k + offset for k in o] for o in second.orbits]
    real = None if first.real_orbits is None or second.real_orbits is None else first.real_orbits + second.real_orbits
    multiplicity = None if first.multiplicity is None or second.multiplicity is None else \
        first.multiplicity + second.multiplicity
    return LocalPicture(multiplicity, np.vstack([first.local_points, second.local_points]),
                        np.vstack([first.near_points, second.near_points]), orbits, real,
                        first.lost + second.lost, first.notes + second.notes, first.shrink)


# --- along positive-dimensional singular components (hypersurfaces) -----------------------------------

def _normal_slice(polynomial, point, dimension, rng):
    """f restricted to a random affine space of dimension n - k through the point (a normal slice), and the
    space's orthonormal columns N (x = point + N s)."""
    n = polynomial.n_variables
    frame = rng.standard_normal((n, n - dimension)) + 1j * rng.standard_normal((n, n - dimension))
    frame, _ = np.linalg.qr(frame)
    return polynomial.substitute_linear(frame, point), frame


def _slice_anatomy(polynomial, computed, user_point, dimension, rng, options, scaling, centre=None):
    """The anatomy of the normal slice of f = 0 at a point of a singular component of dimension k.

    ``computed`` is the point in the balanced units of ``scaling`` (after the translation by ``centre``, when f is
    written centred); a point moved onto the singular point of the slice (a candidate pinch point given off it) is
    reported in the ambient space, x = centre + computed + N s.
    """
    restricted, normal = _normal_slice(polynomial, computed, dimension, rng)
    restricted = restricted - complex(restricted.evaluate(np.zeros(restricted.n_variables)))
    origin = np.zeros(restricted.n_variables, dtype=complex)
    identity = Scaling.identity(PolynomialSystem([f"u{j}" for j in range(restricted.n_variables)], [restricted]))
    # the slice's coordinates are complex: no real branches to tell, no angles
    computed = np.asarray(computed, dtype=complex)

    def to_user(points):  # slice coordinates s -> the ambient space, user's units
        rows = scaling.to_user(computed[None, :] + np.asarray(points, dtype=complex) @ normal.T)
        return rows if centre is None else rows + centre[None, :]

    anatomy = _hypersurface_point(restricted, origin, np.asarray(user_point, dtype=complex), identity, rng, False,
                                  None, options, to_user)
    anatomy.local_dimension = restricted.n_variables - 1
    _complex_slice(anatomy)
    return anatomy


def _complex_slice(anatomy):
    """A transversal anatomy read on a complex slice: no motion, and the branches' reality undecided."""
    anatomy.motion = None
    for branch in (anatomy.branches or []) + (anatomy.branches_read or []):
        branch.real, branch.angle_rates = None, {}


def _hessian_jump_system(polynomial, rank):
    """f, grad f and the (rank + 1)-minors of the Hessian: where the Hessian's rank drops below ``rank``+1."""
    n = polynomial.n_variables
    gradient = polynomial.gradient()
    hessian = [[g.derivative(j) for j in range(n)] for g in gradient]
    minors = []
    size = rank + 1
    for rows in itertools.combinations(range(n), size):
        for cols in itertools.combinations(range(n), size):
            if cols < rows:   # the Hessian is symmetric: that minor is the one of (cols, rows)
                continue
            minor = determinant([[hessian[i][j] for j in cols] for i in rows])
            if not minor.is_zero():
                minors.append(minor)
    return [polynomial] + [g for g in gradient if not g.is_zero()] + minors


def _cubic_jump_system(polynomial, dimension, rng):
    """f, grad f and the cubic of f along the kernel of a fixed generic normal slice's Hessian.

    Along a component of dimension k with transversal type A_m (m >= 2) the Hessian of f restricted to a
    generic normal space N (dimension n - k) has corank 1; its kernel is spanned by w = adj(N^T H N) e for
    a generic e (the adjugate of a corank-1 symmetric matrix is a multiple of v v^T). The transversal type
    is A2 where the cubic D^3 f(N w, N w, N w) is non-zero (the residual function of the splitting lemma
    starts with that cubic, Arnold 1972) and A3 or more where it vanishes; the cubic does not depend on
    which kernel vector of the whole Hessian is used modulo the component's tangent (the derivatives of
    H t = 0 and H v = 0 along the component). The cubic also vanishes where the adjugate does (the Hessian's
    rank drops), so the isolated points of this system contain both kinds of special points.
    """
    n = polynomial.n_variables
    size = n - dimension
    normal = rng.standard_normal((n, size)) + 1j * rng.standard_normal((n, size))
    normal, _ = np.linalg.qr(normal)
    pick = rng.standard_normal(size) + 1j * rng.standard_normal(size)
    gradient = polynomial.gradient()
    hessian = [[g.derivative(j) for j in range(n)] for g in gradient]
    restricted = [[sum((hessian[a][b] * complex(normal[a, i] * normal[b, j]) for a in range(n) for b in range(n)),
                       Polynomial.zero(n)) for j in range(size)]
                  for i in range(size)]

    def cofactor(i, j):  # (-1)^(i+j) det of the matrix without row i and column j
        if size == 1:
            return Polynomial.constant(1.0, n)
        rows = [r for r in range(size) if r != i]
        cols = [c for c in range(size) if c != j]
        return determinant([[restricted[r][c] for c in cols] for r in rows]) * ((-1.0) ** (i + j))

    adjugate = [[cofactor(j, i) for j in range(size)] for i in range(size)]   # adj[i][j] = cofactor(j, i)
    kernel = [sum((adjugate[i][j] * complex(pick[j]) for j in range(size)), Polynomial.zero(n)) for i in range(size)]
    direction = [sum((kernel[i] * complex(normal[a, i]) for i in range(size)), Polynomial.zero(n)) for a in range(n)]
    cubic = Polynomial.zero(n)
    for a, b, c in itertools.product(range(n), repeat=3):
        third = hessian[a][b].derivative(c)
        if not third.is_zero():
            cubic = cubic + third * direction[a] * direction[b] * direction[c]
    return [polynomial] + [g for g in gradient if not g.is_zero()] + ([cubic] if not cubic.is_zero() else [])


def _line_direction(polynomial, generic):
    """The direction of a singular line through ``generic`` (computed units), or None when the component
    through it is not a line.

    Where the transversal type is A2 the Hessian's kernel is a plane holding the component's tangent t and
    the transversal kernel direction v, and the cubic of f on it is c l^3 with l(t) = 0 (D^3 f(t, ., .)
    vanishes on the kernel: differentiate H t = 0 and H v = 0 along the component); t is that cube's root.
    The component is the line through the point along t when f and grad f vanish identically on it.
    """
    evidence, kernel, unclear = hessian_evidence(polynomial, generic)
    if unclear or kernel.shape[1] != 2:
        return None
    cubic, _ = kernel_cubic(polynomial, generic, kernel)
    direction = kernel @ cube_root_direction(cubic)
    direction = direction / np.linalg.norm(direction)
    # yardstick: f's largest coefficient (balanced units) at the point's scale
    size = float(np.max(np.abs(polynomial.numeric_coefficients()))) * (1 + np.linalg.norm(generic)) ** polynomial.degree
    for q in [polynomial] + [g.numeric() for g in polynomial.gradient()]:
        along = q.substitute_linear(direction[:, None], generic)
        if along.n_terms and np.max(np.abs(along.numeric_coefficients())) > 1e-8 * size:
            return None
    return direction


def _cubic_jump_points(polynomial, generic, rng):
    """The points (computed units) of a singular line where the cubic of :func:`_cubic_jump_system` vanishes,
    or None when the component is not a line (not searched).

    The system f, grad f, cubic is not reduced along the component (grad f vanishes to higher order on a
    cuspidal edge): a witness decomposition of it was measured to return a point off the line and to miss
    the special one, and Gauss-Newton projections onto V(f, grad f) to slide along it. On a line the
    cubic is a polynomial in the line's parameter: its roots are the special points.
    """
    n = polynomial.n_variables
    direction = _line_direction(polynomial, generic)
    if direction is None:
        return None
    try:
        equations = _cubic_jump_system(polynomial, 1, rng)
    except LimitError:  # the cubic's expansion is too large: not searched
        return None
    along = equations[-1].numeric().substitute_linear(direction[:, None], generic)   # the cubic in s
    if along.n_terms == 0 or along.degree < 1:
        return np.zeros((0, n), dtype=complex)
    coefficients = np.zeros(along.degree + 1, dtype=complex)
    for exponent, value in zip(along.exponents[:, 0], along.numeric_coefficients()):
        coefficients[along.degree - int(exponent)] += value
    largest = float(np.max(np.abs(coefficients), initial=0.0))
    # leading coefficients at rounding level would put roots near infinity
    while len(coefficients) > 1 and abs(coefficients[0]) <= 1e-12 * largest:
        coefficients = coefficients[1:]
    roots = np.roots(coefficients) if len(coefficients) > 1 else np.zeros(0)
    return np.array([generic + r * direction for r in roots], dtype=complex).reshape(-1, n)


def _distinct_points(points, tolerance=1e-6):
    """The rows of ``points`` with near duplicates (relative distance below ``tolerance``) removed."""
    kept = []
    for p in points:
        if all(np.linalg.norm(p - q) > tolerance * (1 + np.linalg.norm(q)) for q in kept):
            kept.append(p)
    return np.array(kept, dtype=complex).reshape(-1, points.shape[1])


def _system_slice_anatomy(polynomials, computed, user_point, dimension, rng, options):
    """The anatomy of X = V(F) (several equations, balanced units) cut by a random normal affine space through
    ``computed``, in the slice's own coordinates s (x = computed + N s)."""
    n = polynomials[0].n_variables
    normal = rng.standard_normal((n, n - dimension)) + 1j * rng.standard_normal((n, n - dimension))
    normal, _ = np.linalg.qr(normal)
    names = [f"s{j}" for j in range(n - dimension)]
    origin = np.zeros(n - dimension, dtype=complex)
    restricted = []
    for q in polynomials:
        sliced = q.substitute_linear(normal, computed)
        sliced = sliced - complex(sliced.evaluate(origin))   # the point is on X: its value is rounding
        # the point is known to about 1e-16 only (coordinates of 1e-17 where the curve has 0): terms within that
        # error against the slice's largest are dropped; kept (a linear term of 1e-17), the slice's curve is
        # smoothed at the point and the local witness points were lost on every slice
        values = sliced.numeric_coefficients()
        keep = np.abs(values) > _SLICE_ROUNDING * float(np.max(np.abs(values), initial=0.0))
        restricted.append(Polynomial(sliced.exponents[keep], values[keep], n - dimension) if np.any(keep)
                          else Polynomial.zero(n - dimension))
    transversal = point_anatomy(PolynomialSystem(names, restricted), origin, seed=int(rng.integers(2 ** 31)),
                                options=options)
    transversal.point = np.asarray(user_point, dtype=complex)
    _complex_slice(transversal)  # the slice is complex: no real motion to tell
    return transversal


def _system_component_anatomy(system, component, seed, options, isolated=None):
    """The transversal type of X = V(F) (several equations) along a singular component, and the points where
    it changes (:func:`_lagrangian_special_points`)."""
    _, rng = random_state(seed)
    k = component.dimension
    generic_user = np.asarray(component.points[0], dtype=complex)
    scaling, polynomials = _balanced(system)
    generic = scaling.to_computed(generic_user)
    # the slice keeps the draws it had before special points were searched: its own generator
    transversal = _system_slice_anatomy(polynomials, generic, generic_user, k, np.random.default_rng(seed), options)
    notes = ["several equations: the transversal type is the anatomy of the normal slice (multiplicity, branches)"]
    if not options.special_points:
        return ComponentAnatomy(component.id, k, transversal, [], notes, special_points_searched=False)
    candidates, search_notes, undecided = _lagrangian_special_points(
        polynomials, scaling.to_computed(np.asarray(component.points, dtype=complex)), k, rng)
    if candidates is None:
        notes.append(f"special points not searched: {search_notes[0]}")
        return ComponentAnatomy(component.id, k, transversal, [], notes, special_points_searched=False)
    notes += search_notes
    on_component = _on_system_component(polynomials, candidates, scaling.to_computed(
        np.asarray(isolated if isolated is not None else [], dtype=complex).reshape(-1, system.n_variables)))
    rejected = int(np.sum(~on_component))
    if rejected:
        notes.append(f"{counted(rejected, 'candidate special point')} rejected: not on this component (F or the "
                     "Jacobian's rank drop not met in term units, or an isolated singular point of the locus)")
    special = [_system_slice_anatomy(polynomials, candidate, scaling.to_user(candidate[None, :])[0], k, rng, options)
               for candidate in candidates[on_component]]
    return ComponentAnatomy(component.id, k, transversal, special, notes, special_points_searched=True,
                            rejected_candidates=rejected, undecided_candidates=undecided)


def _lagrangian_special_points(polynomials, witness, dimension, rng):
    """Candidate special points (computed units) of a singular component of X = V(f_1, ..., f_c), the notes of
    their search and the count of candidates left undecided; (None, [why], 0) when they cannot be searched.

    Where the Jacobian J drops rank by one along the component, X is near each of its points a hypersurface
    in the smooth manifold that c - 1 of the equations cut out, given by phi = sum_i lambda_i f_i with lambda
    the left null vector of J; phi's Hessian on that manifold is the Hessian of the Lagrangian
    G(x, lambda) = sum_i lambda_i f_i(x) in x, restricted to ker J. All of it is the Hessian of G in (x, lambda)
    together: the bordered matrix [[Q, J^T], [J, 0]], whose rank is rank(Q on ker J) + 2 rank J. So the
    transversal type changes where that rank drops below its value at the generic point: the special points
    of the hypersurface G = 0 along its critical set (:func:`_hessian_jump_system`), with lambda normalised by a
    random affine condition. Points where J drops rank further (lambda is no longer unique) are added: the
    isolated points of V(F, the (c-1)-minors of J).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 - y^2*z", "w - x - 2*y + z"], ["x", "y", "z", "w"])
    >>> points, _, _ = _lagrangian_special_points([p.numeric() for p in system.polynomials],
    ...                                        np.array([0, 0, 3.0, -3.0]), 1, np.random.default_rng(1))
    >>> np.round(np.abs(points), 8).tolist()
    [[0.0, 0.0, 0.0, 0.0]]
    """
    c, n = len(polynomials), polynomials[0].n_variables
    witness = np.atleast_2d(np.asarray(witness, dtype=complex))
    if dimension != 1:
        return None, ["special points are searched on singular curves"], 0
    generic = witness[0]
    _, jacobians = BatchEvaluator(polynomials).evaluate(np.asarray(generic, dtype=complex)[None, :])
    sizes = TermSizes(polynomials).gradients(np.asarray(generic, dtype=complex)[None, :])[0]
    rows = np.where(sizes > 0, sizes, 1.0)
    left, values, _ = np.linalg.svd(jacobians[0] / rows[:, None])
    rank, width = widest_gap_rank(values, HESSIAN_ZERO, _KEPT_JACOBIAN)
    if width < _CLEAR_DECADES or rank != c - 1:
        return None, ["the Jacobian's rank along the component is unclear" if width < _CLEAR_DECADES else
                      f"the Jacobian drops rank by {c - rank} along the component (by one is searched)"], 0
    # lambda for the equations as balanced, scaled by their rows: the left null vector of J itself
    null = left[:, -1].conj() / rows
    pick = rng.standard_normal(c) + 1j * rng.standard_normal(c)
    null = null / (pick @ null)
    lagrangian = Polynomial.zero(n + c)
    for i, f in enumerate(polynomials):
        padded = Polynomial(np.hstack([f.exponents, np.zeros((f.n_terms, c), dtype=np.int64)]),
                            f.numeric_coefficients(), n + c)
        lagrangian = lagrangian + padded * Polynomial.variable(n + i, n + c)
    evidence, _, unclear = hessian_evidence(lagrangian, np.concatenate([generic, null]))
    if unclear:
        return None, ["the rank of the Lagrangian's Hessian at the generic point is unclear"], 0
    try:
        determinants, minors = _lagrangian_determinants(polynomials, dimension, evidence.rank, rng)
    except LimitError:
        return None, ["the compressed Hessian of the Lagrangian is too large to expand"], 0
    curve = list(polynomials) + [m * (1.0 / m.coefficient_norm()) for m in minors if not m.is_zero()]
    meeting = curve_meets_hypersurface(curve, witness, determinants[0], rng)
    found, undecided, notes = meeting.points, meeting.undecided, list(meeting.notes)
    points = []
    for point in _distinct_points(found):
        # the rank of the whole bordered matrix there, with lambda from J's own left null vector
        _, jacobians_here = BatchEvaluator(polynomials).evaluate(point[None, :])
        null_here = np.linalg.svd(jacobians_here[0])[0][:, -1].conj()
        at_point, _, unclear_here = hessian_evidence(lagrangian, np.concatenate([point, null_here]))
        # the point is read off the eliminant's samples, to about 1e-10 of its size: singular values that small are
        # its distance from the rank drop, which the widest gap may count as a rank (a pinch point 2e-10 off:
        # values 4e-11 and 1e-11 over a gap to 1e-22); counted below the Hessian's zero they are a drop
        values_here = np.asarray(at_point.singular_values)
        above_zero = int(np.sum(values_here > at_point.tolerance))
        if unclear_here or min(at_point.rank, above_zero) < evidence.rank:   # unclear is kept: its slice decides
            points.append(point)
        elif values_here[evidence.rank - 1] <= _NEAR_DROP * at_point.tolerance:
            # a value just above the zero at a point known to ~1e-10: a rank drop the point's error may hide
            undecided += 1
            notes.append(f"a point of the curve where the bordered Hessian nearly drops rank (a singular value "
                         f"{values_here[evidence.rank - 1]:.1e}): undecided")
    if c >= 2:
        # where J drops rank by two or more: the curve's points on a random combination of J's (c-1)-minors,
        # kept where the scaled Jacobian's rank is below c - 1 there (or unclear: the slice decides)
        jacobian = [[f.derivative(j) for j in range(n)] for f in polynomials]
        smaller = [determinant([[jacobian[i][j] for j in cols] for i in rows_])
                   for rows_ in itertools.combinations(range(c), c - 1)
                   for cols in itertools.combinations(range(n), c - 1)]
        smaller = [m * (1.0 / m.coefficient_norm()) for m in smaller if not m.is_zero()]
        weights = rng.standard_normal(len(smaller)) + 1j * rng.standard_normal(len(smaller))
        deeper = curve_meets_hypersurface(curve, witness, _combination(smaller, weights), rng)
        undecided += deeper.undecided
        notes += deeper.notes
        for point in _distinct_points(deeper.points):
            _, jacobians_here = BatchEvaluator(polynomials).evaluate(point[None, :])
            sizes_here = TermSizes(polynomials).gradients(point[None, :])[0]
            values_here = np.linalg.svd(jacobians_here[0] / np.where(sizes_here > 0, sizes_here, 1.0)[:, None],
                                        compute_uv=False)
            rank_here, width_here = widest_gap_rank(values_here, HESSIAN_ZERO, _KEPT_JACOBIAN)
            if width_here < _CLEAR_DECADES or rank_here < c - 1:
                points.append(point)
    return _distinct_points(np.array(points, dtype=complex).reshape(-1, n)), notes, undecided


#: A candidate special point whose bordered Hessian keeps its rank by a value below this times the zero is
#: undecided (its point is known to the eliminant's accuracy only).
_NEAR_DROP = 1e3


def _lagrangian_determinants(polynomials, dimension, rank, rng):
    """(determinants, minors): ``dimension + 1`` compressed determinants of the bordered Hessian of the
    Lagrangian in x alone (rank ``rank`` at a generic point of the component), and the c x c minors of J."""
    c, n = len(polynomials), polynomials[0].n_variables
    # In x alone (a system in (x, lambda) with every minor was measured at 20 s for the umbrella on a graph in
    # C^4 and over 18 min after a linear change): lambda(x) as the generalised cross product of J R_1 (R_1 a
    # random n x (c - 1) matrix; J's rank is c - 1 along the component, so J R_1's is too at all but finitely
    # many of its points), the bordered matrix compressed to R^T B R by random (n + c) x rank matrices R, one
    # determinant per dimension of the component plus one (each also vanishes where B's range turns against its
    # R, finitely many points of the component, apart for different R), on the component's own equations
    jacobian = [[f.derivative(j) for j in range(n)] for f in polynomials]
    reduce = rng.standard_normal((n, c - 1)) + 1j * rng.standard_normal((n, c - 1))
    reduced = [[_combination(jacobian[i], reduce[:, m]) for m in range(c - 1)] for i in range(c)]
    multipliers = [determinant([reduced[r] for r in range(c) if r != i]) * ((-1.0) ** i) if c > 1
                   else Polynomial.constant(1.0, n) for i in range(c)]
    hessians = [[[g.derivative(j) for j in range(n)] for g in row] for row in jacobian]
    lagrangian_hessian = [[_combination([hessians[i][a][b] for i in range(c)], multipliers)
                           for b in range(n)] for a in range(n)]
    bordered = [lagrangian_hessian[a] + [jacobian[i][a] for i in range(c)] for a in range(n)] + \
               [jacobian[i] + [Polynomial.zero(n)] * c for i in range(c)]
    determinants = []
    for _ in range(dimension + 1):
        compress = rng.standard_normal((n + c, rank)) + 1j * rng.standard_normal((n + c, rank))
        left = [[_combination([bordered[a][b] for a in range(n + c)], compress[:, i]) for b in range(n + c)]
                for i in range(rank)]
        compressed = [[_combination(left[i], compress[:, j]) for j in range(rank)]
                      for i in range(rank)]
        determinants.append(MatrixDeterminant(compressed))
    minors = [determinant([[jacobian[i][j] for j in cols] for i in range(c)])
              for cols in itertools.combinations(range(n), c)]
    return determinants, minors


def _combination(polynomials, weights):
    """sum_i weights_i polynomials_i (weights numbers or polynomials)."""
    total = Polynomial.zero(polynomials[0].n_variables)
    for polynomial, weight in zip(polynomials, weights):
        if not polynomial.is_zero():
            total = total + polynomial * (weight if isinstance(weight, Polynomial) else complex(weight))
    return total


def _on_system_component(polynomials, candidates, isolated):
    """Which candidates (computed units) lie on a component of X's singular locus where J drops rank by one:
    F vanishes and J's c-th scaled singular value is zero in term units, and the point is none of the locus's
    isolated singular points.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 - y^2*z", "w - x - 2*y + z"], ["x", "y", "z", "w"])
    >>> _on_system_component([p.numeric() for p in system.polynomials],
    ...                      np.array([[0, 0, 0, 0], [0, 0, 5, -5], [1, 1, 1, 2]]), np.array([[0, 0, 5, -5.0]])).tolist()
    [True, False, False]
    """
    candidates = np.asarray(candidates, dtype=complex).reshape(-1, polynomials[0].n_variables)
    if not len(candidates):
        return np.zeros(0, dtype=bool)
    residual = largest_scaled_residual(TermSizes(polynomials), BatchEvaluator(polynomials), candidates)
    _, jacobians = BatchEvaluator(polynomials).evaluate(candidates)
    sizes = TermSizes(polynomials).gradients(candidates)
    scaled = jacobians / np.where(sizes > 0, sizes, 1.0)[:, :, None]
    smallest = np.linalg.svd(scaled, compute_uv=False)[:, -1]
    result = (residual <= _ON_LOCUS) & (smallest <= _ON_LOCUS)
    for point in np.asarray(isolated, dtype=complex).reshape(-1, candidates.shape[1]):
        result &= np.linalg.norm(candidates - point[None, :], axis=1) > 1e-6 * (1 + np.linalg.norm(point))
    return result


def component_anatomy(system, component, seed=None, options=None, special_candidates=None, isolated=None):
    """Transversal type of a hypersurface along a singular component, and the points where it changes.

    The transversal type is the anatomy of f restricted to a random normal slice (an affine space of
    complementary dimension) at a witness point of the component. The special points are the points
    where the Hessian's rank drops below its value at the generic point (the pinch points of a double
    line): the isolated points of V(f, grad f, the minors of the Hessian one size larger than that
    rank), each with the anatomy of its own normal slice. Where the transversal type is A2 and the
    component a line, also the points where the cubic along the kernel vanishes (A2 -> A3 on a cuspidal
    edge at constant Hessian rank, :func:`_cubic_jump_system`). Exact f is searched and read in coordinates
    centred exactly at the generic point and at each candidate; a candidate read as the transversal type is
    undecided, never listed as a change (decision 0116).

    For several equations (X of codimension 2 and more) the transversal type is the anatomy of X cut by
    the normal slice: its multiplicity and, for a curve, its branches; the special points are where the
    Hessian of the Lagrangian sum_i lambda_i f_i drops rank (:func:`_lagrangian_special_points`).

    Parameters
    ----------
    system : PolynomialSystem
        One equation (a hypersurface), or several.
    component : SingularComponent
        Of positive dimension (user's units).
    seed : int, optional
    options : AnatomyOptions, optional
    special_candidates : ndarray, optional
        Points (user's units) to use as the special points instead of searching them.
    isolated : ndarray, optional
        The isolated singular points of the locus (user's units): candidates at one of them are not on this
        component and are rejected (counted in ``rejected_candidates``).

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
        return _system_component_anatomy(system, component, seed, options, isolated)
    scaling, polynomials = _balanced(system)
    k = component.dimension
    generic_user = np.asarray(component.points[0], dtype=complex)
    # the transversal type and the search for special points in coordinates centred exactly at the generic point
    # (decision 0116): expanded about a far origin, the Hessian's minors and the cubic along the line are
    # cancellations of terms of size |p|^d, and their rounding made false special points and missed true ones
    local_scaling, f, centre = _read_in(system, generic_user, scaling, polynomials[0])
    generic = local_scaling.to_computed((generic_user - centre)[None, :])[0]
    transversal = _slice_anatomy(f, generic, generic_user, k, rng, options, local_scaling, centre)
    if transversal.moved_by is not None and np.all(np.isfinite(transversal.point)):
        # the search starts where the slice's deflation put the generic point: a witness point of a non-reduced
        # component (a cuspidal edge) is 1e-9 off it, and in the features' own units its Hessian shows that
        # offset (a second value of 1e-9 made the rank 2 where it is 1, and the line test failed)
        generic = local_scaling.to_computed((transversal.point - centre)[None, :])[0]
    generic_here = local_scaling.to_user(generic[None, :])[0] + centre
    notes = []
    special = []
    searched = True
    undecided = 0
    if special_candidates is not None:
        candidates = np.atleast_2d(special_candidates)
    elif options.special_points:
        evidence, _, unclear = hessian_evidence(f, generic)
        searched = not unclear and evidence.rank > 0
        if unclear:
            notes.append("the Hessian's rank at the generic point is unclear: special points not searched")
            candidates = np.zeros((0, system.n_variables))
        elif evidence.rank == 0:
            candidates = np.zeros((0, system.n_variables))
            notes.append("the Hessian vanishes along the component: no rank can drop, special points not searched")
        else:
            candidates, lost = _rank_jump_points(system, scaling, polynomials[0], evidence.rank - 1, seed,
                                                 (local_scaling, f, centre), generic_here)
            if lost:
                undecided += lost
                notes.append("the search for points where the Hessian's rank drops lost endpoints (off X or failed "
                             "paths) where such a point may lie: the special points may be incomplete (undecided)")
            kind = transversal.hypersurface.type if transversal.hypersurface is not None else None
            if kind is not None and kind.family is Family.A and kind.index == 2:
                # A2 -> A3 and beyond at constant Hessian rank (a cuspidal edge's special points)
                more = _cubic_jump_points(f, generic, rng) if k == 1 else None
                if more is None:
                    notes.append("transversal type A2: a jump of mu at constant Hessian rank is searched on singular "
                                 "lines only; this component is not one")
                else:
                    candidates = _distinct_points(np.vstack([candidates,
                                                             local_scaling.to_user(more) + centre[None, :]]))
            elif kind is not None and kind.family is Family.A and kind.index > 2:
                notes.append(f"transversal type {kind.label}: only the points where the Hessian's rank drops were "
                             "searched (a jump of mu at constant rank beyond A2 is not)")
    else:
        candidates = np.zeros((0, system.n_variables))
        searched = False
    on_component = _on_component(f, local_scaling, candidates - centre[None, :],
                                 None if isolated is None else np.asarray(isolated, dtype=complex) - centre[None, :])
    rejected = int(np.sum(~on_component))
    if rejected:
        notes.append(f"{counted(rejected, 'candidate special point')} rejected: not on this component (the singular "
                     "locus's equations not met in term units, or an isolated singular point of the locus)")
    for candidate in candidates[on_component]:
        # each candidate read where it is, centred exactly at it (decision 0091's reading of a point)
        here_scaling, here_f, here_centre = _read_in(system, candidate, scaling, polynomials[0])
        here = here_scaling.to_computed((candidate - here_centre)[None, :])[0]
        anatomy = _slice_anatomy(here_f, here, candidate, k, rng, options, here_scaling, here_centre)
        _type_changes(anatomy, transversal)
        special.append(anatomy)
    return ComponentAnatomy(component.id, k, transversal, special, notes, special_points_searched=searched,
                            rejected_candidates=rejected, undecided_candidates=undecided)


def _rank_jump_points(system, scaling, polynomial, rank, seed, first, generic):
    """The isolated points (user's units) where the Hessian's rank drops to ``rank`` or below, each judged again in
    coordinates centred exactly at it (decision 0116), and the count of searches that lost endpoints where such a
    point may lie (decision 0126).

    ``first`` = (units, f, centre) of the reading at the component's generic point ``generic`` (user's units). The
    first search is centred at a short decimal next to it, on a grid of a tenth of the smallest of those units
    (:func:`~numag.system.centred.centre_in_region`), not at the generic point itself: that point is known to
    1e-11 of the line, and centred there the jump system's constant and linear terms were that offset, terms at the
    rounding of the others; the umbrella x^2 - y^2 z after a rational linear change lost its pinch point to them
    (one endpoint off X, one path jumped, exit 0). A short decimal's offset is either exactly zero or the geometry's
    own, and it moves the centre by at most 5% of the units the features are read in.

    Seen from there, features far smaller than their distance merge: the umbrella x^2 - y^2 (z^2 + 1) after a
    rational linear change has its pinch points 2.9 apart and 200 from the generic point, which balanced to units
    of 1e3, and the two came out as one double point at their midpoint. Each first point is searched again centred
    at itself (decision 0084's idea for singular points), and of that run the points nearer to it than to any other
    first point are kept: no radius enters.
    """
    def solutions(units, g, centre):
        jump = PolynomialSystem(list(system.variables), _hessian_jump_system(g, rank))
        found = decompose(jump, seed=seed)
        points = [p for c in found.components if c.dimension == 0 for p in c.points]
        return (units.to_user(np.array(points, dtype=complex).reshape(-1, system.n_variables)) + centre[None, :],
                _lost_endpoints(found))

    if not _exactly_centred_at_all(system):
        found, lost = solutions(*first)
        return found, int(lost)
    units, _, _ = first
    unit = float(np.min(np.abs(units.variable_factors)))
    decimal = np.asarray(centre_in_region(generic, unit).point, dtype=complex)
    found, lost = solutions(*_read_in(system, decimal, scaling, polynomial))
    kept = []
    for j, candidate in enumerate(found):
        again, _ = solutions(*_read_in(system, candidate, scaling, polynomial))
        mine = [p for p in again if int(np.argmin(np.linalg.norm(found - p[None, :], axis=1))) == j]
        # none there: the point stays as found first (its reading then says whether the type changes there)
        kept.extend(mine if mine else [candidate])
    return _distinct_points(np.array(kept, dtype=complex).reshape(-1, system.n_variables)), int(lost)


def _lost_endpoints(decomposition):
    """Whether a decomposition of a jump system lost endpoints that may have been its points: failed paths (a
    jumped one included) or endpoints off X. Paths to infinity, endpoints on a larger component and junk by the
    local test are what a clean run of these overdetermined systems has; those are not counted."""
    paths = decomposition.paths
    return bool(sum(paths.get(label, 0) for label in FAILURE_LABELS) or paths.get("not_on_X", 0)
                or paths.get("residual_not_explained", 0))


def _exactly_centred_at_all(system):
    """Whether :func:`_exactly_centred` writes this system centred (exact, affine, small enough)."""
    return not (system.projective or type(system) is not PolynomialSystem or not system.polynomials[0].is_exact
                or translated_terms(system) > CENTRING_TERMS)


def _read_in(system, point, scaling, polynomial):
    """The coordinates a hypersurface is read in at ``point`` (user's units): exact f centred exactly at a rational
    next to the point and balanced anew (decision 0091), else f in its balanced units (``scaling``, ``polynomial``).

    Returns
    -------
    (Scaling, Polynomial, ndarray)
        The units, f in them, and the centre (zero when f is not centred): x = centre + scaling.to_user(u).
    """
    centred = _exactly_centred(system, np.asarray(point, dtype=complex))
    if centred is None:
        return scaling, polynomial, np.zeros(system.n_variables, dtype=complex)
    return centred


def _type_changes(special, transversal):
    """A special point must show a change of the transversal type: one read as the transversal type itself (both
    decided) is set undecided (``NO_CHANGE``), never listed as a special point of that type (decision 0116).

    Genuine candidates change the type by construction (the Hessian's rank drops, or the cubic along the kernel
    vanishes), so such a reading means a false candidate or a wrong reading, and numag cannot tell which.
    """
    kind, generic = special.hypersurface.type, transversal.hypersurface.type if transversal.hypersurface else None
    if generic is None or kind.family is Family.UNDECIDED or generic.family is Family.UNDECIDED:
        return
    same = (kind.family, kind.index) == (generic.family, generic.index) and \
        (kind.simple or special.hypersurface.milnor == transversal.hypersurface.milnor)
    if same:
        special.notes.append(f"read as {kind.label}, the transversal type itself: no change of type shown, so this "
                             "candidate is neither confirmed nor ruled out (undecided)")
        _undecided(special.hypersurface, TypeTest.NO_CHANGE)


#: A candidate special point must meet f and grad f to this (largest residual over the size of the terms).
_ON_LOCUS = 1e-8


def _on_component(polynomial, scaling, candidates, isolated):
    """Which candidates (user's units) lie on the component: f and grad f vanish there in term units, and the
    point is none of the locus's isolated singular points (those lie on no positive-dimensional piece).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    >>> scaling = Scaling.identity(system)
    >>> _on_component(system.polynomials[0].numeric(), scaling, np.array([[0, 0, 0], [0, 0, 5], [1, 1, 1]]),
    ...               np.array([[0, 0, 5.0]])).tolist()
    [True, False, False]
    """
    candidates = np.asarray(candidates, dtype=complex).reshape(-1, polynomial.n_variables)
    if not len(candidates):
        return np.zeros(0, dtype=bool)
    equations = [polynomial] + [g.numeric() for g in polynomial.gradient() if not g.is_zero()]
    residual = largest_scaled_residual(TermSizes(equations), BatchEvaluator(equations),
                                       scaling.to_computed(candidates))
    result = residual <= _ON_LOCUS
    for point in np.asarray(isolated if isolated is not None else [], dtype=complex).reshape(-1, len(candidates[0])):
        result &= np.linalg.norm(candidates - point[None, :], axis=1) > 1e-6 * (1 + np.linalg.norm(point))
    return result


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
        # isolated points read in the affine chart of their largest coordinate (local invariants are the same in
        # any chart); components are not, and that is said: a silent empty anatomy reads as "nothing singular to
        # describe" (decision 0147)
        for c in locus.components:
            if c.kind == "singular" and c.dimension == 0:
                points[c.id] = _projective_chart_anatomy(system, c.points[0], seed + c.id, options)
        missing = [c.id for c in locus.components if c.kind == "singular" and c.id not in points]
        if missing:
            notes.append(f"no anatomy for {counted(len(missing), 'singular component')} of positive dimension "
                         f"({', '.join(map(str, missing))}) of projective input: it is computed for affine systems "
                         "only; write the system in an affine chart that contains the component (set a coordinate "
                         "that is not 0 on it to 1)")
        return LocusAnatomy(points, {}, time.perf_counter() - started, notes, options.special_points, missing)
    isolated = np.array([c.points[0] for c in locus.components
                         if c.dimension == 0 and not c.at_infinity and c.kind == "singular"],
                        dtype=complex).reshape(-1, system.n_variables)
    at_infinity = [c for c in locus.components if c.at_infinity and c.kind == "singular"]
    for c in at_infinity:
        if c.dimension == 0 and system.n_equations == 1:
            points[c.id] = _chart_anatomy(system, c.points[0], seed + c.id, options)
    missing = [c.id for c in at_infinity if c.id not in points]
    if missing:
        notes.append("singular pieces at infinity of several equations, or of positive dimension, have no anatomy "
                     "(undecided): write the system in an affine chart that contains them")
    for c in locus.components:
        if c.at_infinity or c.kind != "singular":
            continue
        if c.dimension == 0:
            points[c.id] = point_anatomy(system, c.points[0], seed=seed + c.id, decomposition=locus.variety,
                                         angles=angles, options=options)
        else:
            positive = [d for d in locus.components if d.dimension > 0 and not d.at_infinity and d.kind == "singular"]
            options_here = options if len(positive) == 1 else AnatomyOptions(options.local, special_points=False)
            components[c.id] = component_anatomy(system, c, seed=seed + c.id, options=options_here,
                                                 isolated=isolated)
            if len(positive) > 1 and options.special_points:
                components[c.id].notes.append("several singular components: the special points were not searched "
                                              "(they could not be told apart by component)")
    return LocusAnatomy(points, components, time.perf_counter() - started, notes, options.special_points, missing)


def infinity_chart(system, homogeneous):
    """The affine chart a point at infinity (w : x_1 : ... : x_n) is read in: the index j (0 is w) of its largest
    x_j, set to 1, and the chart's variable names (w first, named apart from the user's).

    Examples
    --------
    >>> import numag
    >>> infinity_chart(numag.parse_system(["x^2*y - 1"], ["x", "y"]), np.array([0, 0.1, 1.0]))
    (2, ['w', 'x'])
    """
    j = 1 + int(np.argmax(np.abs(np.asarray(homogeneous)[1:])))
    w = next(name for name in itertools.chain(["w"], (f"w{k}" for k in itertools.count()))
             if name not in system.variables)
    return j, [w] + [v for k, v in enumerate(system.variables) if k != j - 1]


def _chart_anatomy(system, homogeneous, seed, options):
    """The anatomy of a hypersurface's closure at a singular point at infinity, read in an affine chart.

    The point (w : x_1 : ... : x_n), w = 0, is read in the chart x_j = 1 of its largest coordinate: the closure
    there is f^h(w, x) with x_j = 1, a polynomial in w and the other x_k, and the point is (0, x_k / x_j). Every
    local invariant (multiplicity, corank, mu, tau, type, branches) is the same in any chart; the point and the
    branches' tangents are given in the chart's coordinates, which a note names.

    Examples
    --------
    >>> import numag
    >>> curve = numag.parse_system(["x^2*y - 1"], ["x", "y"])   # closure x^2 y = w^3: a cusp at (0 : 0 : 1)
    >>> anatomy = _chart_anatomy(curve, np.array([0, 0, 1.0]), 1, AnatomyOptions())
    >>> anatomy.hypersurface.type.label, anatomy.point.real.tolist()
    ('A2', [0.0, 0.0])
    """
    homogeneous = np.asarray(homogeneous, dtype=complex)
    j, names = infinity_chart(system, homogeneous)
    chart_variable, w = system.variables[j - 1], names[0]
    chart = PolynomialSystem(names, [system.polynomials[0].homogenize(0).dehomogenize(j)])
    point = np.delete(homogeneous, j) / homogeneous[j]
    anatomy = point_anatomy(chart, point, seed=seed, options=options)
    anatomy.motion = None  # no configuration of a mechanism lies at infinity: no sentence about its motion
    anatomy.notes.insert(0, f"at infinity: read in the affine chart {chart_variable} = 1 of the closure, coordinates "
                            f"({', '.join(names)}) with {w} = 1/{chart_variable}; the point and tangents are in them")
    return anatomy


def projective_chart(system, homogeneous):
    """The affine chart a projective point (x_1 : ... : x_n) is read in: the index j of its largest coordinate,
    set to 1, and the chart's variable names (decision 0147).

    Examples
    --------
    >>> import numag
    >>> projective_chart(numag.parse_system(["x*z - y^2"], ["x", "y", "z"], projective=True), np.array([0.1, 0, 1]))
    (2, ['x', 'y'])
    """
    j = int(np.argmax(np.abs(np.asarray(homogeneous))))
    return j, [v for k, v in enumerate(system.variables) if k != j]


def _projective_chart_anatomy(system, homogeneous, seed, options):
    """The anatomy of a projective system at a singular point (x_1 : ... : x_n), read in the affine chart x_j = 1
    of its largest coordinate: the equations with x_j = 1, at the point x / x_j. Every local invariant is the
    same in any chart; the point and the branches' tangents are in the chart's coordinates, which a note names.

    Examples
    --------
    >>> import numag
    >>> cubic = numag.parse_system(["y^2*z - x^2*(x + z)"], ["x", "y", "z"], projective=True)  # a node at (0:0:1)
    >>> anatomy = _projective_chart_anatomy(cubic, np.array([0, 0, 1.0]), 1, AnatomyOptions())
    >>> anatomy.hypersurface.type.label, anatomy.point.real.tolist()
    ('A1', [0.0, 0.0])
    """
    homogeneous = np.asarray(homogeneous, dtype=complex)
    j, names = projective_chart(system, homogeneous)
    chart = PolynomialSystem(names, [p.dehomogenize(j) for p in system.polynomials])
    anatomy = point_anatomy(chart, np.delete(homogeneous, j) / homogeneous[j], seed=seed, options=options)
    anatomy.notes.insert(0, f"projective input: read in the affine chart {system.variables[j]} = 1, coordinates "
                            f"({', '.join(names)}); the point and tangents are in them")
    return anatomy


def check_anatomy(report, decomposition=None, angles=None, options=None):
    """The anatomy at every singular point of a :class:`~numag.singular.smoothness.CheckReport`.

    Returns
    -------
    dict
        Index of the point -> PointAnatomy.
    """
    result = {}
    for verdict in report.points:
        if verdict.verdict != "singular":
            continue
        if report.system.projective:  # read in the chart of the point's largest coordinate (decision 0147)
            result[verdict.index] = _projective_chart_anatomy(report.system, verdict.point,
                                                              report.seed + verdict.index, options or AnatomyOptions())
            continue
        result[verdict.index] = point_anatomy(report.system, verdict.point, seed=report.seed + verdict.index,
                                              decomposition=decomposition, angles=angles,
                                              local_dimension=verdict.local_dimension, options=options)
    return result
