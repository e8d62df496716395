"""``numag solve``: isolated solutions of a square system, with run folders and ``--resume``."""

from ...errors import NumagError
from ...system.files import load_groups, system_from_mapping
from ...run.checkpoint import RunFolder
from ...numeric.seeds import resolved_seed
from ...tracking.solve import Execution, SolveOptions, solve_system
from ...tracking.starts import StartKind
from ..report import CAUTION, solve_report_to_dict, write_json
from .certify import _certified, _doubtful, _print_certification
from . import SUMMARIES
from .plot import add_plot_options, check_plot_request, plot_after, with_angles
from .common import (EXIT_OK, EXIT_UNDECIDED, _WITNESS_ACCURACY, _add_certify_switch, _add_executor_options,
                     _add_work_options, _checked_seed, _count, _counted, _headline, _load, _PointFormat,
                     _print_warnings, _progress, _root_accuracy, _seed, _with_notes, _with_warnings, _write_notes)


def add_parser(commands):
    """Add ``numag solve`` to the sub-parsers ``commands`` of the command line."""
    solve = commands.add_parser(
        "solve", help=SUMMARIES["solve"],
        description="Track every path of a homotopy from a start system (--start) and report the distinct isolated "
                    "solutions with multiplicities, the points at infinity, and every path's fate.")
    solve.add_argument("system_file", metavar="FILE", nargs="?",
                       help="system file (TOML); not needed with --resume (the run folder has the system)")
    solve.add_argument("--digits", type=int, default=SolveOptions.refine_digits, metavar="D",
                       help="precision (decimal digits) for refining singular solutions (default %(default)s)")
    solve.add_argument("--square-up", action="store_true",
                       help="allow more equations than unknowns (random combinations; solutions rechecked)")
    solve.add_argument("--batch-size", type=_count(1, 10**7), default=SolveOptions.batch_size, metavar="N",
                       help="paths tracked together (default %(default)s)")
    solve.add_argument("--start", choices=[k.value for k in StartKind], default=SolveOptions.start,
                       help="start system: total-degree (Bezout number of paths), multihomogeneous (variable groups "
                            "from the file's 'groups' or the best found), polyhedral (mixed volume of paths), or auto "
                            "(the cheapest worth its set-up; default %(default)s)")
    solve.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    solve.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(solve)
    solve.add_argument("--run-folder", metavar="DIR",
                       help="save the run: a manifest and every finished batch (atomic writes), for --resume")
    solve.add_argument("--resume", metavar="DIR",
                       help="continue the run saved in DIR: finished batches are read back, not tracked again")
    _add_certify_switch(solve)
    _add_work_options(solve)
    add_plot_options(solve)
    solve.set_defaults(run=run)


#: A solution's reality as printed (None: undecided at the point's accuracy, decision 0120)
_REALITY = {True: "real", False: "complex", None: "reality undecided"}


def _print_solve(result, out, data=None):
    system = result.system
    counts = result.path_counts()
    out.write(_headline("solve", system, result.seed))
    failed = ", ".join(f"{label} {n}" for label, n in counts["failed_by_reason"].items() if n) or "none"
    out.write(f"paths: {counts['tracked']} tracked: {counts['converged']} converged, "
              f"{counts['singular_endpoint']} singular endpoints, {counts['at_infinity']} at infinity, "
              f"{counts['failed']} failed ({failed}); {counts['retracked']} re-tracked, "
              f"{counts['rescued_in_high_precision']} of them in high precision; "
              f"{result.seconds:.2f} s\n")
    start = result.extra.get("start")
    if start:
        counts = ", ".join(f"{name} {count}" for name, count in start["paths"].items())
        out.write(f"start: {start['chosen']} ({start['reason']}); paths by start: {counts}"
                  + (f"; groups {start['groups']['groups']}" if start["chosen"] == "multihomogeneous" else "")
                  + (f"; roots with zero coordinates: {start['zero_coordinates']}" if start["chosen"] == "polyhedral"
                     else "") + "\n")
    execution = result.extra.get("execution")
    if execution:
        failed = execution["failed_batches"]
        out.write(f"run: {execution['executor']}, {_counted(execution['workers'], 'worker')}, "
                  f"{_counted(execution['batches'], 'batch', 'batches')} "
                  f"of up to {execution['batch_size']} paths, {execution['batches_resumed']} read back from the run "
                  f"folder, {execution['retries']} retried, {len(failed)} failed"
                  + (f"; saved in {execution['run_folder']}" if execution["run_folder"] else "") + "\n")
        for failure in failed:
            out.write(f"  batch {failure['index']} (paths {failure['paths'][0]}-{failure['paths'][1]}) failed "
                      f"{failure['attempts']} times: {failure['error']}\n")
        for rejected in execution.get("batches_rejected", []):
            out.write(f"  batch {rejected['index']} of the run folder was not trusted and was tracked again: "
                      f"{rejected['reason']}\n")
    for record in result.extra.get("centred") or []:  # decision 0081: the paths there are those of the first run
        if record["settled"] and "paths_first_run" not in record:
            # solved again after failed paths (no region compared): the centred run accounted for every path
            verdict = f"after {record['after_failed_paths']} failed paths; the centred run accounted for every path"
        elif record["settled"]:
            verdict = f"{record['paths_first_run']} paths nearby in both runs, settled"
        elif "paths_first_run" not in record:
            verdict = "not settled (" + (record.get("reason") or f"after {record['after_failed_paths']} failed paths, "
                                         "the centred run did not account for every path, "
                                         f"{record['centred_run_failed_paths']} of its paths failed") + ")"
        else:
            verdict = "not settled (" + (record.get("reason") or f"{record['paths_first_run']} paths nearby in the first "
                                         f"run, {record['paths_centred_run']} in the centred one") + ")"
        what = "a multiple group solved again there" if "paths_first_run" in record else "solved again there"
        out.write(f"centred at {record['centre']}: {what}, {verdict}\n")
    if result.squared_up:
        out.write("note: more equations than unknowns; random combinations were tracked and every "
                  f"solution was kept only if it satisfies all equations ({len(result.discarded)} discarded)\n")
    real = sum(1 for s in result.solutions if s.real is True)
    unsure = sum(1 for s in result.solutions if s.real is None)
    out.write(f"\n{_counted(len(result.solutions), 'isolated solution')}, {real} real"
              + (f", {unsure} of undecided reality" if unsure else "") + "\n")
    names = system.variables
    text = _PointFormat()
    for k, s in enumerate(result.solutions, 1):
        out.write(f"  {k:4d}  multiplicity {s.multiplicity}  {_REALITY[s.real]}  "
                  f"cond {s.condition:.2g}  {text(names, s.point, _root_accuracy(s.digits, s.multiplicity))}\n")
    if result.at_infinity:
        homogeneous = names if system.projective else ["(w)"] + list(names)
        out.write(f"\n{_counted(len(result.at_infinity), 'point')} at infinity (homogeneous coordinates "
                  f"{', '.join(homogeneous)}):\n")
        for s in result.at_infinity:
            unsure = "  isolated or on a set at infinity: undecided" if s.dimension_at_least else ""
            out.write(f"        paths {s.multiplicity}  "
                      f"{text(homogeneous, s.point, _root_accuracy(s.digits, s.multiplicity))}{unsure}\n")
    if result.sets_at_infinity:  # decision 0112: where these groups end depends on the start; not points
        homogeneous = names if system.projective else ["(w)"] + list(names)
        out.write(f"\n{_counted(len(result.sets_at_infinity), 'endpoint group')} at infinity on positive-dimensional "
                  f"sets at infinity, not isolated points (homogeneous coordinates {', '.join(homogeneous)}):\n")
        for s in result.sets_at_infinity:
            out.write(f"        paths {s.multiplicity}  dimension {'>= ' if s.dimension_at_least else ''}"
                      f"{s.set_dimension}  "
                      f"{text(homogeneous, s.point, _WITNESS_ACCURACY)}\n")
    if result.not_isolated:
        out.write(f"\n{_counted(len(result.not_isolated), 'endpoint group')} "
                  f"{'lies' if len(result.not_isolated) == 1 else 'lie'} on positive-dimensional solution "
                  "sets (not counted as solutions):\n")
        for s in result.not_isolated:
            out.write(f"        paths {s.multiplicity}  {text(names, s.point, _WITNESS_ACCURACY)}\n")
    if result.unverified:
        out.write(f"\n{_counted(len(result.unverified), 'singular endpoint group')} "
                  f"{'does' if len(result.unverified) == 1 else 'do'} not satisfy the "
                  "equations after refinement (not counted as solutions):\n")
        for s in result.unverified:
            out.write(f"        paths {s.multiplicity}  {text(names, s.point, _WITNESS_ACCURACY)}\n")
    if result.undecided:  # decision 0081: centred coordinates did not confirm these multiple groups
        out.write(f"\n{_counted(len(result.undecided), 'multiple endpoint group')} away from the origin "
                  "not settled in centred coordinates (not counted as solutions):\n")
        for s in result.undecided:
            out.write(f"        paths {s.multiplicity}  {text(names, s.point, _WITNESS_ACCURACY)}\n")
    _print_warnings(data, out)
    _print_certification(data, out)
    out.write(("\n" + text.footnote()) if text.used else "")
    out.write(f"\n{CAUTION}\n")


def run(args, out):
    if args.resume:
        if args.run_folder:
            raise NumagError("give either --run-folder (a new run) or --resume (an interrupted one), not both")
        manifest = RunFolder.open(args.resume).manifest
        if manifest.get("kind") != "solve":
            raise NumagError(f"{args.resume} holds a run of {str(manifest.get('kind'))[:40]!r}, not of 'numag solve'")
        try:
            system = system_from_mapping({k: v for k, v in manifest["system"].items() if v is not None},
                                         path=f"{args.resume}/manifest.json")
            saved = manifest["options"]
            groups = saved.get("groups")
            options = SolveOptions(refine_digits=saved["refine_digits"], square_up=saved["square_up"],
                                   batch_size=saved["batch_size"], cluster_tolerance=saved["cluster_tolerance"],
                                   start=saved.get("start", SolveOptions.start),
                                   groups=None if groups is None else tuple(tuple(g) for g in groups)).validated()
            seed = _checked_seed(manifest["seed"], f"the seed in {args.resume}/manifest.json")
        except (KeyError, TypeError, AttributeError):
            raise NumagError(f"{args.resume}/manifest.json is damaged: it does not describe a solve run") from None
        if args.system_file is not None and _load(args).to_texts() != system.to_texts():
            raise NumagError(f"{args.system_file} is not the system of the run in {args.resume}")
    else:
        if args.system_file is None:
            raise NumagError("a system file is needed (or --resume DIR)")
        system = _load(args)
        groups = load_groups(args.system_file, system.variables)
        if groups is not None and args.start not in (StartKind.MULTIHOMOGENEOUS.value, StartKind.AUTO.value):
            groups = None  # the file's groups serve the multihomogeneous start only
        options = SolveOptions(refine_digits=args.digits, square_up=args.square_up, batch_size=args.batch_size,
                               start=args.start, groups=groups)
        seed = args.seed
        if args.run_folder and seed is None:  # a saved run must be reproducible: fix the seed now
            seed = resolved_seed(seed)
    check_plot_request(args, system)
    execution = Execution(workers=args.workers, scheduler=args.scheduler, local_dask=args.local_dask,
                          run_folder=args.resume or args.run_folder, resume=bool(args.resume))
    result = solve_system(system, options, seed=seed, progress=_progress(args), execution=execution)
    # lazy: each solution's dictionary is made as it is written, never all at once (issue 19, item 5)
    report = solve_report_to_dict(result, options, lazy=True)
    data = with_angles(_with_warnings(_certified(_with_notes(report, args), args)), args.system_file)
    if args.json:
        write_json(data, out)
    else:
        _write_notes(args, out)
        _print_solve(result, out, data)
    pictured = plot_after(data, args, out)
    return EXIT_UNDECIDED if _doubtful(data) or data["warnings"] or pictured else EXIT_OK
