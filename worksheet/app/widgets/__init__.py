"""The app's widgets, one a module."""
