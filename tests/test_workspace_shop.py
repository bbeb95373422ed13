"""The shop named on the reports comes from faultwise.yaml; wrong values are located errors.

Checks are against the file written in the test (what a shop would type) and the error
contract of DESIGN.md section 10 (one sentence naming file, line and key; exit status 1).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from faultwise.core.errors import FaultwiseError
from faultwise.core.workspace import Shop, resolve_workspace

KB = Path(__file__).parent / "fixtures" / "kb_review"


def _ws(tmp_path: Path, text: str):
    (tmp_path / "faultwise.yaml").write_text(text, encoding="utf-8")
    return resolve_workspace(knowledge=KB, cases=tmp_path, cwd=tmp_path)


def test_no_config_means_no_shop(tmp_path):
    assert resolve_workspace(knowledge=KB, cwd=tmp_path).shop == Shop()


def test_shop_keys_are_read(tmp_path):
    ws = _ws(tmp_path, "bench: B2\nshop:\n  name: Test Shop\n  contact: |\n    1 Road\n"
                       "    tel 0100 555 0100\n  terms: Ninety days on parts.\n")
    assert ws.shop == Shop("Test Shop", "1 Road\ntel 0100 555 0100", "Ninety days on parts.")
    assert ws.bench == "B2"


@pytest.mark.parametrize("text, line, key", [
    ("bench: B1\nshop: Test Shop\n", 2, "shop"),                       # not a mapping
    ("shop:\n  name: A\n  phone: 1\n", 3, "shop.phone"),               # unknown key
    ("shop:\n  name: [a, b]\n", 2, "shop.name"),                       # not a text
    ("shop:\n  terms: true\n", 2, "shop.terms"),                        # a boolean
    ("shop:\n  name: |\n    two\n    lines\n", 2, "shop.name"),        # name on two lines
    ("shop:\n  terms: " + "x" * 1300 + "\n", 2, "shop.terms"),         # too long for a page
    ("cases: cases\nshop_name: A\n", 2, "shop_name"),                  # unknown top key
    ("cases: [a]\n", 1, "cases"),                                      # folder not a text
])
def test_wrong_shop_config_is_located(tmp_path, text, line, key):
    with pytest.raises(FaultwiseError) as err:
        _ws(tmp_path, text)
    assert err.value.line == line and err.value.key == key
    assert str(err.value).startswith(str(tmp_path / "faultwise.yaml") + f":{line}")


def test_cli_names_the_wrong_key_in_one_sentence(tmp_path):
    (tmp_path / "faultwise.yaml").write_text("shop:\n  name: A\n  fax: 1\n", encoding="utf-8")
    proc = subprocess.run([sys.executable, "-m", "faultwise", "report", "x", "--knowledge",
                           str(KB)], cwd=tmp_path, capture_output=True, text=True, timeout=60)
    assert proc.returncode == 1
    assert "faultwise.yaml:3" in proc.stderr and "shop.fax" in proc.stderr
    assert "Traceback" not in proc.stderr
