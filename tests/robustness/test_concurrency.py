"""Several benches on one shared cases folder: a race to open one case, cases created in
the same second by several processes, and review running while a bench writes.

What must hold: one bench wins a case and every other is refused with CaseLockedError
naming the winner; ids made in the same second are distinct and no case overwrites
another; a review running beside a writer never crashes, accounts for every case file in
each run (read, or listed as damaged), and changes no case file.

Outside facts relied on: O_CREAT|O_EXCL creation is atomic (POSIX.1-2017, open()), which
filelock's SoftFileLock and the store's exclusive create rely on; rename(2) is atomic, so
a reader sees the old or the new case file, never a mix.
"""

from __future__ import annotations

import json
import subprocess
import time
from pathlib import Path

from rb_helpers import (HERE, KB_WALK, PY, case_bytes, json_out, recorded_case, run_cli,
                        tree_hashes, write_case)

from faultwise.cases.store import CaseStore

PRELUDE = (f"import sys, time, os; sys.path.insert(0, {str(HERE)!r})\n"
           "from rb_helpers import H, clock\n"
           "from faultwise.cases.store import CaseStore\n"
           "from faultwise.core.errors import CaseLockedError\n"
           "go = sys.argv[2]\n"
           "while not os.path.exists(go): time.sleep(0.005)\n")


def start_all(codes: list[tuple[str, list[str]]], go: Path) -> list[subprocess.Popen]:
    procs = [subprocess.Popen([PY, "-c", PRELUDE + code, *args], stdout=subprocess.PIPE,
                              stderr=subprocess.PIPE, text=True) for code, args in codes]
    time.sleep(1.0)                          # let every interpreter reach the barrier
    go.write_text("go")
    return procs


def test_race_to_open_one_case_has_one_winner_and_names_it(tmp_path):
    folder = tmp_path / "cases"
    write_case(folder, recorded_case(status_closed=False))
    code = ("store = CaseStore(sys.argv[1], sys.argv[3], clock=clock)\n"
            "try:\n"
            "    case = store.open('20261201-B1-001')\n"
            "except CaseLockedError as e:\n"
            "    print('locked', e.bench, flush=True)\n"
            "else:\n"
            "    print('got', flush=True); time.sleep(2.0); case.close()\n")
    go = tmp_path / "go"
    benches = [f"B{i}" for i in range(1, 6)]
    procs = start_all([(code, [str(folder), str(go), b]) for b in benches], go)
    outs = {b: p.communicate(timeout=60) for b, p in zip(benches, procs)}
    for _b, (_out, err) in outs.items():
        assert "Traceback" not in err, err
    winners = [b for b, (out, _) in outs.items() if out.strip() == "got"]
    assert len(winners) == 1, outs
    for b, (out, _) in outs.items():
        if b != winners[0]:
            assert out.strip() == f"locked {winners[0]}", (b, out)
    CaseStore(folder, "B9").open("20261201-B1-001").close()     # free again afterwards


def test_cases_created_in_the_same_second_are_distinct_and_intact(tmp_path):
    folder = tmp_path / "cases"
    code = ("store = CaseStore(sys.argv[1], 'B1', clock=clock)\n"
            "for j in range(5):\n"
            "    c = store.new_case({'family': 'series-string', 'label': 'x'}, 'x', 'dead',\n"
            "                       'dead-lights-on', customer=f'{sys.argv[3]}-{j}')\n"
            "    c.append({'type': 'note', 'text': f'{sys.argv[3]}-{j}'})\n"
            "    print(c.id, f'{sys.argv[3]}-{j}', flush=True); c.close()\n")
    go = tmp_path / "go"
    procs = start_all([(code, [str(folder), str(go), f"p{i}"]) for i in range(4)], go)
    made = {}
    for p in procs:
        out, err = p.communicate(timeout=120)
        assert p.returncode == 0 and "Traceback" not in err, err
        for line in out.split("\n"):
            if line.strip():
                case_id, who = line.split()
                assert case_id not in made, case_id
                made[case_id] = who
    assert len(made) == 20
    assert sorted(made) == [f"20261201-B1-{n:03d}" for n in range(1, 21)]
    for case_id, who in made.items():            # nothing overwritten: each file is its maker's
        data = json.loads((folder / f"{case_id}.json").read_bytes())
        assert data["customer"] == who and [e["text"] for e in data["events"]] == [who]
    assert not list(folder.glob(".*.fwtmp")) and not list(folder.glob("*.lock"))


def test_review_while_a_bench_writes(tmp_path):
    folder = tmp_path / "cases"
    closed = [f"20261201-B1-00{i}" for i in range(1, 5)]
    for case_id in closed:
        write_case(folder, recorded_case(case_id))
    open_case = recorded_case("20261201-B2-001", upto=2, status_closed=False)
    write_case(folder, open_case)
    (folder / "20261130-B3-001.json").write_bytes(case_bytes(recorded_case())[:300])
    (folder / "20261130-B3-002.json").write_bytes(b"\x00\x01binary")
    damaged = {"20261130-B3-001.json", "20261130-B3-002.json"}
    writer = (f"import sys, time; sys.path.insert(0, {str(HERE)!r})\n"
              "from rb_helpers import clock\n"
              "from faultwise.cases.store import CaseStore\n"
              "case = CaseStore(sys.argv[1], 'B2', clock=clock).open('20261201-B2-001')\n"
              "print('open', flush=True)\n"
              "for i in range(400):\n"
              "    case.append({'type': 'note', 'text': f'reading {i}'})\n"
              "    time.sleep(0.005)\n"
              "case.close(); print('done', flush=True)\n")
    proc = subprocess.Popen([PY, "-c", writer, str(folder)], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True)
    assert proc.stdout.readline().strip() == "open"
    others = {k: v for k, v in tree_hashes(folder).items() if "B2-001" not in k}
    runs = 0
    while proc.poll() is None and runs < 8:
        extra = ["--no-index"] if runs % 2 else []
        res = run_cli(["review", "--json", "--cases", folder, "--knowledge", KB_WALK, *extra],
                      cwd=tmp_path)
        runs += 1
        assert res.returncode == 0 and "Traceback" not in res.stderr, res.stderr
        doc = json_out(res)
        assert doc["cases"] == len(closed)           # the open case is read, not counted
        assert {Path(d["file"]).name for d in doc["damaged"]} == damaged
        now = {k: v for k, v in tree_hashes(folder).items() if "B2-001" not in k}
        assert now == others                          # review changed no case file
    out, err = proc.communicate(timeout=120)
    assert proc.returncode == 0 and "Traceback" not in err, err
    assert runs >= 2, "the writer finished before review could run beside it"
    final = json.loads((folder / "20261201-B2-001.json").read_bytes())
    notes = [e["text"] for e in final["events"] if e["type"] == "note"]
    assert notes[-400:] == [f"reading {i}" for i in range(400)]
