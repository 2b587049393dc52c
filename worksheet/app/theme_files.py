"""Colour themes read from data files (``themes/*.toml``); a broken file is an error value.

A theme file holds ``name``, ``dark`` (true or false), a ``[colours]`` table with textual's
theme colours (``primary`` required) and an optional ``[variables]`` table with the app's
own state colours: ``result-ok``, ``result-failed``, ``result-error``, ``result-stale``.
Missing state colours are taken from ``success``, ``error`` and ``warning``. An optional
``[syntax]`` table colours the calc-cell grammar (``comment``, ``unit``, ``number``,
``verb``, ``keyword``, ``function``, ``name``); missing ones are taken from the theme's
colours. They become the variables ``syntax-comment`` and so on.
"""

from __future__ import annotations

import importlib
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from textual.color import Color, ColorParseError
from textual.theme import Theme

from worksheet.errors import WorksheetError

if TYPE_CHECKING:  # importlib.resources is loaded only for a package that is no folder
    from importlib.resources.abc import Traversable

# The top-level themes/ folder, installed as this package (see pyproject.toml).
THEMES_PACKAGE = "worksheet.themes"
STYLESHEET_NAME = "worksheet.tcss"
BUILT_IN = ("dark", "light", "contrast")

COLOUR_KEYS = (
    "primary",
    "secondary",
    "warning",
    "error",
    "success",
    "accent",
    "foreground",
    "background",
    "surface",
    "panel",
    "boost",
)
STATE_DEFAULTS = {
    "result-ok": "success",
    "result-failed": "error",
    "result-error": "error",
    "result-stale": "warning",
}
FALLBACK = {"success": "#4caf50", "error": "#e53935", "warning": "#ffb300"}
# Grammar kinds of worksheet/app/highlight.py and the theme colour each defaults to.
SYNTAX_DEFAULTS = {
    "comment": "secondary",
    "unit": "success",
    "number": "accent",
    "verb": "primary",
    "keyword": "primary",
    "function": "primary",
    "name": "foreground",
}
SYNTAX_FALLBACK = {
    "secondary": "#8e7cc3",
    "success": "#4caf50",
    "accent": "#e0a458",
    "primary": "#5b9bd5",
    "foreground": "#dcdcdc",
}


@dataclass(frozen=True)
class ThemeLoad:
    """The themes that loaded and one message per file that did not."""

    themes: tuple[Theme, ...]
    problems: tuple[str, ...]


def _colour(value: object, where: str) -> str:
    if not isinstance(value, str):
        raise WorksheetError(f"{where} must be a colour written as text")
    try:
        Color.parse(value)
    except ColorParseError as err:
        raise WorksheetError(f"{where} is not a colour: {value!r}") from err
    return value


def parse_theme(text: str, label: str) -> Theme:
    """A textual Theme from a theme file's text.

    Raises:
        WorksheetError: the text is not TOML or lacks what a theme needs.
    """
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise WorksheetError(f"theme file {label} is not valid TOML: {err}") from err
    name = data.get("name")
    if not isinstance(name, str) or not name.strip():
        raise WorksheetError(f"theme file {label} needs a 'name'")
    colours = data.get("colours", {})
    if not isinstance(colours, dict) or "primary" not in colours:
        raise WorksheetError(f"theme file {label} needs a [colours] table with 'primary'")
    unknown = sorted(set(colours) - set(COLOUR_KEYS))
    if unknown:
        raise WorksheetError(f"theme file {label}: unknown colours {', '.join(unknown)}")
    chosen = {key: _colour(value, f"{label}: colours.{key}") for key, value in colours.items()}
    variables = data.get("variables", {})
    if not isinstance(variables, dict):
        raise WorksheetError(f"theme file {label}: [variables] must be a table")
    extra = {str(k): _colour(v, f"{label}: variables.{k}") for k, v in variables.items()}
    for variable, source in STATE_DEFAULTS.items():
        extra.setdefault(variable, chosen.get(source, FALLBACK[source]))
    syntax = data.get("syntax", {})
    if not isinstance(syntax, dict):
        raise WorksheetError(f"theme file {label}: [syntax] must be a table")
    unknown = sorted(set(syntax) - set(SYNTAX_DEFAULTS))
    if unknown:
        raise WorksheetError(f"theme file {label}: unknown syntax kinds {', '.join(unknown)}")
    for kind, source in SYNTAX_DEFAULTS.items():
        colour = syntax.get(kind)
        extra[f"syntax-{kind}"] = (
            _colour(colour, f"{label}: syntax.{kind}")
            if colour is not None
            else chosen.get(source, SYNTAX_FALLBACK[source])
        )
    dark = data.get("dark", True)
    if not isinstance(dark, bool):
        raise WorksheetError(f"theme file {label}: 'dark' must be true or false")
    return Theme(name=name.strip(), dark=dark, variables=extra, **chosen)


def themes_folder() -> Traversable:
    """The shipped themes, wherever the package is installed (folder, wheel or zip).

    A plain folder is used as such: ``resources.files`` would load its zip support (a few
    milliseconds at start) to hand back the same folder."""
    package = importlib.import_module(THEMES_PACKAGE)
    locations = list(getattr(package.__spec__, "submodule_search_locations", None) or [])
    if len(locations) == 1 and Path(locations[0]).is_dir():
        return Path(locations[0])
    from importlib import resources

    return resources.files(THEMES_PACKAGE)


def read_stylesheet(folder: Traversable | None = None) -> str | None:
    """The app's stylesheet text, or None when it is missing or unreadable."""
    try:
        return (folder or themes_folder()).joinpath(STYLESHEET_NAME).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError, ModuleNotFoundError):
        return None


def read_theme_file(path: Path | Traversable) -> Theme:
    """Read one theme file (raises WorksheetError when it is unreadable or broken)."""
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as err:
        raise WorksheetError(f"cannot read theme file {path.name}: {err}") from err
    return parse_theme(text, path.name)


def load_themes(folder: Path | Traversable | None = None) -> ThemeLoad:
    """Every ``*.toml`` theme in ``folder`` (default: the shipped ones), by file name."""
    themes: list[Theme] = []
    problems: list[str] = []
    try:
        where = folder if folder is not None else themes_folder()
        paths = (
            sorted((p for p in where.iterdir() if p.name.endswith(".toml")), key=lambda p: p.name)
            if where.is_dir()
            else []
        )
    except (OSError, ModuleNotFoundError):
        where, paths = None, []
    if not paths:
        label = where.name if where is not None else THEMES_PACKAGE
        problems.append(f"no theme files found in the folder {label}")
    for path in paths:
        try:
            themes.append(read_theme_file(path))
        except WorksheetError as err:
            problems.append(err.message)
    return ThemeLoad(tuple(themes), tuple(problems))
