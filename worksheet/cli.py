"""The ``worksheet`` command line. The terminal app is imported only by ``open``."""

from __future__ import annotations

import argparse
import json
import os
import sys
from collections.abc import Sequence
from pathlib import Path

from worksheet import CAUTION
from worksheet.errors import WorksheetError

COMMANDS = ("open", "run", "check", "calc", "constants", "export")


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
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    p_open = sub.add_parser("open", help="open a sheet in the terminal app (new if missing)")
    p_open.add_argument("file")
    p_open.add_argument(
        "--theme", default=None, help="colour theme: dark, light, contrast or a file"
    )

    p_run = sub.add_parser("run", help="re-run a sheet and rewrite its result blocks")
    p_run.add_argument("file")
    p_run.add_argument("-o", "--output", help="write the result here instead of in place")

    p_check = sub.add_parser("check", help="re-run in memory and compare with recorded results")
    p_check.add_argument("files", nargs="+")
    p_check.add_argument("--json", action="store_true", help="print one JSON object per file")

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


def main(argv: Sequence[str] | None = None) -> int:
    args_list = list(sys.argv[1:] if argv is None else argv)
    if args_list and args_list[0] not in COMMANDS and not args_list[0].startswith("-"):
        args_list = ["open", *args_list]
    try:
        args = build_parser().parse_args(args_list)
        if args.command is None:
            build_parser().print_help()
            return 2
        handler = {
            "open": _open,
            "run": _run,
            "check": _check,
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


def _run_document(path_text: str):
    from worksheet.runner import SheetRunner

    doc = _read(path_text)
    runner = SheetRunner()
    try:
        return runner.run(doc)
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
    run = _run_document(args.file)
    _save(target, run.text)
    for warning in run.settings.warnings:
        print(f"{args.file}: warning: {warning}", file=sys.stderr)
    problems = _summary_lines(args.file, run.results)
    for line in problems:
        print(line)
    counted = [r for r in run.results if r.kind != "blank"]
    print(f"{args.file}: {len(counted)} statements, {len(problems)} not holding; wrote {target}")
    return 0 if run.all_hold else 1


def _check(args: argparse.Namespace) -> int:
    worst = 0
    for path_text in args.files:
        try:
            run = _run_document(path_text)
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
    from worksheet.constants import DATASET_NAMES
    from worksheet.engine import calculate, make_context
    from worksheet.engine.budget import DEFAULT_SECONDS

    if args.constants is not None and args.constants not in DATASET_NAMES:
        raise UsageError(
            f"unknown dataset '{args.constants}'; use one of " + ", ".join(DATASET_NAMES)
        )
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
        DATASET_NAMES,
        DEFAULT_DATASET,
        constant_record,
        format_constants_table,
        load_dataset,
    )

    name = args.constants or DEFAULT_DATASET
    if name not in DATASET_NAMES:
        raise UsageError(f"unknown dataset '{name}'; use one of " + ", ".join(DATASET_NAMES))
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
    from worksheet.export import PLOT_FORMATS, export_run, plot_files

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
            return 0
        for item in files:
            target = folder / item.name
            _save(str(target), item.content)
            print(f"wrote {target}")
        return 0
    try:
        text, suffix = export_run(run, args.to, source_name=Path(args.file).name)
    except WorksheetError as err:
        raise UsageError(f"{args.file}: {err.located()}") from err
    target = args.output or stem + suffix
    _save(target, text)
    print(f"wrote {target}")
    return 0
