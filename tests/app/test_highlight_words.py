"""The highlighter's word lists match the language the engine understands."""

from __future__ import annotations

from worksheet.app import highlight
from worksheet.engine import translate


def test_every_verb_and_function_of_the_engine_is_coloured():
    # The engine's verbs, functions and other calls (natural, sqrt, abs, min, max): each
    # must be in one of the highlighter's lists, so a new one cannot silently go uncoloured
    # (`log` is coloured as a keyword, the word of logarithmic sweeps).
    coloured = highlight.VERBS | highlight.FUNCTIONS | highlight.KEYWORDS
    missing = (translate.VERBS | set(translate.FUNCTIONS) | translate.OTHER_CALLS) - coloured
    assert not missing, missing


def test_the_highlighter_colours_no_call_the_engine_does_not_know():
    known = translate.VERBS | set(translate.FUNCTIONS) | translate.OTHER_CALLS
    assert (highlight.VERBS | highlight.FUNCTIONS) - known == set()
