"""Run the command line: ``python -m worksheet``."""

from worksheet.cli import main

raise SystemExit(main())
