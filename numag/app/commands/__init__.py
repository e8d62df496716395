"""The sub-commands of the command line, one module each.

Each module (``check``, ``solve``, ``singular``, ``decompose``, ``certify``, ``compare``, ``discriminant``,
``sweep``, ``plot``) has
``add_parser(commands)``, which adds its sub-parser and options, and ``run(args, out)``, which runs it and
returns the exit code; ``common`` holds what they share (exit codes, option types, loading a system,
progress lines). :mod:`numag.app.cli` builds the parser from them and runs ``main``. A new sub-command is
a new module here and its one-line summary in :data:`SUMMARIES`. This ``__init__`` imports nothing, so that
``numag --help`` lists the commands without importing them (and the stages behind them).
"""

#: Exit codes (see :mod:`numag.app.cli`).
EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_UNDECIDED, EXIT_MISMATCH = 0, 1, 2, 3, 4

#: Each sub-command's one-line summary, in the order ``numag --help`` lists them.
SUMMARIES = {
    "check": "smooth or singular at given points (Jacobian criterion, with evidence)",
    "solve": "isolated solutions of a square system (homotopy continuation)",
    "singular": "where X is singular: every singular point and component (the main job)",
    "decompose": "irreducible components of X: dimension, degree, witness points",
    "certify": "certify the points of a saved report (solve, singular or check)",
    "compare": "numag's singular locus beside an exact Groebner-basis reference (sympy)",
    "discriminant": "parameter values where a member of a family is singular, and what happens between",
    "sweep": "solve a square family at many parameter values (one batched parameter homotopy)",
    "plot": "draw a saved report: real curves and surfaces, singular points, joint angles",
}

