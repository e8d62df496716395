"""Witness sets: positive-dimensional solution sets and their irreducible components.

Owns the regenerative cascade that builds witness supersets of every dimension, junk removal, the
homotopy membership test and the tracking of slice moves (``cascade``), and the decomposition of X into
irreducible components by monodromy and the trace test, with ``components_through`` a point
(``decompose``). It builds on :mod:`numag.tracking`; the point check and the singular locus
(:mod:`numag.singular`) build on it. This ``__init__`` imports nothing.
"""
