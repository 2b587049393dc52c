"""Exports of a sheet run for a proposal or a referee: LaTeX, HTML and a Markdown report.

``export_run(run, to)`` gives the text and the file suffix the command line appends to the
sheet's name without ``.md`` (``burst.sheet.md`` becomes ``burst.sheet.tex``,
``burst.sheet.html`` or ``burst.sheet.report.md``).

Plots: HTML embeds each as inline SVG, LaTeX draws each with pgfplots from its data, the
Markdown report keeps the text chart (one self-contained file). ``plot_files(run, "svg",
stem)`` gives one picture per plot (``burst.sheet.plot-14.svg``); ``"png"`` needs the
optional extra ``worksheet[plots]`` (matplotlib). ``table`` statements come out as real
tables in all three documents.
"""

from __future__ import annotations

from worksheet import CAUTION
from worksheet.errors import WorksheetError
from worksheet.export.html import html_document
from worksheet.export.latex import latex_document
from worksheet.export.markdown import markdown_document
from worksheet.export.plot_files import PLOT_FORMATS, PlotFile, plot_files
from worksheet.export.report import Report, build_report, outcome_sentence
from worksheet.runner import SheetRun

FORMATS: dict[str, str] = {"latex": ".tex", "html": ".html", "md": ".report.md"}
"""Each export format and the suffix its file gets."""


def export_run(
    run: SheetRun, to: str, source_name: str | None = None, standalone: bool = True
) -> tuple[str, str]:
    """The export of a sheet run as ``(text, suffix)``.

    Args:
        run: a finished run (``worksheet.runner.run_text`` or ``SheetRunner().run``).
        to: ``latex``, ``html`` or ``md``.
        source_name: the sheet's file name, shown in the export (never a full path).
        standalone: LaTeX only: a whole ``article`` (default) or a fragment to ``\\input``.

    Raises:
        WorksheetError: ``to`` is not one of the formats.
    """
    if to not in FORMATS:
        raise WorksheetError(f"unknown export format {to!r}; use one of {', '.join(FORMATS)}")
    report = build_report(run, source_name)
    if to == "latex":
        text = latex_document(report, standalone=standalone)
    elif to == "html":
        text = html_document(report)
    else:
        text = markdown_document(report)
    return text, FORMATS[to]


def run_problems(run: SheetRun) -> str | None:
    """The sentence every export shows when a claim does not hold or a line errs, else None.

    The command line prints it on stderr and exits 1, after writing the document.
    """
    report = build_report(run)
    return outcome_sentence(report) if report.has_problems else None


__all__ = [
    "CAUTION",
    "FORMATS",
    "PLOT_FORMATS",
    "PlotFile",
    "Report",
    "build_report",
    "export_run",
    "plot_files",
    "run_problems",
]
