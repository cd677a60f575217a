"""The package version (one place; the package and the JSON read it here)."""

__version__ = "0.1.0"
