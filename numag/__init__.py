"""numag: where is a variety singular? Numerical algebraic geometry by homotopy continuation.

The public API in brief:

* :func:`load_system`, :func:`parse_system` -- read equations (our own grammar, exact coefficients);
* :func:`check_points` -- the Jacobian criterion at points, with evidence (``numag check``);
* :func:`solve_system`, :func:`continue_solutions` -- isolated solutions of square systems (``numag solve``);
* :func:`decompose`, :func:`components_through` -- irreducible components of X with dimension, degree and
  witness points, and the components through a point (``numag decompose``);
* :func:`singular_locus` -- every singular point and singular component of X (``numag singular``);
* :func:`certify_regular_zero`, :func:`certify_singular_point`, :func:`certify_smooth_point`,
  :func:`certify_rank`, :func:`overlapping_pairs` with :class:`CertifyOptions` -- certificates (``numag certify``);
* :class:`BatchEvaluator` -- F and J at many points at once;
* :class:`NumagError` -- the root of every error numag raises on purpose.

Examples
--------
>>> import numag
>>> system = numag.parse_system(["y^2 - x^3"], ["x", "y"])
>>> numag.check_points(system, [[0, 0]], seed=0).points[0].verdict
'singular'
"""

from .version import __version__
from .run.allocation import retain_freed_memory  # noqa: E402

# Batched evaluations free and reallocate megabyte arrays all the time; keeping freed memory in
# the process halves their cost (see numag.run.allocation; NUMAG_KEEP_ALLOCATOR=1 opts out).
retain_freed_memory()

from .errors import NumagError  # noqa: E402
from .system.parse import parse_system, parse_polynomial  # noqa: E402
from .system.polynomial import Polynomial, PolynomialSystem  # noqa: E402
from .numeric.evaluate import BatchEvaluator  # noqa: E402
from .singular.smoothness import CheckOptions, check_points  # noqa: E402
from .system.files import load_system  # noqa: E402
from .tracking.solve import SolveOptions, continue_solutions, solve_system  # noqa: E402
from .witness.decompose import DecomposeOptions, components_through, decompose  # noqa: E402
from .singular.locus import SingularOptions, singular_locus  # noqa: E402
from .certify.records import CertifyOptions  # noqa: E402
from .certify.certificates import (certify_rank, certify_regular_zero, certify_singular_point,  # noqa: E402
                                   certify_smooth_point, overlapping_pairs)
from .tracking.starts import StartKind, choose_start  # noqa: E402
from .tracking.polyhedral import mixed_volume  # noqa: E402
from .singular.isolated import isolated_singular_points  # noqa: E402

__all__ = ["NumagError", "parse_system", "parse_polynomial", "Polynomial", "PolynomialSystem",
           "BatchEvaluator", "CheckOptions", "check_points", "load_system", "SolveOptions", "solve_system",
           "continue_solutions", "DecomposeOptions", "decompose", "components_through", "SingularOptions",
           "singular_locus", "CertifyOptions", "certify_regular_zero", "certify_singular_point",
           "certify_smooth_point", "certify_rank", "overlapping_pairs", "StartKind", "choose_start", "mixed_volume",
           "isolated_singular_points", "__version__"]
