"""``use`` statements: find, read, digest and run the other sheets, and lend their names.

Paths are relative to the sheet that holds the ``use``; after ``os.path.realpath`` they
must stay inside the folder of the sheet that started the run (the library's own sheets
stay inside the library folder). The imported sheet runs under the importer's context
(dataset, budget), with its own ``use`` statements resolved the same way, so a chain of
sheets is one run. Its bytes' sha256 is recorded on the ``use`` line, which is how
``check`` sees a changed dependency.
"""

from __future__ import annotations

import hashlib
import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from worksheet.engine import Context, SheetEvaluator, SourceStatement, StatementResult
from worksheet.engine.bindings import Binding
from worksheet.engine.import_scope import ImportScope, LentName
from worksheet.errors import WorksheetError
from worksheet.hints import did_you_mean
from worksheet.library import library_folder, library_names, library_sheet
from worksheet.syntax import parse_statement
from worksheet.syntax import tree as t
from worksheet.syntax.names import referenced_names
from worksheet.syntax.use import looks_like_use, parse_use


class UseError(WorksheetError):
    """A ``use`` statement cannot bring its sheet in (path refused, cycle, dataset, name)."""


@dataclass(frozen=True)
class SheetExports:
    """What one imported sheet offers: every name it defines or brought in itself."""

    names: dict[str, Binding]
    hidden: dict[str, Binding]  # lent to the sheet with the names above, not offered
    reads: dict[str, frozenset[str]]  # name -> sheet names its definition reads
    digest: str
    token: tuple


@dataclass(frozen=True)
class _Place:
    real: Path  # realpath of the sheet file
    shown: str  # how messages name it: as written in the use statement
    root: Path  # the folder its own relative uses must stay in


@dataclass
class SheetImports:
    """Resolves the ``use`` statements of a sheet; keeps imported runs between re-runs."""

    _cache: dict[tuple, SheetExports] = field(default_factory=dict)

    def scope_for(
        self,
        statements: Sequence[SourceStatement],
        sheet_path: str | os.PathLike[str] | None,
        context: Context,
        pinned_dataset: str,
    ) -> ImportScope:
        """The scope of the starting sheet (``sheet_path`` None: the current folder)."""
        if not any(s.text.lstrip().startswith("use") for s in statements):
            return ImportScope()
        if sheet_path is None:
            here = Path(os.path.realpath(os.getcwd()))
            start: tuple[Path, ...] = ()
        else:
            real = Path(os.path.realpath(sheet_path))
            here, start = real.parent, (real,)
        scope, _ = self._scope(statements, here, here, start, context, pinned_dataset)
        return scope

    # --- one sheet's use statements -----------------------------------------------------
    def _scope(
        self,
        statements: Sequence[SourceStatement],
        here: Path,
        root: Path,
        chain: tuple[Path, ...],
        context: Context,
        pin: str,
    ) -> tuple[ImportScope, dict[str, frozenset[str]]]:
        names: dict[str, LentName] = {}
        results: dict[int, StatementResult] = {}
        failed: dict[str, int] = {}
        token: list[tuple] = []
        reads: dict[str, frozenset[str]] = {}
        for source in statements:
            if not source.text.lstrip().startswith("use") or not looks_like_use(source.text):
                continue
            try:
                use = parse_use(source.text, source.line)
            except WorksheetError:
                continue  # the evaluator records the parse error on its line
            try:
                place = _locate(use, here, root)
                exports = self._load(place, chain, context, pin)
                lent = _lend(use, exports, place.shown)
                _merge(names, lent)
            except WorksheetError as err:
                message = WorksheetError(err.message, use.line, use.column).located()
                results[use.line] = StatementResult(
                    use.line, "use", use.source, "error", message=message, record=message
                )
                failed.update({name: use.line for name in use.names})
                token.append((use.line, "error", message))
                continue
            reads.update(exports.reads)
            token.append((use.line, str(place.real), exports.token, use.names))
            results[use.line] = StatementResult(
                use.line,
                "use",
                use.source,
                "ok",
                record=f"{use.source}: sha256 {exports.digest}",
                imported={
                    "file": place.shown,
                    "library": use.library,
                    "sha256": exports.digest,
                    "names": sorted(name for name, item in lent.items() if item.brought_in),
                },
                # Every name the lent definitions read (constants among them), so the
                # exports' table of constants lists those reached only through the use.
                detail=tuple(sorted({read for name in lent for read in reads.get(name, ())})),
            )
        return ImportScope(names, results, failed, tuple(token)), reads

    def _load(self, place: _Place, chain: tuple[Path, ...], context: Context, pin: str):
        from worksheet.document import decode_sheet_bytes, parse_document
        from worksheet.runner import document_statements, read_settings

        if place.real in chain:
            names = [_shown(p, chain[0].parent if chain else place.root) for p in chain]
            loop = " -> ".join([*names, _shown(place.real, chain[0].parent)])
            raise UseError(f"use cycle: {loop}; a sheet cannot bring itself in")
        try:
            data = place.real.read_bytes()
        except OSError as err:
            raise UseError(f"cannot read {place.shown}: {err.strerror or err}") from err
        digest = hashlib.sha256(data).hexdigest()
        try:
            doc = parse_document(decode_sheet_bytes(data))
            settings = read_settings(doc)
        except WorksheetError as err:
            raise UseError(f"{place.shown}: {err.located()}") from err
        if settings.pinned and settings.dataset != pin:
            raise UseError(
                f"datasets differ: {place.shown} pins {settings.dataset}, the sheet using it "
                f"{pin}; pin the same dataset in both"
            )
        statements = document_statements(doc)
        child, child_reads = self._scope(
            statements, place.real.parent, place.root, (*chain, place.real), context, pin
        )
        key = (
            place.real,
            digest,
            child.token,
            chain,
            context.dataset.name,
            context.seconds,
            context.guard,
        )
        cached = self._cache.get(key)
        if cached is not None:
            return cached
        evaluator = SheetEvaluator(context)
        evaluator.set_imports(child)
        for result in evaluator.run(statements):
            if result.kind != "blank" and result.status != "ok":
                detail = result.message or result.record or ""
                if not detail.startswith(f"line {result.line}"):
                    detail = f"line {result.line}: {detail}"
                raise UseError(f"{place.shown} does not hold: {detail}")
        names = {
            name: lent.binding for name, lent in child.names.items() if lent.brought_in
        } | evaluator.bindings
        hidden = {
            name: lent.binding
            for name, lent in child.names.items()
            if not lent.brought_in and name not in names
        }
        reads = dict(child_reads)
        for source in statements:
            try:
                parsed = parse_statement(source.text, source.line)
            except WorksheetError:
                continue
            name = getattr(parsed, "name", None)
            if name is not None and not isinstance(parsed, t.Check | t.Use):
                reads[name] = frozenset(referenced_names(parsed))
        exports = SheetExports(names, hidden, reads, digest, (digest, child.token))
        if len(self._cache) > 64:
            self._cache.clear()
        self._cache[key] = exports
        return exports


def _within(path: str | Path, folder: Path) -> bool:
    return os.path.commonpath([str(folder), str(path)]) == str(folder)


def _shown(path: Path, folder: Path) -> str:
    try:
        return path.relative_to(folder).as_posix()
    except ValueError:
        return path.name


def _locate(use: t.Use, here: Path, root: Path) -> _Place:
    """The file a use statement names, refused when it would leave the allowed folder."""
    if use.library:
        found = library_sheet(use.path)
        if found is None:
            listing = "; it has " + ", ".join(library_names())
            hint = did_you_mean(use.path, library_names()) or listing
            raise UseError(f"the library has no subject '{use.path}'{hint}")
        folder = Path(os.path.realpath(library_folder()))
        return _Place(Path(os.path.realpath(found)), f'library "{use.path}"', folder)
    text = use.path
    if any(ord(char) < 32 or char == "\x7f" for char in text):
        raise UseError("a use path cannot hold control characters")
    try:
        text.encode("utf-8")
    except UnicodeEncodeError as err:  # a lone surrogate, possible only from Python text
        raise UseError("a use path must be valid Unicode text") from err
    if os.path.isabs(text) or text.startswith("~") or (len(text) > 1 and text[1] == ":"):
        raise UseError(
            f"'{text}' is an absolute path; a use path is relative to the sheet that holds it"
        )
    lexical = os.path.normpath(os.path.join(here, text))
    if not _within(lexical, root):
        raise UseError(
            f"'{text}' leaves the folder of the sheet that started the run; "
            "keep the sheets it uses inside that folder"
        )
    real = os.path.realpath(lexical)
    if not _within(real, root):
        raise UseError(
            f"'{text}' goes through a symbolic link to a place outside the folder of the "
            "sheet that started the run; refused"
        )
    if not os.path.exists(real):
        raise UseError(f"'{text}': no such sheet file (paths are relative to this sheet)")
    if not os.path.isfile(real):
        raise UseError(f"'{text}' is a folder, not a sheet file")
    return _Place(Path(real), text, root)


def _lend(use: t.Use, exports: SheetExports, shown: str) -> dict[str, LentName]:
    """The names a use brings in, and the names those are computed from (lent hidden)."""
    wanted = use.names or tuple(exports.names)
    for name in wanted:
        if name not in exports.names:
            hint = did_you_mean(name, exports.names)
            raise UseError(f"'{name}' is not defined in {shown}{hint}")
    lendable = exports.hidden | exports.names
    closure: set[str] = set()
    pending = list(wanted)
    while pending:
        name = pending.pop()
        if name in closure or name not in lendable:
            continue
        closure.add(name)
        pending.extend(exports.reads.get(name, ()))
    return {
        name: LentName(lendable[name], use.line, shown, name in wanted) for name in sorted(closure)
    }


def _merge(names: dict[str, LentName], lent: dict[str, LentName]) -> None:
    """Add one use's names; the same name from two different definitions is an error."""
    for name, item in lent.items():
        present = names.get(name)
        if present is None:
            names[name] = item
        elif present.binding is not item.binding:
            raise UseError(
                f"'{name}' comes from {present.file} (line {present.use_line}) and from "
                f"{item.file}, defined differently; bring it in from one of them"
            )
        elif item.brought_in and not present.brought_in:
            names[name] = item


def stale_use_message(recorded: str | None, result: StatementResult) -> str:
    """What ``check`` says when a used sheet's bytes changed since the results were run."""
    file = (result.imported or {}).get("file", "the used sheet")
    now = (result.imported or {}).get("sha256", "")
    before = recorded.rsplit("sha256 ", 1)[-1] if recorded and "sha256 " in recorded else None
    if before is None:
        return f"{file}: no digest recorded; now sha256 {now} (run the sheet to record it)"
    return f"{file} changed since the results were recorded (sha256 was {before}, now {now})"
