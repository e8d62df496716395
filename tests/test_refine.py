import mpmath
import numpy as np

from numag.numeric.evaluate import BatchEvaluator
from numag.system.parse import parse_system
from numag.numeric.refine import RankDropSystem, mp_gauss_newton, project_to_variety


def test_projection_lands_on_the_variety_in_one_batch():
    system = parse_system(["x^2 + y^2 - 1", "z - x*y"], ["x", "y", "z"])
    rng = np.random.default_rng(2)
    points = rng.standard_normal((200, 3))
    points[:, :2] /= np.linalg.norm(points[:, :2], axis=1)[:, None]
    points[:, 2] = points[:, 0] * points[:, 1]
    points += 1e-4 * rng.standard_normal((200, 3))
    result = project_to_variety(system, BatchEvaluator(system.polynomials), points)
    assert result.converged.all()
    assert np.all(result.distances < 1e-3)


def test_rank_drop_system_finds_the_node():
    # the node of y^2 = x^2 (x + 1) is the origin (common practice, no source)
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    with mpmath.mp.workdps(40):
        start = [mpmath.mpc("1e-3"), mpmath.mpc("0.9e-3")]
        drop = RankDropSystem(system, 0, [complex(v) for v in start], mpmath.mp)
        z, converged, _, _ = mp_gauss_newton(drop, drop.initial(start), mpmath.mp, tolerance=1e-30)
    assert converged
    assert np.abs(drop.point_of(z)).max() < 1e-25


def test_rank_drop_system_finds_the_whitney_umbrella_axis():
    # x^2 = y^2 z is singular along the z-axis (common practice, no source)
    system = parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    with mpmath.mp.workdps(40):
        start = [mpmath.mpc("1e-4"), mpmath.mpc("2e-4"), mpmath.mpc(3)]
        drop = RankDropSystem(system, 0, [complex(v) for v in start], mpmath.mp)
        z, converged, _, _ = mp_gauss_newton(drop, drop.initial(start), mpmath.mp, tolerance=1e-30,
                                             anchored=True)
    point = drop.point_of(z)
    # y enters the partials squared (d/dz = -y^2), so it converges like the square root of the tolerance
    assert converged and abs(point[0]) < 1e-20 and abs(point[1]) < 1e-12 and abs(point[2] - 3) < 1e-3
