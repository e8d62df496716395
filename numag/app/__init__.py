"""The application layer: the command line, report files, the exact reference and the comparison.

Owns the command line (``cli``; ``python -m numag`` and the ``numag`` console script), the JSON reports
and their round trips, including certifying a saved report (``report``), the exact sympy reference run
in an isolated child process (``reference``) and numag's singular locus held beside it (``compare``).
It sits on top of every other package and nothing imports it. This ``__init__`` imports nothing.
"""
