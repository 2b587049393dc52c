"""A plot as a self-contained SVG: our own writer, no fonts, scripts or images fetched.

The output is byte-stable: coordinates are written with two decimals, the order of every
element is fixed, and nothing depends on the time, the machine or a hash seed. There are
no ``id`` attributes, so several plots can be embedded in one HTML page.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from xml.sax.saxutils import escape, quoteattr

from worksheet.engine.plots import PlotData
from worksheet.export.names import GREEK, SOLAR_SUBSCRIPT, SPECIAL, split_name
from worksheet.export.plot_axes import Axis, TickLabel, make_axis, scaled
from worksheet.export.plot_style import SeriesStyle, marker_step, style

WIDTH = 640
PLOT_HEIGHT = 300
FONT = "DejaVu Sans, Helvetica, Arial, sans-serif"
FONT_SIZE = 12
CHAR_WIDTH = 7.0  # a generous average advance at FONT_SIZE, for layout only
MINUS = "\u2212"
LEGEND_ROW = 18


@dataclass(frozen=True)
class _Frame:
    left: float
    top: float
    width: float
    height: float

    def x(self, axis: Axis, value: float) -> float:
        return self.left + axis.fraction(value) * self.width

    def y(self, axis: Axis, value: float) -> float:
        return self.top + self.height - axis.fraction(value) * self.height


def _n(value: float) -> str:
    text = f"{value:.2f}"
    return "0.00" if text == "-0.00" else text


# --- text with sub- and superscripts --------------------------------------------------

Run = tuple[str, int]  # text and its shift: 0 baseline, -1 subscript, +1 superscript


def name_runs(name: str) -> list[Run]:
    """A sheet name as text runs: ``T_H`` is T with subscript H, Greek spelled out shown."""
    parts = split_name(name)
    special = SPECIAL.get(parts.base)
    runs: list[Run] = [(special[0] if special else GREEK.get(parts.base, parts.base), 0)]
    if parts.subscripts:
        subs = ["⊙" if s == SOLAR_SUBSCRIPT else GREEK.get(s, s) for s in parts.subscripts]
        runs.append((",".join(subs), -1))
    return runs


def unit_runs(unit: str) -> list[Run]:
    """``[m^2/s]`` with the powers raised: the unit as written, powers as superscripts."""
    runs: list[Run] = [(" [", 0)]
    text = unit
    while "^" in text:
        before, _, rest = text.partition("^")
        power = rest[: _power_length(rest)]
        runs += [(before, 0), (power.replace("-", MINUS), 1)]
        text = rest[len(power) :]
    runs += [(text, 0), ("]", 0)]
    return [run for run in runs if run[0]]


def _power_length(text: str) -> int:
    if text.startswith("("):
        close = text.find(")")
        return close + 1 if close > 0 else len(text)
    length = 1 if text[:1] in "+-" else 0
    while length < len(text) and (text[length].isdigit() or text[length] == "."):
        length += 1
    return max(length, 1)


def title_runs(name: str, unit: str) -> list[Run]:
    return name_runs(name) + (unit_runs(unit) if unit else [])


def tick_runs(label: TickLabel) -> list[Run]:
    """``10^9`` or ``1.5×10^14`` or ``250``, with the exponent raised."""
    if label.exponent is None:
        return [((label.mantissa or "").replace("-", MINUS), 0)]
    head = "" if label.mantissa is None else label.mantissa.replace("-", MINUS) + "×"
    return [(head + "10", 0), (str(label.exponent).replace("-", MINUS), 1)]


def runs_width(runs: Sequence[Run]) -> float:
    return sum(len(text) * CHAR_WIDTH * (0.75 if shift else 1.0) for text, shift in runs)


def plain(runs: Sequence[Run]) -> str:
    """The runs as one plain string (for ``<title>`` and accessible labels)."""
    out = []
    for text, shift in runs:
        out.append(("_" if shift < 0 else "^" if shift > 0 else "") + text)
    return "".join(out)


def text_element(
    runs: Sequence[Run], x: float, y: float, anchor: str = "start", extra: str = ""
) -> str:
    """One ``<text>``; shifted runs are smaller ``<tspan>``s that return to the baseline."""
    body = []
    offset = 0.0
    for text, shift in runs:
        wanted = {0: 0.0, -1: 3.5, 1: -5.0}[max(-1, min(1, shift))]
        move = wanted - offset
        offset = wanted
        attrs = f' dy="{_n(move)}"' if move else ""
        if shift:
            attrs += f' font-size="{FONT_SIZE * 0.75:.0f}"'
        body.append(f"<tspan{attrs}>{escape(text)}</tspan>" if attrs else escape(text))
    return (
        f'<text x="{_n(x)}" y="{_n(y)}" text-anchor="{anchor}"{extra}>' + "".join(body) + "</text>"
    )


# --- markers ---------------------------------------------------------------------------


def marker(kind: str, x: float, y: float, colour: str) -> str:
    r = 3.5
    if kind == "circle":
        return f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(r)}" fill="{colour}"/>'
    if kind == "square":
        s = r * 0.9
        return (
            f'<rect x="{_n(x - s)}" y="{_n(y - s)}" width="{_n(2 * s)}" height="{_n(2 * s)}" '
            f'fill="{colour}"/>'
        )
    shapes = {
        "triangle": ((0, -1.2), (1.1, 0.8), (-1.1, 0.8)),
        "down": ((0, 1.2), (1.1, -0.8), (-1.1, -0.8)),
        "diamond": ((0, -1.3), (1.1, 0), (0, 1.3), (-1.1, 0)),
    }
    if kind in shapes:
        points = " ".join(f"{_n(x + dx * r)},{_n(y + dy * r)}" for dx, dy in shapes[kind])
        return f'<polygon points="{points}" fill="{colour}"/>'
    if kind == "cross":
        d = (
            f"M{_n(x - r)} {_n(y - r)}L{_n(x + r)} {_n(y + r)}"
            f"M{_n(x - r)} {_n(y + r)}L{_n(x + r)} {_n(y - r)}"
        )
    else:  # plus
        d = f"M{_n(x - r)} {_n(y)}L{_n(x + r)} {_n(y)}M{_n(x)} {_n(y - r)}L{_n(x)} {_n(y + r)}"
    return f'<path d="{d}" stroke="{colour}" stroke-width="1.6" fill="none"/>'


def _dash(look: SeriesStyle) -> str:
    if not look.dash:
        return ""
    return ' stroke-dasharray="' + " ".join(f"{v:g}" for v in look.dash) + '"'


# --- the plot ----------------------------------------------------------------------------


def _points(data: PlotData) -> list[list[tuple[float, float] | None]]:
    xs = [scaled(x, data.x_scale) for x in data.x_values]
    out = []
    for series in data.series:
        row: list[tuple[float, float] | None] = []
        for x, y in zip(xs, series.values, strict=True):
            sy = scaled(y, data.y_scale)
            row.append(None if x is None or sy is None else (x, sy))
        out.append(row)
    return out


def plot_svg(data: PlotData, description: str = "", standalone: bool = True) -> str:
    """The plot as SVG text; ``standalone`` adds the XML declaration (for a ``.svg`` file).

    ``description`` (the plot statement, say) becomes the picture's ``<title>``.
    """
    points = _points(data)
    drawable = [p for row in points for p in row if p is not None]
    x_axis = make_axis((p[0] for p in drawable), data.x_scale)
    y_axis = make_axis((p[1] for p in drawable), data.y_scale)
    x_title = title_runs(data.x_name, data.x_unit)
    y_title: list[Run] = []
    for index, series in enumerate(data.series):
        y_title += ([(", ", 0)] if index else []) + title_runs(series.name, series.unit)
    y_label_width = max((runs_width(tick_runs(label)) for _, label in y_axis.major), default=0)
    left = 30 + y_label_width + 12
    last_x = runs_width(tick_runs(x_axis.major[-1][1])) / 2 if x_axis.major else 0
    frame = _Frame(left, 14.0, WIDTH - left - max(24, last_x + 8), PLOT_HEIGHT)
    bottom = frame.top + frame.height
    dropped = sum(1 for row in points for p in row if p is None)
    legend_top = bottom + 50
    height = legend_top + LEGEND_ROW * len(data.series) + (LEGEND_ROW if dropped else 0) + 8
    label = plain(y_title) + " against " + plain(x_title)
    out = [
        '<?xml version="1.0" encoding="UTF-8"?>\n' if standalone else "",
        f'<svg xmlns="http://www.w3.org/2000/svg" class="plot" width="{WIDTH}" '
        f'height="{_n(height)}" viewBox="0 0 {WIDTH} {_n(height)}" role="img" '
        f"aria-label={quoteattr(label)} font-family={quoteattr(FONT)} "
        f'font-size="{FONT_SIZE}">\n',
        f"<title>{escape(description or label)}</title>\n",
        f'<rect x="0" y="0" width="{WIDTH}" height="{_n(height)}" fill="#ffffff"/>\n',
    ]
    out += _grid_and_ticks(frame, x_axis, y_axis)
    out.append(
        f'<rect x="{_n(frame.left)}" y="{_n(frame.top)}" width="{_n(frame.width)}" '
        f'height="{_n(frame.height)}" fill="none" stroke="#333333" stroke-width="1"/>\n'
    )
    out.append(text_element(x_title, frame.left + frame.width / 2, bottom + 38, "middle") + "\n")
    middle = frame.top + frame.height / 2
    out.append(
        text_element(y_title, 16, middle, "middle", f' transform="rotate(-90 16 {_n(middle)})"')
        + "\n"
    )
    for index, row in enumerate(points):
        out += _series(frame, x_axis, y_axis, row, index, len(points))
    if not drawable:
        out.append(
            text_element(
                [("nothing to draw: no finite values on these axes", 0)],
                frame.left + frame.width / 2,
                middle,
                "middle",
                ' fill="#555555"',
            )
            + "\n"
        )
    out += _legend(data, frame.left, legend_top, dropped)
    out.append("</svg>\n")
    return "".join(out)


def _grid_and_ticks(frame: _Frame, x_axis: Axis, y_axis: Axis) -> list[str]:
    out = []
    bottom = frame.top + frame.height
    right = frame.left + frame.width
    for value in x_axis.minor:
        x = frame.x(x_axis, value)
        out.append(f'<path d="M{_n(x)} {_n(bottom)}v-3" stroke="#333333" stroke-width="0.8"/>\n')
    for value in y_axis.minor:
        y = frame.y(y_axis, value)
        out.append(f'<path d="M{_n(frame.left)} {_n(y)}h3" stroke="#333333" stroke-width="0.8"/>\n')
    for value, label in x_axis.major:
        x = frame.x(x_axis, value)
        out.append(
            f'<path d="M{_n(x)} {_n(frame.top)}V{_n(bottom)}" stroke="#dddddd" '
            'stroke-width="0.8"/>\n'
        )
        out.append(f'<path d="M{_n(x)} {_n(bottom)}v-6" stroke="#333333" stroke-width="1"/>\n')
        out.append(text_element(tick_runs(label), x, bottom + 17, "middle") + "\n")
    for value, label in y_axis.major:
        y = frame.y(y_axis, value)
        out.append(
            f'<path d="M{_n(frame.left)} {_n(y)}H{_n(right)}" stroke="#dddddd" '
            'stroke-width="0.8"/>\n'
        )
        out.append(f'<path d="M{_n(frame.left)} {_n(y)}h6" stroke="#333333" stroke-width="1"/>\n')
        out.append(text_element(tick_runs(label), frame.left - 6, y + 4, "end") + "\n")
    return out


def _series(
    frame: _Frame,
    x_axis: Axis,
    y_axis: Axis,
    row: list[tuple[float, float] | None],
    index: int,
    count: int,
) -> list[str]:
    """One series: a polyline per unbroken run, markers staggered between series."""
    look = style(index)
    pixels = [None if p is None else (frame.x(x_axis, p[0]), frame.y(y_axis, p[1])) for p in row]
    runs: list[list[tuple[float, float]]] = [[]]
    for pixel in pixels:
        if pixel is None:
            if runs[-1]:
                runs.append([])
        else:
            runs[-1].append(pixel)
    out = [f'<g class="series" stroke-linejoin="round"><!-- series {index + 1} -->\n']
    for run in runs:
        if len(run) > 1:
            coords = " ".join(f"{_n(x)},{_n(y)}" for x, y in run)
            out.append(
                f'<polyline points="{coords}" fill="none" stroke="{look.colour}" '
                f'stroke-width="1.8"{_dash(look)}/>\n'
            )
    step = marker_step(len(row))
    start = (index * step) // count
    for number, pixel in enumerate(pixels):
        if pixel is not None and (number - start) % step == 0:
            out.append(marker(look.marker, pixel[0], pixel[1], look.colour) + "\n")
    out.append("</g>\n")
    return out


def _legend(data: PlotData, left: float, top: float, dropped: int) -> list[str]:
    out = []
    for index, series in enumerate(data.series):
        look = style(index)
        y = top + index * LEGEND_ROW
        out.append(
            f'<path d="M{_n(left)} {_n(y)}h32" stroke="{look.colour}" stroke-width="1.8"'
            f"{_dash(look)}/>\n"
        )
        out.append(marker(look.marker, left + 16, y, look.colour) + "\n")
        out.append(text_element(title_runs(series.name, series.unit), left + 40, y + 4) + "\n")
    if dropped:
        y = top + len(data.series) * LEGEND_ROW
        note = f"{dropped} values not drawn (not finite, or not positive on a log axis)"
        out.append(text_element([(note, 0)], left, y + 4, extra=' fill="#555555"') + "\n")
    return out
