"""Job and review reports (markdown and HTML) and their SVG charts.

The job report is one model (:mod:`faultwise.report.model`) rendered to a bench copy and a
customer copy (:mod:`faultwise.report.render`). The names below are re-exported so that
``from faultwise.report import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.report.formats import (LEAKAGE_STATEMENT, NOT_LINE_CONNECTED, SAFETY_STATEMENT,
                                      band_text, minutes_text, number, when_text)
from faultwise.report.job import (find_case, job_report, job_report_markdown, read_case,
                                  review_text)
from faultwise.report.model import JobReport

__all__ = [
    "JobReport",
    "LEAKAGE_STATEMENT",
    "NOT_LINE_CONNECTED",
    "SAFETY_STATEMENT",
    "band_text",
    "find_case",
    "job_report",
    "job_report_markdown",
    "minutes_text",
    "number",
    "read_case",
    "review_text",
    "when_text",
]
