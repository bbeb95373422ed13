"""The two views of a :class:`faultwise.report.model.JobReport`, as Markdown and as HTML.

Templates live in ``faultwise/templates`` (package data) and are rendered with Jinja2.
Why a template library: four documents (bench and customer copy, each in Markdown and
HTML) share one model, and every piece of case text must be escaped in each. Jinja2
escapes every ``{{ }}`` of the HTML templates (autoescape), and the Markdown environment
passes every ``{{ }}`` through :func:`md_text` (``finalize``), so a template cannot forget
to escape. Both also make control characters visible (:mod:`faultwise.core.safe_text`).

The HTML is one self-contained printable file (inline CSS and SVG, no script, nothing that
names a URL). Its CSS keeps a heading with what follows it and keeps short sections whole,
so that each view prints on one or two A4 or Letter pages with no page ending on a heading.
No UI imports.
"""

from __future__ import annotations

from functools import lru_cache

from faultwise.report.formats import (LEAKAGE_STATEMENT, NOT_LINE_CONNECTED, SAFETY_STATEMENT,
                                      minutes_text, when_text)
from faultwise.report.model import JobReport

OUTCOME_WORDS = {"repaired": "Repaired", "returned-unrepaired": "Returned without a repair",
                 "waiting-parts": "In the shop, waiting for parts"}
SAFETY_WORDS = {
    "passed": "Passed: every exposed metal part was tested for leakage to earth, with the "
              "plug one way and then reversed.",
    "failed": "NOT passed: the set must not be used until the shop has put this right.",
    "not recorded": "Not made yet: the set is not ready to go back.",
    "not needed": "Not needed: this set runs from batteries.",
}
LEAKAGE_RESULT = {
    "passed": "Result: passed.",
    "failed": "Result: NOT passed: the set must not go back to its owner.",
    "not recorded": "NOT RECORDED: a mains-powered set must pass the leakage check before it "
                    "goes back to its owner.",
}


def md_text(value: object) -> str:
    """Case text made safe inside a Markdown table cell or line (no control characters)."""
    from faultwise.core.safe_text import one_line

    if value is None:
        return ""
    return one_line(value).replace("\\", "\\\\").replace("|", "\\|") \
        .replace("<", "&lt;").replace(">", "&gt;")


def _shown(value: object) -> str:
    from faultwise.core.safe_text import shown_text

    if hasattr(value, "__html__"):          # markup built here (the stage map, the CSS)
        return value
    return "" if value is None else shown_text(value)


@lru_cache(maxsize=2)
def _env(kind: str):
    import jinja2

    loader = jinja2.PackageLoader("faultwise", "templates")
    if kind == "html":
        return jinja2.Environment(loader=loader, autoescape=True, finalize=_shown,
                                  undefined=jinja2.StrictUndefined)
    return jinja2.Environment(loader=loader, autoescape=False, finalize=md_text,
                              trim_blocks=True, lstrip_blocks=True, keep_trailing_newline=True,
                              undefined=jinja2.StrictUndefined)


@lru_cache(maxsize=1)
def _css() -> str:
    from importlib.resources import files

    return files("faultwise").joinpath("templates", "report.css").read_text(encoding="utf-8")


def _context(r: JobReport) -> dict:
    return dict(r=r, when=when_text, minutes=minutes_text,
                outcome=OUTCOME_WORDS.get(r.outcome, "Not finished yet"),
                safety=SAFETY_WORDS.get(r.leakage_state, r.leakage_state),
                leakage_result=LEAKAGE_RESULT.get(r.leakage_state, ""),
                not_mains=NOT_LINE_CONNECTED, safety_statement=SAFETY_STATEMENT,
                leakage_statement=LEAKAGE_STATEMENT)


def _tidy_markdown(text: str) -> str:
    """At most one blank line in a row, one newline at the end."""
    out: list[str] = []
    for line in text.splitlines():
        if line.strip() or (out and out[-1].strip()):
            out.append(line.rstrip() if not line.endswith("  ") else line)
    return "\n".join(out).strip("\n") + "\n"


def bench_markdown(r: JobReport) -> str:
    """The bench copy: steps 1..n with what was typed or chosen, bands, results, node ids."""
    return _tidy_markdown(_env("md").get_template("bench.md.j2").render(**_context(r)))


def customer_markdown(r: JobReport) -> str:
    """The customer copy: no node ids, no bands, no keys."""
    return _tidy_markdown(_env("md").get_template("customer.md.j2").render(**_context(r)))


def bench_html(r: JobReport) -> str:
    """The bench copy as one printable page, with the receiver's stage map."""
    from markupsafe import Markup

    from faultwise.report.svg import stage_map_svg

    svg = Markup(stage_map_svg(dict(r.stages), f"Stage map of case {r.case_id}"))
    return _env("html").get_template("bench.html.j2").render(
        title=f"Job report {r.case_id}", css=Markup(_css()), stage_map=svg, **_context(r))


def customer_html(r: JobReport) -> str:
    """The customer copy as one printable page."""
    from markupsafe import Markup

    return _env("html").get_template("customer.html.j2").render(
        title=f"Repair report {r.case_id}", css=Markup(_css()), **_context(r))
