"""The built-in tube table against receiving-tube handbook ratings.

Heater ratings are those listed under "Receiving tubes (heater ratings)" in the project's
outside references: mostly memory of receiving-tube handbooks; the 6V6GT's 0.45 A, the
6X4's 6.3 V 0.6 A, the 5Y3GT's 2.0 A and the 35Z5GT's 7.5 V dial-lamp tap were checked in
secondary sources. Rectifier figures are from tube data (secondary source) as listed under
"Rectifier and filter".
"""

from __future__ import annotations

import math

import pytest

from faultwise.core.errors import KnowledgeError
from faultwise.profile.tubes import load_tube_table, lookup, parse_tube_table
from faultwise.core.yamlload import load_yaml_text


@pytest.fixture(scope="module")
def table():
    return load_tube_table()


@pytest.mark.parametrize("name", ["12BE6", "12BA6", "12AV6", "12AT6", "12SA7", "12SK7", "12SQ7"])
def test_150ma_12v_types(table, name):
    # receiving-tube handbooks (mostly memory): 12.6 V 0.15 A
    tube = lookup(name, table)
    assert (tube.heater_v, tube.heater_a) == (12.6, 0.15)


@pytest.mark.parametrize("name, volts", [("50C5", 50), ("50L6GT", 50), ("35C5", 35),
                                         ("35W4", 35), ("35Z5GT", 35)])
def test_150ma_output_and_rectifier_types(table, name, volts):
    # receiving-tube handbooks (mostly memory): 50 V or 35 V at 0.15 A
    tube = lookup(name, table)
    assert (tube.heater_v, tube.heater_a) == (volts, 0.15)


def test_35z5gt_has_a_dial_lamp_tap(table):
    # secondary source: the 35Z5GT heater is tapped at 7.5 V for a dial lamp
    assert lookup("35Z5GT", table).dial_tap_v == 7.5


@pytest.mark.parametrize("name, amps", [("6BE6", 0.3), ("6BA6", 0.3), ("6AV6", 0.3),
                                        ("6SA7", 0.3), ("6SK7", 0.3), ("6SQ7", 0.3),
                                        ("6V6GT", 0.45), ("6AQ5", 0.45), ("6X4", 0.6)])
def test_6v_parallel_types(table, name, amps):
    # 0.3 A types: handbook, memory; 6V6GT 0.45 A secondary source, 6AQ5 memory;
    # 6X4 6.3 V 0.6 A datasheet text (secondary source)
    tube = lookup(name, table)
    assert (tube.heater_v, tube.heater_a) == (6.3, amps)


def test_5y3gt(table):
    # 5.0 V handbook (memory), 2.0 A secondary source
    tube = lookup("5Y3GT", table)
    assert (tube.heater_v, tube.heater_a) == (5.0, 2.0)


def test_five_tube_lineup_sums_to_the_line(table):
    # handbook heater ratings; the sum is computed here: 12.6 x 3 + 50 + 35 = 122.8 V,
    # which some secondary sources round to 121 V
    lineup = ["12BE6", "12BA6", "12AV6", "50C5", "35W4"]
    total = sum(lookup(n, table).heater_v for n in lineup)
    assert total == pytest.approx(12.6 * 3 + 50 + 35)
    assert {lookup(n, table).heater_a for n in lineup} == {0.15}
    # heaters within ±10 % of rating at normal line (amateur and tube handbooks, 2nd):
    # the string is designed for about 117-120 V
    assert 0.9 * 120 <= total <= 1.1 * 117


def test_rectifier_figures(table):
    # tube data (secondary source): 6X4 about 22 V at 70 mA; 5Y3GT about 60 V at 125 mA,
    # first filter capacitor at most 20 uF; 35Z5GT at most 100 mA rectified
    r = lookup("6X4", table).rectifier
    assert (r.drop_v, r.drop_at_ma, r.circuit) == (22, 70, "full-wave")
    r = lookup("5Y3GT", table).rectifier
    assert (r.drop_v, r.drop_at_ma, r.max_first_cap_uf, r.circuit) == (60, 125, 20, "full-wave")
    assert lookup("35Z5GT", table).rectifier.max_dc_ma == 100
    assert lookup("35W4", table).rectifier.circuit == "half-wave"


def test_table_size_and_completeness(table):
    assert len(table) >= 45
    for name, tube in table.items():
        assert tube.heater_v > 0 and tube.heater_a > 0, name
        assert tube.source.strip(), name
        assert tube.base and tube.kind and tube.roles, name
        if tube.rectifier:
            assert tube.rectifier.source.strip(), name
        if tube.operation:
            assert tube.operation.source.strip(), name


def test_series_string_types_take_150ma(table):
    # common practice, no source: a 150 mA series-string type has a 0.15 A heater
    series = [t for t in table.values() if t.series_ma == 150]
    assert len(series) >= 25
    assert all(t.heater_a == 0.15 for t in series)
    assert all(t.heater_a == 0.3 for t in table.values() if t.series_ma == 300)


def test_rectifier_role_and_data_agree(table):
    # common practice, no source: every rectifier type says what the rectifier model needs
    for tube in table.values():
        assert ("rectifier" in tube.roles) == tube.is_rectifier, tube.name
        if tube.is_rectifier and tube.rectifier.drop_v is not None:
            assert tube.rectifier.drop_at_ma > 0


def test_output_operation_obeys_ohms_law(table):
    # textbook: cathode bias Vk = Ik x Rk, with Ik = plate + screen current; the table's
    # cathode resistor gives the grid bias of the typical operation within E12 rounding
    outputs = [t for t in table.values() if "output" in t.roles]
    assert len(outputs) >= 10
    for tube in outputs:
        op = tube.operation
        assert op is not None, tube.name
        assert op.cathode_ma == pytest.approx(op.plate_ma + op.screen_ma), tube.name
        vk = op.cathode_ohm * op.cathode_ma / 1000
        assert vk == pytest.approx(abs(op.grid_v), rel=0.10), tube.name
        # Pout < Pin: the power output is less than the plate dissipation at rest
        assert op.power_w < op.plate_v * op.plate_ma / 1000, tube.name


@pytest.mark.parametrize("query, name", [
    ("50L6", "50L6GT"), ("50l6gt", "50L6GT"), ("50 L6-GT", "50L6GT"), ("6V6", "6V6GT"),
    ("6V6GTA", "6V6GT"), ("5Y3", "5Y3GT"), ("5y3g", "5Y3GT"), ("35Z5", "35Z5GT"),
    ("12SA7GT", "12SA7"), ("12ba6", "12BA6"), ("6BQ5", "EL84"), ("6CA4", "EZ81"), ("80", "80"),
])
def test_lookup_normalises_and_finds_variants(table, query, name):
    assert lookup(query, table).name == name


@pytest.mark.parametrize("query", ["12XY9", "", "   ", "50C5GTX", "6V6GTB"])
def test_lookup_unknown_is_none(table, query):
    assert lookup(query, table) is None


def test_lookup_refuses_variants_whose_heaters_differ():
    text = """
format: faultwise-tubes/1
tubes:
  - {type: 9Z9, heater_v: 6.3, heater_a: 0.3, base: octal, kind: k, roles: [if], source: s}
  - {type: 9Z9GT, heater_v: 12.6, heater_a: 0.15, base: octal, kind: k, roles: [if], source: s}
"""
    table = parse_tube_table(load_yaml_text(text, "t.yaml"), "t.yaml")
    assert lookup("9Z9GT", table).heater_v == 12.6
    assert lookup("9Z9G", table) is None        # G could be either: do not guess


def test_table_is_cached_per_path(table):
    assert load_tube_table() is table


GOOD = "  - {type: 1X1, heater_v: 6.3, heater_a: 0.3, base: octal, kind: k, roles: [if], source: s}"


@pytest.mark.parametrize("entry, key, fragment", [
    (GOOD.replace("heater_v: 6.3, ", ""), "tubes[0].heater_v", "missing"),
    (GOOD.replace("heater_a: 0.3", "heater_a: -0.3"), "tubes[0].heater_a", "positive"),
    (GOOD.replace("heater_a: 0.3", "heater_a: [0.3]"), "tubes[0].heater_a", "number"),
    (GOOD.replace(", source: s", ""), "tubes[0].source", "text"),
    (GOOD.replace("octal", "12-pin"), "tubes[0].base", "base"),
    (GOOD.replace("[if]", "[speaker]"), "tubes[0].roles", "role"),
    (GOOD.replace("kind: k", "kind: k, hot: 1"), "tubes[0].hot", "unknown key"),
    (GOOD + "\n" + GOOD, "tubes[1].type", "twice"),
    (GOOD.replace("}", ", rectifier: {circuit: triple, source: s}}"), "tubes[0].rectifier.circuit",
     "circuit"),
])
def test_bad_table_is_a_located_knowledge_error(tmp_path, entry, key, fragment):
    path = tmp_path / "tubes.yaml"
    path.write_text("format: faultwise-tubes/1\ntubes:\n" + entry + "\n", encoding="utf-8")
    with pytest.raises(KnowledgeError, match=fragment) as err:
        load_tube_table(tmp_path)
    assert err.value.key == key
    assert err.value.file == str(path.resolve())
    assert err.value.line in (3, 4)


def test_missing_or_damaged_table(tmp_path):
    with pytest.raises(KnowledgeError, match="missing"):
        load_tube_table(tmp_path)
    (tmp_path / "tubes.yaml").write_bytes(b"tubes: [\x00]")
    with pytest.raises(KnowledgeError, match="binary"):
        load_tube_table(tmp_path)
    (tmp_path / "tubes.yaml").write_text("format: faultwise-tubes/9\ntubes: []\n")
    with pytest.raises(KnowledgeError, match="format") as err:
        load_tube_table(tmp_path)
    assert err.value.line == 1


def test_heater_power_is_plausible(table):
    # common practice, no source: receiving-tube heaters take 1-16 W
    for tube in table.values():
        assert 1.0 <= tube.heater_v * tube.heater_a <= 16.0, tube.name
        assert math.isfinite(tube.heater_v)
