"""expect(): the contract names per family, bands, typical flags; the `faultwise expect` command."""

from __future__ import annotations

import json
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from faultwise.expect.expected import STAGES, Expected, expect, expectation_names
from faultwise.profile.model import (TRANSISTOR_ROLES, TUBE_ROLES, Audio, Bias, Profile, Supply,
                                     Transistor, Tube)

ROOT = Path(__file__).resolve().parents[1]
SETS = ROOT / "knowledge" / "sets"
PY = "/work/.venv/bin/python" if Path("/work/.venv/bin/python").exists() else sys.executable

# DESIGN.md section 5 (contract), by the families that have each name
CONTRACT = {
    "series-string": {"heaters.string_v", "heaters.string_ma", "heaters.dropping_ohm",
                      "supply.rectifier_out_v", "supply.ripple_vpp", "supply.filtered_v",
                      "output.reflected_ohm", "output.cathode_v"},
    "transformer": {"heaters.winding_v", "heaters.total_a", "supply.rectifier_out_v",
                    "supply.ripple_vpp", "supply.filtered_v", "output.reflected_ohm",
                    "output.cathode_v"},
    "transistor": {"supply.battery_v"},
}
TUNING = {"tuning.lo_low_khz", "tuning.lo_high_khz", "tuning.image_low_khz",
          "tuning.image_high_khz", "tuning.cap_ratio", "tuning.antenna_uh"}
# DEVELOPERS.md "Expectation names" beyond the contract
EXTRA = {
    "series-string": {"mains.line_v", "supply.filter_drop_v", "output.plate_v",
                      "output.primary_ohm", "output.voice_coil_ohm", "detector.avc_v",
                      "detector.time_constant_us", "oscillator.grid_v", "if.peak_khz",
                      "if.bandwidth_khz", "tuning.osc_uh", "tuning.align_low_khz",
                      "tuning.align_high_khz", "safety.leakage_v"},
    "transformer": {"mains.line_v", "supply.filter_drop_v", "supply.secondary_v",
                    "output.plate_v", "output.primary_ohm", "output.voice_coil_ohm",
                    "detector.avc_v", "detector.time_constant_us", "oscillator.grid_v",
                    "if.peak_khz", "if.bandwidth_khz", "tuning.osc_uh", "tuning.align_low_khz",
                    "tuning.align_high_khz", "safety.leakage_v"},
    "transistor": {"supply.standby_ma", "output.voice_coil_ohm", "detector.avc_v",
                   "detector.time_constant_us", "oscillator.emitter_shift_v", "if.peak_khz",
                   "if.bandwidth_khz", "tuning.osc_uh", "tuning.align_low_khz",
                   "tuning.align_high_khz"},
}

COMMON = {"label": "test set", "band_low_khz": 540, "band_high_khz": 1600, "if_khz": 455,
          "gang_min_pf": 12, "gang_max_pf": 365, "gang_stray_pf": 15}


def series_string(**kw) -> Profile:
    tubes = (Tube("converter", "12BE6", 12.6, 0.15), Tube("if", "12BA6", 12.6, 0.15),
             Tube("detector", "12AV6", 12.6, 0.15), Tube("output", "50C5", 50, 0.15, 150, 45),
             Tube("rectifier", "35W4", 35, 0.15))
    base = dict(COMMON, family="series-string", mains_v=120, mains_hz=60, tubes=tubes,
                supply=Supply("tube", "half-wave", 22, 50, 1000, 30, 55, 12),
                audio=Audio(3.2, 28))
    return Profile(**{**base, **kw})


def transformer(**kw) -> Profile:
    tubes = (Tube("converter", "6BE6", 6.3, 0.3), Tube("if", "6BA6", 6.3, 0.3),
             Tube("detector", "6AV6", 6.3, 0.3), Tube("output", "6V6GT", 6.3, 0.45, 250, 45),
             Tube("rectifier", "5Y3GT", 5.0, 2.0))
    base = dict(COMMON, family="transformer", mains_v=120, mains_hz=60, tubes=tubes,
                heater_winding_v=6.3,
                supply=Supply("tube", "full-wave", 100, 20, 1500, 20, 70, 25, 250),
                audio=Audio(3.2, 30))
    return Profile(**{**base, **kw})


def transistor(**kw) -> Profile:
    trs = (Transistor("converter", "germanium", "pnp", 80, Bias(56e3, 8.2e3, 1e3)),
           Transistor("if", "germanium", "pnp", 60, Bias(47e3, 6.8e3, 1e3)),
           Transistor("audio", "silicon", "npn", 150, Bias(100e3, 22e3, 1e3, 4.7e3)))
    base = dict(COMMON, family="transistor", gang_max_pf=140, gang_min_pf=8, gang_stray_pf=10,
                battery_v=9, transistors=trs, audio=Audio(8, 10))
    return Profile(**{**base, **kw})


BUILDERS = {"series-string": series_string, "transformer": transformer, "transistor": transistor}


@pytest.mark.parametrize("family", list(BUILDERS))
def test_contract_and_guide_names_are_produced(family):
    p = BUILDERS[family]()
    e = expect(p)
    want = CONTRACT[family] | TUNING | EXTRA[family]
    assert want <= set(e), sorted(want - set(e))
    if p.line_powered:
        assert {f"heater.{t.role}.v" for t in p.tubes} <= set(e)
        assert {f"heater.{t.role}.cold_ohm" for t in p.tubes} <= set(e)
    else:
        for t in p.transistors:
            assert {f"bias.{t.role}.{f}" for f in ("vb_v", "ve_v", "ic_ma", "vc_v")} <= set(e)


@pytest.mark.parametrize("family", list(BUILDERS))
def test_names_are_exactly_within_expectation_names(family):
    p = BUILDERS[family]()
    names = expectation_names(family)
    assert set(expect(p)) <= names
    # the role vocabulary of profile.py is covered
    if family == "transistor":
        assert {f"bias.{r}.ic_ma" for r in TRANSISTOR_ROLES} <= names
        assert not any(n.startswith("heater") for n in names)
    else:
        assert {f"heater.{r}.v" for r in TUBE_ROLES} <= names
        assert not any(n.startswith("bias.") for n in names)
    assert expectation_names("no-such-family") == frozenset()


@pytest.mark.parametrize("family", list(BUILDERS))
def test_every_expectation_is_well_formed(family):
    units = {"V", "mA", "A", "ohm", "kHz", "uH", "pF", "uF", "Vpp", "us", "m", "ratio", "W"}
    for name, x in expect(BUILDERS[family]()).items():
        assert isinstance(x, Expected) and x.name == name
        assert x.stage in STAGES
        assert x.unit in units
        assert x.low <= x.nominal <= x.high, name
        assert x.absent_below >= 0 and x.absent_below <= max(x.low, 0) + 1e-12, name
        assert x.basis and x.title
        assert set(x.to_json()) == {"nominal", "low", "high", "unit", "basis", "typical"}


def test_string_sum_basis_shows_this_sets_numbers():
    # DESIGN section 5 example: 12.6+12.6+12.6+50+35 = 122.8 V
    e = expect(series_string())["heaters.string_v"]
    assert e.basis.startswith("12.6+12.6+12.6+50+35 = 122.8 V")
    assert e.nominal == pytest.approx(12.6 * 3 + 50 + 35)


def test_line_band_is_ansi_range_a_and_iec_60038():
    assert (expect(series_string())["mains.line_v"].low,
            expect(series_string())["mains.line_v"].high) == (114, 126)      # ANSI C84.1 Range A
    e = expect(transformer(mains_v=230, mains_hz=50))["mains.line_v"]
    assert (e.low, e.high) == pytest.approx((207, 253))                      # IEC 60038


def test_leakage_is_a_limit_with_zero_normal():
    e = expect(series_string())["safety.leakage_v"]
    assert (e.nominal, e.low, e.high, e.absent_below) == (0, 0, 0.75, 0)


def test_dropping_resistor_when_the_string_is_short():
    four = series_string(tubes=series_string().tubes[:3] + (Tube("output", "35C5", 35, 0.15, 150, 40),
                                                          Tube("rectifier", "35W4", 35, 0.15)))
    e = expect(four)["heaters.dropping_ohm"]
    total = 12.6 * 3 + 35 + 35
    assert e.nominal == pytest.approx((120 - total) / 0.15)
    assert e.low < e.nominal < e.high


def test_pnp_basis_states_the_polarity():
    e = expect(transistor())
    assert "PNP" in e["bias.converter.ic_ma"].basis and "negative" in e["bias.converter.ic_ma"].basis
    assert "NPN" in e["bias.audio.vc_v"].basis


def test_typical_flag_follows_profile_typical():
    plain = expect(series_string())
    assert not plain["supply.rectifier_out_v"].typical
    assert not plain["heaters.string_v"].typical
    flagged = expect(series_string(typical=frozenset({"supply.surge_ohm"})))
    assert flagged["supply.rectifier_out_v"].typical
    assert flagged["supply.ripple_vpp"].typical
    assert not flagged["heaters.string_v"].typical
    assert not flagged["tuning.lo_low_khz"].typical
    band = expect(series_string(typical=frozenset({"band.low_khz", "band.high_khz"})))
    assert band["tuning.lo_low_khz"].typical and band["antenna.half_wave_m"].typical
    assert not band["supply.rectifier_out_v"].typical
    tr = expect(transistor(typical=frozenset({"transistors.if.beta"})))
    assert tr["bias.if.ic_ma"].typical and not tr["bias.converter.ic_ma"].typical
    assert tr["supply.standby_ma"].typical


def test_bands_move_with_the_profile():
    # more load: lower B+ and more ripple (physics of the capacitor-input filter)
    base = expect(series_string())
    heavy = expect(series_string(supply=replace(series_string().supply, load_ma=75)))
    assert heavy["supply.rectifier_out_v"].nominal < base["supply.rectifier_out_v"].nominal
    assert heavy["supply.ripple_vpp"].nominal > base["supply.ripple_vpp"].nominal


def test_impossible_supply_is_a_located_profile_error():
    from faultwise.core.errors import ProfileError

    p = series_string(supply=replace(series_string().supply, load_ma=900, filter_load_ma=100),
                      source="bad.yaml")
    with pytest.raises(ProfileError) as info:
        expect(p)
    assert "bad.yaml" in str(info.value) and "supply.load_ma" in str(info.value)


# ------------------------------------------------------------------ demo sets and the command

def _demo_sets() -> list[Path]:
    return sorted(SETS.glob("*.yaml"))


def test_demo_sets_produce_their_familys_names():
    from faultwise.profile.load import load_profile

    sets = _demo_sets()
    assert len(sets) >= 10, "the bundled knowledge ships ten demo sets"
    for path in sets:
        p = load_profile(path)
        e = expect(p)
        assert set(e) <= expectation_names(p.family), path.name
        assert CONTRACT[p.family] - {"output.cathode_v"} <= set(e), path.name
        for x in e.values():
            assert x.low <= x.nominal <= x.high, (path.name, x.name)


def _run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([PY, "-m", "faultwise", "expect", *args], capture_output=True,
                          text=True, cwd=ROOT, timeout=60, check=False)


def _a_demo_set() -> Path:
    named = [s for s in _demo_sets() if "5-tube" in s.name]
    assert named, "the demo 5-tube series-string table set is bundled"
    return named[0]


def test_command_prints_the_table():
    proc = _run(str(_a_demo_set()))
    assert proc.returncode == 0, proc.stderr
    out = proc.stdout
    assert "SUPPLY" in out and "supply.rectifier_out_v" in out
    assert "rests on a typical value" in out          # the legend of the marker
    assert "band:" in out                             # bases shown


def test_command_json_shape():
    proc = _run(str(_a_demo_set()), "--json")
    assert proc.returncode == 0, proc.stderr
    doc = json.loads(proc.stdout)
    assert set(doc) == {"profile", "expectations"}
    assert doc["profile"]["format"] == "faultwise-set/1"
    assert doc["expectations"]
    for name, x in doc["expectations"].items():
        assert {"nominal", "low", "high", "unit", "basis", "typical"} <= set(x), name
        assert isinstance(x["typical"], bool)
        assert x["low"] <= x["nominal"] <= x["high"]


def test_command_bad_path_is_one_line_exit_1(tmp_path):
    proc = _run(str(tmp_path / "missing.yaml"))
    assert proc.returncode == 1
    assert proc.stdout == ""
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in proc.stderr
    assert "missing.yaml" in lines[0]
