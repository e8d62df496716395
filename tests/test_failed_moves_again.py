"""Regeneration paths that fail with the candidates' lowered endgame radius are tracked again at the tracker's own.

The singular locus of 3 x 3 matrices of rank <= 1 (the Segre variety P^2 x P^2 in C^9, singular only at the zero
matrix; J. Harris, "Algebraic Geometry: A First Course", 1992, the Segre varieties, from memory; the shared problem file
verifies it with sympy Groebner bases) left 0-8 candidate paths at the minimum step depending on the seed
(decision 0129). Each failed path is now tracked again; the answer is one singular point and no path fails.
"""

import json
from pathlib import Path

import pytest

from numag.singular.locus import singular_locus
from numag.system.parse import parse_system

PROBLEMS = json.loads((Path(__file__).parent / "data" / "problems.json").read_text())
ENTRY = next(p for p in (PROBLEMS["problems"] if isinstance(PROBLEMS, dict) else PROBLEMS)
             if p["name"] == "rank1_3x3_matrices")


@pytest.mark.parametrize("seed", [2, 4, 5])  # seeds where the lowered radius alone left failed paths
def test_no_candidate_path_stays_failed(seed):
    system = parse_system(ENTRY["equations"], ENTRY["variables"], projective=ENTRY["projective"])
    locus = singular_locus(system, seed=seed)
    assert locus.paths.get("minimum_step", 0) + locus.paths.get("step_limit", 0) == 0, locus.paths
    points = [c for c in locus.components if c.dimension == 0 and c.kind == "singular" and not c.at_infinity]
    assert len(points) == ENTRY["expected"]["singular_points"]
    assert not [c for c in locus.components if c.dimension > 0 and not c.at_infinity]
