"""The kinds of answers of :mod:`numag.singular`: verdicts, where a local dimension came from,
formulations of "rank J < c", the systems candidates come from, and the kinds of singular pieces.

Members are their text (:class:`numag.kinds.TextEnum`): reports and the command line print the value,
code compares members.

Examples
--------
>>> Verdict.NON_REDUCED.is_singular, Formulation.parse("null vector", "formulation") is Formulation.NULL_VECTOR
(True, True)
>>> source = LocalDimensionSource.from_text("components through the point: 1 (dimension 1, degree 2)")
>>> source is LocalDimensionSource.COMPONENTS, source.describe([{"id": 1, "dimension": 1, "degree": 2}])
(True, 'components through the point: 1 (dimension 1, degree 2)')
"""

from ..kinds import TextEnum

__all__ = ["Verdict", "JudgedPoint", "LocalDimensionSource", "Formulation", "CandidateSystem", "PieceKind",
           "CoefficientPrecision"]


class Verdict(TextEnum):
    """The verdict of the Jacobian criterion at a point."""

    SMOOTH = "smooth"
    SINGULAR = "singular"
    NON_REDUCED = "non-reduced"    # the rank drops on a whole neighbourhood in X: multiplicity > 1
    # the rank drops at the point only, which lies on one reduced component of X with local multiplicity 1: X is
    # smooth there and the equations do not cut it out reduced at the point (an embedded point, decision 0105)
    EMBEDDED = "embedded point"
    UNDECIDED = "undecided"
    OFF = "off"                    # not on X within the point tolerance: nothing is judged there

    @property
    def is_singular(self):
        """Singular or non-reduced: the point is kept as a piece of the singular locus."""
        return self in (Verdict.SINGULAR, Verdict.NON_REDUCED)


class JudgedPoint(TextEnum):
    """Which point a verdict of the check is about (decision 0072)."""

    GIVEN = "the given point"                          # exact data on X: judged exactly where given
    NEAREST_ON_X = "the nearest point of X found"       # the given point moved onto X by Newton's method
    RANK_DROP = "a point where the rank drops"          # within the point tolerance of the given point
    NONE = "none"                                       # "off", or undecided between two points the data allows


class LocalDimensionSource(TextEnum):
    """Where the local dimension dim_a X of a verdict came from."""

    GIVEN = "given"
    COMPONENTS = "components through the point"
    FULL_RANK = "complete intersection (Jacobian of full rank)"   # independent equations: no assumption
    ASSUMED = "complete intersection (assumed)"
    HYPERSURFACE = "one equation (every component of X has dimension n - 1)"   # Krull: no assumption
    ISOLATED = "isolated point (Jacobian injective)"
    UNKNOWN = "unknown"
    NOT_JUDGED = "not judged (the point is not on X)"   # the verdict "off"
    NOT_REACHED = "not judged (no point of X reached)"  # undecided whether on X within the tolerance (0120)

    def describe(self, components=()):
        """The text a report shows: for :attr:`COMPONENTS`, followed by the components (dicts with
        ``id``, ``dimension``, ``degree``)."""
        if self is not LocalDimensionSource.COMPONENTS:
            return self.value
        names = ", ".join(f"{c['id']} (dimension {c['dimension']}, degree {c['degree']})" for c in components)
        return f"{self.value}: {names}"

    @classmethod
    def from_text(cls, text):
        """The source a report's text describes (the inverse of :meth:`describe`); InputError if none."""
        if isinstance(text, str) and text.startswith(cls.COMPONENTS.value + ":"):
            return cls.COMPONENTS
        return cls.parse(text, "local_dimension_source")


class Formulation(TextEnum):
    """How "rank J < c" is written as equations (the option of :func:`numag.singular.locus.singular_locus`)."""

    AUTO = "auto"
    MINORS = "minors"
    NULL_VECTOR = "null vector"
    GRADIENT = "gradient"          # projective hypersurfaces: the partial derivatives


class CandidateSystem(TextEnum):
    """The system whose solutions a piece of the singular locus came from (reported with the piece)."""

    MINORS = "minors"
    RANDOM_MINORS = "random minors"
    NULL_VECTOR = "null vector"
    GRADIENT = "gradient system"
    GRADIENT_AT_INFINITY = "gradient system at infinity"
    # f and its partials up to a non-reduced component's multiplicity m: where ord f > m inside it (decision 0140)
    HIGHER_PARTIALS = "partials up to the multiplicity"


class PieceKind(TextEnum):
    """What a piece of the singular locus is."""

    SINGULAR = "singular"
    NON_REDUCED = "non-reduced"    # a whole generically non-reduced component of X
    UNDECIDED = "undecided"
    NEAR_SINGULAR = "near-singular"   # smooth as written, singular after a change of the coefficients within
    #                                   their precision (decision 0062): listed apart, never a piece
    # a set of positive dimension where the equations' Jacobian drops rank and X is smooth at its generic point (one
    # reduced component of multiplicity 1 there): an embedded component of the equations (decision 0108): listed
    # apart, never a piece
    EMBEDDED = "embedded"

    @classmethod
    def of_verdict(cls, verdict):
        """The kind of a piece whose witness point got ``verdict`` (smooth points and embedded points are never
        pieces)."""
        return {Verdict.SINGULAR: cls.SINGULAR, Verdict.NON_REDUCED: cls.NON_REDUCED}.get(verdict, cls.UNDECIDED)


class CoefficientPrecision(TextEnum):
    """How precisely the input's coefficients are known (decision 0062)."""

    EXACT = "exact"                        # integers, rationals, short decimals: the numbers as written
    DOUBLE = "double precision"            # decimals of 15 or more significant digits, or stored floats
