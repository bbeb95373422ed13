"""The answers file read in the domain (faultwise.walk.answers), without a subprocess.

The CLI's view of the same file (exit 1, one located line) is in test_walk_cli.py; here the
returned values and the InputError's location are checked directly. The fixture bands are
invented (helpers_walk_proc.expectations). YAML 1.1 reads an unquoted yes/no as a boolean
(YAML 1.1 spec, "Boolean Language-Independent Type"); the reader turns it back into the
choice the tech meant.
"""

from __future__ import annotations

import helpers_walk_proc as H
import pytest

from faultwise.core.errors import InputError
from faultwise.walk.answers import load_answers


def _load(tmp_path, text: str):
    path = tmp_path / "answers.yaml"
    path.write_text(text, encoding="utf-8")
    return load_answers(path, H.knowledge(), H.expectations())


def test_values_come_back_as_written_and_yes_no_become_choices(tmp_path):
    readings, observations = _load(tmp_path, "readings:\n  supply.rectifier_out_v: ' 58 V '\n"
                                             "  output.plate_v: 120\n"
                                             "  safety.leakage_v: low\n"
                                             "observations:\n  supply.rect-swap: yes\n")
    assert readings == {"supply.rectifier_out_v": "58 V", "output.plate_v": 120,
                        "safety.leakage_v": "low"}
    assert observations == {"supply.rect-swap": "yes"}


def test_an_empty_file_answers_nothing(tmp_path):
    assert _load(tmp_path, "") == ({}, {})


@pytest.mark.parametrize("text,line,key", [
    ("readings:\n  supply.rectifier_out_v: 58 V\n  supply.nope_v: 3\n", 3, "supply.nope_v"),
    ("readings:\n  supply.rectifier_out_v: lots\n", 2, "supply.rectifier_out_v"),
    ("observations:\n  supply.rect-swap: maybe\n", 2, "supply.rect-swap"),
    ("\nanswers:\n  x: 1\n", 2, "answers"),
])
def test_a_bad_entry_is_located_by_line_and_key(tmp_path, text, line, key):
    with pytest.raises(InputError) as info:
        _load(tmp_path, text)
    assert info.value.file.endswith("answers.yaml")
    assert (info.value.line, info.value.key) == (line, key)
    assert info.value.hint
