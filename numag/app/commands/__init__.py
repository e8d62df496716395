"""The sub-commands of the command line, one module each.

Each module (``check``, ``solve``, ``singular``, ``decompose``, ``certify``, ``compare``) has
``add_parser(commands)``, which adds its sub-parser and options, and ``run(args, out)``, which runs it and
returns the exit code; ``common`` holds what they share (exit codes, option types, loading a system,
progress lines). :mod:`numag.app.cli` builds the parser from them and runs ``main``. A new sub-command is
a new module here and one name in ``build_parser``. This ``__init__`` imports nothing.
"""
