"""A whole sheet's statements in reading order: names, dependencies, incremental re-runs."""

from __future__ import annotations

import heapq
import itertools
import operator
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import sympy

from worksheet.engine.bindings import Binding
from worksheet.engine.budget import statement_timer
from worksheet.engine.collector import collector_paused
from worksheet.engine.context import Context
from worksheet.engine.import_scope import ImportScope
from worksheet.engine.results import StatementResult
from worksheet.engine.statements import KINDS, RESERVED_NAMES, StatementEvaluator
from worksheet.errors import EvaluationError, NameResolutionError, WorksheetError
from worksheet.syntax import parse_statement
from worksheet.syntax import tree as t
from worksheet.syntax.names import referenced_names
from worksheet.syntax.use import looks_like_use


@dataclass(frozen=True)
class SourceStatement:
    """One statement's text (continuation lines joined by newlines) and where it starts."""

    line: int
    text: str
    cell: int = 0


def split_statements(body: str, first_line: int, cell: int = 0) -> list[SourceStatement]:
    """Statements of a calc cell: one a line, continued while parentheses are open.

    >>> [s.line for s in split_statements("a = (1 +\\n 2)\\nb = 3\\n", 10)]
    [10, 12]
    """
    statements: list[SourceStatement] = []
    pending: list[str] = []
    start = first_line
    depth = 0
    # Only \n, \r\n and a bare \r end a line, as in the document model: str.splitlines
    # would also break at form feeds and Unicode separators and shift every line number.
    lines = _LINE_END.split(body)
    if lines and lines[-1] == "":
        lines.pop()
    for offset, raw in enumerate(lines):
        if not pending:
            start = first_line + offset
            if looks_like_use(raw):
                # A use statement is one line (its parser refuses more), whatever its
                # quotes hold: 'use "\\"("' has a '(' after the path's closing quote.
                statements.append(SourceStatement(start, raw, cell))
                continue
        pending.append(raw)
        depth += _paren_balance(raw)
        if depth <= 0:
            statements.append(SourceStatement(start, "\n".join(pending), cell))
            pending, depth = [], 0
    if pending:
        statements.append(SourceStatement(start, "\n".join(pending), cell))
    return statements


_LINE_END = re.compile(r"\r\n|\n|\r")
_DEFINED_NAME = re.compile(r"\s*([^\W\d]\w*)\s*(?:=(?!=)|:)")


def internal_error(err: Exception, line: int) -> EvaluationError:
    """An unexpected exception of one statement, as that statement's recorded error.

    Every cause found is fixed where it arises; this keeps a cause not yet found from
    taking the whole sheet down.
    """
    detail = str(err).splitlines()[0][:200] if str(err) else ""
    name = type(err).__name__
    return EvaluationError(
        f"internal error ({name}{': ' + detail if detail else ''}); "
        "this statement was not evaluated, the rest of the sheet was",
        line,
    )


def _serial(binding: Binding | None) -> int:
    return -1 if binding is None else binding.serial


def _paren_balance(line: str) -> int:
    balance = 0
    in_unit = in_quote = False
    for char in line:
        if char == '"':  # a quoted path ('use "notes (old).sheet.md"') holds no parentheses
            in_quote = not in_quote
        if in_quote or char == '"':
            continue
        if char == "#" and not in_unit:
            break
        if char == "[":
            in_unit = True
        elif char == "]":
            in_unit = False
        elif not in_unit and char == "(":
            balance += 1
        elif not in_unit and char == ")":
            balance -= 1
    return balance


@dataclass
class _RunState:
    """What the last full run left behind, so that small edits can re-run only dependents."""

    first_definer: dict[str, int]
    visible: dict[str, Binding]
    failed: dict[str, int]
    values: dict[sympy.Symbol, Binding]
    users: dict[str, list[int]]
    lookup: Callable[[str], Binding | None]
    evaluator: StatementEvaluator


@dataclass
class _Slot:
    source: SourceStatement
    parsed: t.AnyStatement | WorksheetError
    defines: str | None
    uses: tuple[str, ...]  # sorted
    key: tuple | None = None
    result: StatementResult | None = None
    binding: Binding | None = None


class SheetEvaluator:
    """Evaluates a list of statements; re-evaluates only what a change can affect.

    Call :meth:`run` with the full statement list whenever it changes. Unchanged statements
    whose inputs are unchanged keep their results (by identity of the bindings they read),
    so editing one given recomputes only its dependents.
    """

    def __init__(self, context: Context):
        self.ctx = context
        self._slots: list[_Slot] = []
        self.runs = 0  # how many times run() was called: lets a caller tell it is in step
        self._sources: list[SourceStatement] = []  # slot sources, for a C-speed comparison
        self._results: list[StatementResult] = []  # one per slot after a run
        self.rerun: list[int] | None = None
        """Indices of the statements the last run evaluated, when it re-ran only those
        (None after a full run): callers of a long sheet need not compare every result."""
        self._parse_cache: dict[tuple[int, str], tuple] = {}
        self._state: _RunState | None = None
        self._imports = ImportScope()

    def set_imports(self, scope: ImportScope) -> None:
        """Names other sheets lend (``use``); new file contents void every cached result."""
        if scope.token != self._imports.token or scope.names.keys() != self._imports.names.keys():
            self._state = None
            for slot in self._slots:
                slot.key = slot.result = slot.binding = None
        self._imports = scope

    def _parse(self, source: SourceStatement) -> tuple:
        key = (source.line, source.text)
        cached = self._parse_cache.get(key)
        if cached is None:
            try:
                parsed: t.AnyStatement | WorksheetError = parse_statement(source.text, source.line)
            except WorksheetError as err:
                parsed = err
            except Exception as err:  # last resort: one statement's bug, recorded, never a crash
                parsed = internal_error(err, source.line)
            if isinstance(parsed, WorksheetError):
                # A definition that does not parse still claims its name, so that the lines
                # using it say they depend on it rather than that it is unknown.
                claimed = _DEFINED_NAME.match(source.text)
                cached = (parsed, claimed.group(1) if claimed else None, ())
            else:
                defines = (
                    getattr(parsed, "name", None)
                    if isinstance(parsed, t.Definition | t.Relation | t.Declaration | t.Estimate)
                    else None
                )
                cached = (parsed, defines, tuple(sorted(referenced_names(parsed))))
            self._parse_cache[key] = cached
        return cached

    def _claims_name(self, slot: _Slot) -> bool:
        """Whether a statement takes over its name for the whole sheet.

        A definition of a constant's name (``G = 5``) is refused on its own line; it claims
        nothing, so the lines above and below it keep meaning the constant. Only a
        declaration (``G : [m^3/(kg*s^2)]``) makes a constant's name the sheet's own.
        """
        if slot.defines is None:
            return False
        if isinstance(slot.parsed, t.Declaration):
            return True
        return slot.defines not in self.ctx.constants and slot.defines not in RESERVED_NAMES

    def run(
        self,
        statements: Sequence[SourceStatement],
        replaced: Sequence[int] | None = None,
    ) -> list[StatementResult]:
        """Evaluate all statements (reusing what is unchanged) and return their results.

        ``replaced``, when the caller knows it, lists the positions (ascending) of the only
        statements that are not the very objects of the last run; the others are then not
        compared one by one (an edit of a long sheet).
        """
        self.runs += 1
        with collector_paused():
            fast = self._run_changed_only(statements, replaced)
            if fast is not None:
                return fast
            self.rerun = None
            return self._run_all(statements)

    def _run_all(self, statements: Sequence[SourceStatement]) -> list[StatementResult]:
        old = {(slot.source.line, slot.source.text): slot for slot in self._slots}
        slots: list[_Slot] = []
        for source in statements:
            parsed, defines, uses = self._parse(source)
            previous = old.get((source.line, source.text))
            slot = _Slot(source, parsed, defines, uses)
            if previous is not None:
                slot.key, slot.result, slot.binding = (
                    previous.key,
                    previous.result,
                    previous.binding,
                )
            slots.append(slot)
        self._slots = slots
        if len(self._parse_cache) > 4 * len(slots) + 1000:
            self._parse_cache = {
                (s.source.line, s.source.text): self._parse(s.source) for s in slots
            }

        first_definer: dict[str, int] = {}
        for index, slot in enumerate(slots):
            if self._claims_name(slot) and slot.defines not in first_definer:
                first_definer[slot.defines] = index

        visible: dict[str, Binding] = {}
        failed: dict[str, int] = dict(self._imports.failed)  # name -> line that failed
        values: dict[sympy.Symbol, Binding] = {
            lent.binding.symbol: lent.binding for lent in self._imports.names.values()
        }
        constants = self.ctx.constants
        imports = self._imports

        if imports.names:

            def lookup(name: str) -> Binding | None:
                binding = visible.get(name)
                if binding is not None:
                    return binding
                return imports.binding(name) or constants.get(name)

        else:  # the usual sheet: no other sheet lends it names

            def lookup(name: str) -> Binding | None:
                binding = visible.get(name)
                return binding if binding is not None else constants.get(name)

        evaluator = StatementEvaluator(self.ctx, lookup, values)
        for index, slot in enumerate(slots):
            result, binding = self._evaluate_slot(
                index, slot, slots, first_definer, visible, failed, lookup, evaluator
            )
            slot.result, slot.binding = result, binding
            if slot.defines is not None:
                if binding is not None and first_definer.get(slot.defines) == index:
                    visible[slot.defines] = binding
                    values[binding.symbol] = binding
                elif first_definer.get(slot.defines) == index:
                    failed[slot.defines] = slot.source.line
        users: dict[str, list[int]] = {}
        for index, slot in enumerate(slots):
            for name in slot.uses:
                users.setdefault(name, []).append(index)
        self._state = _RunState(first_definer, visible, failed, values, users, lookup, evaluator)
        self._sources = [slot.source for slot in slots]
        self._results = [slot.result for slot in slots if slot.result is not None]
        return list(self._results)

    def _run_changed_only(
        self, statements: Sequence[SourceStatement], replaced: Sequence[int] | None = None
    ) -> list | None:
        """Edits that keep every line and every defined name: re-run only the dependents.

        Returns None when the fast path does not apply (lines moved, names changed).
        """
        state = self._state
        slots = self._slots
        if state is None or len(statements) != len(slots):
            return None
        if len(self._sources) != len(slots):
            return None
        changed: list[int] = []
        # The runner hands unchanged cells' statements back as the same objects: only the
        # others are looked at (found by identity, at C speed).
        if replaced is None:
            others = list(
                itertools.compress(
                    range(len(slots)), map(operator.is_not, statements, self._sources)
                )
            )
        else:
            others = list(replaced)
        for index in others:
            source, slot = statements[index], slots[index]
            if source.line != slot.source.line or source.cell != slot.source.cell:
                return None
            if source.text != slot.source.text:
                changed.append(index)
        fresh: list[_Slot] = []
        for index in changed:
            parsed, defines, uses = self._parse(statements[index])
            if defines != slots[index].defines:
                return None
            slot = _Slot(statements[index], parsed, defines, uses)
            if defines is not None and self._claims_name(slot) != self._claims_name(slots[index]):
                return None  # G = 5 became G : [...]: the name's owner changes
            fresh.append(slot)
        for index in others:  # same text, line and cell, or changed: keep the new object
            slots[index].source = statements[index]
        cache = self._parse_cache
        for index, slot in zip(changed, fresh, strict=True):
            # The text it replaces is forgotten with it: parses kept for texts no longer in
            # the sheet outlive a few collections and make the collector rescan them all.
            old = slots[index].source
            cache.pop((old.line, old.text), None)
            slots[index] = slot
        if len(self._parse_cache) > 4 * len(slots) + 1000:  # an app session's many edits
            self._parse_cache = {
                (slot.source.line, slot.source.text): self._parse(slot.source) for slot in slots
            }
        sources = self._sources
        for index in others:  # the only places where ``statements`` differs from them
            sources[index] = statements[index]
        users = state.users
        for index in changed:  # the reverse map may gain names the new text reads
            for name in slots[index].uses:
                if index not in users.setdefault(name, []):
                    users[name].append(index)
                    users[name].sort()
        one_each = len(self._results) == len(slots)
        pending = list(changed)
        heapq.heapify(pending)
        done: set[int] = set()
        while pending:
            index = heapq.heappop(pending)
            if index in done:
                continue
            done.add(index)
            slot = slots[index]
            result, binding = self._evaluate_slot(
                index,
                slot,
                slots,
                state.first_definer,
                state.visible,
                state.failed,
                state.lookup,
                state.evaluator,
            )
            slot.result, slot.binding = result, binding
            if one_each:
                self._results[index] = result
            name = slot.defines
            if name is not None and state.first_definer.get(name) == index:
                if binding is not None:
                    state.visible[name] = binding
                    state.failed.pop(name, None)
                    state.values[binding.symbol] = binding
                else:
                    state.visible.pop(name, None)
                    state.failed[name] = slot.source.line
                for user in users.get(name, ()):
                    if user > index and user not in done:
                        heapq.heappush(pending, user)
        if one_each:
            self.rerun = sorted(done)
            return list(self._results)
        self.rerun = None
        return [slot.result for slot in slots if slot.result is not None]

    def _evaluate_slot(
        self,
        index: int,
        slot: _Slot,
        slots: list[_Slot],
        first_definer: dict[str, int],
        visible: dict[str, Binding],
        failed: dict[str, int],
        lookup,
        evaluator: StatementEvaluator,
    ) -> tuple[StatementResult, Binding | None]:
        parsed = slot.parsed
        line = slot.source.line
        if isinstance(parsed, WorksheetError):
            message = WorksheetError(parsed.message, parsed.line or line, parsed.column).located()
            return StatementResult(
                line, "error", slot.source.text.strip(), "error", message=message, record=message
            ), None
        key = (
            tuple([(name, _serial(visible.get(name)), name in failed) for name in slot.uses]),
            self.ctx.digits,
        )
        if slot.key == key and slot.result is not None:
            return slot.result, slot.binding
        slot.key = key
        if isinstance(parsed, t.Use):
            return self._imports.results[line], None
        if self._imports.names:  # names another sheet lends: this line may not take them
            for name in (slot.defines, *slot.uses):
                refusal = name and self._imports.refusal(name, line, name == slot.defines)
                if refusal:
                    error = NameResolutionError(refusal, line)
                    return evaluator.error_result(parsed, error), None
        # Names: redefinition, use before definition, dependence on a failed line.
        if slot.defines is not None and first_definer.get(slot.defines, index) != index:
            first_line = slots[first_definer[slot.defines]].source.line
            err = NameResolutionError(
                f"'{slot.defines}' is already defined on line {first_line}; "
                f"line {line} defines it again (pick a new name)",
                line,
            )
            return evaluator.error_result(parsed, err), None
        for name in slot.uses:
            definer = first_definer.get(name)
            if definer is not None and definer > index:
                err = NameResolutionError(
                    f"'{name}' is used before its definition on line "
                    f"{slots[definer].source.line}; move this line below it",
                    line,
                )
                return evaluator.error_result(parsed, err), None
            if name in failed and name not in visible:
                message = f"line {line}: depends on line {failed[name]}, which failed"
                return StatementResult(
                    line,
                    KINDS[type(parsed)],
                    parsed.source,
                    "skipped",
                    name=getattr(parsed, "name", None),
                    message=message,
                    record=message,
                ), None
        try:
            with statement_timer(self.ctx.seconds):
                return evaluator.evaluate(parsed)
        except WorksheetError as err:  # budget from the timer
            return evaluator.error_result(parsed, err), None
        except Exception as err:  # last resort: one statement's bug, recorded, never a crash
            return evaluator.error_result(parsed, internal_error(err, line)), None

    @property
    def bindings(self) -> dict[str, Binding]:
        """Every name the last run defined, in reading order."""
        return {
            slot.defines: slot.binding
            for slot in self._slots
            if slot.defines is not None and slot.binding is not None
        }
