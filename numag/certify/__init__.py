"""Certificates: proofs about points, in interval arithmetic and exactly.

Owns every proof numag issues: boxes that provably hold one zero (Krawczyk, alpha test), every equation
of a claim accounted for over the box, isosingular deflation of singular zeros, exact recognition of
coordinates and root separation, certified rank bounds, claim checks and box disjointness. It needs only
the system, the mpmath evaluator and the projection onto X from :mod:`numag.numeric`; the application
layer (:mod:`numag.app`) applies it to reports. This ``__init__`` imports nothing.
"""
