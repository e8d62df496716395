"""Homotopy continuation: start systems, homotopies, the path tracker and isolated solutions.

Owns start systems and homotopies (``homotopy``: total-degree start, straight-line and parameter
homotopies, the projective patch), the batched path tracker with its step control, endgame, retries
and path statuses (``tracker``), the predictor's Butcher tableau and the step-control constants
both trackers share (``methods``), the precision rescue of single paths in mpmath (``rescue``), and
``solve_system`` / ``continue_solutions`` for square systems, which batch paths through an executor
and a run folder (``solve``). Witness sets (:mod:`numag.witness`) track their own moves with this
package's tracker. This ``__init__`` imports nothing.
"""
