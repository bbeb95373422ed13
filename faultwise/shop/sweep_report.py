"""Text and JSON forms of a :class:`faultwise.shop.sweep_results.SweepReport` (no printing here)."""

from __future__ import annotations

from faultwise.shop.sweep_orders import BASELINES
from faultwise.shop.sweep_results import LearningCheck, PairFigures, SweepReport, SweepWalk


def _r(x: float | None, digits: int = 3) -> float | None:
    return None if x is None else round(float(x), digits)


def path_text(walk: SweepWalk) -> str:
    """The path as 'node: outcome -> node: outcome -> end'."""
    steps = [f"{s.node}: {s.outcome}" for s in walk.path]
    return " -> ".join(steps + [walk.ended_at()])


def walk_to_dict(walk: SweepWalk) -> dict:
    return {
        "symptom": walk.symptom, "family": walk.family, "fault": walk.fault,
        "set": walk.set_name, "concluded": walk.concluded, "escalate": walk.escalate,
        "checks": walk.checks, "minutes": _r(walk.minutes),
        "path": [{"node": s.node, "outcome": s.outcome, "value": _r(s.value, 6)}
                 for s in walk.path],
        **({"error": walk.error} if walk.error else {}),
    }


def pair_to_dict(pair: PairFigures) -> dict:
    return {
        "symptom": pair.symptom, "family": pair.family, "walks": pair.walks,
        "isolated": pair.isolated, "faults": len(pair.weights),
        "mean_checks": _r(pair.mean_checks), "entropy_bits": _r(pair.entropy_bits),
        "ratio": _r(pair.ratio), "mean_minutes": _r(pair.mean_minutes),
        "known_cause_minutes": _r(pair.known_cause_minutes),
        "baselines": {k: _r(v) for k, v in pair.baselines.items()},
        "weights": {k: _r(v, 6) for k, v in pair.weights.items()},
        "unswept": list(pair.unswept),
    }


def learning_to_dict(check: LearningCheck | None) -> dict | None:
    if check is None:
        return None
    return {
        "method": check.method, "cases": check.cases, "earlier": check.earlier,
        "later": check.later, "split": check.split, "walked": check.walked,
        "mean_checks_prior": _r(check.mean_checks_prior),
        "mean_checks_learned": _r(check.mean_checks_learned),
        "mean_minutes_prior": _r(check.mean_minutes_prior),
        "mean_minutes_learned": _r(check.mean_minutes_learned),
        "isolated_prior": check.isolated_prior, "isolated_learned": check.isolated_learned,
        "counts": check.counts,
        "skipped": [{"case": c, "reason": r} for c, r in check.skipped],
    }


def sweep_to_dict(report: SweepReport) -> dict:
    """The --json document (DESIGN section 10 keys first)."""
    return {
        "signatures": report.signatures,
        "isolated": report.isolated,
        "mean_checks": _r(report.mean_checks),
        "entropy_bits": _r(report.entropy_bits),
        "ratio": _r(report.ratio),
        "mean_minutes": _r(report.mean_minutes),
        "known_cause_minutes": _r(report.known_cause_minutes),
        "baselines": ({k: _r(v) for k, v in report.baselines.items()}
                      if report.baselines is not None else None),
        "random_seed": report.random_seed,
        "baseline_isolated": {k: sum(1 for w in ws if w.isolated)
                              for k, ws in report.baseline_walks.items()},
        "failures": [walk_to_dict(w) for w in report.failures],
        "pairs": [pair_to_dict(p) for p in report.pairs],
        "sets": {k: list(v) for k, v in report.sets.items()},
        "no_set": {n.family: list(n.faults) for n in report.no_set},
        "unreachable": [{"fault": u.fault, "symptom": u.symptom, "family": u.family}
                        for u in report.unreachable],
        "learning": learning_to_dict(report.learning),
    }


def _num(x: float | None, width: int, digits: int = 2) -> str:
    return f"{'-':>{width}}" if x is None else f"{x:{width}.{digits}f}"


def sweep_text(report: SweepReport, *, learning: bool = False) -> str:
    """A readable table per pair, the failures with their paths, and the overall line."""
    names = BASELINES if report.baselines is not None else ()
    short = {"written": "written", "speaker-back": "spk-back", "random": "random"}
    head = (f"{'symptom':<22} {'family':<13} {'found':>7} {'checks':>6} {'bits':>5} "
            f"{'ratio':>5} {'min':>6} {'known':>6}" + "".join(f" {short[n]:>8}" for n in names))
    lines = ["Sweep: every fault signature through the graph", "",
             "sets: " + "; ".join(f"{fam}: {', '.join(s)}" for fam, s in sorted(report.sets.items())),
             "", head, "-" * len(head)]
    for p in report.pairs:
        found = f"{p.isolated}/{p.walks}"
        lines.append(f"{p.symptom:<22} {p.family:<13} {found:>7} {p.mean_checks:6.2f} "
                     f"{p.entropy_bits:5.2f} {_num(p.ratio, 5)} {p.mean_minutes:6.1f} "
                     f"{p.known_cause_minutes:6.1f}"
                     + "".join(f" {p.baselines[n]:8.2f}" for n in names))
    lines.append("")
    failures = report.failures
    if failures:
        lines.append(f"Not isolated ({len(failures)}):")
        for w in failures:
            lines.append(f"  {w.fault} for {w.symptom} on {w.family} ({w.set_name}):")
            lines.append(f"    {path_text(w)}")
        lines.append("")
    for gap in report.no_set:
        lines.append(f"note: {len(gap.faults)} fault(s) of the {gap.family} family apply on none "
                     f"of its demo sets, so they were not walked: {', '.join(gap.faults)}")
    if report.unreachable:
        lines.append(f"note: {len(report.unreachable)} prior(s) name a symptom whose walk "
                     "cannot reach the fault:")
        for u in report.unreachable:
            lines.append(f"  {u.fault}: {u.symptom} on {u.family}")
    if report.baselines is None:
        lines.append("note: baselines need the walk's order hook (walk.auto_walk(order=...))")
    ratio = f"{report.ratio:.2f} x" if report.ratio is not None else "-"
    overall = (f"overall: {report.isolated}/{report.signatures} signatures isolated; "
               f"mean checks {report.mean_checks:.2f} over {report.entropy_bits:.2f} bits "
               f"({ratio}); mean minutes {report.mean_minutes:.1f} "
               f"(known-cause floor {report.known_cause_minutes:.1f})")
    if report.baselines is not None:
        overall += "; baselines " + ", ".join(
            f"{n} {report.baselines[n]:.2f}" for n in names) + f" (random seed {report.random_seed})"
    lines.append(overall)
    if learning:
        lines.append("")
        lines.append(learning_text(report.learning))
    return "\n".join(lines) + "\n"


def learning_text(check: LearningCheck | None) -> str:
    if check is None:
        return "learning: fewer than two closed cases with a conclusion, nothing to learn from"
    text = (f"learning: {check.cases} closed cases split at {check.split}: counts learned on "
            f"{check.earlier}, measured on {check.later} ({check.walked} re-walked from their "
            f"fault signatures")
    text += f", {len(check.skipped)} skipped)" if check.skipped else ")"
    if check.walked:
        text += (f"; mean checks {check.mean_checks_prior:.2f} with the priors only, "
                 f"{check.mean_checks_learned:.2f} with the learned counts; mean minutes "
                 f"{check.mean_minutes_prior:.1f} -> {check.mean_minutes_learned:.1f}")
    return text


def failure_sentence(report: SweepReport) -> str | None:
    """One sentence for stderr naming how many signatures were not isolated and the first."""
    failures = report.failures
    if not failures:
        return None
    first = failures[0]
    return (f"{len(failures)} of {report.signatures} fault signatures were not isolated; the "
            f"first is '{first.fault}' for '{first.symptom}' on {first.family} sets "
            f"({first.set_name}), whose walk ended at {first.ended_at()}; fix the graph so that "
            "its path reaches the fault ('faultwise sweep' lists every path).")
