"""Special points asked for and not searched make the anatomy incomplete (exit 3), never a clean "0 special
points" (decision 0127)."""

import io

import pytest

from numag.app.cli import EXIT_UNDECIDED, main

#: Steiner's Roman surface: singular along the three coordinate axes, each with two pinch points at +-1/2 (from
#: memory; sympy confirms that f and its gradient vanish on the axes). The axes are several singular components,
#: so the special points are not searched there.
STEINER = 'variables = ["x", "y", "z"]\nequations = ["x^2*y^2 + y^2*z^2 + z^2*x^2 - x*y*z"]\n'


@pytest.mark.parametrize("seed", ["1", "2"])
def test_special_points_not_searched_are_reported_as_incomplete(tmp_path, seed):
    path = tmp_path / "steiner.toml"
    path.write_text(STEINER)
    out = io.StringIO()
    code = main(["singular", str(path), "--anatomy", "--seed", seed], out=out)
    text = out.getvalue()
    assert code == EXIT_UNDECIDED
    assert "special points where the transversal type changes: not searched" in text
    assert "is incomplete" in text


def test_special_points_not_asked_for_leave_the_anatomy_complete():
    # a library caller who turns the search off did not ask: nothing is missing from what was asked
    import numag
    from numag.anatomy.survey import AnatomyOptions, locus_anatomy
    locus = numag.singular_locus(numag.parse_system(["x^2 - y^2*z"], ["x", "y", "z"]), seed=1)
    asked = locus_anatomy(locus)
    not_asked = locus_anatomy(locus, options=AnatomyOptions(special_points=False))
    assert not any(component.special_points_searched is False for component in asked.components.values())
    assert all(not component.special_points_searched for component in not_asked.components.values())
    assert not_asked.incomplete() == [] and asked.incomplete() == []
