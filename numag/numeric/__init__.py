"""Numerics at points: evaluation, linear algebra, refinement, clustering and units.

Owns batched evaluation of F and its Jacobian in double precision and at any mpmath precision
(``evaluate``), scaled singular values and numerical rank (``linalg``), Gauss-Newton projection onto X,
the rank-drop system and the local isolation test (``refine``), grouping equal points (``cluster``), and
the least-squares balancing of units by powers of ten (``scaling``). It knows nothing of homotopies:
:mod:`numag.tracking` and everything after it build on it. This ``__init__`` imports nothing.
"""
