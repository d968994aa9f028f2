"""The package version (one place; ``infoscope.__version__`` re-exports it)."""

__version__ = "0.1.0"
