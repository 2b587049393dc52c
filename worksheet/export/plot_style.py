"""One look for every plot writer: a fixed palette, dash patterns and marker shapes.

Each series differs from the others in colour *and* dash *and* marker, so curves stay
apart in grey print and for readers who do not see the colours. The colours are the
Okabe-Ito set (readable with the common colour-vision deficiencies), black last.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class SeriesStyle:
    """How series number ``i`` is drawn, spelled for each writer."""

    colour: str  # "#rrggbb"
    dash: tuple[float, ...]  # on/off lengths in points; () is a solid line
    marker: str  # circle | square | triangle | diamond | down | cross | plus

    @property
    def rgb(self) -> tuple[int, int, int]:
        value = int(self.colour[1:], 16)
        return value >> 16, (value >> 8) & 0xFF, value & 0xFF


STYLES: tuple[SeriesStyle, ...] = (
    SeriesStyle("#0072b2", (), "circle"),
    SeriesStyle("#d55e00", (6.0, 3.0), "square"),
    SeriesStyle("#009e73", (2.0, 2.0), "triangle"),
    SeriesStyle("#cc79a7", (8.0, 3.0, 2.0, 3.0), "diamond"),
    SeriesStyle("#e69f00", (1.0, 3.0), "down"),
    SeriesStyle("#56b4e9", (10.0, 4.0), "cross"),
    SeriesStyle("#000000", (4.0, 2.0, 1.0, 2.0), "plus"),
)
"""As many styles as the engine allows series in one plot (seven)."""

MAX_MARKERS = 12
"""At most this many markers per series, so dense sweeps stay readable."""


def style(index: int) -> SeriesStyle:
    return STYLES[index % len(STYLES)]


def marker_step(points: int) -> int:
    """Draw a marker on every n-th point so a series shows at most ``MAX_MARKERS``.

    >>> marker_step(40), marker_step(12), marker_step(1)
    (4, 1, 1)
    """
    return max(1, -(-points // MAX_MARKERS))


def axis_title(name: str, unit: str) -> str:
    """``M [kg]``: a quantity's name with its unit, as the text chart writes it."""
    return name + (f" [{unit}]" if unit else "")
