"""The key hints under the sheet: one line of text, drawn like textual's footer.

textual's ``Footer`` makes a widget per key and rebuilds them whenever the focus moves; at
the app's first paint those widgets cost more than the whole sheet. This draws the same
hints (the screen's shown bindings, the command palette key on the right) as one line,
and a click on a hint presses its key, as the footer does.
"""

from __future__ import annotations

from dataclasses import dataclass

from textual import events
from textual.content import Content
from textual.widget import Widget

# Styles of textual's footer keys, by the same theme variables.
KEY_STYLE = "bold $footer-key-foreground on $footer-key-background"
DESCRIPTION_STYLE = "$footer-description-foreground on $footer-description-background"
DISABLED = " dim"
HOVER_STYLE = "on $block-hover-background"
# The command palette key's left edge (textual's footer draws it as a ``vkey`` border).
PALETTE_EDGE = ("▏", "$foreground 20%")


@dataclass(frozen=True)
class Hint:
    """One shown key: what is drawn, the key it presses, whether it is enabled, its tip."""

    key: str
    display: str
    description: str
    enabled: bool
    tooltip: str

    @property
    def width(self) -> int:
        return len(self.text)

    @property
    def text(self) -> str:
        return f" {self.display} {self.description} "


class KeyHints(Widget, can_focus=False):
    """The shown bindings of its screen in one line; follows the screen's binding changes."""

    ALLOW_SELECT = False
    DEFAULT_CSS = """
    KeyHints {
        dock: bottom;
        height: 1;
        color: $footer-foreground;
        background: $footer-background;
    }
    """

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)  # type: ignore[arg-type]
        self._hints: tuple[Hint, ...] = ()
        self._palette: Hint | None = None
        self._hover: Hint | None = None

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, self._bindings_changed)
        self._read_bindings()

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def _bindings_changed(self, _screen: object) -> None:
        self._read_bindings()

    def _read_bindings(self) -> None:
        """The hints textual's footer would show for this screen, in its order."""
        app = self.app
        active = self.screen.active_bindings
        hints: list[Hint] = []
        seen_actions: set[str] = set()
        for _node, binding, enabled, tooltip in active.values():
            if not binding.show or binding.action in seen_actions:
                continue
            seen_actions.add(binding.action)
            hints.append(
                Hint(
                    binding.key,
                    app.get_key_display(binding),
                    binding.description,
                    enabled,
                    tooltip or binding.description,
                )
            )
        palette = None
        if app.ENABLE_COMMAND_PALETTE and app.COMMAND_PALETTE_BINDING in active:
            _node, binding, enabled, tooltip = active[app.COMMAND_PALETTE_BINDING]
            palette = Hint(
                binding.key,
                app.get_key_display(binding),
                binding.description,
                enabled,
                binding.tooltip or binding.description,
            )
        hints_now = tuple(hints)
        if hints_now != self._hints or palette != self._palette:
            self._hints, self._palette = hints_now, palette
            self.refresh()

    @property
    def hints(self) -> tuple[Hint, ...]:
        """The hints on the left, then the command palette key if it is shown."""
        return self._hints + ((self._palette,) if self._palette is not None else ())

    def _placed(self) -> list[tuple[int, Hint]]:
        """Where each hint starts on the line (the palette key at the right edge)."""
        placed: list[tuple[int, Hint]] = []
        x = 0
        for hint in self._hints:
            placed.append((x, hint))
            x += hint.width
        if self._palette is not None:
            # The palette text is drawn without its leading space, after the edge mark.
            start = max(x, self.size.width - self._palette.width)
            placed.append((start, self._palette))
        return placed

    def _parts(self, hint: Hint) -> list[tuple[str, str]]:
        dim = "" if hint.enabled else DISABLED
        hover = f" {HOVER_STYLE}" if hint is self._hover else ""
        return [
            (f" {hint.display} ", KEY_STYLE + dim + hover),
            (f"{hint.description} ", DESCRIPTION_STYLE + dim + hover),
        ]

    def render(self) -> Content:
        parts: list[tuple[str, str] | str] = []
        x = 0
        for start, hint in self._placed():
            key, description = self._parts(hint)
            if hint is self._palette:
                # As textual draws it: the edge, the key, then " description" and a space.
                parts.append(" " * (start - x))
                parts.append(PALETTE_EDGE)
                parts.append((hint.display, key[1]))
                parts.append((f" {hint.description}", description[1]))
                parts.append(" ")
            else:
                parts.extend([key, description])
            x = start + hint.width
        return Content.assemble(*parts)

    def hint_at(self, x: int) -> Hint | None:
        """The hint drawn at column ``x``, if any."""
        for start, hint in self._placed():
            if start <= x < start + hint.width:
                return hint
        return None

    def on_mouse_move(self, event: events.MouseMove) -> None:
        hint = self.hint_at(event.x)
        if hint is not self._hover:
            self._hover = hint
            self.tooltip = hint.tooltip if hint is not None else None
            self.refresh()

    def on_leave(self, _event: events.Leave) -> None:
        if self._hover is not None:
            self._hover = None
            self.refresh()

    def on_mouse_down(self, event: events.MouseDown) -> None:
        hint = self.hint_at(event.x)
        if hint is None:
            return
        if hint.enabled:
            self.app.simulate_key(hint.key)
        else:
            self.app.bell()
