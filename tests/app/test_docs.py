"""The app's README material: every key is documented, the screenshot is a real one."""

from __future__ import annotations

from pathlib import Path

from worksheet.app.keys import KEY_ACTIONS
from worksheet.app.screens.help import EXTRA_KEYS

DOCS = Path(__file__).resolve().parents[2] / "docs"


def test_the_doc_lists_every_key() -> None:
    text = (DOCS / "app.md").read_text(encoding="utf-8")
    rows = {
        line.split("|")[1].strip().strip("`"): line.split("|")[2].strip()
        for line in text.splitlines()
        if line.startswith("| `")
    }
    for key in KEY_ACTIONS:
        assert rows.get(key.key) == key.description, key.key
    for key, description in EXTRA_KEYS:
        assert rows.get(key) == description, key


def test_screenshot_is_an_svg_of_the_demo_sheet_at_100_columns() -> None:
    text = (DOCS / "screenshot.svg").read_text(encoding="utf-8")
    assert text.lstrip().startswith("<svg")
    assert "Kestrel&#160;Ridge" in text or "Kestrel Ridge" in text
    assert "/tmp" not in text and "/work" not in text  # no paths of this machine
