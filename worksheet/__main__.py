"""Run the command line: ``python -m worksheet``."""

from worksheet.cli import entry

entry()
