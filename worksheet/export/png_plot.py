"""A plot as PNG through matplotlib, which is an optional extra (``worksheet[plots]``).

Fixed size and resolution, matplotlib's default style whatever the user's settings, and no
``Software`` metadata, so the same data and the same matplotlib give the same bytes.
"""

from __future__ import annotations

import importlib.util
import io

from worksheet.engine.plots import PlotData
from worksheet.errors import WorksheetError
from worksheet.export.plot_axes import scaled
from worksheet.export.plot_style import axis_title, marker_step, style

EXTRA = "plots"
SIZE_INCHES = (6.4, 4.2)
DPI = 100
_MARKERS = {
    "circle": "o",
    "square": "s",
    "triangle": "^",
    "diamond": "D",
    "down": "v",
    "cross": "x",
    "plus": "+",
}

MISSING = (
    "PNG plots need matplotlib, which is not installed; install the extra with "
    f"pip install 'worksheet[{EXTRA}]', or use --to svg (no extra needed)"
)


def matplotlib_available() -> bool:
    return importlib.util.find_spec("matplotlib") is not None


def plot_png(data: PlotData) -> bytes:
    """The PNG bytes of a plot.

    Raises:
        WorksheetError: matplotlib is not installed.
    """
    if not matplotlib_available():
        raise WorksheetError(MISSING)
    import matplotlib.style
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    with matplotlib.style.context("default"):
        figure = Figure(figsize=SIZE_INCHES, dpi=DPI)
        FigureCanvasAgg(figure)
        axes = figure.add_subplot()
        axes.set_xscale("log" if data.x_scale == "log" else "linear")
        axes.set_yscale("log" if data.y_scale == "log" else "linear")
        xs = [x if scaled(x, data.x_scale) is not None else float("nan") for x in data.x_values]
        for index, series in enumerate(data.series):
            look = style(index)
            ys = [v if scaled(v, data.y_scale) is not None else float("nan") for v in series.values]
            axes.plot(
                xs,
                ys,
                color=look.colour,
                linestyle=(0, look.dash) if look.dash else "-",
                linewidth=1.6,
                marker=_MARKERS[look.marker],
                markevery=marker_step(len(ys)),
                label=axis_title(series.name, series.unit),
            )
        axes.set_xlabel(axis_title(data.x_name, data.x_unit))
        axes.set_ylabel(", ".join(axis_title(s.name, s.unit) for s in data.series))
        axes.grid(True, color="#dddddd", linewidth=0.8)
        axes.legend(loc="best")
        figure.tight_layout()
        buffer = io.BytesIO()
        figure.savefig(buffer, format="png", dpi=DPI, metadata={"Software": None})
    return buffer.getvalue()
