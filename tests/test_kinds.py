"""Kinds, verdicts and options as types (issue 18, item 3): text-valued enums that read back from their
text, options refused on construction naming the option, keyword-only result records, one progress
protocol, and an answer about the closure that is a value, not an exception."""

import json

import pytest

from numag.certify.records import CertifyOptions, Status
from numag.errors import InputError
from numag.singular.kinds import CandidateSystem, Formulation, LocalDimensionSource, PieceKind, Verdict
from numag.singular.locus import SingularComponent, SingularOptions, singular_locus
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions, solve_system
from numag.tracking.tracker import TrackerOptions
from numag.witness.cascade import WitnessOptions
from numag.witness.decompose import DecomposeOptions

ENUMS = (Verdict, LocalDimensionSource, Formulation, CandidateSystem, PieceKind, Status)


@pytest.mark.parametrize("kind", ENUMS)
def test_members_are_their_text_in_json_and_read_back(kind):
    for member in kind:
        assert json.loads(json.dumps({"k": member})) == {"k": member.value}
        assert f"{member}" == member.value and kind.parse(member.value, "k") is member


@pytest.mark.parametrize("kind", ENUMS)
def test_unknown_text_is_refused_naming_the_option(kind):
    with pytest.raises(InputError, match="unknown colour 'no such kind'; choose one of"):
        kind.parse("no such kind", "colour")


def test_local_dimension_source_reads_back_from_every_text():
    components = [{"id": 2, "dimension": 1, "degree": 3}, {"id": 5, "dimension": 0, "degree": 1}]
    for source in LocalDimensionSource:
        text = source.describe(components)
        assert LocalDimensionSource.from_text(text) is source
    assert LocalDimensionSource.COMPONENTS.describe(components) == (
        "components through the point: 2 (dimension 1, degree 3), 5 (dimension 0, degree 1)")
    with pytest.raises(InputError, match="local_dimension_source"):
        LocalDimensionSource.from_text("complete intersection (perhaps)")


def test_piece_kind_of_each_verdict():
    # smooth, singular, non-reduced, embedded point (decision 0105: X smooth there, never a piece), undecided, off
    assert [PieceKind.of_verdict(v) for v in Verdict] == [PieceKind.UNDECIDED, PieceKind.SINGULAR,
                                                          PieceKind.NON_REDUCED, PieceKind.UNDECIDED,
                                                          PieceKind.UNDECIDED, PieceKind.UNDECIDED]
    assert [v.is_singular for v in Verdict] == [False, True, True, False, False, False]


@pytest.mark.parametrize("build, option", [
    (lambda: CheckOptions(point_tolerance=2.0), "point_tolerance"),
    (lambda: CheckOptions(max_digits=4), "max_digits"),
    (lambda: CheckOptions(local_dimension=1.5), "local_dimension"),
    (lambda: CheckOptions(neighbour_samples=-1), "neighbour_samples"),
    (lambda: CheckOptions(suspect_threshold="small"), "suspect_threshold"),
    (lambda: SolveOptions(batch_size=0), "batch_size"),
    (lambda: SolveOptions(refine_digits=10), "refine_digits"),
    (lambda: CertifyOptions(digits=5), "digits"),
    (lambda: CertifyOptions(max_digits=20), "max_digits"),
    (lambda: CertifyOptions(guard_digits=40), "guard_digits"),
    (lambda: TrackerOptions(max_steps=0), "max_steps"),
    (lambda: TrackerOptions(min_step=-1e-12), "min_step"),
    (lambda: TrackerOptions(endgame_shrink=1.5), "endgame_shrink"),
    (lambda: WitnessOptions(cluster_tolerance=0), "cluster_tolerance"),
    (lambda: WitnessOptions(lowest_dimension="2"), "lowest dimension"),
    (lambda: DecomposeOptions(max_loops=0), "max_loops"),
    (lambda: SingularOptions(formulation="nul vector"), "formulation"),
])
def test_a_bad_option_is_refused_on_construction_naming_it(build, option):
    with pytest.raises(InputError, match=option):
        build()


def test_defaults_and_text_options_construct():
    # every default passes its own checks (a failing check raises here), and text becomes a member
    CheckOptions(), SolveOptions(), CertifyOptions(), WitnessOptions(), DecomposeOptions()
    assert TrackerOptions(rescue_digits=0).rescue_digits == 0
    assert SingularOptions(formulation="null vector").formulation is Formulation.NULL_VECTOR


def test_singular_component_takes_keywords_only():
    with pytest.raises(TypeError):
        SingularComponent(0, 0, 1, None, None, None, False, CandidateSystem.GRADIENT, PieceKind.SINGULAR)


def test_verdicts_are_members():
    # the nodal cubic y^2 = x^2 (x + 1) has its node at the origin (a worked example in any
    # algebraic-geometry text; common practice, no source)
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    report = check_points(system, [[0, 0], [3, 6]], seed=1)
    assert [v.verdict for v in report.points] == [Verdict.SINGULAR, Verdict.SMOOTH]
    assert all(isinstance(v.verdict, Verdict) for v in report.points)
    assert {v.local_dimension_source for v in report.points} <= set(LocalDimensionSource)


def test_progress_is_told_path_counts_through_one_protocol():
    # two circles meet in two points (Bezout: 2 x 2 = 4 paths, two of them to infinity); common practice
    system = parse_system(["x^2 + y^2 - 4", "(x - 1)^2 + y^2 - 4"], ["x", "y"])
    told = []
    solve_system(system, seed=3, progress=lambda message, *, done=None, total=None: told.append((message, done, total)))
    assert told and all(isinstance(message, str) and message for message, _, _ in told)
    assert told[-1][1:] == (4, 4)
    assert all(0 <= done <= total == 4 for _, done, total in told)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_singular_line_reaching_infinity_is_a_note_not_an_error(seed):
    # V(xy) in C^3 is two planes meeting in the z-axis: the axis is the singular locus, and its point at
    # infinity lies on it (a positive-dimensional singular set there); common practice, no source
    locus = singular_locus(parse_system(["x*y"], ["x", "y", "z"]), seed=seed)
    assert [(c.dimension, c.degree, c.kind, c.at_infinity) for c in locus.components] == [
        (1, 1, PieceKind.SINGULAR, False)]
    assert any("reaches infinity" in note for note in locus.notes)  # the case said as it is (issue 20)


def test_a_point_off_x_is_an_answer_not_an_error():
    # (3, 0) is at distance 2 from the unit circle, (1, 0) on it (common practice, no source)
    circle = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    report = check_points(circle, [[1, 0], [3, 0]], seed=0)
    assert [v.verdict for v in report.points] == [Verdict.SMOOTH, Verdict.OFF] and report.off
    assert report.points[1].distance > 1  # Newton moved it far beyond the point tolerance
