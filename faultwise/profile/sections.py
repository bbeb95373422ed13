"""Profile section readers: band, IF and gang; supply and its loads; audio; the typical list.

Each reader takes the :class:`faultwise.profile.fields.ProfileReader` of the profile being
read and raises ProfileError located by file, line and key.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from faultwise.profile.model import (CIRCUITS, OUTPUT_ROLES, RECTIFIERS, Audio, Profile, Supply,
                                     Tube, profile_to_dict)
from faultwise.profile.fields import SECTION_KEYS, ProfileReader, item_line, nearest, what_of
from faultwise.profile.typical import (SCREEN_SHARE, TYPICAL_BAND_KHZ, TYPICAL_GANG_PF,
                                       TYPICAL_IF_KHZ, TYPICAL_OUTPUT, TYPICAL_SPEAKER_OHM,
                                       TYPICAL_STAGE_MA, TYPICAL_SUPPLY)

if TYPE_CHECKING:
    from faultwise.profile.tubes import TubeTable


def read_common(r: ProfileReader, data: dict, family: str) -> dict:
    out: dict = {}
    band = r.mapping(data.get("band"), "band", r.line(data, "band"))
    r.keys(band, SECTION_KEYS["band"], "band")
    low = r.fill(r.number(band, "low_khz", "band"), TYPICAL_BAND_KHZ[0], "band.low_khz")
    high = r.fill(r.number(band, "high_khz", "band"), TYPICAL_BAND_KHZ[1], "band.high_khz")
    if high <= low:
        raise r.error(f"the band is reversed or empty ({low:g} to {high:g} kHz)",
                      "band.high_khz", r.line(band, "high_khz") or r.line(data, "band"),
                      "give low_khz below high_khz, e.g. 540 and 1600")
    if_khz = r.fill(r.number(data, "if_khz", ""), TYPICAL_IF_KHZ, "if_khz")
    if low <= if_khz <= high:
        raise r.error(f"an IF of {if_khz:g} kHz lies inside the band {low:g}-{high:g} kHz",
                      "if_khz", r.line(data, "if_khz"),
                      "broadcast superhets use an IF outside the band, usually 455 kHz")
    gang = r.mapping(data.get("gang"), "gang", r.line(data, "gang"))
    r.keys(gang, SECTION_KEYS["gang"], "gang")
    gmin = r.fill(r.number(gang, "min_pf", "gang"), TYPICAL_GANG_PF[0], "gang.min_pf")
    gmax = r.fill(r.number(gang, "max_pf", "gang"), TYPICAL_GANG_PF[1], "gang.max_pf")
    stray = r.fill(r.number(gang, "stray_pf", "gang", strict=False), TYPICAL_GANG_PF[2],
                   "gang.stray_pf")
    if gmax <= gmin:
        raise r.error(f"the gang's maximum ({gmax:g} pF) is not above its minimum ({gmin:g} pF)",
                      "gang.max_pf", r.line(gang, "max_pf") or r.line(data, "gang"),
                      "give one section's capacitance fully open (min) and fully meshed (max)")
    out.update(band_low_khz=low, band_high_khz=high, if_khz=if_khz, gang_min_pf=gmin,
               gang_max_pf=gmax, gang_stray_pf=stray)
    return out


def read_supply(r: ProfileReader, data: dict, family: str, tubes: list[Tube],
                table: TubeTable) -> Supply:
    from faultwise.profile.tubes import lookup

    sup = r.mapping(data.get("supply"), "supply", r.line(data, "supply"))
    r.keys(sup, SECTION_KEYS["supply"], "supply")
    typ = TYPICAL_SUPPLY[family]
    rect_tube = next((t for t in tubes if t.role == "rectifier"), None)
    rect_data = getattr(lookup(rect_tube.type, table), "rectifier", None) if rect_tube else None
    rectifier = r.choice(sup, "rectifier", "supply", RECTIFIERS)
    if rectifier == "tube" and rect_tube is None:
        raise r.error("supply.rectifier is 'tube' but no tube has the role 'rectifier'",
                      "supply.rectifier", r.line(sup, "rectifier"),
                      "add the rectifier tube to the lineup, or say silicon or selenium")
    if rectifier in ("silicon", "selenium") and rect_tube is not None:
        raise r.error(f"supply.rectifier is '{rectifier}' but the lineup has a rectifier tube "
                      f"({rect_tube.type})", "supply.rectifier", r.line(sup, "rectifier"),
                      "remove the tube from the lineup if it was replaced by a diode")
    rectifier = r.fill(rectifier, "tube" if rect_tube else "silicon", "supply.rectifier")
    circuit = r.choice(sup, "circuit", "supply", CIRCUITS)
    tube_circuit = rect_data.circuit if rect_data else None
    default_circuit = typ["circuit"]
    if family == "transformer" and tube_circuit in ("half-wave", "doubler"):
        default_circuit = "half-wave"
    where = ("supply.circuit", r.line(sup, "circuit"))
    if circuit == "full-wave" and family == "series-string":
        raise r.error("a series-string set has no transformer, so no centre-tapped full-wave "
                      "circuit", *where, "use half-wave (or bridge for a silicon bridge)")
    if circuit == "bridge" and rectifier == "tube":
        raise r.error("a tube rectifier does not make a bridge here", *where,
                      "use half-wave or full-wave for a tube rectifier")
    if circuit == "full-wave" and tube_circuit in ("half-wave", "doubler"):
        raise r.error(f"the {rect_tube.type} has one plate per section and cannot make a "
                      "centre-tapped full-wave circuit", *where, "use half-wave")
    circuit = r.fill(circuit, default_circuit, "supply.circuit")
    first_typ = typ["first_cap_uf"]
    if rect_data and rect_data.max_first_cap_uf:
        first_typ = min(first_typ, rect_data.max_first_cap_uf)
    values = {
        "surge_ohm": r.fill(r.number(sup, "surge_ohm", "supply"), typ["surge_ohm"],
                            "supply.surge_ohm"),
        "first_cap_uf": r.fill(r.number(sup, "first_cap_uf", "supply"), first_typ,
                               "supply.first_cap_uf"),
        "filter_ohm": r.fill(r.number(sup, "filter_ohm", "supply"), typ["filter_ohm"],
                             "supply.filter_ohm"),
        "second_cap_uf": r.fill(r.number(sup, "second_cap_uf", "supply"), typ["second_cap_uf"],
                                "supply.second_cap_uf"),
    }
    if family == "transformer":
        values["secondary_v"] = r.fill(r.number(sup, "secondary_v", "supply"),
                                       typ["secondary_v"], "supply.secondary_v")
    else:
        r.forbid(sup, "secondary_v", "supply", "a series-string set has no power transformer",
                 "remove secondary_v, or make the family transformer")
    load, filter_load = _loads(r, sup, family, tubes, table)
    return Supply(rectifier=rectifier, circuit=circuit, load_ma=load, filter_load_ma=filter_load,
                  **values)


def _loads(r: ProfileReader, sup: dict, family: str, tubes: list[Tube],
           table: TubeTable) -> tuple[float, float]:
    """DC load on the first capacitor and the part of it through the filter resistor."""
    from faultwise.profile.tubes import lookup

    small = sum(TYPICAL_STAGE_MA[family].get(t.role, 0.0) for t in tubes
                if t.role not in OUTPUT_ROLES)
    cathode = screen = 0.0
    for t in tubes:
        if t.role in OUTPUT_ROLES:
            op = getattr(lookup(t.type, table), "operation", None)
            cathode += t.cathode_ma
            share = op.screen_ma / op.cathode_ma if op else SCREEN_SHARE
            screen += t.cathode_ma * share
    # the output plate is fed from the first capacitor; its screen and the small-signal
    # stages from the second, through the filter resistor
    filter_load = r.number(sup, "filter_load_ma", "supply", strict=False)
    filter_load = r.fill(filter_load, round(small + screen, 1), "supply.filter_load_ma")
    load = r.number(sup, "load_ma", "supply")
    load = r.fill(load, round(cathode - screen + filter_load, 1), "supply.load_ma")
    if filter_load > load:
        raise r.error(f"filter_load_ma ({filter_load:g} mA) is more than the total load_ma "
                      f"({load:g} mA)", "supply.filter_load_ma",
                      r.line(sup, "filter_load_ma") or r.line(sup, "load_ma"),
                      "filter_load_ma is the part of load_ma that flows through filter_ohm")
    return load, filter_load


def read_audio(r: ProfileReader, data: dict, family: str, tubes: list[Tube],
               table: TubeTable) -> Audio:
    from faultwise.profile.tubes import lookup

    aud = r.mapping(data.get("audio"), "audio", r.line(data, "audio"))
    r.keys(aud, SECTION_KEYS["audio"], "audio")
    speaker = r.fill(r.number(aud, "speaker_ohm", "audio"), TYPICAL_SPEAKER_OHM[family],
                     "audio.speaker_ohm")
    ratio = r.number(aud, "output_turns_ratio", "audio")
    if family != "transistor" and ratio is None:
        out = next(t for t in tubes if t.role == "output")
        op = getattr(lookup(out.type, table), "operation", None)
        load = op.load_ohm if op else TYPICAL_OUTPUT[family][2]
        # Zp = (Np/Ns)^2 Zs, so Np/Ns = sqrt(Zp/Zs) for the output type's typical load
        ratio = r.fill(None, round(math.sqrt(load / speaker), 1), "audio.output_turns_ratio")
    return Audio(speaker_ohm=speaker, output_turns_ratio=ratio)


def read_typical_list(r: ProfileReader, data: dict, profile: Profile) -> set[str]:
    rows = r.sequence(data.get("typical"), "typical", r.line(data, "typical"))
    valid = _dotted_keys(profile)
    out = set()
    for i, key in enumerate(rows):
        if not isinstance(key, str) or key not in valid:
            near = nearest(key, valid) if isinstance(key, str) else None
            raise r.error(f"typical lists {what_of(key)}, which is not a key of this profile",
                          f"typical[{i}]", item_line(rows, i) or r.line(data, "typical"),
                          f"the nearest key is '{near}'" if near else
                          "list dotted keys such as supply.surge_ohm")
        out.add(key)
    return out


def _dotted_keys(p: Profile) -> set[str]:
    """Every dotted key this profile has a value for (the vocabulary of ``typical``)."""
    d = profile_to_dict(p, with_typical=False)
    keys: set[str] = set()
    for k, v in d.items():
        if k in ("tubes", "transistors"):
            for item in v:
                for sub, val in item.items():
                    if sub == "bias":
                        keys.update(f"{k}.{item['role']}.bias.{b}" for b in val)
                    elif sub != "role":
                        keys.add(f"{k}.{item['role']}.{sub}")
        elif isinstance(v, dict):
            keys.update(f"{k}.{sub}" for sub in v)
        elif k not in ("format", "label", "family"):
            keys.add(k)
    return keys
