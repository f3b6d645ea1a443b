"""The package version, written here only (the build reads it from this file)."""

__all__ = ["__version__"]

__version__ = "0.1.0"
