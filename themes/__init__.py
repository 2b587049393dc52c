"""The app's colour themes and stylesheet, as data; installed as ``worksheet.themes``.

The folder stays at the top of the repository; pyproject.toml maps it into the package so
that ``importlib.resources`` finds the files in an editable install and in a wheel alike.
"""
