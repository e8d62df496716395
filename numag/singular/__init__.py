"""Where X is singular: the verdict at a point and the singular locus.

Owns the Jacobian criterion at points, with evidence, escalation to higher precision and the components
through each point (``smoothness``: ``check_points``), and the singular locus of X (``locus``:
``singular_locus``, with the augmented systems F + "rank J < c" as minors or null vectors, the gradient
system of a projective hypersurface and the points at infinity). It builds on :mod:`numag.witness`.
This ``__init__`` imports nothing.
"""
