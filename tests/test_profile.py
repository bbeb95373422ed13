"""Set profiles: loading, validation (located errors), typical values, round trip.

Outside references: ANSI C84.1 (120 V nominal), the superhet IF of 455 kHz and the
540-1600 kHz dial (receiver textbooks, secondary), Zp = (Np/Ns)^2 Zs (amateur handbooks,
secondary), IEC 60063 (E24 values), and receiving-tube handbook ratings via the tube table.
Where a figure is a trade habit it says "common practice, no source".
"""

from __future__ import annotations

import copy
import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from faultwise.core.codes import is_preferred
from faultwise.core.errors import FaultwiseError, ProfileError
from faultwise.profile.load import load_profile, profile_from_dict
from faultwise.profile.model import FAMILIES, TRANSISTOR_ROLES, Profile, profile_to_dict
from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.core.yamlload import load_yaml_file

ROOT = Path(__file__).resolve().parents[1]
FIXTURES = Path(__file__).resolve().parent / "fixtures" / "profiles"
SETS = bundled_knowledge_dir() / "sets"
DEMOS = sorted(SETS.glob("*.yaml"))
BAD = sorted((FIXTURES / "bad").glob("*.yaml"))
GOOD = sorted((FIXTURES / "good").glob("*.yaml"))
EXPECT = re.compile(r"^# expect: key=(\S+) line=(\d+) match=(.+)$")


def _expectation(path: Path) -> tuple[str, int, str]:
    m = EXPECT.match(path.read_text(encoding="utf-8").splitlines()[0])
    assert m, f"{path.name}: first line must be '# expect: key=... line=... match=...'"
    return m.group(1), int(m.group(2)), m.group(3)


# --- bad profiles: one file per kind of mistake -----------------------------------------

@pytest.mark.parametrize("path", BAD, ids=[p.stem for p in BAD])
def test_bad_profile_is_a_located_profile_error(path):
    key, line, fragment = _expectation(path)
    with pytest.raises(ProfileError) as err:
        load_profile(path)
    e = err.value
    assert (e.key, e.line) == (key, line), str(e)
    assert e.file == str(path)
    text = str(e)
    assert re.search(fragment, text), text
    assert "\n" not in text and text.endswith(".")
    assert text.startswith(f"{path}:{line}, key '{key}': ")
    assert e.hint, "every profile error says what to do"


def test_there_is_a_bad_fixture_for_each_kind_of_mistake():
    kinds = {p.stem for p in BAD}
    assert len(kinds) >= 40
    for needed in ("unknown-key", "list-for-number", "wrong-unit", "missing-label",
                   "band-reversed", "negative-resistance", "zero-capacitance", "if-inside-band",
                   "duplicate-tube-role", "unknown-family", "unknown-rectifier",
                   "unknown-circuit", "unknown-material", "unknown-polarity",
                   "unknown-tube-type", "transformer-no-winding", "wrong-format"):
        assert needed in kinds


def test_plain_dict_errors_have_the_key_but_no_line():
    data = {"label": "x", "family": "series-string",
            "tubes": [{"role": "output", "type": "50C5"}], "supply": {"surge_ohm": "4 uF"}}
    with pytest.raises(ProfileError) as err:
        profile_from_dict(data, source="case.json")
    assert err.value.key == "supply.surge_ohm" and err.value.line is None
    assert str(err.value).startswith("case.json, key 'supply.surge_ohm': expected a resistance")


def test_not_a_mapping():
    for data in ([1, 2], "text", 5, None, {}):
        with pytest.raises(ProfileError):
            profile_from_dict(data)


# --- demo sets -------------------------------------------------------------------------

@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_demo_set_loads(path):
    profile = load_profile(path)
    assert profile.label.startswith("Demo bench set")     # invented, no brand
    _assert_family_fields_filled(profile)
    again = profile_from_dict(profile_to_dict(profile), source=profile.source)
    assert again == profile


def test_demo_library_covers_the_families():
    profiles = [load_profile(p) for p in DEMOS]
    assert len(profiles) >= 7
    assert {p.family for p in profiles} == set(FAMILIES)
    materials = {(t.material, t.polarity) for p in profiles for t in p.transistors}
    assert {("germanium", "pnp"), ("silicon", "npn")} <= materials
    assert any(p.mains_v == 230 and p.mains_hz == 50 for p in profiles)     # IEC 60038 line


def test_a_demo_series_string_needs_a_dropping_resistor():
    # R = (line - sum of heaters) / string current, computed here (Ohm's law)
    needs = []
    for p in map(load_profile, DEMOS):
        if p.family == "series-string":
            total = sum(t.heater_v for t in p.tubes)
            ohm = (p.mains_v - total) / p.tubes[0].heater_a
            needs.append(ohm > 1.0)
    assert any(needs) and not all(needs)


def test_five_tube_demo_matches_the_handbook_sum():
    p = load_profile(SETS / "demo-5-tube-table.yaml")
    # receiving-tube handbooks (memory): 12.6 x 3 + 50 + 35
    assert sum(t.heater_v for t in p.tubes) == pytest.approx(12.6 * 3 + 50 + 35)
    assert p.typical == frozenset()        # every value is given in this demo


# --- typical values --------------------------------------------------------------------

FAMILY_FIELDS = {
    "series-string": ["mains_v", "mains_hz", "supply.rectifier", "supply.circuit",
                      "supply.surge_ohm", "supply.first_cap_uf", "supply.filter_ohm",
                      "supply.second_cap_uf", "supply.load_ma", "supply.filter_load_ma",
                      "audio.speaker_ohm", "audio.output_turns_ratio"],
    "transformer": ["mains_v", "mains_hz", "heater_winding_v", "supply.rectifier",
                    "supply.circuit", "supply.surge_ohm", "supply.first_cap_uf",
                    "supply.filter_ohm", "supply.second_cap_uf", "supply.load_ma",
                    "supply.filter_load_ma", "supply.secondary_v", "audio.speaker_ohm",
                    "audio.output_turns_ratio"],
    "transistor": ["battery_v", "audio.speaker_ohm"],
}
COMMON = ["band_low_khz", "band_high_khz", "if_khz", "gang_min_pf", "gang_max_pf",
          "gang_stray_pf"]


def _get(profile: Profile, dotted: str):
    value = profile
    for part in dotted.split("."):
        value = getattr(value, part)
    return value


def _assert_family_fields_filled(p: Profile) -> None:
    for name in COMMON + FAMILY_FIELDS[p.family]:
        assert _get(p, name) is not None, name
    for t in p.tubes:
        assert t.heater_v > 0 and t.heater_a > 0
        if t.role in ("output", "output2"):
            assert t.cathode_ohm and t.cathode_ma
    for t in p.transistors:
        assert t.material and t.polarity and t.beta >= 1
        assert t.bias.top_ohm > 0 and t.bias.bottom_ohm > 0
    if p.family == "transistor":
        assert p.transistors and not p.tubes and p.mains_v is None
    else:
        assert p.tubes and not p.transistors and p.battery_v is None


@pytest.mark.parametrize("path", GOOD, ids=[p.stem for p in GOOD])
def test_good_fixture_loads_filled(path):
    p = load_profile(path)
    _assert_family_fields_filled(p)
    assert profile_from_dict(profile_to_dict(p), source=p.source) == p


def test_series_string_typicals():
    p = load_profile(FIXTURES / "good" / "minimal-series-string.yaml")
    # ANSI C84.1 nominal 120 V; North American 60 Hz
    assert (p.mains_v, p.mains_hz) == (120.0, 60.0)
    # the North American dial and the US IF after about 1940 (receiver textbooks, 2nd)
    assert (p.band_low_khz, p.band_high_khz, p.if_khz) == (540.0, 1600.0, 455.0)
    # common practice, no source: 365 pF gang, half-wave from the line, 22 ohm surge,
    # 50 uF / 30 uF with 1000 ohm
    assert (p.gang_min_pf, p.gang_max_pf, p.gang_stray_pf) == (10.0, 365.0, 15.0)
    s = p.supply
    assert (s.rectifier, s.circuit, s.surge_ohm) == ("tube", "half-wave", 22.0)
    assert (s.first_cap_uf, s.second_cap_uf, s.filter_ohm) == (50.0, 30.0, 1000.0)
    assert s.secondary_v is None
    # the 50C5 output: cathode resistor and current from its typical operation (handbook,
    # memory): Vk = Ik Rk is near its -7.5 V grid bias
    out = p.tube("output")
    assert out.cathode_ohm * out.cathode_ma / 1000 == pytest.approx(7.5, rel=0.1)
    # Zp = (Np/Ns)^2 Zs with the 50C5's 2500 ohm load and a 3.2 ohm speaker (2nd)
    assert p.audio.output_turns_ratio == pytest.approx(math.sqrt(2500 / 3.2), abs=0.05)
    assert 0 < s.filter_load_ma < s.load_ma < 100          # within the 35W4's rating
    for key in ("mains.volts_v", "supply.surge_ohm", "tubes.output.cathode_ohm",
                "audio.output_turns_ratio", "supply.load_ma", "if_khz"):
        assert p.is_typical(key), key
    assert not p.is_typical("tubes.output.heater_v")   # a rating from the table, not a guess


def test_transformer_typicals():
    p = load_profile(FIXTURES / "good" / "minimal-transformer.yaml")
    # common practice, no source: full-wave centre-tapped, 250 V each half, 20/20 uF
    s = p.supply
    assert (s.rectifier, s.circuit, s.secondary_v) == ("tube", "full-wave", 250.0)
    assert (s.first_cap_uf, s.second_cap_uf) == (20.0, 20.0)
    assert p.heater_winding_v == 6.3 and p.is_typical("heater_winding_v")


def test_first_cap_typical_respects_the_rectifier_limit(tmp_path):
    # tube data (2nd): the 5Y3GT takes at most 20 uF as first filter capacitor
    path = tmp_path / "s.yaml"
    path.write_text("label: t\nfamily: transformer\ntubes:\n  - {role: output, type: 6V6GT}\n"
                    "  - {role: rectifier, type: 5Y3GT}\n", encoding="utf-8")
    assert load_profile(path).supply.first_cap_uf <= 20.0


def test_rectifier_follows_the_lineup():
    base = {"label": "t", "family": "series-string",
            "tubes": [{"role": "output", "type": "50C5"}]}
    assert profile_from_dict(base).supply.rectifier == "silicon"
    with_tube = copy.deepcopy(base)
    with_tube["tubes"].append({"role": "rectifier", "type": "35W4"})
    assert profile_from_dict(with_tube).supply.rectifier == "tube"


def test_half_wave_tube_in_a_transformer_set_defaults_to_half_wave():
    p = profile_from_dict({"label": "t", "family": "transformer", "tubes": [
        {"role": "output", "type": "6V6GT"}, {"role": "rectifier", "type": "35W4"}]})
    assert p.supply.circuit == "half-wave"


def test_transistor_typicals():
    p = load_profile(FIXTURES / "good" / "minimal-transistor.yaml")
    assert p.battery_v == 9.0 and p.is_typical("battery.volts_v")
    # common practice, no source: germanium portables are PNP; beta by material
    for t in p.transistors:
        assert (t.material, t.polarity) == ("germanium", "pnp")
        assert p.is_typical(f"transistors.{t.role}.bias.top_ohm")
    assert p.audio.output_turns_ratio is None         # not used by the transistor family
    assert p.audio.speaker_ohm == 8.0


def test_silicon_defaults_to_npn_and_spreads_to_the_other_stages():
    p = profile_from_dict({"label": "t", "family": "transistor", "transistors": [
        {"role": "if", "material": "silicon"}, {"role": "output"}]})
    assert [(t.material, t.polarity) for t in p.transistors] == [("silicon", "npn")] * 2
    assert not p.is_typical("transistors.if.material")
    assert p.is_typical("transistors.output.material")


def test_bias_typicals_keep_the_base_voltage_on_another_battery():
    # Thevenin divider Vth = Vb Rb / (Rt + Rb) (textbook); the 6 V set's typical divider
    # gives the base the same voltage as the 9 V set's, within E24 rounding (IEC 60063)
    def vth(p, role):
        b = p.transistor(role).bias
        return p.battery_v * b.bottom_ohm / (b.top_ohm + b.bottom_ohm)

    nine = profile_from_dict({"label": "t", "family": "transistor",
                              "transistors": [{"role": r} for r in TRANSISTOR_ROLES]})
    six = profile_from_dict({"label": "t", "family": "transistor", "battery": {"volts_v": 6},
                             "transistors": [{"role": r} for r in TRANSISTOR_ROLES]})
    for role in TRANSISTOR_ROLES:
        assert vth(six, role) == pytest.approx(vth(nine, role), rel=0.06), role
        assert is_preferred(six.transistor(role).bias.top_ohm, "E24"), role


def test_units_in_strings_are_converted():
    p = load_profile(FIXTURES / "good" / "units-in-strings.yaml")
    assert (p.mains_v, p.band_low_khz, p.gang_min_pf) == (117.0, 540.0, 12.0)
    out = p.tube("output")
    assert (out.cathode_ohm, out.cathode_ma) == (150.0, 45.0)
    s = p.supply
    assert (s.surge_ohm, s.filter_ohm, s.second_cap_uf, s.load_ma) == (22.0, 1000.0, 30.0, 55.0)
    assert (p.audio.speaker_ohm, p.audio.output_turns_ratio) == (3.2, 28.0)
    assert p.tube("converter").type == "12BE6"          # names normalised
    assert p.typical == frozenset()


def test_unknown_type_with_its_heater_is_accepted():
    p = load_profile(FIXTURES / "good" / "unknown-type-with-heater.yaml")
    assert (p.tube("converter").type, p.tube("converter").heater_v) == ("12QQ9", 12.6)


def test_suffix_variant_is_stored_under_the_table_name():
    p = profile_from_dict({"label": "t", "family": "series-string",
                           "tubes": [{"role": "output", "type": "50l6"}]})
    assert p.tube("output").type == "50L6GT"


def test_format_may_be_missing_or_version_one():
    data = {"label": "t", "family": "transistor", "transistors": [{"role": "output"}]}
    a = profile_from_dict(data)
    b = profile_from_dict({"format": "faultwise-set/1", **data})
    assert a == b


# --- round trip --------------------------------------------------------------------------

def test_round_trip_is_json_and_keeps_typical():
    p = load_profile(SETS / "demo-octal-series.yaml")
    d = profile_to_dict(p)
    text = json.dumps(d)
    assert sorted(json.loads(text)["typical"]) == sorted(p.typical)
    back = profile_from_dict(json.loads(text), source=p.source)
    assert back == p and back.typical == p.typical
    assert list(d)[:3] == ["format", "label", "family"]


def test_typical_key_marks_given_values():
    data = {"label": "t", "family": "series-string", "supply": {"surge_ohm": 27},
            "tubes": [{"role": "output", "type": "50C5"}], "typical": ["supply.surge_ohm"]}
    p = profile_from_dict(data)
    assert p.supply.surge_ohm == 27.0 and p.is_typical("supply.surge_ohm")


# --- hostile input through yamlload ------------------------------------------------------

HOSTILE = {
    "tag": ("label: !!python/object/apply:os.system ['echo hi']\nfamily: transistor\n", "tag", 1),
    # yamlload names the line of the first alias (*a), where the value is reused
    "alias": ("label: &a x\nfamily: transistor\nbattery: {volts_v: 9}\nx: *a\n", "alias", 4),
    "laughs": ("a: &a [1, 1]\nb: &b [*a, *a]\nc: [*b, *b]\n", "alias", 2),
    "deep": ("label: " + "[" * 60 + "]" * 60 + "\n", "nesting", None),
    "syntax": ("label: x\nfamily: [transistor\n", "syntax", None),
    "duplicate": ("label: x\nlabel: y\nfamily: transistor\n", "twice", 2),
    "custom-tag": ("label: !shout x\nfamily: transistor\n", "tag", 1),
}


@pytest.mark.parametrize("name", sorted(HOSTILE))
def test_hostile_yaml_is_a_located_profile_error(tmp_path, name):
    text, fragment, line = HOSTILE[name]
    path = tmp_path / f"{name}.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProfileError, match=fragment) as err:
        load_profile(path)
    assert err.value.file == str(path)
    if line is not None:
        assert err.value.line == line


@pytest.mark.parametrize("raw, fragment", [
    (b"label: x\x00\n", "binary"),
    (b"label: caf\xe9\nfamily: transistor\n", "UTF-8"),
    (b"", "empty"),
    (b"- 1\n- 2\n", "mapping"),
    (b"just text\n", "mapping"),
])
def test_binary_encoding_and_shape(tmp_path, raw, fragment):
    path = tmp_path / "p.yaml"
    path.write_bytes(raw)
    with pytest.raises(ProfileError, match=fragment) as err:
        load_profile(path)
    assert err.value.file == str(path)


def test_huge_and_missing_files(tmp_path):
    path = tmp_path / "huge.yaml"
    path.write_bytes(b"# " + b"x" * (5 * 1024 * 1024) + b"\n")
    with pytest.raises(ProfileError, match="larger"):
        load_profile(path)
    with pytest.raises(ProfileError, match="not found"):
        load_profile(tmp_path / "absent.yaml")
    with pytest.raises(ProfileError, match="not a file"):
        load_profile(tmp_path)


# --- property: mutations of valid profiles raise only FaultwiseError ----------------------

def _plain(data):
    return json.loads(json.dumps(data))


SEEDS = [_plain(load_yaml_file(p)) for p in DEMOS] + \
    [_plain(profile_to_dict(load_profile(p))) for p in DEMOS[:3]]

ODD_VALUES = st.one_of(
    st.none(), st.booleans(), st.integers(min_value=-10**30, max_value=10**30),
    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12),
    st.lists(st.integers(), max_size=3),
    st.dictionaries(st.text(max_size=6), st.integers(), max_size=2),
    st.sampled_from(["4k7", "160 V", "0", "-1", "1e400", "series-string", "transformer",
                     "transistor", "tube", "silicon", "full-wave", "bridge", "germanium",
                     "npn", "output", "rectifier", "12BE6", "5Y3GT", "35W4", "if", "nan"]),
)


def _places(data, out=None):
    """Every (container, key) in a nested structure of dicts and lists."""
    out = [] if out is None else out
    if isinstance(data, dict):
        for k in list(data):
            out.append((data, k))
            _places(data[k], out)
    elif isinstance(data, list):
        for i in range(len(data)):
            out.append((data, i))
            _places(data[i], out)
    return out


@settings(max_examples=250, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_mutated_profiles_raise_only_faultwise_errors(data):
    profile = copy.deepcopy(data.draw(st.sampled_from(SEEDS)))
    for _ in range(data.draw(st.integers(min_value=1, max_value=4))):
        places = _places(profile)
        if not places:
            break
        container, key = data.draw(st.sampled_from(places))
        action = data.draw(st.sampled_from(["replace", "replace", "delete", "add"]))
        if action == "replace":
            container[key] = data.draw(ODD_VALUES)
        elif action == "delete":
            del container[key]
        elif isinstance(container, dict):
            container[data.draw(st.text(max_size=10))] = data.draw(ODD_VALUES)
        else:
            container.append(data.draw(ODD_VALUES))
    try:
        p = profile_from_dict(profile)
    except FaultwiseError as exc:
        assert "\n" not in str(exc)
        return
    _assert_family_fields_filled(p)


# --- the command line --------------------------------------------------------------------

@pytest.mark.parametrize("name", ["unknown-key", "wrong-unit", "transformer-no-winding"])
def test_cli_expect_reports_a_bad_profile_in_one_line(name):
    path = FIXTURES / "bad" / f"{name}.yaml"
    key, line, _ = _expectation(path)
    run = subprocess.run([sys.executable, "-m", "faultwise", "expect", str(path)],
                         capture_output=True, text=True, timeout=60, cwd=ROOT)
    assert run.returncode == 1
    assert "Traceback" not in run.stderr
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1 and f":{line}" in lines[0] and key in lines[0]
