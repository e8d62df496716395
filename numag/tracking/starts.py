"""Choosing a start system: total degree, multihomogeneous, polyhedral, or the cheapest (``auto``).

Every start gives a count of paths before anything is tracked: the Bezout number, the
multihomogeneous Bezout number of a grouping (given or found, see
:func:`~numag.tracking.multihomogeneous.best_groups`), and the mixed volume (which needs the
mixed cells, a set-up cost of linear programs). ``auto`` computes the first two always and the
mixed volume when the mixed-cell search is estimated to cost less than tracking the best other
count's paths (:data:`SECONDS_PER_LINEAR_PROGRAM` times the entries of its relation table against
:data:`SECONDS_PER_PATH` times the paths), then takes the polyhedral start when its set-up (its linear programs, counted) and its paths cost less than
the best other count's paths at :data:`SECONDS_PER_PATH` each (its paths are tracked twice, through
the cells and then to the system's coefficients, but neither stage has paths that diverge, the
expensive ones: cyclic 5 took 4 s for 70 polyhedral paths against 21 s for 120 total-degree paths),
else the smaller of the other two. The choice, the reason
and every count computed go to the report's ``start`` block.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> sparse = parse_system(["x^3*y^3 - x - 1", "x^3*y^3 - y - 2"], ["x", "y"])
>>> choice = choose_start(sparse, StartKind.AUTO, rng=np.random.default_rng(0))
>>> choice.kind.value, choice.counts
('polyhedral', {'total-degree': 36, 'multihomogeneous': 18, 'polyhedral': 6})
"""

from dataclasses import dataclass, field
import enum
import time

import numpy as np

from ..errors import InputError
from .multihomogeneous import GroupSource, VariableGroups, best_groups, multihomogeneous_bezout
from .polyhedral import MAX_LINEAR_PROGRAMS, PolyhedralStart

__all__ = ["StartKind", "StartChoice", "choose_start", "SECONDS_PER_LINEAR_PROGRAM", "SECONDS_PER_PATH"]

#: Estimates for ``auto`` (benchmarks/bench_starts.py --quick on the shared 2-core machine, decisions 0047
#: and 0055): one linear program of the cell search (50-70 microseconds in the batched simplex of
#: numag.numeric.feasibility; 3 ms with scipy's linprog) ...
SECONDS_PER_LINEAR_PROGRAM = 1e-4
#: ... and one tracked path (cyclic 6 by total degree: 232 s for 720 paths; eigenproblems 0.02 s a path).
SECONDS_PER_PATH = 0.1


class StartKind(enum.Enum):
    """The start systems of ``--start``."""

    TOTAL_DEGREE = "total-degree"
    MULTIHOMOGENEOUS = "multihomogeneous"
    POLYHEDRAL = "polyhedral"
    AUTO = "auto"

    @classmethod
    def parse(cls, text):
        """The kind named ``text`` (InputError naming the choices otherwise)."""
        for kind in cls:
            if kind.value == text:
                return kind
        raise InputError(f"unknown start {str(text)[:40]!r}: choose from {', '.join(k.value for k in cls)}")


@dataclass
class StartChoice:
    """The start chosen, why, and the path counts of the starts considered.

    Attributes
    ----------
    kind : StartKind
        Never AUTO.
    counts : dict
        Start name -> number of paths, for every start whose count was computed.
    reason : str
    groups : VariableGroups or None
        The grouping of a multihomogeneous count.
    polyhedral : PolyhedralStart or None
        The mixed cells, when they were computed (reused to track).
    setup_seconds : dict
        Start name -> seconds spent on its count (the mixed cells for the polyhedral one).
    """

    kind: StartKind
    counts: dict
    reason: str
    groups: object = None
    polyhedral: object = None
    setup_seconds: dict = field(default_factory=dict)

    @property
    def n_paths(self):
        """Paths the chosen start tracks."""
        return self.counts[self.kind.value]

    def report(self):
        """The ``start`` block of a report."""
        block = {"chosen": self.kind.value, "reason": self.reason, "paths": self.counts,
                 "setup_seconds": {k: round(v, 4) for k, v in self.setup_seconds.items()}}
        if self.groups is not None:
            block["groups"] = self.groups.report()
        if self.polyhedral is not None:
            block["mixed_cells"] = len(self.polyhedral.cells)
            block["linear_programs"] = self.polyhedral.linear_programs
            block["zero_coordinates"] = self.polyhedral.zero_coordinates.value
        return block


def _relation_table_size(system):
    pairs = [len(p.exponents) * (len(p.exponents) + 1) // 2 for p in system.polynomials]  # + the origin
    return sum(pairs[p] * pairs[q] for p in range(len(pairs)) for q in range(p + 1, len(pairs)))


def choose_start(system, kind, groups=None, rng=None):
    """Counts of the starts that ``kind`` needs, and the start to use.

    Parameters
    ----------
    system : PolynomialSystem
        Square (the system that will be tracked).
    kind : StartKind
    groups : list of list of str, optional
        Variable groups for the multihomogeneous start (default: the best grouping found).
    rng : numpy.random.Generator
        For the polyhedral start's random coefficients and lifting.

    Returns
    -------
    StartChoice

    Raises
    ------
    InputError
        For a start that does not apply (a multihomogeneous or polyhedral start of a projective system).
    """
    rng = rng or np.random.default_rng()
    counts, seconds = {StartKind.TOTAL_DEGREE.value: int(np.prod(system.degrees))}, {}
    if kind == StartKind.TOTAL_DEGREE:
        if groups is not None:
            raise InputError("variable groups are used by the multihomogeneous start only (--start multihomogeneous)")
        return StartChoice(kind, counts, "asked for")
    if system.projective:
        if kind == StartKind.AUTO:
            return StartChoice(StartKind.TOTAL_DEGREE, counts, "a projective system: only the total-degree start "
                               "applies")
        raise InputError(f"the {kind.value} start is for affine systems; a projective system has a total-degree start")
    chosen_groups = None
    if kind in (StartKind.MULTIHOMOGENEOUS, StartKind.AUTO):
        started = time.perf_counter()
        if groups is not None:
            chosen_groups = VariableGroups.of(system, groups, GroupSource.FILE)
            count = multihomogeneous_bezout(chosen_groups.degree_matrix(system.polynomials), chosen_groups.sizes)
        else:
            chosen_groups, count = best_groups(system)
        counts[StartKind.MULTIHOMOGENEOUS.value] = count
        seconds[StartKind.MULTIHOMOGENEOUS.value] = time.perf_counter() - started
        if kind == StartKind.MULTIHOMOGENEOUS:
            if len(chosen_groups.groups) == 1:
                # one group is the total-degree count; its diagonal start is cheaper per step than products
                # of linear forms (cyclic 5: 22 s against 81 s for the same 120 paths, decision 0048)
                return StartChoice(StartKind.TOTAL_DEGREE, counts, "multihomogeneous asked for, but the best "
                                   "grouping is one group: the total-degree start has the same paths",
                                   chosen_groups, setup_seconds=seconds)
            return StartChoice(kind, counts, "asked for", chosen_groups, setup_seconds=seconds)
    polyhedral = None
    cheapest = min(counts.values())
    table = _relation_table_size(system)
    # auto stays below the cell search's guard on linear programs (which would end the run, not fall back);
    # the table is not the whole search (katsura 6: 32,718 programs for a table of 14,479), hence a quarter
    if kind == StartKind.POLYHEDRAL or \
            (table * SECONDS_PER_LINEAR_PROGRAM <= cheapest * SECONDS_PER_PATH and table <= MAX_LINEAR_PROGRAMS // 4):
        started = time.perf_counter()
        polyhedral = PolyhedralStart.random(system.polynomials, rng)
        counts[StartKind.POLYHEDRAL.value] = polyhedral.n_paths
        seconds[StartKind.POLYHEDRAL.value] = time.perf_counter() - started
        if kind == StartKind.POLYHEDRAL:
            return StartChoice(kind, counts, "asked for", polyhedral=polyhedral, setup_seconds=seconds)
    others = {k: v for k, v in counts.items() if k != StartKind.POLYHEDRAL.value}
    best_other = min(others, key=lambda k: (others[k], k != StartKind.TOTAL_DEGREE.value))
    # the set-up estimated from the linear programs solved, not from the clock: the same seed makes the
    # same choice on every machine
    setup = polyhedral.linear_programs * SECONDS_PER_LINEAR_PROGRAM if polyhedral is not None else None
    if polyhedral is not None and setup + polyhedral.n_paths * SECONDS_PER_PATH < others[best_other] * SECONDS_PER_PATH:
        return StartChoice(StartKind.POLYHEDRAL, counts,
                           f"the mixed volume {polyhedral.n_paths} is below the {best_other} count "
                           f"{others[best_other]} by more paths than its {polyhedral.linear_programs} linear "
                           "programs cost", chosen_groups, polyhedral, seconds)
    note = "" if polyhedral is not None else \
        "; the mixed volume was not computed (its cell search would cost more than tracking these paths)"
    if best_other == StartKind.MULTIHOMOGENEOUS.value and len(chosen_groups.groups) > 1:
        return StartChoice(StartKind.MULTIHOMOGENEOUS, counts, "the smallest count" + note, chosen_groups,
                           polyhedral, seconds)
    return StartChoice(StartKind.TOTAL_DEGREE, counts, "no other start has fewer paths" + note, chosen_groups,
                       polyhedral, seconds)
