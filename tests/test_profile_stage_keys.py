"""Profile keys of the voltage chart: tubes[] stage parts and the transistor output_stage."""

from __future__ import annotations

import pytest

from faultwise.core.errors import ProfileError
from faultwise.expect import expect
from faultwise.profile import load_profile, profile_from_dict, profile_to_dict
from faultwise.core.yamlload import load_yaml_text

BASE = """\
label: t
family: series-string
tubes:
  - {role: converter, type: 12BE6}
  - {role: if, type: 12BA6, cathode_ohm: 0, screen_ohm: 0, plate_ohm: 12, supply: second}
  - {role: detector, type: 12AV6, plate_ohm: 470k, grid_ohm: 10M}
  - {role: output, type: 50C5}
  - {role: rectifier, type: 35W4}
"""


def test_given_parts_are_used_and_not_typical():
    p = profile_from_dict(load_yaml_text(BASE, "t.yaml"), "t.yaml")
    assert p.tube("detector").plate_ohm == 470e3 and p.tube("detector").grid_ohm == 10e6
    exp = expect(p)
    # cathode returned to B- directly: no cathode volts at all, the grid bias from the AVC
    assert exp["stage.if.cathode_v"].nominal == 0.0
    assert "470000 ohm" in exp["stage.detector.plate_v"].basis
    # round trip through the contract shape keeps the parts
    again = profile_from_dict(profile_to_dict(p), "again")
    assert again.tube("if") == p.tube("if")


@pytest.mark.parametrize("line, key, word", [
    ("  - {role: output, type: 50C5, supply: third}", "supply", "third"),
    ("  - {role: output, type: 50C5, anode_ohm: 100}", "anode_ohm", "anode_ohm"),
    ("  - {role: output, type: 50C5, screen_ohm: -5}", "screen_ohm", "screen_ohm"),
])
def test_bad_stage_keys_are_located(tmp_path, line, key, word):
    text = BASE.replace("  - {role: output, type: 50C5}", line)
    path = tmp_path / "bad.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProfileError) as exc:
        load_profile(path)
    assert exc.value.line == 7
    assert key in (exc.value.key or "") and word in str(exc.value)


def test_output_stage_typical_and_given():
    data = {"label": "t", "family": "transistor",
            "transistors": [{"role": "output", "polarity": "npn"},
                            {"role": "output2", "polarity": "pnp"}]}
    p = profile_from_dict(data)
    assert p.output_stage == "complementary" and "output_stage" in p.typical
    p = profile_from_dict(dict(data, output_stage="single-ended"))
    assert p.output_stage == "single-ended" and "output_stage" not in p.typical
    assert "bias.output.idle_ma" not in expect(p)          # class A keeps the divider model
    with pytest.raises(ProfileError):
        profile_from_dict(dict(data, output_stage="push-pull"))
    with pytest.raises(ProfileError):
        profile_from_dict({"label": "t", "family": "series-string", "output_stage": "complementary",
                           "tubes": [{"role": "output", "type": "50C5"}]})
