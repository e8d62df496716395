"""Choosing a start system: total degree, multihomogeneous, polyhedral, or the cheapest (``auto``).

Every start gives a count of paths before anything is tracked: the Bezout number, the
multihomogeneous Bezout number of a grouping (given or found, see
:func:`~numag.tracking.multihomogeneous.best_groups`), and the mixed volume (which needs the
mixed cells, a set-up cost of linear programs). ``auto`` decides by estimated cost
(:func:`estimated_cost`, the one cost rule of the package, also used by ``singular --start auto``):
a start's paths times the work of one of its paths (:data:`PATH_WEIGHTS`: a path of products of
linear forms costs about twice a total-degree path), plus the linear programs of the cell search.
It computes the first two counts always and the mixed volume when the cell search (the entries of
its relation table) is estimated to cost less than the cheapest other start, then takes the start
of least estimated cost (ties to the total-degree start). Counts, not the clock: the same seed makes
the same choice on every machine. The choice, the reason, every count computed and the estimated
costs go to the report's ``start`` block.

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
from ..system.polynomial import Polynomial, PolynomialSystem
from .multihomogeneous import GroupSource, VariableGroups, best_groups, multihomogeneous_bezout

__all__ = ["StartKind", "StartChoice", "choose_start", "choose_witness_start", "estimated_cost", "PATH_WEIGHTS",
           "SINGULAR_ENDPOINT_WEIGHT", "SECONDS_PER_LINEAR_PROGRAM", "SECONDS_PER_PATH"]

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


#: Work of one path by start, in paths of the total-degree start (decision 0088: the square null-vector
#: systems of five shared problems, seeds 1-3, the same endpoints by every start: a path of the
#: 2-homogeneous start took 0.6 to 4.1 times a total-degree path, median 1.8 (its start Jacobian is
#: dense and products of linear forms make longer paths; cyclic 5 with one group, decision 0048: 3.7);
#: a polyhedral path, both stages, 0.5 to 3.4 times, median 1.0).
PATH_WEIGHTS = {StartKind.TOTAL_DEGREE: 1.0, StartKind.MULTIHOMOGENEOUS: 2.0, StartKind.POLYHEDRAL: 1.0}
#: A path ending at a singular endpoint (the endgame) costs this many paths of the same start ending at a
#: regular point: with the 2-homogeneous weight, a path of the square null-vector route costs 15 paths of
#: the witness sets, measured between 8 and 27 (decision 0077).
SINGULAR_ENDPOINT_WEIGHT = 7.5


def estimated_cost(kind, paths, singular_endpoints=0, linear_programs=0):
    """Estimated work of a start, in regular paths of the total-degree start (the one cost rule of ``auto``).

    Counts, not the clock, so that the same seed makes the same choice on every machine: the paths
    weighted by the start (:data:`PATH_WEIGHTS`), those expected to end at singular endpoints weighted
    again (:data:`SINGULAR_ENDPOINT_WEIGHT`), and the linear programs of a cell search at
    :data:`SECONDS_PER_LINEAR_PROGRAM` against :data:`SECONDS_PER_PATH`.

    Parameters
    ----------
    kind : StartKind
        Not AUTO.
    paths : int
        Paths tracked from the start.
    singular_endpoints : int
        Of them, those expected to end at singular endpoints.
    linear_programs : int
        The set-up's linear programs (the polyhedral start's cell search, or an estimate of it).

    Returns
    -------
    float

    Examples
    --------
    >>> estimated_cost(StartKind.TOTAL_DEGREE, 27), estimated_cost(StartKind.MULTIHOMOGENEOUS, 12)
    (27.0, 24.0)
    >>> estimated_cost(StartKind.MULTIHOMOGENEOUS, 1, singular_endpoints=1)   # a square-route path
    15.0
    """
    weight = PATH_WEIGHTS[kind]
    return float(weight * (paths + (SINGULAR_ENDPOINT_WEIGHT - 1) * singular_endpoints)
                 + linear_programs * SECONDS_PER_LINEAR_PROGRAM / SECONDS_PER_PATH)


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
    costs : dict
        ``auto``: start name -> estimated cost in total-degree paths (:func:`estimated_cost`).
    """

    kind: StartKind
    counts: dict
    reason: str
    groups: object = None
    polyhedral: object = None
    setup_seconds: dict = field(default_factory=dict)
    costs: dict = field(default_factory=dict)

    @property
    def n_paths(self):
        """Paths the chosen start tracks."""
        return self.counts[self.kind.value]

    def report(self):
        """The ``start`` block of a report."""
        block = {"chosen": self.kind.value, "reason": self.reason, "paths": self.counts,
                 "setup_seconds": {k: round(v, 4) for k, v in self.setup_seconds.items()}}
        if self.costs:
            block["estimated_cost"] = dict(self.costs)
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
    costs = {name: estimated_cost(StartKind(name), count) for name, count in counts.items()}
    cheapest = min(costs.values())
    table = _relation_table_size(system)
    # the cell search estimated by its relation table (an upper bound on its linear programs)
    search_pays = estimated_cost(StartKind.POLYHEDRAL, 0, linear_programs=table) <= cheapest
    if kind == StartKind.POLYHEDRAL or search_pays:
        # imported here, not at start-up: a run whose cell search is too dear never needs it (decision 0067)
        from .polyhedral import MAX_LINEAR_PROGRAMS, PolyhedralStart
    # auto stays below the cell search's guard on linear programs (which would end the run, not fall back);
    # the table is not the whole search (katsura 6: 32,718 programs for a table of 14,479), hence a quarter
    if kind == StartKind.POLYHEDRAL or (search_pays and table <= MAX_LINEAR_PROGRAMS // 4):
        started = time.perf_counter()
        polyhedral = PolyhedralStart.random(system.polynomials, rng)
        counts[StartKind.POLYHEDRAL.value] = polyhedral.n_paths
        seconds[StartKind.POLYHEDRAL.value] = time.perf_counter() - started
        # the linear programs solved, not the clock: the same seed makes the same choice on every machine
        costs[StartKind.POLYHEDRAL.value] = estimated_cost(StartKind.POLYHEDRAL, polyhedral.n_paths,
                                                           linear_programs=polyhedral.linear_programs)
        if kind == StartKind.POLYHEDRAL:
            return StartChoice(kind, counts, "asked for", polyhedral=polyhedral, setup_seconds=seconds)
    if len(chosen_groups.groups) == 1:  # one group is the total-degree start (decision 0048)
        costs.pop(StartKind.MULTIHOMOGENEOUS.value)
    costs = {name: round(cost, 2) for name, cost in costs.items()}
    others = {k: v for k, v in costs.items() if k != StartKind.POLYHEDRAL.value}
    best_other = min(others, key=lambda k: (others[k], k != StartKind.TOTAL_DEGREE.value))
    figures = ", ".join(f"{name} {costs[name]:g}" for name in costs)
    if polyhedral is not None and costs[StartKind.POLYHEDRAL.value] < others[best_other]:
        return StartChoice(StartKind.POLYHEDRAL, counts,
                           f"the least estimated cost (in total-degree paths: {figures}): the mixed volume "
                           f"{polyhedral.n_paths} with its {polyhedral.linear_programs} linear programs", chosen_groups,
                           polyhedral, seconds, costs)
    note = "" if polyhedral is not None else \
        "; the mixed volume was not computed (its cell search would cost more than tracking these paths)"
    if best_other == StartKind.MULTIHOMOGENEOUS.value:
        return StartChoice(StartKind.MULTIHOMOGENEOUS, counts, f"the least estimated cost (in total-degree paths: "
                           f"{figures}){note}", chosen_groups, polyhedral, seconds, costs)
    return StartChoice(StartKind.TOTAL_DEGREE, counts, f"no other start costs less (estimated in total-degree paths: "
                       f"{figures}){note}", chosen_groups, polyhedral, seconds, costs)


def _square_stand_in(system):
    """The first n equations by degree, or all m < n of them and n - m hyperplanes (a square system).

    The hyperplanes (the sum of the unknowns plus one) have degree 1 in every group, like the random
    slices that cut out the deepest witness set: the Bezout numbers of this square system bound the
    paths of the regeneration's last product homotopy.
    """
    n = system.n_variables
    order = sorted(range(len(system.polynomials)), key=lambda k: system.polynomials[k].degree)
    chosen = [system.polynomials[k] for k in order[:n]]
    plane = Polynomial.linear(np.ones(n), 1.0)
    return PolynomialSystem(system.variables, chosen + [plane] * (n - len(chosen)), name=system.name)


def choose_witness_start(system, kind, groups=None, group_source=None):
    """The start of a regeneration (witness sets): total degree, or products of linear forms in variable groups.

    The regeneration (:mod:`numag.witness.cascade`) brings in one equation f at a time: from each witness
    point not on f, the slice through it is moved to the factors of a product of linear forms, which is
    then deformed into f. With variable groups, each factor involves X_0 and one group only, d_j factors
    for f's degree d_j in group j. Where the d_j add up to f's degree (multilinear structure: the
    null-vector equations have degree (d - 1, 1) in (x, lambda)), the moves are as many as with the
    total-degree factors, and each reaches only the points of the current witness curve C where a factor
    of one group vanishes, at most deg C and fewer where C is not general in that group, so the product
    homotopy starts from at most as many points, and fewer. ``auto`` takes the grouping then; where
    the d_j add up to more, the moves alone are more, and it keeps total degree.

    The counts reported are the Bezout numbers of a square stand-in (the first n equations by degree,
    and hyperplanes for the slices when there are fewer), a bound on the paths of the last product
    homotopy; the paths a regeneration tracks depend on the witness sets met on the way. The polyhedral
    start has no product form: asked for, the regeneration proceeds as with ``auto``.

    Parameters
    ----------
    system : PolynomialSystem
        Affine, any number of equations (a :class:`~numag.numeric.minors.MinorsSystem`'s evaluated
        minors have no exponents: they keep total-degree factors whatever the start).
    kind : StartKind
    groups : sequence of sequence of str, optional
        Variable names per group; names that are not the system's variables are left out (a fibre of a
        decomposition has fewer unknowns). Default: the best grouping of the stand-in.
    group_source : GroupSource, optional
        Where given groups come from (default: the file).

    Returns
    -------
    StartChoice
        Total degree or multihomogeneous (then with ``groups``).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> pencil = parse_system(["x*l - y - 1", "y*l - 2*x"], ["x", "y", "l"])
    >>> choice = choose_witness_start(pencil, StartKind.AUTO, groups=[["x", "y"], ["l"]])
    >>> choice.kind.value, choice.groups.names
    ('multihomogeneous', (('x', 'y'), ('l',)))
    """
    if system.projective:
        raise InputError("witness sets are computed for affine systems")
    stand_in = _square_stand_in(system)
    counts = {StartKind.TOTAL_DEGREE.value: int(np.prod(stand_in.degrees))}
    if kind == StartKind.TOTAL_DEGREE:
        return StartChoice(kind, counts, "asked for")
    started = time.perf_counter()
    if groups is not None:
        present = set(system.variables)
        kept = [[name for name in group if name in present] for group in groups]
        chosen = VariableGroups.of(stand_in, [g for g in kept if g], group_source or GroupSource.FILE)
        count = multihomogeneous_bezout(chosen.degree_matrix(stand_in.polynomials), chosen.sizes)
    else:
        chosen, count = best_groups(stand_in)
    counts[StartKind.MULTIHOMOGENEOUS.value] = count
    seconds = {StartKind.MULTIHOMOGENEOUS.value: time.perf_counter() - started}
    asked = " (the polyhedral start has no product form for a regeneration)" if kind == StartKind.POLYHEDRAL else ""
    if len(chosen.groups) == 1:
        return StartChoice(StartKind.TOTAL_DEGREE, counts, "one group: the same factors as the total-degree start"
                           + asked, chosen, setup_seconds=seconds)
    if kind == StartKind.MULTIHOMOGENEOUS:
        return StartChoice(kind, counts, "asked for", chosen, setup_seconds=seconds)
    matrix = chosen.degree_matrix(system.polynomials)
    surplus = [k for k, p in enumerate(system.polynomials) if int(matrix[k].sum()) > p.degree]
    if surplus:
        return StartChoice(StartKind.TOTAL_DEGREE, counts, f"equation {surplus[0] + 1} has more factors in the "
                           "groups than its degree" + asked, chosen, setup_seconds=seconds)
    return StartChoice(StartKind.MULTIHOMOGENEOUS, counts, "every equation has as many factors in the groups as "
                       "its degree, and fewer points to start from" + asked, chosen, setup_seconds=seconds)
