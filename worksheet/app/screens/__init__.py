"""The app's modal screens, one a module; each hands back a typed answer."""
