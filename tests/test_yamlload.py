"""Safe YAML loading for files people write (faultwise.core.yamlload).

Outside reference: the YAML 1.1 behaviour of PyYAML's safe loader (tags, anchors and
aliases, merge keys), which the loader narrows to plain data with line numbers.
"""

from __future__ import annotations

import pytest
import yaml
from hypothesis import given, settings, strategies as st

from faultwise.core.errors import FaultwiseError
from faultwise.core.yamlload import (MAX_BYTES, MAX_DEPTH, LineDict, LineList, line_of,
                                     load_yaml_file, load_yaml_text)


def test_plain_data_with_lines():
    data = load_yaml_text("a: 1\nb:\n  - x\n  - {c: 2.5}\nd: text\n", "f.yaml")
    assert data == {"a": 1, "b": ["x", {"c": 2.5}], "d": "text"}
    assert isinstance(data, LineDict) and isinstance(data["b"], LineList)
    assert (data.line_of("a"), data.line_of("b"), data.line_of("d")) == (1, 2, 5)
    assert data["b"].line_of(1) == 4 and data["b"][1].line_of("c") == 4
    assert line_of(data, "d") == 5 and line_of({"d": 1}, "d") is None


def test_dates_stay_text():
    assert load_yaml_text("when: 2026-12-01\n")["when"] == "2026-12-01"


@pytest.mark.parametrize("text, fragment, line", [
    ("a: !!python/object/apply:os.system ['true']\n", "tag", 1),
    ("a: !!python/name:os.system\n", "tag", 1),
    ("b: 1\na: !custom 3\n", "tag", 2),
    ("a: !!set {x, y}\n", "tag", 1),
    ("a: !!binary aGVsbG8=\n", "tag", 1),
    # an alias is located where it is used (*name), not at its anchor (&name)
    ("a: &x [1, 2]\nb: *x\n", "alias", 2),
    ("a: &a [1, 1]\nb: &b [*a, *a]\nc: &c [*b, *b]\nd: [*c, *c]\n", "alias", 2),
    ("base: &b {x: 1}\nother:\n  <<: *b\n", "alias", 3),
    ("a: 1\na: 2\n", "twice", 2),
    ("a: [1, 2\n", "syntax", None),
    ("a: b: c\n", "syntax", 1),
    ("? [1, 2]\n: x\n", "plain text", 1),
])
def test_refused_yaml_is_located(text, fragment, line):
    with pytest.raises(FaultwiseError, match=fragment) as err:
        load_yaml_text(text, "p.yaml")
    assert err.value.file == "p.yaml"
    if line is not None:
        assert err.value.line == line


def test_deep_nesting_is_refused():
    with pytest.raises(FaultwiseError, match="nesting"):
        load_yaml_text("a: " + "[" * (MAX_DEPTH + 5) + "]" * (MAX_DEPTH + 5) + "\n")
    nested = "a: " + "[" * 10 + "]" * 10 + "\n"
    assert load_yaml_text(nested)["a"] == [[[[[[[[[[]]]]]]]]]]


def test_huge_text_and_file_are_refused(tmp_path):
    with pytest.raises(FaultwiseError, match="larger"):
        load_yaml_text("#" * (MAX_BYTES + 1))
    path = tmp_path / "huge.yaml"
    path.write_bytes(b"a: 1\n" + b"#" * MAX_BYTES)
    with pytest.raises(FaultwiseError, match="larger") as err:
        load_yaml_file(path)
    assert err.value.file == str(path)


@pytest.mark.parametrize("raw, fragment, line", [
    (b"a: 1\x00\n", "binary", None),
    (b"a: 1\nb: caf\xe9\n", "UTF-8", 2),
    (b"\xff\xfea\x00:\x00", "binary", None),
])
def test_binary_and_encoding(tmp_path, raw, fragment, line):
    path = tmp_path / "p.yaml"
    path.write_bytes(raw)
    with pytest.raises(FaultwiseError, match=fragment) as err:
        load_yaml_file(path)
    assert err.value.file == str(path)
    if line is not None:
        assert err.value.line == line


def test_utf8_with_bom_is_read(tmp_path):
    path = tmp_path / "p.yaml"
    path.write_bytes("\ufeffa: 4.7 kΩ\n".encode("utf-8"))
    assert load_yaml_file(path) == {"a": "4.7 kΩ"}


def test_missing_and_directory(tmp_path):
    with pytest.raises(FaultwiseError, match="not found"):
        load_yaml_file(tmp_path / "nope.yaml")
    with pytest.raises(FaultwiseError, match="not a file"):
        load_yaml_file(tmp_path)


@settings(max_examples=300, deadline=None)
@given(text=st.text(max_size=80))
def test_any_text_gives_data_or_a_faultwise_error(text):
    try:
        load_yaml_text(text, "fuzz.yaml")
    except FaultwiseError as exc:
        assert exc.file == "fuzz.yaml"


_ORACLE = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
_YAMLISH = st.text(alphabet="ab: -[]{}&*!?|>#'\"\n,%@`<=", max_size=40)


@settings(max_examples=300, deadline=None)
@given(text=_YAMLISH)
def test_yaml_punctuation_gives_data_or_a_faultwise_error(text):
    """PyYAML's own safe loader (on the same libyaml parser where present) is the oracle: where we return data it is the same data;
    where we refuse, PyYAML refuses too or the text holds what we refuse on purpose
    (an alias or a tag)."""
    try:
        ours = load_yaml_text(text, "fuzz.yaml")
    except FaultwiseError as exc:
        assert exc.file == "fuzz.yaml"
        try:
            yaml.load(text, Loader=_ORACLE)
        except yaml.YAMLError:
            return
        assert "*" in text or "!" in text, (text, str(exc))
        return
    if "!" not in text:        # a bare "!" (non-specific tag) makes a str, per the YAML spec;
        assert ours == yaml.load(text, Loader=_ORACLE)     # PyYAML's resolver gives None there
