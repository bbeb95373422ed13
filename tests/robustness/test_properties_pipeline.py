"""Property tests (hypothesis) for the gaps the module tests leave: the case loader on
mutated case files, every reader of case data (summary, walk rebuild, job report, replay)
on type-confused case data, a mutated profile carried through expect(), byte-level damage
to a knowledge file, and parser inputs built to hang a backtracking regular expression.

Rule checked throughout (DEVELOPERS.md, "Rules everyone keeps"): no input makes them crash
or hang; every refusal is a FaultwiseError subclass that names its file (and key or node
where it applies). Inputs are generated, so nothing here hard-codes a result; the oracle
is the project's own error contract plus the JSON round trip of RFC 8259 (json module).
Hang checks run in a subprocess with a timeout.
"""

from __future__ import annotations

import copy
import json
import math
import shutil
import subprocess

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from rb_helpers import KB_SMALL, PY, H, recorded_case

from faultwise.cases.store import CaseStore
from faultwise.cases.codec import read_case_bytes
from faultwise.core.errors import DamagedCaseError, FaultwiseError

EXAMPLES = 120
SETTINGS = settings(max_examples=EXAMPLES, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow,
                                           HealthCheck.function_scoped_fixture])
REASONS = {"empty", "truncated", "not JSON", "binary", "not a mapping", "wrong format version",
           "unknown format version"}

GOOD = recorded_case()
GOOD_BYTES = json.dumps(GOOD, indent=2, ensure_ascii=False).encode()


def _paths(obj, prefix=()):
    yield prefix
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _paths(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _paths(v, prefix + (i,))


# The fields the readers use: every top-level key, every event and each of its keys, the
# band's keys, the copied profile (its own fields are the profile test's business).
CASE_PATHS = [p for p in _paths(GOOD) if p and (len(p) == 1 or p[0] == "events" and len(p) <= 4
                                                or p[:2] == ("set", "profile") and len(p) == 2)]
ODD = st.one_of(st.none(), st.booleans(), st.integers(-10**6, 10**6), st.just(10**30),
                st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12),
                st.sampled_from(["../../etc", "\x1b[2J", "[/b]", "nan", "-1", "1e999"]),
                st.lists(st.integers(), max_size=3), st.dictionaries(st.text(max_size=3),
                                                                     st.integers(), max_size=2))


@st.composite
def mutated_case(draw):
    """The good case with 1-3 values replaced by odd types or removed."""
    data = copy.deepcopy(GOOD)
    for _ in range(draw(st.integers(1, 3))):
        path = draw(st.sampled_from(CASE_PATHS))
        target = data
        try:
            for key in path[:-1]:
                target = target[key]
            if draw(st.booleans()) and isinstance(target, dict):
                target.pop(path[-1], None)
            else:
                target[path[-1]] = draw(ODD)
        except (KeyError, IndexError, TypeError):
            pass
    return data


def _loaded(data) -> dict | None:
    """What a reader gets: the JSON round trip (NaN stays, as json writes it) and the loader."""
    try:
        return read_case_bytes(json.dumps(data).encode(), "mutated.json")
    except DamagedCaseError:
        return None


def _only_located_errors(call):
    try:
        call()
    except FaultwiseError as err:
        assert str(err) and (err.file or err.node or err.key), repr(err)


def _get(obj, path):
    for key in path:
        obj = obj[key]
    return obj


def _with(path, value):
    data = copy.deepcopy(GOOD)
    _get(data, path[:-1])[path[-1]] = value
    return data


FOUND = [(("events", 0, "n"), [1]), (("events", 1, "n"), "x"), (("set",), []),
         (("events", 0, "type"), ["answer"]), (("events", 4, "parts"), True),
         (("events", 0, "band", "unit"), {"V": 1}), (("events", 3, "outcome"), {}),
         (("parts",), 1.5), (("events", 1, "raw"), float("nan")), (("events", 7, "at"), {})]


def found(test):
    """The mutations that crashed a reader while this suite was written, always tried."""
    for path, value in FOUND:
        test = example(data=_with(path, value))(test)
    return test


# ------------------------------------------------------------------ the case loader

@st.composite
def damaged_bytes(draw):
    raw = bytearray(GOOD_BYTES)
    how = draw(st.sampled_from(["cut", "delete", "insert", "flip", "splice"]))
    i = draw(st.integers(0, len(raw) - 1))
    if how == "cut":
        return bytes(raw[:i])
    if how == "delete":
        del raw[i: i + draw(st.integers(1, 64))]
    elif how == "insert":
        raw[i:i] = draw(st.binary(min_size=1, max_size=16))
    elif how == "flip":
        raw[i] ^= draw(st.integers(1, 255))
    else:
        j = draw(st.integers(0, len(raw) - 1))
        raw[i:i] = raw[j: j + 40]
    return bytes(raw)


@SETTINGS
@given(damaged_bytes())
def test_case_loader_on_damaged_bytes(tmp_path, raw):
    path = tmp_path / "20261201-B1-001.json"
    path.write_bytes(raw)
    store = CaseStore(tmp_path, "B9")
    try:
        data = store.read("20261201-B1-001")
    except DamagedCaseError as err:
        assert err.reason in REASONS or err.reason.startswith("missing or bad key"), err.reason
        assert err.file == str(path)
        return
    assert isinstance(data, dict) and isinstance(data["events"], list)


# ------------------------------------------------------------------ every reader of case data

@SETTINGS
@given(mutated_case())
@found
def test_summary_of_mutated_case_never_crashes(data):
    from faultwise.cases.summary import summarise

    loaded = _loaded(data)
    if loaded is not None:
        summary = summarise(loaded, "mutated.json")
        json.dumps(summary, allow_nan=True)          # stays JSON-ready for the index
        answers = [e for e in loaded["events"] if type(e) is dict and e.get("type") == "answer"
                   and e.get("phase", "diagnose") == "diagnose"]
        assert len(summary["checks"]) == 2 * len(answers)   # node, outcome per answer


@SETTINGS
@given(mutated_case())
@found
def test_walk_rebuilt_from_mutated_case_raises_only_located_errors(data):
    """walk_from_case is what the TUI's resume and replay call: an odd type in a hand-edited
    case must come back as a WalkError/ProfileError, not a TypeError that ends the program."""
    from faultwise.walk.scripted import walk_from_case

    loaded = _loaded(data)
    if loaded is not None:
        _only_located_errors(lambda: walk_from_case(H.knowledge(), loaded,
                                                    expectations=H.expectations()))


@SETTINGS
@given(mutated_case())
@found
def test_job_report_of_mutated_case_raises_only_located_errors(data):
    from faultwise.report.job import job_report, job_report_markdown
    from faultwise.report.html_report import job_report_html

    loaded = _loaded(data)
    if loaded is not None:
        def build():
            report = job_report(loaded, H.knowledge())
            job_report_markdown(report)
            job_report_html(report)
        _only_located_errors(build)


@SETTINGS
@given(mutated_case())
@found
def test_replay_of_mutated_case_raises_only_located_errors(data):
    from faultwise.shop.replay import replay_case

    loaded = _loaded(data)
    if loaded is not None:
        got = []
        _only_located_errors(lambda: got.append(replay_case(
            H.knowledge(), loaded, expectations=H.expectations(), file="m.json")))
        for result in got:                       # a replay names the case it re-walked
            assert (result.case, result.file) == (loaded["id"], "m.json")
            assert result.same == (result.step is None)


# ------------------------------------------------------------------ profile through expect()

PROFILE = None


def _profile_dict():
    global PROFILE
    if PROFILE is None:
        from faultwise.profile.model import profile_to_dict

        PROFILE = profile_to_dict(H.series_profile())
        PROFILE.pop("typical", None)
    return copy.deepcopy(PROFILE)


NUMBERS = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**9, 10**9),
                    st.sampled_from([0, -0.0, 1e-300, 1e300, "4k7", "0 V", "-5 uF", "inf",
                                     "1e400", "nan", "50 uF", "0.15 A"]))


@st.composite
def mutated_profile(draw):
    data = _profile_dict()
    leaves = [p for p in _paths(data) if p and not isinstance(_get(data, p), (dict, list))]
    for _ in range(draw(st.integers(1, 3))):
        path = draw(st.sampled_from(leaves))
        parent = _get(data, path[:-1])
        parent[path[-1]] = draw(NUMBERS)
    return data


@SETTINGS
@given(mutated_profile())
def test_mutated_profile_through_expect(data):
    """Every profile the loader accepts gives finite bands that contain their nominal or
    says why not with a located error; nothing else escapes expect()."""
    from faultwise.expect import expect
    from faultwise.profile import profile_from_dict

    try:
        profile = profile_from_dict(data, source="mutated.yaml")
    except FaultwiseError as err:
        assert err.file == "mutated.yaml" and err.key, repr(err)
        return
    try:
        bands = expect(profile)
    except FaultwiseError as err:
        assert err.file or err.key, repr(err)
        return
    for name, e in bands.items():
        for value in (e.nominal, e.low, e.high):
            assert math.isfinite(value), (name, e)
        assert e.low <= e.high, (name, e)


# ------------------------------------------------------------------ knowledge bytes

KB_FILES = ["symptoms.yaml", "cautions.yaml", "graph/supply.yaml", "graph/audio.yaml"]


@st.composite
def damaged_knowledge(draw):
    name = draw(st.sampled_from(KB_FILES))
    raw = bytearray((KB_SMALL / name).read_bytes())
    i = draw(st.integers(0, len(raw) - 1))
    how = draw(st.sampled_from(["delete", "insert", "flip", "cut", "indent"]))
    if how == "delete":
        del raw[i: i + draw(st.integers(1, 30))]
    elif how == "insert":
        raw[i:i] = draw(st.sampled_from([b"&a ", b"*a", b"!!python/object:os.system ", b": ",
                                         b"\t", b"- ", b"{", b"[", b"'", b"\xff", b"\x00",
                                         b"<<: *a", b"? "]))
    elif how == "flip":
        raw[i] ^= draw(st.integers(1, 255))
    elif how == "cut":
        raw = raw[:i]
    else:
        raw[i:i] = b"  "
    return name, bytes(raw)


@pytest.fixture(scope="module")
def kb_copy(tmp_path_factory):
    target = tmp_path_factory.mktemp("kb") / "kb"
    shutil.copytree(KB_SMALL, target)
    return target


@SETTINGS
@given(damaged_knowledge())
def test_knowledge_loader_on_damaged_bytes(kb_copy, mutation):
    from faultwise.graph.knowledge import load_knowledge

    name, raw = mutation
    for rel in KB_FILES:
        shutil.copy(KB_SMALL / rel, kb_copy / rel)
    (kb_copy / name).write_bytes(raw)
    try:
        load_knowledge(kb_copy)
    except FaultwiseError as err:
        assert err.file, repr(err)


# ------------------------------------------------------------------ hang checks

HANG_PROBE = r"""
import sys
from faultwise.core.units import parse_reading
from faultwise.core.errors import FaultwiseError
texts = [
    "1" * 200_000 + "x",
    "1" + "0" * 100_000 + " kV",
    "1." + "1" * 50_000 + "e" + "9" * 5000,
    " " * 100_000 + "5 V",
    "-" * 50_000 + "5",
    "4k" + "7" * 100_000,
    "1e" + "9" * 400 + " V",
    "9" * 5000 + " V",
    "5 " + "m" * 50_000 + "V",
    "5" + "," * 50_000 + "5 V",
    "1:" * 30_000,
]
for text in texts:
    for unit in ("V", "ohm", "uF", "kHz", "ratio"):
        try:
            parse_reading(text, unit)
        except FaultwiseError:
            pass
print("ok")
"""


def test_reading_parser_does_not_hang_or_crash_on_huge_inputs():
    """Built to trip catastrophic backtracking and CPython's 4300-digit int limit; the
    whole batch must finish well inside the timeout and raise only InputError."""
    res = subprocess.run([PY, "-c", HANG_PROBE], capture_output=True, text=True, timeout=60)
    assert res.returncode == 0 and res.stdout.strip() == "ok", res.stderr[-2000:]
