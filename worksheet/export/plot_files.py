"""One picture file per plot statement: ``NAME.plot-LINE.svg`` (or ``.png``) next to the sheet."""

from __future__ import annotations

from dataclasses import dataclass

from worksheet.errors import WorksheetError
from worksheet.export.png_plot import plot_png
from worksheet.export.svg_plot import plot_svg
from worksheet.runner import SheetRun

PLOT_FORMATS: dict[str, str] = {"svg": ".svg", "png": ".png"}
"""Picture formats and their suffixes; PNG needs the optional ``plots`` extra."""


@dataclass(frozen=True)
class PlotFile:
    name: str  # e.g. "burst.sheet.plot-14.svg"
    line: int
    content: bytes


def plot_files(run: SheetRun, to: str, stem: str) -> list[PlotFile]:
    """Every drawn plot of a run as a file named from ``stem`` (the sheet name minus ``.md``).

    Plots that did not evaluate (an error, skipped) have no data and give no file.

    Raises:
        WorksheetError: ``to`` is not a picture format, or PNG without matplotlib.
    """
    if to not in PLOT_FORMATS:
        raise WorksheetError(f"unknown plot format {to!r}; use one of {', '.join(PLOT_FORMATS)}")
    files = []
    for result in run.results:
        if result.kind != "plot" or result.status != "ok" or result.plot is None:
            continue
        if to == "svg":
            content = plot_svg(result.plot, f"{result.text} (line {result.line})").encode()
        else:
            content = plot_png(result.plot)
        files.append(PlotFile(f"{stem}.plot-{result.line}{PLOT_FORMATS[to]}", result.line, content))
    return files
