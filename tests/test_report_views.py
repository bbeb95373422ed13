"""The job report's two views of one model, on a loud-hum job walked on the demo 230 V
transformer set (tests/report_example_job.py).

Outside references: the choices' words and the check titles are the bundled knowledge's
own (read from the graph in the test, not written here); the part ratings are the RKM code
of IEC 60062 (``2k2`` = 2.2 kOhm) and the EL84's published heater rating 6.3 V 0.76 A
(the demo profile's figure; tube handbooks, from memory). The rest are facts of the trade
for a customer's copy: no internal ids, no keys pressed, steps numbered as walked
(common practice, no source).
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import pytest

from faultwise.graph import load_knowledge
from faultwise.report import job_report, read_case
from faultwise.report.render import bench_html, bench_markdown, customer_html, customer_markdown
from faultwise.core.workspace import Shop, bundled_knowledge_dir
from report_example_job import FAULT, PARTS, SHOP, walk_example_job


@pytest.fixture(scope="module")
def knowledge():
    return load_knowledge(bundled_knowledge_dir())


@pytest.fixture(scope="module")
def job(tmp_path_factory):
    path = walk_example_job(tmp_path_factory.mktemp("cases"))
    return path, read_case(path)


@pytest.fixture(scope="module")
def report(job, knowledge):
    return job_report(job[1], knowledge, SHOP)


def _text_of_html(page: str) -> str:
    from html import unescape

    page = re.sub(r"<style>.*?</style>", " ", page, flags=re.S)
    return unescape(re.sub(r"<[^>]+>", " ", page))


def _ids(case: dict, knowledge) -> set[str]:
    ids = {e["node"] for e in case["events"] if e.get("node")}
    return ids | {case["symptom"], FAULT} | {n for n in knowledge.nodes
                                              if n.startswith(("supply.", "audio."))}


def _observation_keys(case: dict, knowledge) -> list[tuple[str, str, str]]:
    """(raw key pressed, choice name, choice words) of every observation answer."""
    out = []
    for e in case["events"]:
        node = knowledge.nodes.get(e.get("node") or "")
        if e.get("type") == "answer" and node is not None and not node.is_measurement:
            out.append((e["raw"], e["outcome"], node.choices[e["outcome"]]))
    return out


def test_example_job_was_answered_with_keys(job, knowledge):
    keys = _observation_keys(job[1], knowledge)
    assert len(keys) == 3 and all(raw.isdigit() for raw, _, _ in keys)


@pytest.mark.parametrize("render", [customer_markdown, customer_html])
def test_customer_copy_holds_no_node_id_and_no_raw_key(job, knowledge, report, render):
    text = render(report)
    shown = _text_of_html(text) if text.lstrip().startswith("<!DOCTYPE") else text
    for node_id in _ids(job[1], knowledge):
        assert node_id not in shown, node_id
    for part in report.parts:    # typed by the bench, and its rating: any digit ("1 W")
        shown = shown.replace(part.text, " ").replace(part.rating or part.text, " ")
    for raw, name, _ in _observation_keys(job[1], knowledge):
        # the key pressed ("2") and the choice's name ("stays"): neither as a word of its own
        assert not re.search(rf"(?<![\w.:,-]){re.escape(raw)}(?![\w.:,-])", shown), raw
        assert not re.search(rf"\b{re.escape(name)}\b", shown), name
    for word in ("line-connected", "live", "Vpp", "nominal", "band"):
        assert word not in shown, word


def test_customer_copy_says_what_the_customer_needs(report, knowledge):
    md = customer_markdown(report)
    fault = knowledge.nodes[FAULT]
    assert SHOP.name in md and "tel. 0100 555 0199" in md and SHOP.terms in md
    assert "loud hum even with the volume turned right down" in md       # their words
    assert fault.title in md and fault.plain in md and fault.plain.endswith(".")
    assert "Tube set with a power transformer" in md
    assert "| Bridge the second filter capacitor | passed |" in md        # after the repair
    assert "Electrical safety check" in md and "Passed" in md
    assert "55 min" in md                     # 09:30 to 10:25 on the walk's clock


def test_parts_show_what_was_recorded_with_ratings(report):
    assert tuple(p.text for p in report.parts) == tuple(PARTS)
    ratings = {p.text: p.rating for p in report.parts}
    assert ratings[PARTS[0]] == "50 µF, 350 V"
    assert ratings[PARTS[1]] == "2.2 kΩ, 1 W"                # IEC 60062 RKM code 2k2
    assert ratings[PARTS[2]] == "heater 6.3 V, 760 mA"       # EL84 (profile; from memory)
    assert ratings[PARTS[3]] == ""                           # a dial cord has none


def _md_step_numbers(md: str) -> list[int]:
    return [int(m) for m in re.findall(r"^\| (\d+) \|", md, flags=re.M)]


def test_bench_copy_steps_run_one_to_n_in_walk_order(job, knowledge, report):
    case = job[1]
    walked = [e for e in case["events"] if e.get("type") in ("answer", "skip")]
    n = len(walked)
    md = bench_markdown(report)
    assert _md_step_numbers(md) == list(range(1, n + 1))
    html = bench_html(report)
    assert [int(x) for x in re.findall(r'<td class="num">(\d+)</td>', html)] == \
        list(range(1, n + 1))
    # Each row: the check's title, what was chosen in words, and the node id last.
    rows = [line for line in md.splitlines() if re.match(r"^\| \d+ \|", line)]
    for row, event in zip(rows, walked):
        cells = [c.strip() for c in row.strip("|").split(" | ")]
        node = knowledge.nodes[event["node"]]
        assert cells[1] == node.title
        assert cells[-1] == f"`{event['node']}`"
        if not node.is_measurement:
            assert cells[2] == node.choices[event["outcome"]]     # the words, not "2"
        else:
            assert cells[3] != "observation"                      # the band as recorded


def test_bench_copy_band_is_the_one_recorded(job, report):
    event = next(e for e in job[1]["events"] if e.get("node") == "supply.hum-ripple")
    step = next(s for s in report.steps if s.node == "supply.hum-ripple")
    from faultwise.core.units import format_reading

    assert step.band.startswith(f"{format_reading(event['band']['low'], 'Vpp')} to "
                                f"{format_reading(event['band']['high'], 'Vpp')}")
    assert step.answer == "10.2 Vpp" and step.result == "normal"


def test_transformer_family_is_not_called_line_connected(report):
    md = bench_markdown(report)
    assert "line-connected" not in md
    assert "Family: transformer: mains through a power transformer" in md


def test_no_shop_configured_names_no_shop(job, knowledge):
    bare = job_report(job[1], knowledge)
    for doc in (bench_markdown(bare), customer_markdown(bare), bench_html(bare),
                customer_html(bare)):
        assert "Larkspur" not in doc and 'class="shop"' not in doc


def test_shop_text_is_escaped_in_every_view(job, knowledge):
    evil = Shop(name="A | B <script>x</script>", contact="1 Road\n<b>bold</b>",
                terms="[/b] & <i>terms</i> | more")
    r = job_report(job[1], knowledge, evil)
    for page in (customer_html(r), bench_html(r)):
        assert "<script>" not in page and "<b>bold" not in page and "<i>terms" not in page
    md = customer_markdown(r)
    assert "A \\| B &lt;script&gt;" in md and "<i>" not in md


def test_cli_customer_copy_uses_the_configured_shop(tmp_path, job):
    path = job[0]
    (tmp_path / "faultwise.yaml").write_text(
        "shop:\n  name: Test Shop Ltd\n  contact: tel 0100 555 0100\n"
        "  terms: Ninety days on parts.\n", encoding="utf-8")
    run = lambda *a: subprocess.run([sys.executable, "-m", "faultwise", "report", str(path),
                                     *a], cwd=tmp_path, capture_output=True, text=True,
                                    timeout=60)  # noqa: E731
    out = run("--customer")
    assert out.returncode == 0, out.stderr
    assert out.stdout.startswith("**Test Shop Ltd**") and "Ninety days on parts." in out.stdout
    assert "supply." not in out.stdout
    page = tmp_path / "c.html"
    out = run("--customer", "--html", str(page))
    assert out.returncode == 0 and "Test Shop Ltd" in page.read_text(encoding="utf-8")
    bench = run()
    assert "| 1 |" in bench.stdout and "`audio.tf-hum-volume-zero`" in bench.stdout


# ----------------------------------------------------------- other jobs, same model

KB_REVIEW = Path(__file__).parent / "fixtures" / "kb_review"


def test_skipped_check_keeps_its_place_in_walk_order():
    from review_case_factory import make_case

    kb = load_knowledge(KB_REVIEW)
    case = make_case("s1", symptom="hum-loud", checks=[("supply.first-cap-esr", "good")],
                     skips=[("supply.second-cap-esr", "No ESR meter on this bench today.")],
                     fault="supply.dry-first-cap", closing=[("supply.leakage-check", "0.1")])
    r = job_report(case, kb)
    assert [s.number for s in r.steps] == [1, 2, 3]
    skipped = r.steps[1]
    assert skipped.skipped and skipped.answer == "not made: No ESR meter on this bench today."
    only_skip = make_case("s2", symptom="hum-loud", skips=[("supply.second-cap-esr", "")])
    assert job_report(only_skip, kb).stages == {}          # a check not made clears nothing
    assert _md_step_numbers(bench_markdown(r)) == [1, 2, 3]


@pytest.mark.parametrize("family, closing, state, words", [
    ("transistor", [], "not needed", "runs from batteries"),
    ("series-string", [], "not recorded", "not ready to go back"),
    ("series-string", [("supply.leakage-check", "0.2")], "passed", "plug one way"),
])
def test_customer_safety_line_per_family(family, closing, state, words):
    from review_case_factory import make_case

    kb = load_knowledge(KB_REVIEW)
    case = make_case("f1", symptom="hum-loud", family=family, closing=closing,
                     fault="supply.dry-first-cap")
    r = job_report(case, kb)
    assert r.leakage_state == state
    md = customer_markdown(r)
    assert words in md
    assert "live" not in md and "line-connected" not in md


def test_failed_leakage_check_is_not_passed_in_either_copy():
    from review_case_factory import make_case

    kb = load_knowledge(KB_REVIEW)
    case = make_case("f2", symptom="hum-loud", fault="supply.dry-first-cap",
                     closing=[("supply.leakage-check", "2.5")])
    case["events"][-2]["outcome"] = "high"            # 2.5 V > 0.75 V, as the walk classifies
    r = job_report(case, kb)
    assert r.leakage_state == "failed"
    assert "NOT passed" in customer_markdown(r) and "NOT passed" in bench_markdown(r)
