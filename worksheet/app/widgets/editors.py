"""Is this widget an editor? Asked without loading the editors' module.

The first paint has no editor (calc cells are drawn by stand-ins, notes as text), so the
TextArea module loads after it; until it is loaded, no widget can be an editor.
"""

from __future__ import annotations

import sys

TEXT_AREA_MODULE = "textual.widgets._text_area"
CALC_EDITOR_MODULE = "worksheet.app.widgets.calc_editor"


def is_text_area(widget: object) -> bool:
    module = sys.modules.get(TEXT_AREA_MODULE)
    return module is not None and isinstance(widget, module.TextArea)


def is_calc_editor(widget: object) -> bool:
    module = sys.modules.get(CALC_EDITOR_MODULE)
    return module is not None and isinstance(widget, module.CalcEditor)
