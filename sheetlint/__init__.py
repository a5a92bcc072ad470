"""sheetlint: physical-consistency checks for permanent-magnet synchronous machine datasheets."""

__version__ = "0.1.0"
