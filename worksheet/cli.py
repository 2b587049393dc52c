"""The ``worksheet`` command line. The terminal app is imported only by ``open``."""

from __future__ import annotations

import argparse
import functools
import gc
import json
import os
import re
import sys
from collections.abc import Sequence
from pathlib import Path

from worksheet import CAUTION, __version__
from worksheet.errors import WorksheetError
from worksheet.hints import did_you_mean

COMMANDS = ("open", "new", "run", "check", "compare", "calc", "constants", "export")


class UsageError(Exception):
    """Bad arguments: exit 2 with a message saying what to do."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]
        raise UsageError(
            f"{message} (see 'worksheet {self.prog.split()[-1]} --help')"
            if " " in self.prog
            else f"{message} (see 'worksheet --help')"
        )


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="worksheet",
        description="Unit-checked derivation worksheets: run, check and open .sheet.md files.",
        epilog=CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"worksheet {__version__}")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    p_open = sub.add_parser("open", help="open a sheet in the terminal app (new if missing)")
    p_open.add_argument("file")
    p_open.add_argument(
        "--theme", default=None, help="colour theme: dark, light, contrast or a file"
    )

    p_new = sub.add_parser("new", help="write a short starter sheet (and open nothing)")
    p_new.add_argument("file")
    p_new.add_argument("--constants", default=None, help="dataset to pin (default: newest)")
    p_new.add_argument("--title", default=None, help="title (default: from the file name)")

    p_run = sub.add_parser("run", help="re-run a sheet and rewrite its result blocks")
    p_run.add_argument("file")
    p_run.add_argument("-o", "--output", help="write the result here instead of in place")
    p_run.add_argument("--budget", type=_seconds, default=None, help=_BUDGET_HELP)

    p_check = sub.add_parser("check", help="re-run in memory and compare with recorded results")
    p_check.add_argument("files", nargs="+")
    p_check.add_argument("--json", action="store_true", help="print one JSON object per file")
    p_check.add_argument("--budget", type=_seconds, default=None, help=_BUDGET_HELP)

    p_compare = sub.add_parser(
        "compare", help="which recorded quantities differ between two sheets or two datasets"
    )
    p_compare.add_argument("old", help="the sheet taken as reference")
    p_compare.add_argument("new", nargs="?", help="the other sheet (default: OLD again)")
    p_compare.add_argument(
        "--constants", default=None, help="run NEW (or OLD again) under this dataset"
    )
    p_compare.add_argument(
        "--within", default="1e-9", help="relative tolerance, e.g. 1e-6 or 0.1%% (default 1e-9)"
    )
    p_compare.add_argument("--all", action="store_true", help="list agreeing quantities too")
    p_compare.add_argument("--json", action="store_true")
    p_compare.add_argument("--budget", type=_seconds, default=None, help=_BUDGET_HELP)

    p_calc = sub.add_parser("calc", help="evaluate one expression")
    p_calc.add_argument("expression")
    p_calc.add_argument("--in", dest="unit", help="unit for the result, e.g. K or [erg/s]")
    p_calc.add_argument("--constants", default=None, help="dataset: CODATA2018 or CODATA2022")
    p_calc.add_argument("--digits", type=int, default=4)
    p_calc.add_argument("--budget", type=float, default=None, help="seconds per statement")
    p_calc.add_argument("--json", action="store_true")

    p_const = sub.add_parser("constants", help="list the pinned constants")
    p_const.add_argument("word", nargs="?", default="")
    p_const.add_argument("--constants", default=None, help="dataset: CODATA2018 or CODATA2022")
    p_const.add_argument("--json", action="store_true")

    p_export = sub.add_parser("export", help="write a document for a proposal or a referee")
    p_export.add_argument("file")
    p_export.add_argument("--to", required=True, choices=["latex", "html", "md", "svg", "png"])
    p_export.add_argument(
        "-o", "--output", help="the file to write (svg/png: the folder for the pictures)"
    )
    return parser


_BUDGET_HELP = "seconds per statement, instead of the sheet's 'budget' (0.1 to 600)"


def _seconds(text: str) -> float:
    try:
        seconds = float(text.removesuffix("s"))
    except ValueError as err:
        raise argparse.ArgumentTypeError(f"'{text}' is not a number of seconds") from err
    if not 0.1 <= seconds <= 600:
        raise argparse.ArgumentTypeError("the budget must be from 0.1 to 600 seconds")
    return seconds


def _implicit_open(first: str) -> bool:
    """``worksheet FILE`` opens FILE only when it exists; a missing name is never a sheet."""
    return first not in COMMANDS and not first.startswith("-") and Path(first).is_file()


def _unknown_first_word(first: str) -> UsageError:
    hint = did_you_mean(first, COMMANDS)
    if hint:
        return UsageError(f"'{first}' is not a command{hint}")
    return UsageError(
        f"'{first}' is neither a command nor an existing file; start a new sheet with "
        f"'worksheet new {first}' or 'worksheet open {first}' (commands: {', '.join(COMMANDS)})"
    )


_APP_COMMANDS = ("open",)
"""Commands that start the app, which lives on and collects cycles as usual."""


def main(argv: Sequence[str] | None = None, one_shot: bool = False) -> int:
    """The command line. ``one_shot``: this process ends when the command does (the
    console command), so a command that runs sheets holds the cycle collector off
    throughout (``engine/collector.py``), not only for each run: re-enabled, its first
    collection would walk every object the run left, just before the exit."""
    args_list = list(sys.argv[1:] if argv is None else argv)
    try:
        if args_list and _implicit_open(args_list[0]):
            args_list = ["open", *args_list]
        elif args_list and args_list[0] not in COMMANDS and not args_list[0].startswith("-"):
            raise _unknown_first_word(args_list[0])
        args = build_parser().parse_args(args_list)
        if args.command is None:
            build_parser().print_help()
            return 2
        if one_shot and args.command not in _APP_COMMANDS:
            gc.disable()
        handler = {
            "open": _open,
            "new": _new,
            "run": _run,
            "check": _check,
            "compare": _compare,
            "calc": _calc,
            "constants": _constants,
            "export": _export,
        }[args.command]
        return handler(args)
    except UsageError as err:
        print(f"worksheet: {err}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("worksheet: interrupted", file=sys.stderr)
        return 130


def entry() -> None:
    """The console command: :func:`main`, then an exit that skips the interpreter's teardown.

    Once the output is flushed and every file is closed, unwinding the modules of sympy
    and numpy object by object takes a tenth of a second or more and does nothing for the
    user, so the process ends at once. ``WORKSHEET_FULL_EXIT=1`` keeps the normal exit (for
    tools that work at exit, such as coverage); so does a thread still running.
    """
    try:
        code = main(one_shot=True)
    except SystemExit as stop:  # raised by argparse (--help, --version)
        code = _exit_status(stop.code)
    if os.environ.get("WORKSHEET_FULL_EXIT") or _threads_still_running():
        raise SystemExit(code)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):  # a closed pipe: the normal exit words it as it always has
        raise SystemExit(code) from None
    os._exit(code)


def _exit_status(code: object) -> int:
    """What ``SystemExit(code)`` would make the process return."""
    if code is None:
        return 0
    if isinstance(code, int):
        return code
    print(code, file=sys.stderr)
    return 1


def _threads_still_running() -> bool:
    """Whether a thread the normal exit would wait for is still running."""
    import threading

    return any(
        thread.is_alive() and not thread.daemon and thread is not threading.main_thread()
        for thread in threading.enumerate()
    )


# --- commands ---------------------------------------------------------------------------


def _read(path_text: str):
    from worksheet.document import read_document

    path = Path(path_text)
    if not path.exists():
        raise UsageError(
            f"{path_text}: no such file (check the path, or 'worksheet open' it "
            "to start a new sheet)"
        )
    if path.is_dir():
        raise UsageError(f"{path_text}: is a folder, not a sheet file")
    try:
        return read_document(path)
    except WorksheetError as err:
        raise UsageError(f"{path_text}: {err.located()}; nothing was written") from err
    except OSError as err:
        raise UsageError(f"{path_text}: cannot read ({err.strerror})") from err


def _run_document(
    path_text: str,
    budget: float | None = None,
    dataset: str | None = None,
    lines_as_written: bool = False,
    worker=None,
):
    from worksheet.engine.collector import collector_paused
    from worksheet.runner import SheetRunner

    # A long sheet's parse, run and record, the collector held: see engine/collector.py.
    with collector_paused():
        doc = _read(path_text)
        runner = SheetRunner(path_text, budget=budget, dataset=dataset, worker=worker)
        try:
            return runner.run(doc, lines_as_written)
        except WorksheetError as err:
            raise UsageError(f"{path_text}: {err.located()}; nothing was written") from err
        finally:
            runner.close()


def _summary_lines(path_text: str, results) -> list[str]:
    lines = []
    for result in results:
        if result.status in ("failed", "error", "skipped", "stale"):
            detail = result.message or result.record or ""
            if detail.startswith(f"line {result.line}"):
                lines.append(f"{path_text}:{result.line}: {result.status}: {detail}")
            else:
                lines.append(f"{path_text}:{result.line}: {result.status}: {result.text}: {detail}")
    return lines


def _check_output_folder(target: str) -> None:
    """Refuse a missing ``-o`` folder before the sheet is run, not after (exit 2)."""
    folder = os.path.dirname(os.path.abspath(target))
    if not os.path.isdir(folder):
        raise UsageError(
            f"{target}: the folder {os.path.dirname(target) or folder} does not exist; "
            "nothing was written (create it first, or give another path)"
        )


def _save(target: str, content: str | bytes) -> None:
    """Write ``target`` atomically; a failed save is exit 2 with what happened, never 1."""
    from worksheet.document import atomic_write_bytes

    data = content.encode("utf-8") if isinstance(content, str) else content
    try:
        atomic_write_bytes(target, data)
    except WorksheetError as err:  # full disk, read-only, no permission, missing folder
        raise UsageError(err.located()) from err
    except OSError as err:
        raise UsageError(f"cannot save {target}: {err.strerror or err}") from err


def _run(args: argparse.Namespace) -> int:
    target = args.output or args.file
    _check_output_folder(target)
    worker = _worker_for([args.file])
    try:
        run = _run_document(args.file, args.budget, lines_as_written=True, worker=worker)
    finally:
        worker.close()
    _save(target, run.text)
    for warning in run.settings.warnings:
        print(f"{args.file}: warning: {warning}", file=sys.stderr)
    problems = _summary_lines(args.file, run.results)
    for line in problems:
        print(line)
    counted = [r for r in run.results if r.kind != "blank"]
    print(f"{args.file}: {len(counted)} statements, {len(problems)} not holding; wrote {target}")
    return 0 if run.all_hold else 1


def _worker_for(paths: Sequence[str]):
    """One worker process for every file of a command; started at once when a file has
    symbolic work, so that it imports sympy and warms up on another core meanwhile."""
    from worksheet.engine.budget import Worker

    worker = Worker()
    if any(_mentions_symbolic_work(path) for path in paths):
        worker.start_early()
    return worker


@functools.cache
def _symbolic_work() -> re.Pattern[str]:
    from worksheet.syntax.names import VERB_NAMES

    verbs = "|".join(sorted(VERB_NAMES))
    return re.compile(rf"\b(?:{verbs})\s*\(|\bscaling\b|\bcheck\b[^\n#]*==")


def _mentions_symbolic_work(path: str) -> bool:
    """Whether a sheet's text calls a verb, or has a 'scaling' or an equality 'check'
    (a guess from the text: a wrong one costs only the early start)."""
    try:
        text = Path(path).read_text(encoding="utf-8", errors="replace")
    except OSError:
        return False
    return _symbolic_work().search(text) is not None


def _check(args: argparse.Namespace) -> int:
    # One worker process for every file: each sheet's verbs find it started, and warm.
    worker = _worker_for(args.files)
    try:
        return _check_each(args, worker)
    finally:
        worker.close()


def _check_each(args: argparse.Namespace, worker) -> int:
    worst = 0
    for path_text in args.files:
        try:
            run = _run_document(path_text, args.budget, worker=worker)
        except UsageError as err:
            if args.json:
                print(
                    json.dumps(
                        {"file": path_text, "ok": False, "error": str(err), "statements": []}
                    )
                )
            print(f"worksheet: {err}", file=sys.stderr)
            worst = 2
            continue
        marked = run.with_staleness()
        ok = all(r.status == "ok" for r in marked if r.kind != "blank")
        if args.json:
            statements = [r.to_json() for r in marked if r.kind != "blank"]
            print(
                json.dumps(
                    {"file": path_text, "ok": ok, "statements": statements}, ensure_ascii=False
                )
            )
        else:
            for warning in run.settings.warnings:
                print(f"{path_text}: warning: {warning}")
            for line in _summary_lines(path_text, marked):
                print(line)
            counted = [r for r in marked if r.kind != "blank"]
            bad = [r for r in counted if r.status != "ok"]
            verdict = "all hold" if ok else f"{len(bad)} of {len(counted)} do not hold"
            print(f"{path_text}: {len(counted)} statements, {verdict}")
        if not ok:
            worst = max(worst, 1)
    return worst


def _calc(args: argparse.Namespace) -> int:
    from worksheet.engine import calculate, make_context
    from worksheet.engine.budget import DEFAULT_SECONDS

    if args.constants is not None:
        _known_dataset(args.constants)
    if not 1 <= args.digits <= 15:
        raise UsageError("--digits must be from 1 to 15")
    context = make_context(args.constants, args.digits, args.budget or DEFAULT_SECONDS)
    try:
        result = calculate(context, args.expression, args.unit)
    finally:
        context.worker.close()
    if args.json:
        print(json.dumps(result.to_json(), ensure_ascii=False))
    elif result.status == "ok":
        print(
            result.record.split(" = ", 1)[1]
            if result.record and " = " in result.record
            else result.record
        )
    else:
        print(f"error: {result.message}", file=sys.stderr)
    return 0 if result.status == "ok" else 1


def _constants(args: argparse.Namespace) -> int:
    from worksheet.constants import (
        DEFAULT_DATASET,
        constant_record,
        format_constants_table,
        load_dataset,
    )

    name = _known_dataset(args.constants or DEFAULT_DATASET)
    dataset = load_dataset(name)
    found = dataset.find(args.word)
    if args.json:
        print(json.dumps([constant_record(c) for c in found], ensure_ascii=False, indent=1))
        return 0
    print(f"{dataset.title}")
    if not found:
        print(f"no constant matches '{args.word}'")
        return 0
    sys.stdout.write(format_constants_table(found))
    return 0


def _open(args: argparse.Namespace) -> int:
    if not sys.stdin.isatty() and os.environ.get("WORKSHEET_ALLOW_NO_TTY") != "1":
        raise UsageError(
            "the app needs a terminal; use 'worksheet run' or 'worksheet check' in scripts"
        )
    from worksheet.app import launch  # the UI is imported only here

    return launch(args.file, theme=args.theme)


def _export(args: argparse.Namespace) -> int:
    from worksheet.export import PLOT_FORMATS, export_run, plot_files, run_problems

    if args.output and args.to not in PLOT_FORMATS:
        _check_output_folder(args.output)
    run = _run_document(args.file)
    stem = str(Path(args.file).with_suffix(""))
    if args.to in PLOT_FORMATS:
        folder = Path(args.output) if args.output else Path(stem).parent
        if not folder.is_dir():
            raise UsageError(f"{folder}: not a folder (with --to {args.to}, -o names a folder)")
        try:
            files = plot_files(run, args.to, Path(stem).name)
        except WorksheetError as err:
            raise UsageError(f"{args.file}: {err.located()}") from err
        if not files:
            print(f"{args.file}: no plot to draw; nothing was written")
            return _export_outcome(args.file, run_problems(run))
        for item in files:
            target = folder / item.name
            _save(str(target), item.content)
            print(f"wrote {target}")
        return _export_outcome(args.file, run_problems(run))
    try:
        text, suffix = export_run(run, args.to, source_name=Path(args.file).name)
    except WorksheetError as err:
        raise UsageError(f"{args.file}: {err.located()}") from err
    target = args.output or stem + suffix
    _save(target, text)
    print(f"wrote {target}")
    return _export_outcome(args.file, run_problems(run))


def _export_outcome(file: str, problems: str | None) -> int:
    """Exit 1, with the export's own summary on stderr, when a claim fails or a line errs."""
    if problems is None:
        return 0
    print(f"{file}: {problems} The export says so.", file=sys.stderr)
    return 1


def _known_dataset(name: str) -> str:
    from worksheet.constants import DATASET_NAMES

    if name not in DATASET_NAMES:
        hint = did_you_mean(name, DATASET_NAMES)
        raise UsageError(
            f"unknown dataset '{name}'{hint or ''}; use one of " + ", ".join(DATASET_NAMES)
        )
    return name


def _new(args: argparse.Namespace) -> int:
    from worksheet.constants import DEFAULT_DATASET
    from worksheet.starter import starter_sheet_text

    path = Path(args.file)
    if path.exists():
        raise UsageError(f"{args.file}: already exists; 'worksheet open {args.file}' edits it")
    if not path.name.endswith(".md"):
        raise UsageError(f"{args.file}: a sheet file ends in .sheet.md (or .md)")
    dataset = _known_dataset(args.constants or DEFAULT_DATASET)
    title = args.title or path.name.removesuffix(".md").removesuffix(".sheet")
    run = _run_text(starter_sheet_text(title, dataset))
    try:
        with path.open("x", encoding="utf-8", newline="") as handle:  # never overwrite
            handle.write(run.text)
    except FileExistsError as err:
        raise UsageError(f"{args.file}: already exists") from err
    except OSError as err:
        raise UsageError(f"{args.file}: cannot write ({err.strerror})") from err
    print(f"wrote {args.file}; open it with 'worksheet open {args.file}'")
    return 0


def _run_text(text: str):
    from worksheet.runner import run_text

    return run_text(text)


def _compare(args: argparse.Namespace) -> int:
    from fractions import Fraction

    from worksheet.compare import compare_results, format_table

    text = args.within.strip()
    try:
        tolerance = Fraction(text[:-1]) / 100 if text.endswith("%") else Fraction(text)
    except (ValueError, ZeroDivisionError) as err:
        raise UsageError(f"--within {args.within}: not a number or a percentage") from err
    if tolerance < 0:
        raise UsageError("--within must not be negative")
    if args.constants is not None:
        _known_dataset(args.constants)
    if args.new is None and args.constants is None:
        raise UsageError("compare needs a second sheet or --constants DATASET")
    worker = _worker_for([args.old, args.new or args.old])  # both runs' verbs in one process
    try:
        old = _run_document(args.old, args.budget, worker=worker)
        new = _run_document(args.new or args.old, args.budget, args.constants, worker=worker)
    finally:
        worker.close()
    old_name = f"{args.old} ({old.settings.dataset})"
    new_name = f"{args.new or args.old} ({new.settings.dataset})"
    rows = compare_results(old.results, new.results, tolerance, old.settings.digits)
    differing = [row for row in rows if row.differs]
    if args.json:
        print(
            json.dumps(
                {
                    "old": old_name,
                    "new": new_name,
                    "tolerance": float(tolerance),
                    "differ": len(differing),
                    "quantities": [row.to_json() for row in rows],
                },
                ensure_ascii=False,
            )
        )
    else:
        print(f"old: {old_name}\nnew: {new_name}")
        sys.stdout.write(format_table(rows, args.all))
        print(f"{len(differing)} of {len(rows)} quantities differ beyond a relative {args.within}")
    return 1 if differing else 0
