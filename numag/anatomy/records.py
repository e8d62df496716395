"""What the anatomy of a singular point or component is made of: typed dataclasses, enums, JSON round trip.

A point's anatomy holds its multiplicity (from a local witness set), for hypersurfaces the Hessian corank
with its rank evidence, the Milnor and Tjurina numbers and Arnold's type with the test that decided it,
and for curves the local branches with their multiplicity, tangent direction and reality, summed up as a
:class:`Motion` for a mechanism designer. A component's anatomy holds the transversal anatomy at a
generic point and the special points where it changes.

Examples
--------
>>> kind = SingularityType(Family.A, 3)
>>> kind.label
'A3'
>>> SingularityType.from_dict(kind.to_dict()) == kind
True
"""

from dataclasses import dataclass, field
from enum import Enum

import numpy as np

__all__ = ["Family", "TypeTest", "Motion", "SingularityType", "HessianEvidence", "HypersurfaceAnatomy",
           "Branch", "IntersectionMilnor", "PointAnatomy", "ComponentAnatomy", "encode_vector", "decode_vector"]


class Family(Enum):
    """Arnold's families of simple singularities, and what else a point can turn out to be."""

    A = "A"
    D = "D"
    E = "E"
    NOT_SIMPLE = "not simple"
    NOT_ISOLATED = "not isolated"
    UNDECIDED = "undecided"


class TypeTest(Enum):
    """The test that decided the type (Arnold 1972, the determinator of the simple singularities)."""

    HESSIAN_FULL_RANK = "Hessian of full rank: a Morse point, A1"
    CORANK_ONE = "Hessian corank 1: A_mu"
    CUBIC_THREE_ROOTS = "corank 2, the cubic on the kernel has three distinct roots: D4"
    CUBIC_DOUBLE_ROOT = "corank 2, the cubic on the kernel has a double root: D_mu"
    CUBIC_TRIPLE_ROOT = "corank 2, the cubic on the kernel is a cube and mu is 6, 7 or 8: E_mu"
    CUBIC_TRIPLE_ROOT_LARGE_MU = "corank 2, the cubic on the kernel is a cube and mu > 8: not simple"
    CUBIC_VANISHES = "corank 2 and the cubic on the kernel vanishes: not simple"
    CORANK_THREE_OR_MORE = "Hessian corank 3 or more: not simple"
    MILNOR_INFINITE = "the gradient's local dual space keeps growing: not an isolated singularity"
    INCONSISTENT = "corank and Milnor number disagree (mu < 2^corank): undecided"
    UNCLEAR_RANK = "the Hessian's singular values show no clear gap: undecided"
    UNCLEAR_DUAL = "a Macaulay matrix of the local dual space shows no clear gap: mu or tau undecided"
    BEYOND_PRECISION = ("mu or tau changes when the Taylor terms at rounding level are dropped or kept: out of "
                        "reach of double precision in these coordinates, undecided")
    CUBIC_ROOTS_CLOSE = "mu is 4 but two roots of the kernel cubic nearly coincide: D4 not confirmed, undecided"
    BRANCHES_DISAGREE = "the local branches contradict the type found from corank and mu: undecided"
    POINT_OFF = ("the point is off the singular point by more than rounding and could not be moved onto it: "
                 "what is read there belongs to a neighbouring function, undecided")
    COUNTS_DISAGREE = ("mu from the local dual space and mu from the gradient's paths disagree (or the paths "
                       "give no clear count): undecided")
    NO_CHANGE = ("a candidate special point reads the component's transversal type: no change of type shown, so "
                 "the search is not trusted there, undecided")


class Motion(Enum):
    """What the real branches through a real point of a curve allow a mechanism to do."""

    SWITCH = "switch"          # two or more real branches: the mechanism can change branch
    DEAD_POINT = "dead point"  # one real branch of even multiplicity (a cusp): motion stops and turns back
    PASS = "pass"              # one smooth real branch (the other branches complex): motion passes
    SINGULAR_PASS = "singular pass"  # one real branch of odd multiplicity above 1: passes, its speed vanishing there
    LOCKED = "locked"          # no real branch: an isolated real point
    COMPLEX = "complex point"  # the point is not real: no real motion through it

    def sentence(self, real_branches, transversal):
        """The plain sentence for a mechanism designer.

        Examples
        --------
        >>> Motion.SWITCH.sentence(2, True)
        'two real branches cross transversally: the mechanism can switch branch here'
        """
        words = {2: "two", 3: "three", 4: "four"}.get(real_branches, str(real_branches))
        if self is Motion.SWITCH:
            how = "cross transversally" if transversal else "meet with a common tangent"
            return f"{words} real branches {how}: the mechanism can switch branch here"
        if self is Motion.DEAD_POINT:
            return "one real branch with a cusp: a dead point (the motion stops and turns back)"
        if self is Motion.PASS:
            return "one smooth real branch passes through (the other branches are complex): no branch switch"
        if self is Motion.SINGULAR_PASS:
            return ("one real branch of odd multiplicity passes through without turning back, though it is singular "
                    "here (its speed vanishes): not a dead point, no branch switch")
        if self is Motion.LOCKED:
            return "isolated real point: the real configuration is locked here"
        return "a complex point: no real configuration passes through it"


def encode_vector(vector):
    """A complex vector as ``[[re, im], ...]`` (the report's point format)."""
    return [[float(np.real(v)), float(np.imag(v))] for v in np.asarray(vector, dtype=complex)]


def decode_vector(pairs):
    """Inverse of :func:`encode_vector`."""
    return np.array([complex(a, b) for a, b in pairs], dtype=complex)


def _optional(value, kind):
    return None if value is None else kind(value)


@dataclass(frozen=True)
class SingularityType:
    """A type in Arnold's list (family and index: A3, D5, E6) or what the point is otherwise.

    Attributes
    ----------
    family : Family
    index : int or None
        k of A_k and D_k, 6/7/8 of E; None for the other families.
    """

    family: Family
    index: object = None

    @property
    def label(self):
        """``"A3"``, ``"E6"``, ``"not simple"``."""
        return f"{self.family.value}{self.index}" if self.index is not None else self.family.value

    @property
    def simple(self):
        return self.family in (Family.A, Family.D, Family.E)

    def to_dict(self):
        return {"family": self.family.value, "index": self.index, "label": self.label}

    @classmethod
    def from_dict(cls, data):
        return cls(Family(data["family"]), _optional(data["index"], int))


@dataclass
class HessianEvidence:
    """The scaled singular values of the Hessian and the rank read from them.

    Attributes
    ----------
    rank : int
    singular_values : list of float
        Of the Hessian with each row divided by the size of its terms at the point, descending.
    tolerance : float
        Values at or below it count as zero (points come from tracking: about half the digits).
    gap : float or None
        sigma_rank / sigma_(rank+1) (infinite when nothing was dropped).
    """

    rank: int
    singular_values: list
    tolerance: float
    gap: object

    def to_dict(self):
        gap = None if self.gap is None else ("infinity" if self.gap == float("inf") else float(self.gap))
        return {"rank": self.rank, "singular_values": [float(v) for v in self.singular_values],
                "tolerance": float(self.tolerance), "gap": gap}

    @classmethod
    def from_dict(cls, data):
        gap = data["gap"]
        return cls(int(data["rank"]), [float(v) for v in data["singular_values"]], float(data["tolerance"]),
                   float("inf") if gap == "infinity" else _optional(gap, float))


@dataclass
class HypersurfaceAnatomy:
    """Invariants of an isolated hypersurface singularity f = 0 at a point.

    Attributes
    ----------
    corank : int
        n minus the rank of the Hessian.
    hessian : HessianEvidence
    milnor : int or None
        mu: the multiplicity of the point as a zero of grad f (local dual space); None when infinite
        (``decided_by`` is MILNOR_INFINITE) or undecided (the other undecided tests).
    tjurina : int or None
        tau: the same for (f, grad f).
    quasi_homogeneous : bool or None
        mu == tau (Saito 1971).
    type : SingularityType
    decided_by : TypeTest
    cubic_degeneracy : float or None
        Corank 2 only: |Hessian covariant of the kernel cubic| / |cubic|^2, 0 for a cube, 1 for three
        distinct roots in the normal form; the test uses it together with mu.
    frame_condition : float or None
        Condition number of the local frame the invariants were computed in (x = p + M u, decision 0044).
    frame_noise : float or None
        The rounding level of f's Taylor coefficients in the frame, relative to the largest: above about
        1e-8 the features that decide the type are out of reach of double precision (type undecided).
    milnor_by_paths : int or None
        Corank 2 or more, and infinite counts: mu counted a second way, as the number of solutions of
        grad f = eps b (b random) that converge to the point as eps -> 0; None when not counted or unclear.
    milnor_read, tjurina_read : int or None
        Where the type is undecided: the counts the local dual space gave, kept as evidence, not as mu and tau
        (decision 0120).
    """

    corank: int
    hessian: HessianEvidence
    milnor: object
    tjurina: object
    quasi_homogeneous: object
    type: SingularityType
    decided_by: TypeTest
    cubic_degeneracy: object = None
    frame_condition: object = None
    frame_noise: object = None
    milnor_by_paths: object = None
    milnor_read: object = None
    tjurina_read: object = None

    @property
    def corank_decided(self):
        """False where the Hessian's rank was unclear: ``corank`` is then what was read, not a fact."""
        return self.decided_by is not TypeTest.UNCLEAR_RANK

    @property
    def milnor_at_least(self):
        """A lower bound of mu known without it: 2^corank where the corank is decided (None otherwise)."""
        return 2 ** self.corank if self.corank_decided and self.corank > 0 else None

    def to_dict(self):
        return {"corank": self.corank if self.corank_decided else None, "corank_read": self.corank,
                "hessian": self.hessian.to_dict(), "milnor": self.milnor,
                "milnor_read": _optional(self.milnor_read, int), "tjurina_read": _optional(self.tjurina_read, int),
                "milnor_at_least": self.milnor_at_least,
                "tjurina": self.tjurina, "quasi_homogeneous": self.quasi_homogeneous, "type": self.type.to_dict(),
                "decided_by": self.decided_by.name, "decided_by_text": self.decided_by.value,
                "cubic_degeneracy": _optional(self.cubic_degeneracy, float),
                "frame_condition": _optional(self.frame_condition, float),
                "frame_noise": _optional(self.frame_noise, float),
                "milnor_by_paths": _optional(self.milnor_by_paths, int)}

    @classmethod
    def from_dict(cls, data):
        corank = data["corank"] if data["corank"] is not None else data["corank_read"]
        return cls(int(corank), HessianEvidence.from_dict(data["hessian"]), _optional(data["milnor"], int),
                   _optional(data["tjurina"], int), _optional(data["quasi_homogeneous"], bool),
                   SingularityType.from_dict(data["type"]), TypeTest[data["decided_by"]],
                   _optional(data["cubic_degeneracy"], float), _optional(data.get("frame_condition"), float),
                   _optional(data.get("frame_noise"), float), _optional(data.get("milnor_by_paths"), int),
                   _optional(data.get("milnor_read"), int), _optional(data.get("tjurina_read"), int))


@dataclass
class Branch:
    """One local branch of a curve at a point: an orbit of the local monodromy.

    Attributes
    ----------
    multiplicity : int
        Points of the branch on a nearby generic slice (the orbit's size).
    tangent : ndarray of complex
        Unit tangent direction, in the user's units (real up to a common phase for a real branch).
    real : bool or None
        The branch is its own complex conjugate (it carries real configurations); None where its reality
        was not decided (a complex slice, or a point that is not real).
    angle_rates : dict
        For files with an ``angles`` table and real branches: label -> rate of that angle along the
        branch, in degrees per degree of the fastest one.
    """

    multiplicity: int
    tangent: np.ndarray
    real: object
    angle_rates: dict = field(default_factory=dict)

    def to_dict(self):
        return {"multiplicity": self.multiplicity, "tangent": encode_vector(self.tangent), "real": self.real,
                "angle_rates": {k: float(v) for k, v in self.angle_rates.items()}}

    @classmethod
    def from_dict(cls, data):
        return cls(int(data["multiplicity"]), decode_vector(data["tangent"]), None if data["real"] is None else bool(data["real"]),
                   {k: float(v) for k, v in data["angle_rates"].items()})


@dataclass
class IntersectionMilnor:
    """mu of an ICIS at a point by the Le-Greuel formula, with the evidence.

    Attributes
    ----------
    milnor : int or None
        None when undecided (a length unclear or infinite, or the two choices disagree).
    lengths : list of list of int or None
        Per choice of the generic equations, dim O / (g_1..g_(j-1), j-minors) for j = 1..k.
    narrowest_gap : float
        The narrowest rank gap (decades) of the Macaulay matrices behind the lengths.
    delta : int or None
        For a curve with counted branches: delta = (mu + r - 1) / 2 (Buchweitz and Greuel 1980).
    notes : list of str
    """

    milnor: object
    lengths: list
    narrowest_gap: float
    notes: list = field(default_factory=list)
    delta: object = None

    @property
    def decided(self):
        return self.milnor is not None

    def to_dict(self):
        return {"milnor": self.milnor, "lengths": [list(c) for c in self.lengths],
                "narrowest_gap": None if not np.isfinite(self.narrowest_gap) else float(self.narrowest_gap),
                "delta": self.delta, "notes": list(self.notes)}

    @classmethod
    def from_dict(cls, data):
        gap = data.get("narrowest_gap")
        return cls(None if data["milnor"] is None else int(data["milnor"]), [list(c) for c in data["lengths"]],
                   float("inf") if gap is None else float(gap), list(data.get("notes", [])),
                   _optional(data.get("delta"), int))


@dataclass
class PointAnatomy:
    """The anatomy of X (or of a normal slice of X) at one point.

    Attributes
    ----------
    point : ndarray of complex
        In the user's units.
    local_dimension : int
    multiplicity : int or None
        Points of a local witness set: on a generic slice of complementary dimension near the point,
        those that converge to it as the slice moves onto it. None when it could not be counted.
    hypersurface : HypersurfaceAnatomy or None
        For one equation with an isolated singularity.
    branches : list of Branch or None
        For curves: the orbits of the local monodromy.
    motion : Motion or None
        For curves: what the real branches allow.
    notes : list of str
    seconds : float
        Time spent on this point.
    moved_by : float or None
        How far (user's units) the given point was moved onto the singular point before it was read (one
        equation); None when it was read where it was given.
    intersection : IntersectionMilnor or None
        For a complete intersection of k >= 2 equations and positive dimension: its Milnor number (Le-Greuel).
    branches_read : list of Branch or None
        Where a plane curve's type is undecided: the branches the local monodromy read, unconfirmed by the type
        (``branches`` is then None: their number and reality undecided, decision 0120).
    multiplicity_read : int or None
        The same: the local witness set's count, of which the branches are the orbits (``multiplicity`` None).
    """

    point: np.ndarray
    local_dimension: int
    multiplicity: object
    hypersurface: object = None
    branches: object = None
    motion: object = None
    notes: list = field(default_factory=list)
    seconds: float = 0.0
    moved_by: object = None
    intersection: object = None
    branches_read: object = None
    multiplicity_read: object = None

    @property
    def real_branches(self):
        """Number of real branches (None when the branches, or their reality, were not decided)."""
        if self.branches is None or any(b.real is None for b in self.branches):
            return None
        return sum(1 for b in self.branches if b.real)

    @property
    def transversal(self):
        """The real branches are smooth with pairwise distinct tangents.

        For a plane curve whose type is known this follows from the type (Arnold 1972's normal forms): A1 and D4
        have pairwise distinct tangents, every other simple type does not. An angle between computed tangents
        depends on the units (a node whose branches' slopes are +-2e-4 read as "a common tangent"); it is used
        only when the type does not tell.
        """
        real = [b for b in self.branches or [] if b.real]
        if any(b.multiplicity > 1 for b in real):
            return False
        kind = self.hypersurface.type if self.hypersurface is not None else None
        if kind is not None and kind.simple and self.local_dimension == 1 and len(self.point) == 2:
            return (kind.family is Family.A and kind.index == 1) or (kind.family is Family.D and kind.index == 4)
        for i in range(len(real)):
            for j in range(i):
                if abs(np.vdot(real[i].tangent, real[j].tangent)) > 1 - 1e-6:
                    return False
        return True

    @property
    def incomplete(self):
        """Something could not be decided: the multiplicity, the type, or a curve's branches."""
        return (self.multiplicity is None
                or (self.hypersurface is not None and self.hypersurface.type.family is Family.UNDECIDED)
                or (self.local_dimension == 1 and self.branches is None)
                or (self.intersection is not None and not self.intersection.decided))

    @property
    def sentence(self):
        """The plain sentence for a mechanism designer (curves only), else None."""
        if self.motion is None:
            return None
        return self.motion.sentence(self.real_branches, self.transversal)

    def to_dict(self):
        return {"point": encode_vector(self.point), "local_dimension": self.local_dimension,
                "multiplicity": self.multiplicity,
                "hypersurface": None if self.hypersurface is None else self.hypersurface.to_dict(),
                "branches": None if self.branches is None else [b.to_dict() for b in self.branches],
                "real_branches": self.real_branches,
                "motion": None if self.motion is None else self.motion.value, "sentence": self.sentence,
                "notes": list(self.notes), "seconds": float(self.seconds), "moved_by": self.moved_by,
                "intersection": None if self.intersection is None else self.intersection.to_dict(),
                "branches_read": None if self.branches_read is None else [b.to_dict() for b in self.branches_read],
                "multiplicity_read": self.multiplicity_read}

    @classmethod
    def from_dict(cls, data):
        read = data.get("branches_read")
        return cls(decode_vector(data["point"]), int(data["local_dimension"]), _optional(data["multiplicity"], int),
                   None if data["hypersurface"] is None else HypersurfaceAnatomy.from_dict(data["hypersurface"]),
                   None if data["branches"] is None else [Branch.from_dict(b) for b in data["branches"]],
                   None if data["motion"] is None else Motion(data["motion"]), list(data["notes"]),
                   float(data["seconds"]), _optional(data.get("moved_by"), float),
                   None if data.get("intersection") is None else IntersectionMilnor.from_dict(data["intersection"]),
                   None if read is None else [Branch.from_dict(b) for b in read],
                   _optional(data.get("multiplicity_read"), int))


@dataclass
class ComponentAnatomy:
    """Along a positive-dimensional singular component: the transversal type and where it changes.

    Attributes
    ----------
    component : int
        Id of the singular component.
    dimension : int
    transversal : PointAnatomy
        The anatomy of X cut by a generic normal slice at a generic point of the component (in the
        slice's own coordinates; ``point`` is the generic point).
    special_points : list of PointAnatomy
        Points of the component where the transversal type changes, each with the anatomy of its
        normal slice.
    notes : list of str
    special_points_searched : bool
        False when no search was made (several equations, a Hessian's rank that cannot drop or is unclear,
        the search switched off): an empty ``special_points`` then says nothing.
    rejected_candidates : int
        Candidate special points that failed the check that they lie on this component (equations of the
        singular locus not met in term units, or an isolated singular point of the locus).
    undecided_candidates : int
        Places where a special point may lie that the search could neither confirm nor rule out (a failure: the
        list of special points may be incomplete).
    """

    component: int
    dimension: int
    transversal: PointAnatomy
    special_points: list = field(default_factory=list)
    notes: list = field(default_factory=list)
    special_points_searched: bool = True
    rejected_candidates: int = 0
    undecided_candidates: int = 0

    def to_dict(self):
        return {"component": self.component, "dimension": self.dimension, "transversal": self.transversal.to_dict(),
                "special_points": [p.to_dict() for p in self.special_points], "notes": list(self.notes),
                "special_points_searched": self.special_points_searched,
                "rejected_candidates": self.rejected_candidates, "undecided_candidates": self.undecided_candidates}

    @classmethod
    def from_dict(cls, data):
        return cls(int(data["component"]), int(data["dimension"]), PointAnatomy.from_dict(data["transversal"]),
                   [PointAnatomy.from_dict(p) for p in data["special_points"]], list(data["notes"]),
                   bool(data.get("special_points_searched", True)), int(data.get("rejected_candidates", 0)),
                   int(data.get("undecided_candidates", 0)))
