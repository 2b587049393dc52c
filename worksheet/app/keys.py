"""The app's key scheme, as data: the footer, the help screen and the palette read it."""

from __future__ import annotations

from dataclasses import dataclass

from textual.binding import Binding


@dataclass(frozen=True)
class KeyAction:
    """A key, the app action it runs, a short label and what it does."""

    key: str
    action: str
    label: str
    description: str
    in_footer: bool = True


KEY_ACTIONS: tuple[KeyAction, ...] = (
    KeyAction("f1", "show_help", "Help", "Show every key and what it does"),
    KeyAction("ctrl+s", "save", "Save", "Save the sheet with fresh results"),
    KeyAction(
        "f2", "find_constant", "Constant", "Find a constant or unit; insert it at the cursor"
    ),
    KeyAction("f3", "toggle_note", "Edit note", "Edit the chosen note, or show it rendered again"),
    KeyAction("f4", "switch_panel", "Panel", "Move between the sheet and the quantity ledger"),
    KeyAction("f6", "next_theme", "Theme", "Switch to the next colour theme", False),
    KeyAction("ctrl+r", "rerun", "Run", "Run the sheet again now", False),
    KeyAction("ctrl+z", "undo", "Undo", "Undo the last edit or cell change", False),
    KeyAction("ctrl+y", "redo", "Redo", "Redo what was undone", False),
    KeyAction("alt+c", "add_calc", "New calc", "Add a calc cell below the chosen cell", False),
    KeyAction("alt+n", "add_note", "New note", "Add a note below the chosen cell", False),
    KeyAction(
        "alt+x", "delete_cell", "Delete", "Delete the chosen cell (undo brings it back)", False
    ),
    KeyAction("alt+up", "move_up", "Move up", "Move the chosen cell up", False),
    KeyAction("alt+down", "move_down", "Move down", "Move the chosen cell down", False),
    KeyAction("ctrl+q", "leave", "Quit", "Quit (asks when there are unsaved edits)"),
)


def app_bindings() -> list[Binding]:
    """Bindings for the app; priority so that editors do not swallow them."""
    return [
        Binding(k.key, k.action, k.label, show=k.in_footer, priority=True, tooltip=k.description)
        for k in KEY_ACTIONS
    ]
