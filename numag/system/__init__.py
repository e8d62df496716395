"""The system: what the user wrote, held exactly.

Owns exact coefficients (Q(i) extended by square roots of rationals, ``exact``), sparse polynomials and
systems with their size limits (``polynomial``), numag's own equation grammar (``parse``; never ``eval``),
TOML system files and point files (``files``), and bounded, strict reading and atomic writing of files
(``safeio``). Nothing here is numerical: it imports only :mod:`numag.errors`, and every later package
builds on it. This ``__init__`` imports nothing, so importing one module never loads its siblings.
"""
