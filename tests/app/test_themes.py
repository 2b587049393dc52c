"""Themes are data files; switching works; a broken file is reported, not fatal."""

from __future__ import annotations

from pathlib import Path

import pytest

from worksheet.app.app import WorksheetApp
from worksheet.app.theme_files import (
    BUILT_IN,
    STYLESHEET_NAME,
    load_themes,
    parse_theme,
    themes_folder,
)
from worksheet.errors import WorksheetError


def test_shipped_themes_load_without_problems() -> None:
    loaded = load_themes()
    assert loaded.problems == ()
    assert sorted(theme.name for theme in loaded.themes) == sorted(BUILT_IN)
    for theme in loaded.themes:
        assert {"result-ok", "result-failed", "result-error", "result-stale"} <= set(
            theme.variables
        )


def test_stylesheet_uses_no_literal_colours() -> None:
    # STYLE habit 5: colours only through theme variables.
    text = themes_folder().joinpath(STYLESHEET_NAME).read_text(encoding="utf-8")
    assert "#" not in text.replace("#title", "").replace("#body", "").replace("#sheet", "").replace(
        "#side", ""
    ).replace("#ledger", "").replace("#links", "").replace("#finder-matches", "")


@pytest.mark.parametrize(
    "text",
    [
        "name = 'x'\n[colours]\nprimary = 'not a colour'\n",  # bad colour
        "[colours]\nprimary = '#112233'\n",  # no name
        "name = 'x'\n",  # no primary colour
        "name = 'x'\n[colours]\nprimary = '#112233'\nsparkle = '#000000'\n",  # unknown key
        "name = 'x'\ndark = 'yes'\n[colours]\nprimary = '#112233'\n",  # dark not a boolean
        "name = \n",  # not TOML
    ],
)
def test_broken_theme_text_is_an_error(text: str) -> None:
    with pytest.raises(WorksheetError):
        parse_theme(text, "test.toml")


def test_state_colours_default_from_theme_colours() -> None:
    theme = parse_theme(
        "name = 'mine'\n[colours]\nprimary = '#102030'\nerror = '#ff0000'\n", "mine.toml"
    )
    assert theme.variables["result-error"] == "#ff0000"
    assert theme.variables["result-failed"] == "#ff0000"


def test_switch_theme_in_the_app(basic_sheet: Path, ui) -> None:
    app = WorksheetApp(str(basic_sheet), theme="light")

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert app.theme == "light"
        seen = {app.theme}
        for _ in BUILT_IN:
            await pilot.press("f6")
            await pilot.pause(0.05)
            seen.add(app.theme)
        assert seen == set(BUILT_IN)
        assert app.theme == "light"  # back where it started

    ui.drive(app, scenario)


def test_broken_theme_file_is_reported_not_fatal(basic_sheet: Path, tmp_path: Path, ui) -> None:
    broken = tmp_path / "broken.toml"
    broken.write_text("name = 'broken'\n[colours]\nprimary = 'no such colour'\n", encoding="utf-8")
    app = WorksheetApp(str(basic_sheet), theme=str(broken))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert app.is_running
        assert app.theme == "dark"
        assert any("broken.toml" in problem for problem in app.problems)

    ui.drive(app, scenario)


def test_theme_from_a_file(basic_sheet: Path, tmp_path: Path, ui) -> None:
    mine = tmp_path / "mine.toml"
    mine.write_text(
        "name = 'mine'\ndark = false\n[colours]\nprimary = '#204080'\n", encoding="utf-8"
    )
    app = WorksheetApp(str(basic_sheet), theme=str(mine))

    async def scenario(pilot, app: WorksheetApp) -> None:
        await ui.settle(pilot, app)
        assert app.theme == "mine"
        assert app.problems == []

    ui.drive(app, scenario)
