"""Profile section readers for the lineup: the tubes with their heaters, and the transistors.

Each reader takes the :class:`faultwise.profile.fields.ProfileReader` of the profile being
read and raises ProfileError located by file, line and key.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING

from faultwise.profile.model import (OUTPUT_ROLES, MATERIALS, POLARITIES, TRANSISTOR_ROLES,
                                     TUBE_ROLES, Bias, Transistor, Tube)
from faultwise.profile.fields import (TRANSISTOR_KEYS, TUBE_KEYS, TUBE_SUPPLY_POINTS, BIAS_KEYS,
                                      ProfileReader,
                                      item_line, nearest)
from faultwise.profile.typical import (TYPICAL_BETA, TYPICAL_MATERIAL, TYPICAL_OUTPUT,
                                       TYPICAL_POLARITY, typical_bias)

if TYPE_CHECKING:
    from faultwise.profile.tubes import TubeTable, TubeType


def read_tubes(r: ProfileReader, data: dict, family: str, table: TubeTable) -> list[Tube]:
    from faultwise.profile.tubes import lookup, normalise_name

    rows = r.sequence(data.get("tubes"), "tubes", r.line(data, "tubes"))
    if not rows:
        raise r.error(f"a {family} set needs its tube lineup", "tubes",
                      r.line(data, "tubes") or r.line(data),
                      "list the tubes, e.g. tubes: [{role: converter, type: 12BE6}, ...]")
    tubes: list[Tube] = []
    roles: dict[str, int] = {}
    for i, raw in enumerate(rows):
        path = f"tubes[{i}]"
        item = r.mapping(raw, path, item_line(rows, i))
        r.keys(item, TUBE_KEYS, path)
        role = r.choice(item, "role", path, TUBE_ROLES, required=True)
        if role in roles:
            raise r.error(f"role '{role}' is given twice (also tubes[{roles[role]}])",
                          f"{path}.role", r.line(item, "role"),
                          "roles are unique: use if2, output2 and so on for a second stage")
        roles[role] = i
        typed = r.text(item, "type", path, required=True)
        known = lookup(typed, table)
        heater_v = r.number(item, "heater_v", path)
        heater_a = r.number(item, "heater_a", path)
        if known is None and (heater_v is None or heater_a is None):
            near = nearest(normalise_name(typed), table, cutoff=50)
            missing = "heater_v and heater_a" if heater_v is None and heater_a is None else \
                ("heater_v" if heater_v is None else "heater_a")
            raise r.error(f"tube type '{typed}' is not in the tube table", f"{path}.type",
                          r.line(item, "type"),
                          f"give {missing} for it" + (f", or check the type (nearest known: "
                                                      f"{near})" if near else ""))
        if known is not None:
            _check_role_fits(r, item, path, role, known)
        tubes.append(Tube(
            role=role, type=known.name if known else normalise_name(typed),
            heater_v=heater_v if heater_v is not None else known.heater_v,
            heater_a=heater_a if heater_a is not None else known.heater_a,
            cathode_ohm=r.number(item, "cathode_ohm", path, strict=role in OUTPUT_ROLES),
            cathode_ma=r.number(item, "cathode_ma", path),
            plate_ohm=r.number(item, "plate_ohm", path, strict=False),
            screen_ohm=r.number(item, "screen_ohm", path, strict=False),
            grid_ohm=r.number(item, "grid_ohm", path),
            supply=r.choice(item, "supply", path, TUBE_SUPPLY_POINTS)))
    if "output" not in roles:
        raise r.error("no tube has the role 'output'", "tubes", r.line(data, "tubes"),
                      "mark the audio output tube with role: output")
    return tubes


def _check_role_fits(r: ProfileReader, item: dict, path: str, role: str,
                     known: TubeType) -> None:
    if role == "rectifier" and not known.is_rectifier:
        raise r.error(f"{known.name} is a {known.kind}, not a rectifier", f"{path}.type",
                      r.line(item, "type"), "check the type or the role")
    if role != "rectifier" and known.is_rectifier:
        raise r.error(f"{known.name} is a rectifier, but its role is '{role}'", f"{path}.role",
                      r.line(item, "role"), "give it role: rectifier")


def fill_output_tubes(r: ProfileReader, tubes: list[Tube], family: str,
                      table: TubeTable) -> list[Tube]:
    """Cathode resistor and current of the output tube(s) from the table's typical operation."""
    from faultwise.profile.tubes import lookup

    out = []
    for tube in tubes:
        if tube.role in OUTPUT_ROLES:
            op = getattr(lookup(tube.type, table), "operation", None)
            rk, ik, _ = TYPICAL_OUTPUT[family]
            if op is not None:
                rk, ik = op.cathode_ohm, op.cathode_ma
            tube = replace(tube,
                           cathode_ohm=r.fill(tube.cathode_ohm, rk, f"tubes.{tube.role}.cathode_ohm"),
                           cathode_ma=r.fill(tube.cathode_ma, ik, f"tubes.{tube.role}.cathode_ma"))
        out.append(tube)
    return out


def check_series_string(r: ProfileReader, data: dict, tubes: list[Tube], mains_v: float,
                        mains_typical: bool) -> None:
    currents = [t.heater_a for t in tubes]
    string_a = max(set(currents), key=currents.count)
    rows = data.get("tubes")
    for i, t in enumerate(tubes):
        if not math.isclose(t.heater_a, string_a, rel_tol=0.02):
            item = rows[i] if isinstance(rows, list) else {}
            raise r.error(f"the {t.role} tube's heater takes {t.heater_a:g} A but the string "
                          f"carries {string_a:g} A", f"tubes[{i}].heater_a",
                          r.line(item, "heater_a") if isinstance(item, dict) else None,
                          "a series string carries one current: check the type or heater_a")
    total = sum(t.heater_v for t in tubes)
    if total > 1.1 * mains_v:
        raise r.error(f"the heaters add up to {total:g} V, more than the {mains_v:g} V line"
                      + (" (typical)" if mains_typical else ""), "tubes",
                      r.line(data, "tubes"),
                      "give mains.volts_v if the set is for another line, or check the types")


def heater_winding(r: ProfileReader, data: dict, tubes: list[Tube]) -> float:
    rows = data.get("tubes")
    given = r.number(data, "heater_winding_v", "")
    fed = [(i, t) for i, t in enumerate(tubes) if t.role != "rectifier"]
    if given is None:
        volts = sorted({t.heater_v for _, t in fed})
        if len(volts) != 1:
            raise r.error("the tubes' heaters differ (" + ", ".join(f"{v:g} V" for v in volts)
                          + ") and no heater winding is given", "heater_winding_v",
                          r.line(data, "tubes"),
                          "give heater_winding_v, the voltage of the winding that feeds them")
        return r.fill(None, volts[0], "heater_winding_v")
    for i, t in fed:
        if not math.isclose(t.heater_v, given, rel_tol=0.1):
            item = rows[i] if isinstance(rows, list) and isinstance(rows[i], dict) else {}
            raise r.error(f"the {t.role} tube ({t.type}) has a {t.heater_v:g} V heater but the "
                          f"heater winding gives {given:g} V", f"tubes[{i}].type",
                          r.line(item, "type") if item else None,
                          "check heater_winding_v or the tube type")
    return given


def read_transistors(r: ProfileReader, data: dict, battery_v: float) -> list[Transistor]:
    rows = r.sequence(data.get("transistors"), "transistors", r.line(data, "transistors"))
    if not rows:
        raise r.error("a transistor set needs its transistor stages", "transistors",
                      r.line(data, "transistors") or r.line(data),
                      "list them, e.g. transistors: [{role: converter, material: germanium}, ...]")
    items = []
    for i, raw in enumerate(rows):
        path = f"transistors[{i}]"
        item = r.mapping(raw, path, item_line(rows, i))
        r.keys(item, TRANSISTOR_KEYS, path)
        items.append((path, item))
    given = [r.choice(item, "material", path, MATERIALS) for path, item in items]
    named = [m for m in given if m]
    default_material = max(set(named), key=named.count) if named else TYPICAL_MATERIAL
    out: list[Transistor] = []
    roles: dict[str, int] = {}
    for (path, item), material in zip(items, given):
        role = r.choice(item, "role", path, TRANSISTOR_ROLES, required=True)
        if role in roles:
            raise r.error(f"role '{role}' is given twice (also transistors[{roles[role]}])",
                          f"{path}.role", r.line(item, "role"),
                          "roles are unique: use if2, output2 and so on for a second stage")
        roles[role] = len(out)
        key = f"transistors.{role}"
        material = r.fill(material, default_material, f"{key}.material")
        polarity = r.fill(r.choice(item, "polarity", path, POLARITIES),
                          TYPICAL_POLARITY[material], f"{key}.polarity")
        beta = r.fill(r.number(item, "beta", path, minimum=1.0, strict=False),
                      TYPICAL_BETA[material], f"{key}.beta")
        bias = r.mapping(item.get("bias"), f"{path}.bias", r.line(item, "bias"))
        r.keys(bias, BIAS_KEYS, f"{path}.bias")
        typ = typical_bias(material, role, battery_v)
        vals = []
        for name, typical_value in zip(BIAS_KEYS, typ):
            strict = name in ("top_ohm", "bottom_ohm")
            vals.append(r.fill(r.number(bias, name, f"{path}.bias", strict=strict),
                               typical_value, f"{key}.bias.{name}"))
        out.append(Transistor(role=role, material=material, polarity=polarity, beta=beta,
                              bias=Bias(*vals)))
    return out
