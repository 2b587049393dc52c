"""A pytest plugin that tests ``*.sheet.md`` files: each claim, each error, and staleness.

Installed with the package (entry point ``pytest11``) but inert until enabled, with
``pytest --sheets`` or ``worksheet_sheets = true`` in the pytest ini settings, so that test
suites which merely contain sheets (as fixtures, say) are not affected.

Each sheet is run once, when it is collected, exactly as ``worksheet check`` runs it. It
gives one item per claim (``line 12: check T_H ~ 1e11 [K]``), one per statement that erred,
and one item ``recorded results are current`` that fails when the recorded result blocks
differ from what a run records now.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import TYPE_CHECKING, Any

import pytest

if TYPE_CHECKING:
    from worksheet.engine import StatementResult

SHEET_SUFFIX = ".sheet.md"
CURRENT_ITEM = "recorded results are current"
READ_ITEM = "sheet can be run"


def pytest_addoption(parser: pytest.Parser) -> None:
    group = parser.getgroup("worksheet", "worksheet sheets")
    group.addoption(
        "--sheets",
        action="store_true",
        default=False,
        dest="worksheet_sheets",
        help="collect *.sheet.md files: each claim, error and staleness check is a test",
    )
    parser.addini(
        "worksheet_sheets",
        type="bool",
        default=False,
        help="collect *.sheet.md files as tests (same as --sheets)",
    )


def sheets_enabled(config: pytest.Config) -> bool:
    """Whether this session collects sheets (the option or the ini setting)."""
    return bool(config.getoption("worksheet_sheets", False) or config.getini("worksheet_sheets"))


def pytest_collect_file(file_path: Path, parent: pytest.Collector) -> pytest.Collector | None:
    if file_path.name.endswith(SHEET_SUFFIX) and sheets_enabled(parent.config):
        return SheetFile.from_parent(parent, path=file_path)
    return None


def item_name(line: int, text: str) -> str:
    """``line N: statement`` on one line, safe as part of a pytest node id.

    >>> item_name(7, "check a ==\\n   b")
    'line 7: check a == b'
    """
    flat = " ".join(text.split())
    while "::" in flat:
        flat = flat.replace("::", ": :")
    return f"line {line}: {flat}"


class SheetFile(pytest.File):
    """One sheet file; running it happens here, once, so items only report the outcome."""

    def collect(self) -> Iterator[pytest.Item]:
        from worksheet.api import load
        from worksheet.errors import WorksheetError

        try:
            result = load(self.path).run()
        except WorksheetError as err:
            yield ProblemItem.from_parent(
                self, name=READ_ITEM, message=err.located(), line=err.line
            )
            return
        for warning in result.warnings:
            self.warn(UserWarning(f"{self.path.name}: {warning}"))
        for statement in result.sheet_run.results:
            if statement.kind == "check" or statement.status == "error":
                item = StatementItem.from_parent(
                    self, name=item_name(statement.line, statement.text), statement=statement
                )
                if statement.status == "skipped":
                    # A mark, so the skip is reported at the sheet's line, not in this module.
                    item.add_marker(pytest.mark.skip(reason=statement.message or "skipped"))
                yield item
        # Staleness is its own item: a claim that holds passes even if its line is stale.
        stale = [s for s in result.sheet_run.with_staleness() if s.status == "stale"]
        yield StaleItem.from_parent(self, name=CURRENT_ITEM, stale=stale)


class _SheetItem(pytest.Item):
    line: int | None = None

    def reportinfo(self) -> tuple[Path, int | None, str]:
        # The headline of a failure: ``file.sheet.md:12: check ...`` (editors follow it).
        # pytest would turn dots into '::' in a headline that is the end of the node id.
        where = f"{self.path.name}:{self.line}" if self.line is not None else self.path.name
        text = self.name.split(": ", 1)[1] if self.name.startswith("line ") else self.name
        return self.path, (self.line - 1) if self.line is not None else None, f"{where}: {text}"


class StatementItem(_SheetItem):
    """A claim (passes when it holds) or a statement that erred (always fails)."""

    def __init__(self, *, statement: StatementResult, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.statement = statement
        self.line = statement.line

    def runtest(self) -> None:
        statement = self.statement
        if statement.status == "ok":
            return
        if statement.status == "skipped":
            pytest.skip(statement.message or "depends on a line that erred")
        if statement.status == "failed":
            detail = statement.message or ""
            pytest.fail(f"{statement.text}: fails\n  {detail}", pytrace=False)
        kind = "claim" if statement.kind == "check" else "statement"
        pytest.fail(
            f"{kind} could not be evaluated: {statement.message or statement.status}",
            pytrace=False,
        )


class StaleItem(_SheetItem):
    """Fails when a recorded result line differs from what the run records now."""

    def __init__(self, *, stale: list[StatementResult], **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.stale = stale

    def runtest(self) -> None:
        if not self.stale:
            return
        lines = [f"line {s.line}: {s.message}" for s in self.stale]
        pytest.fail(
            f"{len(self.stale)} recorded result(s) differ from a fresh run "
            f"(update them with 'worksheet run {self.path.name}'):\n  " + "\n  ".join(lines),
            pytrace=False,
        )


class ProblemItem(_SheetItem):
    """A sheet that cannot be run at all (unreadable file, bad front matter)."""

    def __init__(self, *, message: str, line: int | None = None, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.message = message
        self.line = line

    def runtest(self) -> None:
        pytest.fail(self.message, pytrace=False)
