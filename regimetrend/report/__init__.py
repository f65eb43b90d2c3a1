"""The report an analyst hands to management: HTML with inline charts, PNG charts, CSV and
workbook tables, and the full result as JSON. It reads the analysis; it computes no statistics.

``write_report(analysis, folder) -> {output name: path}``; see ``writer`` for the file names.
"""

from .writer import write_report

__all__ = ["write_report"]
