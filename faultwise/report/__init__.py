"""Job and review reports (markdown and HTML) and their SVG charts.

The names below are re-exported from :mod:`faultwise.report.job` so that the old
``from faultwise.report import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.report.job import (JobReport, LEAKAGE_STATEMENT, NOT_LINE_CONNECTED, ReportStep,
                                  SAFETY_STATEMENT, band_text, find_case, job_report,
                                  job_report_markdown, minutes_text, read_case, reading_text,
                                  review_text, when_text)

__all__ = [
    "JobReport",
    "LEAKAGE_STATEMENT",
    "NOT_LINE_CONNECTED",
    "ReportStep",
    "SAFETY_STATEMENT",
    "band_text",
    "find_case",
    "job_report",
    "job_report_markdown",
    "minutes_text",
    "read_case",
    "reading_text",
    "review_text",
    "when_text",
]
