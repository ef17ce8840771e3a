"""The ``joulebook`` command.

Headless subcommands (``solve``, ``check``, ``state``, ``species``) never
import Textual, and CoolProp only when the reference model is asked for.
Exit codes: 0 solved/valid, 1 solved-failed (no convergence, impossible
process), 2 bad input (message on stderr; ``check`` names every field at
fault, one a line), 3 solved, but a rule of the house procedure the worksheet
names stops it (the rules are printed with the result).
"""

from __future__ import annotations

import gc
import json
import sys
from pathlib import Path
from types import SimpleNamespace

from balance.errors import BalanceError, InputError, SolveError, SpecificationError

EXIT_OK, EXIT_FAILED, EXIT_INPUT, EXIT_HOUSE = 0, 1, 2, 3
DEMO_SAMPLE = "n2-buffer-into-receiver.toml"


def _console(stderr: bool = False):
    from rich.console import Console

    return Console(stderr=stderr, highlight=False)


def _fail(message: str, code: int) -> int:
    print(f"joulebook: {message}", file=sys.stderr)
    return code


def sample_path(name: str) -> str:
    """Path of a bundled sample worksheet.

    The wheel carries ``samples/`` inside the ``tui`` package; a source
    checkout has it at the top of the tree.
    """
    from importlib import resources

    bundled = resources.files("tui").joinpath("samples", name)
    if bundled.is_file():
        return str(bundled)
    return str(Path(__file__).resolve().parent.parent / "samples" / name)


# -- subcommands ------------------------------------------------------------------
def cmd_solve(args) -> int:
    from balance import api

    result = api.solve(Path(args.file))
    if args.csv or args.plot:
        if result.problem.worksheet.system.kind != "transient" or getattr(result, "history", None) is None:
            why = ("a history in time is a transient worksheet's" if result.problem.worksheet.system.kind != "transient"
                   else f"this transient has no history: {result.history_why}")
            return _fail(f"--csv and --plot draw a history: {why}", EXIT_INPUT)
        if args.units == "typed":
            from .display import use_typed

            use_typed(result.problem.worksheet)
        from .render_transient import history_csv, history_plot

        if args.csv:
            try:
                Path(args.csv).write_text(history_csv(result, args.units), encoding="utf-8")
            except OSError as exc:
                return _fail(f"{args.csv}: cannot be written: {exc.strerror}", EXIT_INPUT)
            print(f"history: {len(result.history.t)} rows written to {args.csv}", file=sys.stderr)
        if args.plot:
            import shutil

            print(history_plot(result, args.units, width=min(shutil.get_terminal_size().columns, 120)))
        if not args.json:
            return EXIT_OK
    procedure, house = _house(result)
    uncertain = _uncertainty(args, result)
    if args.json:
        out = api.as_json(result)
        if procedure is not None:
            out["house"] = {"procedure": procedure.id, "version": procedure.version,
                            "findings": [{"rule": f.rule, "kind": f.kind, "outcome": f.outcome, "message": f.message,
                                          "justification": f.justification} for f in house]}
        if uncertain is not None:
            out["uncertainty"] = uncertain.as_json()
        print(json.dumps(out, indent=2, ensure_ascii=False))
    else:
        from .render import result_renderable

        if args.units == "typed":
            from .display import use_typed

            use_typed(result.problem.worksheet)
        _console().print(result_renderable(result, args.units))
        if procedure is not None:
            from .panels import house_panel

            _console().print(house_panel(house, procedure))
        if uncertain is not None:
            from .render_uncertainty import uncertainty_renderable

            _console().print(uncertainty_renderable(uncertain))
    return EXIT_HOUSE if any(f.blocks for f in house) else EXIT_OK


def _uncertainty(args, result):
    """The uncertainty of the solved worksheet's results (None when no value carries one; the
    options that need one are then said to be unused). ``demo --print`` has none of the options."""
    from balance import api
    from balance.study.uncertainty import has_uncertain_inputs

    ws = result.problem.worksheet
    asked = [f for f, v in (("--coverage", getattr(args, "coverage", None)), ("--monte-carlo", getattr(
        args, "monte_carlo", None)), ("--result", getattr(args, "result", None))) if v is not None]
    if not has_uncertain_inputs(ws):
        if asked:
            print(f"joulebook: {', '.join(asked)}: no value of this worksheet carries an uncertainty (like "
                  "P = \"150 barg ± 2 bar\"): nothing to propagate", file=sys.stderr)
        return None
    results = getattr(args, "result", None)
    columns = "all" if results and "all" in results else results
    samples = getattr(args, "monte_carlo", None)
    coverage = getattr(args, "coverage", None)
    progress = _Progress() if samples and sys.stderr.isatty() else None
    try:
        return api.uncertainty(ws, result=result, columns=columns, coverage=2.0 if coverage is None else coverage,
                               monte_carlo=samples, seed=getattr(args, "seed", 1),
                               jobs=getattr(args, "jobs", 1), progress=progress.tick if progress else None)
    finally:
        if progress:
            progress.stop()


class _Progress:
    """A Monte Carlo run's progress on stderr."""

    def __init__(self):
        from rich.progress import Progress

        self.bar = Progress(transient=True)
        self.task = None

    def tick(self, done: int, total: int) -> None:
        if self.task is None:
            self.bar.start()
            self.task = self.bar.add_task("solving samples", total=total)
        self.bar.update(self.task, completed=done)

    def stop(self) -> None:
        if self.task is not None:
            self.bar.stop()


def _house(result):
    """The house procedure the solved worksheet names, and its rules applied to the result
    (None, [] when it names none); a procedure not in the folders is said, not an error."""
    ws = result.problem.worksheet
    if not ws.heading.procedure:
        return None, []
    from balance import api
    from balance.procedures import find_or_none, findings

    procedure = find_or_none(ws.heading.procedure)
    if procedure is None:
        print(f"joulebook: worksheet.procedure: {ws.heading.procedure!r} is not in the procedure folders "
              "(`joulebook procedure list`): its rules were not applied", file=sys.stderr)
        return None, []
    return procedure, findings(procedure, ws, api.entry_data(api.Attempt(ws, result)))


def cmd_check(args) -> int:
    from balance import api

    found = api.problems(Path(args.file))
    if found:  # every field at fault, one a line, not only the first
        for p in found:
            print(f"joulebook: {p}", file=sys.stderr)
        return EXIT_INPUT
    problem = api.prepare(Path(args.file))
    dof = problem.dof
    from .render import dof_renderable

    _console().print(dof_renderable(problem, dof))
    return EXIT_OK if dof.ok else EXIT_INPUT


def cmd_state(args) -> int:
    from balance import api
    from balance.errors import TwoPhaseError
    from balance.state import State, read_specs

    overrides = dict(_pairs(args.override, "--override"))
    species, model = api.fluid(args.fluid, args.model, overrides, fields=("FLUID", "--model", "--override"),
                               composition=dict(_pairs(args.composition, "--composition")) or None,
                               fractions=args.fractions or "", normalise=args.normalise,
                               kij=dict(_pairs(args.kij, "--kij")) or None)
    props = dict(_pairs(args.given, "--given"))
    specs = read_specs(props, species.M, "--given")
    if len(specs) != 2:
        raise InputError("--given", f"give exactly two properties, like --given T='500 K' --given P='10 bar'; got {len(specs)}")
    try:
        point = model.flash(specs, field="state")
    except TwoPhaseError:
        if set(specs) != {"T", "P"} or getattr(model, "mixing", None) is None:
            raise
        return _print_split(api.phases(model, specs["T"], specs["P"]), species, model, args.json)
    st = State("state", model, point, n=1.0)
    warnings = model.warnings(point)
    phases = api.phases(model, point.T, point.P)
    if args.json:
        out = st.as_json()
        out.update(species=species.id, model=model.name, reference_state=model.reference_state, warnings=warnings)
        if species.composition:
            out["composition"] = dict(species.composition)
        if phases is not None:
            out["phases"] = phases.as_json()
        print(json.dumps(out, indent=2, ensure_ascii=False))
    else:
        from .render import state_renderable

        _console().print(state_renderable(st, args.units, warnings, phases.lines() if phases else ()))
    return EXIT_OK


def _print_split(report, species, model, as_json: bool) -> int:
    """A mixture's (T, P) inside its phase envelope: the flash, as the answer to the question asked."""
    if as_json:
        print(json.dumps({"species": species.id, "model": model.name, "composition": dict(species.composition),
                          "phases": report.as_json()}, indent=2, ensure_ascii=False))
        return EXIT_OK
    from .render import split_renderable

    _console().print(split_renderable(species, model, report.lines()))
    return EXIT_OK


def cmd_species(args) -> int:
    from balance.species import catalogue, lookup

    from .render import kij_table, species_detail, species_table

    from balance.mixture import bundled, bundled_mixture

    names = args.name or []
    if args.kij:  # the binary interaction parameters: every bundled pair, or those of the components named
        from balance.interaction import TABLE_OF, bundled_pairs, kij_set
        from balance.models import canonical

        model = canonical(args.model or "peng-robinson", "--model")
        if model not in TABLE_OF:
            raise InputError("--model", f"binary interaction parameters belong to the cubic models "
                                        f"({', '.join(TABLE_OF)}); got {model}")
        title = f"Binary interaction parameters kij, {model}"
        if names:
            ids: list[str] = []
            for name in names:
                sp = bundled_mixture(name)
                for sid in [i for i, _ in sp.composition] if sp else [lookup(name, "NAME").id]:
                    if sid not in ids:
                        ids.append(sid)
            if len(ids) < 2:
                raise InputError("NAME", f"--kij needs two species or more, or a bundled composition; got only {ids[0]}")
            kset = kij_set(ids, model)
            used, note = kset.used, kset.warning()
            extra = {"components": list(kset.ids), "matrix": [list(row) for row in kset.matrix],
                     "missing": [list(pair) for pair in kset.missing()], "warning": note}
        else:
            used = bundled_pairs(model)
            note = (f"{len(used)} pairs; a pair not listed is 0 unless [fluid.kij] in the worksheet gives it" if used
                    else f"{model} has no bundled binary interaction parameters: kij = 0 for every pair unless "
                         "[fluid.kij] in the worksheet gives one")
            extra = {"note": note}
        if args.json:
            print(json.dumps({"model": model, "pairs": [{"i": i, "j": j, "kij": value, "source": source}
                                                        for i, j, value, source in used], **extra}, indent=2))
        else:
            if used:
                _console().print(kij_table(used, title))
            if note:
                print(note)
        return EXIT_OK
    if args.model is not None:
        raise InputError("--model", "goes with --kij: the model whose binary interaction parameters to show")
    if len(names) > 1:
        raise InputError("NAME", f"give one species or composition to show (got {len(names)}); several names go "
                                 "with --kij, which shows their binary interaction parameters")
    if names:
        sp = bundled_mixture(names[0]) or lookup(names[0], "NAME")
        if args.json:
            print(json.dumps(_species_json(sp), indent=2))
        else:
            _console().print(species_detail(sp))
    else:
        entries = list(catalogue().values())
        mixtures = [bundled_mixture(key) for key in bundled()]
        if args.json:
            print(json.dumps([_species_json(sp) for sp in entries + mixtures], indent=2))
        else:
            _console().print(species_table(entries))
            print("Bundled compositions (a worksheet's species, or `joulebook species ID`): "
                  + "; ".join(f"{key} ({entry['name']})" for key, entry in bundled().items()))
    return EXIT_OK


def _species_json(sp) -> dict:
    return {
        "id": sp.id, "name": sp.name, "formula": sp.formula, "cas": sp.cas,
        "M": {"value": sp.M, "unit": "kg/mol"}, "Tc": {"value": sp.Tc, "unit": "K"},
        "Pc": {"value": sp.Pc, "unit": "Pa"}, "omega": sp.omega, "coolprop": sp.coolprop,
        "cp_ideal_gas": sp.cp_ig.label, "sources": sp.sources,
        **({"composition": dict(sp.composition)} if sp.composition else {}),
    }


#: What the demo offers next: a house procedure's worked exercises.
PRACTICE_HINT = ("joulebook: to learn a house procedure step by step on worked exercises: "
                 "joulebook practice hpp-closed-vessels (or hpp-steady-flow)")


def cmd_demo(args) -> int:
    if args.print:
        args.file = sample_path(DEMO_SAMPLE)
        args.json = args.csv = args.plot = False
        code = cmd_solve(args)
        print(PRACTICE_HINT, file=sys.stderr)
        return code
    from .session import demo_session

    code = args.run_app(demo_session(sample_path(DEMO_SAMPLE), args.record))
    print(PRACTICE_HINT, file=sys.stderr)  # once the app has given the terminal back
    return code


def cmd_open(args) -> int:
    from .session import open_target

    _announce_reference_solve(args.record)
    return args.run_app(open_target(args.record, must_exist=args.command == "open"))


def cmd_new(args) -> int:
    from balance.procedures import find

    from .session import Session

    procedure = find(args.procedure, "--procedure") if args.procedure else None
    if args.record and not args.record.endswith(".jbk"):
        return _fail(f"{args.record}: a new record's file ends in .jbk", EXIT_INPUT)
    if args.record and Path(args.record).exists():
        return _fail(f"{args.record}: already exists; open it with `joulebook open {args.record}`", EXIT_INPUT)
    return args.run_app(Session.new(args.record, procedure=procedure))


def cmd_practice(args) -> int:
    from balance.procedures import find

    from .session import Session

    procedure = find(args.id, "practice")
    if not procedure.exercises:
        return _fail(f"procedure {procedure.id} has no exercises to practise", EXIT_INPUT)
    exercise = procedure.exercise(args.exercise) if args.exercise else procedure.exercises[0]
    if exercise is None:
        return _fail(f"--exercise: procedure {procedure.id} has no exercise {args.exercise!r}; it has "
                     + ", ".join(e.id for e in procedure.exercises), EXIT_INPUT)
    print(f"joulebook: practice, {procedure.id} exercise {exercise.id}: {exercise.title} (others: "
          + (", ".join(e.id for e in procedure.exercises if e is not exercise) or "none") + ")", file=sys.stderr)
    return args.run_app(Session.new(procedure=procedure, exercise=exercise.id))


def _announce_reference_solve(target: str | None) -> None:
    """A new record from a worksheet is solved before the app opens: on the reference model that
    waits for its process (seconds), so say so rather than sit silent."""
    if not (target and target.endswith(".toml")):
        return
    from balance import api

    from .offload import uses_reference

    try:
        model = api.read(Path(target)).fluid.model
    except BalanceError:
        return  # opening it reports the problem
    if uses_reference(model):
        print("joulebook: solving the worksheet with the reference model (CoolProp, in its own process) ...",
              file=sys.stderr, flush=True)


def run_app(session) -> int:
    """Run the terminal app on ``session``; its exit code."""
    app = app_for(session)
    from .app import run

    return run(app)


def app_for(session):
    """The terminal app on ``session``, built as the ``joulebook`` command builds it.

    The garbage collector is paused from here until the first screen is
    painted (the app resumes it): start-up allocates a great deal and frees
    almost nothing, so collections then are pure cost. What is loaded by the
    time the app is built (modules, classes) lives for the whole run and is
    frozen out of later collections. The start-up benchmark measures this path.
    """
    gc.disable()
    from .app import JoulebookApp  # Textual only for the terminal app

    app = JoulebookApp(session, gc_paused=True)
    gc.freeze()
    return app


def _pairs(items, flag: str):
    for item in items or []:
        if "=" not in item:
            raise InputError(flag, f"expected NAME=VALUE, like T='500 K'; got {item!r}")
        key, value = item.split("=", 1)
        yield key.strip(), value.strip()


# -- the parser --------------------------------------------------------------------
def build_parser():
    """The argparse parser of every subcommand (the app's own start builds none)."""
    import argparse

    from balance import __version__

    parser = argparse.ArgumentParser(
        prog="joulebook",
        description="Checked energy-balance calculations for closed systems, steady-flow devices and transient "
                    "vessels.",
    )
    parser.add_argument("--version", action="version", version=f"joulebook {__version__}")
    sub = parser.add_subparsers(dest="command")

    units = dict(choices=("si", "metric", "us"), default="metric", help="display units (default metric)")
    solved_units = dict(units, choices=("si", "metric", "us", "typed"),
                        help="display units (default metric; typed: each kind in the unit the worksheet uses)")

    p = sub.add_parser("solve", help="solve a worksheet and print the result")
    p.add_argument("file", help="worksheet (TOML)")
    p.add_argument("--json", action="store_true", help="machine-readable output (SI units)")
    p.add_argument("--units", **solved_units)
    p.add_argument("--csv", metavar="FILE", help="a transient's whole history as CSV (units in the header)")
    p.add_argument("--plot", action="store_true", help="draw a transient's temperatures and pressure against time")
    p.add_argument("--coverage", type=float, metavar="K", help="the coverage factor of the expanded uncertainty "
                   "U = k u_c of results whose inputs carry uncertainties (default 2)")
    p.add_argument("--result", action="append", metavar="COLUMN", help="the uncertainty of this result (a column "
                   "of `joulebook sweep --csv`; 'all': every one) in place of the main results; again for more")
    p.add_argument("--monte-carlo", type=int, metavar="N", help="also propagate the inputs' distributions by N "
                   "samples, each solved (JCGM 101)")
    p.add_argument("--seed", type=int, default=1, metavar="S", help="the Monte Carlo generator's seed (default 1)")
    p.add_argument("--jobs", type=int, default=1, metavar="N", help="solve the Monte Carlo samples on N processes "
                   "(the same numbers)")
    p.set_defaults(func=cmd_solve)

    p = sub.add_parser("check", help="validate a worksheet and count degrees of freedom (no solve)")
    p.add_argument("file")
    p.set_defaults(func=cmd_check)

    p = sub.add_parser("state", help="print one state of a fluid")
    p.add_argument("fluid", help="species id, formula or name")
    p.add_argument("--model", required=True, help="ideal-gas, van-der-waals, redlich-kwong, soave-redlich-kwong, "
                   "peng-robinson, incompressible or reference")
    p.add_argument("--given", action="append", metavar="NAME=VALUE", help="a property, e.g. T='500 K' (twice)")
    p.add_argument("--override", action="append", metavar="NAME=VALUE", help="a species constant, e.g. Tc='126 K'")
    p.add_argument("--composition", action="append", metavar="SPECIES=FRACTION",
                   help="a mixture's component, e.g. CH4=0.9 (once per component; FLUID is then its name)")
    p.add_argument("--fractions", choices=("mole", "mass"), help="what --composition gives (default mole)")
    p.add_argument("--normalise", action="store_true", help="scale fractions that do not add up to 1")
    p.add_argument("--kij", action="append", metavar="A-B=VALUE",
                   help="a cubic mixture's binary interaction parameter, in place of the bundled one")
    p.add_argument("--json", action="store_true")
    p.add_argument("--units", **units)
    p.set_defaults(func=cmd_state)

    p = sub.add_parser("species", help="list species, or show one with its sources; --kij: binary interaction "
                       "parameters")
    p.add_argument("name", nargs="*", metavar="NAME", help="a species or bundled composition (several with --kij)")
    p.add_argument("--kij", action="store_true", help="the bundled kij with their sources: every pair, or the pairs "
                   "of the components NAME gives")
    p.add_argument("--model", help="with --kij: peng-robinson (default), soave-redlich-kwong, redlich-kwong or "
                   "van-der-waals")
    p.add_argument("--json", action="store_true")
    p.set_defaults(func=cmd_species)

    p = sub.add_parser("demo", help="open the bundled demo worksheet in the terminal app")
    p.add_argument("--print", action="store_true", help="print the solved demo instead (no terminal app)")
    p.add_argument("--record", help="keep the demo's record here (default: a temporary folder)")
    p.add_argument("--units", **solved_units)
    p.set_defaults(func=cmd_demo)

    p = sub.add_parser("open", help="open a record (.jbk) or start one from a worksheet (.toml) in the terminal app")
    p.add_argument("record", help="record file (.jbk) or worksheet (.toml)")
    p.set_defaults(func=cmd_open)
    p = sub.add_parser("new", help="start a new worksheet in the terminal app, under a house procedure if named")
    p.add_argument("record", nargs="?", help="the new record's file (.jbk; default worksheet.jbk here, or the next "
                   "free name)")
    p.add_argument("--procedure", metavar="ID", help="the house procedure to follow (`joulebook procedure list`)")
    p.set_defaults(func=cmd_new)

    p = sub.add_parser("practice", help="practise a house procedure on one of its worked exercises")
    p.add_argument("id", help="the procedure's id")
    p.add_argument("--exercise", metavar="ID", help="which exercise (default: its first)")
    p.set_defaults(func=cmd_practice)

    from .record_cli import add_parser as add_record_parser  # `joulebook record …`
    add_record_parser(sub)
    from .procedure_cli import add_parser as add_procedure_parser  # `joulebook procedure …`
    add_procedure_parser(sub)
    from .study_cli import add_parser as add_sweep_parser  # `joulebook sweep …`
    add_sweep_parser(sub)
    return parser


#: the subcommands; a first word not among them is a file to open
COMMANDS = ("solve", "check", "state", "species", "demo", "open", "new", "practice", "record", "procedure", "sweep")


def main(argv: list[str] | None = None, *, run_app=run_app) -> int:
    """``joulebook`` with ``argv`` (default: the command line). ``run_app(session) -> int``
    runs the terminal app where a command opens it (a test passes a recorder)."""
    argv = list(sys.argv[1:] if argv is None else argv)
    # opening the app builds no parser: its first screen is timed (benchmarks/bench_tui_startup.py)
    if not argv:
        args = SimpleNamespace(command="new", record=None, func=cmd_open)  # `joulebook`: a new worksheet
    elif not argv[0].startswith("-") and argv[0] not in COMMANDS:
        if len(argv) != 1:  # `joulebook RECORD.jbk` or `joulebook WORKSHEET.toml`
            build_parser().error("give one record (.jbk) or worksheet (.toml) to open")
        args = SimpleNamespace(command="path", record=argv[0], func=cmd_open)
    else:
        args = build_parser().parse_args(argv)
    if not getattr(args, "func", None):
        build_parser().print_help()
        return EXIT_OK
    args.run_app = run_app
    try:
        return args.func(args)
    except (InputError, SpecificationError) as exc:
        return _fail(str(exc), EXIT_INPUT)
    except SolveError as exc:
        return _fail(f"not solved: {exc}", EXIT_FAILED)
    except BalanceError as exc:
        return _fail(str(exc), EXIT_INPUT)
    except KeyboardInterrupt:
        return _fail("interrupted", EXIT_FAILED)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
