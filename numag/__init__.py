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
* :func:`load_family`, :func:`discriminant`, :func:`sweep` -- families
  F(x; p): where members are singular, what they do between, many members at once (``numag discriminant``,
  ``numag sweep``);
* :func:`point_anatomy`, :func:`component_anatomy`, :func:`locus_anatomy` -- what kind of singularity
  (multiplicity, Milnor and Tjurina numbers, Arnold's type, branches of curves; ``--anatomy``);
* :class:`BatchEvaluator` -- F and J at many points at once;
* :func:`save`, :func:`load` -- any result to a JSON report and back; :class:`System` (``from_sympy``, ``to_sympy``);
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

# The public names and the module that defines each ("module:name" where the name differs). They are
# imported on first use (module ``__getattr__``, PEP 562): the stages pull in numpy, scipy, networkx and
# mpmath, and a command line that only prints its help, or a program that only reads a system, should
# not wait for them.
_PUBLIC = {
    "parse_system": "system.parse", "parse_polynomial": "system.parse",
    "Polynomial": "system.polynomial", "PolynomialSystem": "system.polynomial",
    "System": "system.polynomial:PolynomialSystem",  # the short name: System.from_sympy(...), system.to_sympy()
    "BatchEvaluator": "numeric.evaluate",
    "CheckOptions": "singular.smoothness", "check_points": "singular.smoothness",
    "load_system": "system.files", "load_family": "system.files",
    "SolveOptions": "tracking.solve", "continue_solutions": "tracking.solve", "solve_system": "tracking.solve",
    "DecomposeOptions": "witness.decompose", "components_through": "witness.decompose",
    "decompose": "witness.decompose",
    "SingularOptions": "singular.locus", "singular_locus": "singular.locus",
    "DiscriminantOptions": "families.discriminant", "discriminant": "families.discriminant",
    "SweepOptions": "families.sweep", "sweep": "families.sweep",
    "CertifyOptions": "certify.records",
    "certify_rank": "certify.certificates", "certify_regular_zero": "certify.certificates",
    "certify_singular_point": "certify.certificates", "certify_smooth_point": "certify.certificates",
    "overlapping_pairs": "certify.certificates",
    "point_anatomy": "anatomy.survey", "component_anatomy": "anatomy.survey", "locus_anatomy": "anatomy.survey",
    "complete_intersection_milnor": "anatomy.intersection",
    "save": "app.saved", "load": "app.saved",
    "StartKind": "tracking.starts", "choose_start": "tracking.starts", "mixed_volume": "tracking.polyhedral",
    "choose_witness_start": "tracking.starts", "estimated_cost": "tracking.starts",
    "isolated_singular_points": "singular.isolated",
    "backward_error": "singular.nearness", "coefficient_precision": "singular.nearness",
}

__all__ = ["NumagError", "parse_system", "parse_polynomial", "Polynomial", "PolynomialSystem",
           "BatchEvaluator", "CheckOptions", "check_points", "load_system", "SolveOptions", "solve_system",
           "continue_solutions", "DecomposeOptions", "decompose", "components_through", "SingularOptions",
           "singular_locus", "CertifyOptions", "certify_regular_zero", "certify_singular_point",
           "certify_smooth_point", "certify_rank", "overlapping_pairs", "load_family", "DiscriminantOptions",
           "discriminant", "SweepOptions", "sweep", "point_anatomy",
           "component_anatomy", "locus_anatomy", "save", "load", "System", "StartKind", "choose_start",
           "mixed_volume", "isolated_singular_points", "choose_witness_start", "estimated_cost",
           "complete_intersection_milnor", "__version__"]


def __getattr__(name):
    """Import a public name's module on first use and keep the name here (later look-ups are direct)."""
    where = _PUBLIC.get(name)
    if where is None:
        raise AttributeError(f"module 'numag' has no attribute {name!r}")
    import importlib
    module_name, _, attribute = where.partition(":")
    value = getattr(importlib.import_module(f".{module_name}", __name__), attribute or name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_PUBLIC))
