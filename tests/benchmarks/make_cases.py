"""Generate N closed cases (default 10,000) for the review benchmark, into a folder.

Templates are the demo cases under ``cases/`` (closed ones) when there are any, else cases
built with tests/review_case_factory.py padded to a demo case's size (a set profile and
measurement bands). Each copy gets its own id, bench, dates, customer, outcome and minutes;
the rest is copied as is. Invented data only.

    python tests/benchmarks/make_cases.py OUT_DIR [N]
"""

from __future__ import annotations

import json
import random
import sys
from datetime import datetime, timedelta, timezone
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
sys.path.insert(0, str(HERE.parent))

OUTCOMES = ["repaired"] * 17 + ["returned-unrepaired", "waiting-parts", "repaired"]
PROFILE = {
    "format": "faultwise-set/1", "label": "demo 5-tube series-string table set",
    "family": "series-string", "mains": {"volts_v": 120, "freq_hz": 60},
    "band": {"low_khz": 540, "high_khz": 1600}, "if_khz": 455,
    "gang": {"min_pf": 12, "max_pf": 365, "stray_pf": 15},
    "tubes": [{"role": "converter", "type": "12BE6"}, {"role": "if", "type": "12BA6"},
              {"role": "detector", "type": "12AV6"},
              {"role": "output", "type": "50C5", "cathode_ohm": 150, "cathode_ma": 45},
              {"role": "rectifier", "type": "35W4"}],
    "supply": {"rectifier": "tube", "surge_ohm": 22, "first_cap_uf": 50, "filter_ohm": 1000,
               "second_cap_uf": 30, "load_ma": 55, "filter_load_ma": 12},
    "audio": {"speaker_ohm": 3.2, "output_turns_ratio": 28},
}


def factory_templates() -> list[dict]:
    """Cases over the kb_review fixture, padded with a profile and measured readings."""
    from review_case_factory import make_case

    hum = [("supply.first-cap-esr", "good"), ("supply.second-cap-esr", "good"),
           ("audio.coupling-cap-check", "positive")]
    out = [
        make_case("t1", symptom="hum-loud", checks=[("supply.first-cap-esr", "bad")],
                  fault="supply.dry-first-cap", parts=["50 uF 160 V electrolytic"],
                  closing=[("supply.leakage-check", "0.2")]),
        make_case("t2", symptom="hum-loud", checks=hum, fault="audio.leaky-coupling-cap",
                  parts=["22 nF 630 V film capacitor"], closing=[("supply.leakage-check", "0.1")],
                  skips=[("supply.rectifier-out", "meter at the other bench")]),
        make_case("t3", symptom="dead-lights-on", checks=[("audio.click-test", "click"),
                                                          ("if.if-stage-check", "blocked")],
                  fault="if.open-if-transformer", closing=[("supply.leakage-check", "0.3")]),
        make_case("t4", symptom="dead-lights-on", checks=[("audio.click-test", "click"),
                                                          ("if.if-stage-check", "passes"),
                                                          ("oscillator.grid-check", "running")],
                  off_graph="cracked 12BE6 socket arcing"),
    ]
    for case in out:
        case["set"]["profile"] = PROFILE
        band = {"nominal": 146.1, "low": 131.0, "high": 160.0, "unit": "V",
                "basis": "rectifier model at 114 V and 126 V line, parts at their tolerances",
                "typical": False, "absent_below": 14.6}
        for i in range(6):
            case["events"].insert(0, {"n": 0, "at": case["opened"], "type": "answer",
                                      "phase": "diagnose", "node": "supply.rectifier-out",
                                      "expect": "supply.rectifier_out_v", "band": band,
                                      "raw": f"{140 + i} V", "value": 140.0 + i,
                                      "outcome": "normal"})
        for n, ev in enumerate(case["events"], 1):
            ev["n"] = n
    return out


def templates() -> list[dict]:
    demo = []
    for path in sorted((ROOT / "cases").glob("*.json")):
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            continue
        if isinstance(data, dict) and data.get("status") == "closed":
            demo.append(data)
    return demo or factory_templates()


def make_cases(out: Path, n: int = 10_000, seed: int = 1) -> int:
    """Write ``n`` closed cases into ``out``; returns the number written."""
    rng = random.Random(seed)
    base = templates()
    start = datetime(2025, 1, 6, 9, 0, tzinfo=timezone.utc)
    out.mkdir(parents=True, exist_ok=True)
    for i in range(n):
        case = json.loads(json.dumps(base[i % len(base)]))
        opened = start + timedelta(days=rng.randrange(0, 730), minutes=rng.randrange(0, 480))
        minutes = rng.randrange(15, 180)
        bench = f"B{1 + i % 3}"
        case_id = f"{opened:%Y%m%d}-{bench}-{i:05d}"
        case.update(id=case_id, bench=bench, status="closed", opened=opened.isoformat(),
                    updated=(opened + timedelta(minutes=minutes)).isoformat(),
                    closed=(opened + timedelta(minutes=minutes)).isoformat(),
                    customer=f"ticket {1000 + rng.randrange(0, 4000)}",
                    outcome=rng.choice(OUTCOMES), minutes=minutes, reopened_from=None)
        for k, ev in enumerate(case.get("events", [])):
            ev["at"] = (opened + timedelta(minutes=2 * (k + 1))).isoformat()
        (out / f"{case_id}.json").write_text(json.dumps(case, indent=2) + "\n", encoding="utf-8")
    return n


if __name__ == "__main__":
    if len(sys.argv) < 2:
        raise SystemExit("usage: make_cases.py OUT_DIR [N]")
    count = make_cases(Path(sys.argv[1]), int(sys.argv[2]) if len(sys.argv) > 2 else 10_000)
    print(f"{count} cases written to {sys.argv[1]}")
