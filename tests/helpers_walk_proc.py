"""Shared builders for the walk/case tests, and a script a test kills with SIGKILL.

As a script: ``python helpers_walk_proc.py CASES_DIR CASE_ID [SAVES]`` opens the case and
walks it to the end, saving SAVES times after every step (the parent kills it at a random
moment); ``python helpers_walk_proc.py hold CASES_DIR CASE_ID BENCH`` holds a case open
until its stdin closes.
The set profile and expected bands are fixture data (invented set); the leakage limit
0.75 V is the ANSI C39.5 network limit (see REFERENCES.md).
"""

from __future__ import annotations

import sys
from pathlib import Path

KB = Path(__file__).parent / "fixtures" / "kb_walk"



def script_step(walk, kind: str, text: str) -> None:
    """Give the walk one step of SCRIPT: an answer, a note, the parts, or the close."""
    if kind == "answer":
        walk.answer(text)
    elif kind == "note":
        walk.note(text)
    elif kind == "parts":
        walk.record_parts([text])
    else:
        walk.close(text, 30)

def series_profile():
    from faultwise.profile.load import load_profile

    return load_profile(KB / "sets" / "series.yaml")


def transistor_profile():
    from faultwise.profile.load import load_profile

    return load_profile(KB / "sets" / "portable.yaml")


def _e(name, nominal, low, high, absent_below, unit="V"):
    from faultwise.expect.expected import Expected

    return Expected(name=name, title=name, stage=name.split(".")[0], nominal=nominal, low=low,
                    high=high, unit=unit, basis="fixture band", absent_below=absent_below)


def expectations():
    """Fixture bands for kb_walk (invented numbers, not a calculation)."""
    items = [_e("supply.rectifier_out_v", 146.0, 131.0, 160.0, 5.0),
             _e("output.plate_v", 130.0, 110.0, 145.0, 5.0),
             _e("safety.leakage_v", 0.0, 0.0, 0.75, 0.0),
             _e("supply.battery_v", 9.0, 7.0, 9.6, 0.5)]
    return {e.name: e for e in items}


def knowledge():
    from faultwise.graph.knowledge import load_knowledge

    return load_knowledge(KB)


# The answers the killed process types, in order (a full repaired case).
SCRIPT = [("answer", "58 V"), ("answer", "good"), ("note", "customer says it hummed first"),
          ("answer", "high-esr"), ("parts", "50 uF 160 V electrolytic"), ("answer", "148"),
          ("answer", "0.05"), ("close", "repaired")]


def hold(cases_dir: str, case_id: str, bench: str) -> int:
    """Open the case at ``bench``, say so on stdout, and keep it until stdin closes."""
    from faultwise.cases.store import CaseStore

    case = CaseStore(cases_dir, bench).open(case_id)
    print("held", flush=True)
    sys.stdin.read()
    case.close()
    return 0


def main(cases_dir: str, case_id: str, saves_per_step: int = 1) -> int:
    from faultwise.cases.store import CaseStore
    from faultwise.walk.state import Walk

    kn = knowledge()
    store = CaseStore(cases_dir, "B1")
    case = store.open(case_id)
    walk = Walk.from_events(kn, series_profile(), case.data["symptom"], case.data["events"],
                            expectations=expectations())
    done = len(walk.events)
    for kind, text in SCRIPT[done:]:
        script_step(walk, kind, text)
        for _ in range(saves_per_step):
            case.record(walk)
    case.close()
    return 0


if __name__ == "__main__":
    if sys.argv[1] == "hold":
        raise SystemExit(hold(*sys.argv[2:5]))
    raise SystemExit(main(sys.argv[1], sys.argv[2], int(sys.argv[3]) if len(sys.argv) > 3 else 1))
