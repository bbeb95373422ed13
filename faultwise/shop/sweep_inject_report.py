"""Formatting of the injected sweep (:mod:`faultwise.shop.sweep_inject`): JSON, text, HTML table."""

from __future__ import annotations

from html import escape
from typing import TYPE_CHECKING

from faultwise.core.safe_text import one_line as plain

if TYPE_CHECKING:
    from faultwise.shop.sweep_inject import InjectReport, InjectWalk, OptimalRow


def _r(x: float | None, nd: int = 2) -> float | None:
    return None if x is None else round(float(x), nd)


def inject_to_dict(rep: InjectReport) -> dict:
    """The ``sweep --inject --json`` document (DESIGN section 10)."""
    bw = rep.band_walks
    worst = max(rep.optimal, key=lambda r: r.ratio or 0.0, default=None)
    return {
        "inject": {
            "sets": len(rep.sets), "set_names": list(rep.sets),
            "modelled_faults": rep.modelled_faults, "faults": rep.faults,
            "walks": len(rep.walks), "found": rep.found,
            "wrong": [{"set": w.set_name, "fault": w.fault, "symptom": w.symptom,
                       "concluded": w.concluded, **({"error": w.error} if w.error else {})}
                      for w in rep.wrong],
            "missed": [{"set": w.set_name, "fault": w.fault, "symptom": w.symptom,
                        "escalate": w.escalate} for w in rep.missed],
            "explained": [{"set": w.set_name, "fault": w.fault, "symptom": w.symptom,
                           "escalate": w.escalate,
                           "found_by": rep.known[(w.set_name, w.fault)].found_by,
                           "reason": rep.known[(w.set_name, w.fault)].reason}
                          for w in rep.explained],
            "healthy_walks": len(rep.healthy),
            "healthy_blamed": [{"set": h.set_name, "symptom": h.symptom,
                                "concluded": h.concluded} for h in rep.healthy_blamed],
            "not_applicable": [{"set": s, "fault": f, "reason": why}
                               for s, f, why in rep.skipped],
            "band_pass": {"seed": rep.seed, "walks": len(bw),
                          "found": sum(1 for w in bw if w.found),
                          "not_found": [{"set": w.set_name, "fault": w.fault, "symptom": w.symptom,
                                         "concluded": w.concluded, "escalate": w.escalate}
                                        for w in bw if not w.found]},
            "results": [{"set": w.set_name, "fault": w.fault, "symptom": w.symptom,
                         "result": _result(w), "checks": w.checks, "minutes": _r(w.minutes)}
                        for w in rep.walks],
        },
        "optimal": [{"symptom": r.symptom, "family": r.family, "sets": r.sets, "faults": r.faults,
                     "minutes": _r(r.minutes), "optimal_minutes": _r(r.optimal_minutes),
                     "free_optimal_minutes": _r(_free(r)),
                     "ratio": _r(r.ratio, 3), "entropy_bits": _r(r.entropy_bits, 3),
                     "known_cause_minutes": _r(r.known_cause_minutes),
                     "found": _r(r.found, 3), "exact": r.exact} for r in rep.optimal],
        "optimal_worst": None if worst is None else
        {"symptom": worst.symptom, "family": worst.family, "ratio": _r(worst.ratio, 3)},
        "ok": rep.ok,
    }


def _result(w: InjectWalk) -> str:
    if w.error:
        return f"error: {w.error}"
    if w.found:
        return f"found after {w.checks} checks"
    if w.concluded:
        return f"wrong: {w.concluded}"
    return f"missed: {w.escalate or 'cleared'}"


def inject_text(rep: InjectReport) -> str:
    lines = [f"Injected sweep: {rep.faults} of {rep.modelled_faults} modelled faults walked on "
             f"{len(rep.sets)} sets; {len(rep.walks)} walks, {rep.found} found, "
             f"{len(rep.wrong)} wrong, {len(rep.missed)} missed, {len(rep.explained)} explained "
             "(readings alone cannot find them: inject_known.yaml)."]
    for w in rep.wrong:
        lines.append(f"  WRONG  {w.set_name}  {w.fault} ({w.symptom}): concluded "
                     f"{w.concluded or w.error}")
    for w in rep.missed:
        lines.append(f"  MISSED {w.set_name}  {w.fault} ({w.symptom}): ran out at "
                     f"{w.escalate or 'cleared'}")
    for (set_name, fault), k in sorted(rep.known.items()):
        if any(w.set_name == set_name and w.fault == fault for w in rep.explained):
            lines.append(f"  known  {set_name}  {fault}: found by {k.found_by}")
    lines.append(f"Healthy sets: {len(rep.healthy)} complaint walks, "
                 f"{len(rep.healthy_blamed)} blamed a part.")
    for h in rep.healthy_blamed:
        lines.append(f"  BLAMED {h.set_name}  {h.symptom}: concluded {h.concluded}")
    bw = rep.band_walks
    if bw:
        lines.append(f"Band pass (readings drawn within the faulty band, seed {rep.seed}): "
                     f"{sum(1 for w in bw if w.found)} of {len(bw)} found.")
    if rep.skipped:
        lines.append(f"Not applicable: {len(rep.skipped)} (set, fault) pairs whose model names "
                     "a part the set lacks.")
    if rep.optimal:
        lines.append("")
        lines.append("p/c order against the optimal order (expected minutes, prior-weighted; "
                     "optimal: the best order opening as the complaint does; free: the best "
                     "opening anywhere):")
        lines.append(f"  {'complaint':28} {'family':14} {'found':>6} {'p/c':>7} {'optimal':>8} "
                     f"{'ratio':>6} {'free':>6} {'bits':>5} {'known':>6}")
        for r in rep.optimal:
            ratio = f"{r.ratio:.3f}" if r.ratio else "-"
            mark = "" if r.exact else " *"
            lines.append(f"  {r.symptom:28} {r.family:14} {r.found * 100:5.0f}% {r.minutes:7.1f} "
                         f"{r.optimal_minutes:8.1f} {ratio:>6} {_free(r):6.1f} "
                         f"{r.entropy_bits:5.2f} "
                         f"{r.known_cause_minutes:6.1f}{mark}")
        if not all(r.exact for r in rep.optimal):
            lines.append("  * too many hypotheses for the exhaustive search: the restricted "
                         "search's policy (an upper bound on the optimum)")
        worst = max(rep.optimal, key=lambda r: r.ratio or 0.0)
        within = sum(1 for r in rep.optimal if (r.ratio or 1.0) <= 1.10)
        lines.append(f"  {within} of {len(rep.optimal)} complaint/family pairs within 10 % of "
                     f"the optimum; worst: {worst.symptom} ({worst.family}), ratio "
                     f"{worst.ratio or 0:.3f}")
    return "\n".join(plain(x) for x in lines) + "\n"



def _free(r: OptimalRow) -> float:
    return r.optimal_minutes if r.free_minutes is None else r.free_minutes


def failure_sentence(rep: InjectReport) -> str:
    if rep.ok:
        return ""
    return (f"the injected sweep found {len(rep.wrong)} wrong conclusions, {len(rep.missed)} "
            f"missed faults and {len(rep.healthy_blamed)} healthy walks that blamed a part; "
            "fix the graph (band, route, outcome) or the fault model")


def inject_html(rep: InjectReport) -> str:
    """One table per complaint: found %, mean minutes, optimum, ratio, per family."""
    if not rep.optimal:
        return ""
    out = ["<section><h2>Injected faults and the optimal order</h2>",
           f"<p>{rep.found} of {len(rep.walks)} injected walks found the fault on "
           f"{len(rep.sets)} sets; {len(rep.healthy_blamed)} healthy walks blamed a part.</p>"]
    for sym in sorted({r.symptom for r in rep.optimal}):
        out.append(f"<h3>{escape(sym)}</h3><table><thead><tr><th>family</th><th>found</th>"
                   "<th>mean minutes</th><th>optimal minutes</th><th>ratio</th>"
                   "<th>free optimum</th></tr></thead><tbody>")
        for r in rep.optimal:
            if r.symptom != sym:
                continue
            ratio = f"{r.ratio:.3f}" if r.ratio else "-"
            out.append(f"<tr><td>{escape(r.family)}</td><td>{r.found * 100:.0f} %</td>"
                       f"<td>{r.minutes:.1f}</td><td>{r.optimal_minutes:.1f}</td>"
                       f"<td>{ratio}</td><td>{_free(r):.1f}</td></tr>")
        out.append("</tbody></table>")
    out.append("</section>")
    return "\n".join(out)
