"""Anatomy of a singularity: multiplicity, Milnor and Tjurina numbers, Arnold's simple types, the local
branches of curves, and the transversal type along singular components with the points where it changes.

Sits after ``certify`` (it counts local dual spaces with the Macaulay matrices kept there) and before
``app``. Results are typed dataclasses with enums (:mod:`numag.anatomy.records`); the entry points are
in :mod:`numag.anatomy.survey`.
"""
