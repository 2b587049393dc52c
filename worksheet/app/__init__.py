"""The terminal app of worksheet; ``launch`` opens one sheet in it."""

from __future__ import annotations


def launch(path: str, theme: str | None = None) -> int:
    """Run the app on ``path`` (a new sheet if missing) and return its exit code.

    textual is imported here, not at package import, so the command line stays light.
    """
    from worksheet.app.app import WorksheetApp

    app = WorksheetApp(path, theme=theme)
    try:
        app.run()
    finally:
        app.close_service()
    return app.return_code or 0
