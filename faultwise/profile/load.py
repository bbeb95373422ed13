"""Set profile entry points: read, validate and complete a profile.

``profile_from_dict`` validates a mapping (from YAML or a case file) and fills the family's
typical values; ``load_profile`` reads a YAML file. The data model and its writer
(``profile_to_dict``) are :mod:`faultwise.profile.model`; the section readers are
:mod:`faultwise.profile.sections` and :mod:`faultwise.profile.lineup`.
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path

from faultwise.core.errors import FaultwiseError, ProfileError
from faultwise.profile.fields import SECTION_KEYS, TOP_KEYS, ProfileReader
from faultwise.profile.lineup import (check_series_string, fill_output_tubes, heater_winding,
                                      read_transistors, read_tubes)
from faultwise.profile.model import (FAMILIES, FORMAT, LINE_FAMILIES, OUTPUT_ROLES, OUTPUT_STAGES,
                                     Profile, Transistor)
from faultwise.profile.sections import read_audio, read_common, read_supply, read_typical_list
from faultwise.profile.typical import TYPICAL_BATTERY_V, TYPICAL_MAINS_HZ, TYPICAL_MAINS_V

__all__ = ["profile_from_dict", "load_profile", "typical_output_stage"]


def typical_output_stage(transistors: Iterable[Transistor]) -> str:
    """Two output transistors of opposite polarity: complementary; of the same polarity:
    push-pull with a driver transformer; one: single-ended (trade practice)."""
    outs = [t for t in transistors if t.role in OUTPUT_ROLES]
    if len(outs) < 2:
        return "single-ended"
    return "complementary" if outs[0].polarity != outs[1].polarity else "push-pull-transformer"


# --- entry points ------------------------------------------------------------------------

def profile_from_dict(data: object, source: str = "<profile>",
                      knowledge_dir: str | os.PathLike[str] | None = None) -> Profile:
    """Validate a profile mapping (from YAML or a case file) and fill the family's typicals."""
    r = ProfileReader(str(source))
    data = r.mapping(data, "", r.line(data) if isinstance(data, dict) else None)
    if not data:
        raise r.error("the set profile is empty", None, None,
                      "write at least label, family and the tube or transistor lineup")
    r.keys(data, TOP_KEYS, "")
    fmt = data.get("format")
    if fmt is not None and fmt != FORMAT:
        raise r.error(f"unknown format '{fmt}'", "format", r.line(data, "format"),
                      f"write format: {FORMAT} (or leave it out)")
    label = r.text(data, "label", "", required=True)
    family = r.choice(data, "family", "", FAMILIES, required=True)
    fields = read_common(r, data, family)
    tube_family = family in LINE_FAMILIES
    if tube_family:
        for key in ("battery", "transistors", "output_stage"):
            r.forbid(data, key, "", f"a {family} set is line-powered with tubes",
                     "remove it, or make the family transistor")
        if family == "series-string":
            r.forbid(data, "heater_winding_v", "", "a series-string set has no heater winding",
                     "remove it, or make the family transformer")
        from faultwise.profile.tubes import load_tube_table

        table = load_tube_table(knowledge_dir)
        mains = r.mapping(data.get("mains"), "mains", r.line(data, "mains"))
        r.keys(mains, SECTION_KEYS["mains"], "mains")
        mains_v = r.fill(r.number(mains, "volts_v", "mains"), TYPICAL_MAINS_V, "mains.volts_v")
        mains_hz = r.fill(r.number(mains, "freq_hz", "mains"), TYPICAL_MAINS_HZ, "mains.freq_hz")
        tubes = read_tubes(r, data, family, table)
        winding = None
        if family == "series-string":
            check_series_string(r, data, tubes, mains_v, "mains.volts_v" in r.typical)
        else:
            winding = heater_winding(r, data, tubes)
        tubes = fill_output_tubes(r, tubes, family, table)
        supply = read_supply(r, data, family, tubes, table)
        audio = read_audio(r, data, family, tubes, table)
        profile = Profile(label=label, family=family, mains_v=mains_v, mains_hz=mains_hz,
                          tubes=tuple(tubes), heater_winding_v=winding, supply=supply,
                          audio=audio, source=str(source), **fields)
    else:
        for key in ("mains", "tubes", "heater_winding_v", "supply"):
            r.forbid(data, key, "", "a transistor set runs from its battery",
                     "remove it, or make the family series-string or transformer")
        battery = r.mapping(data.get("battery"), "battery", r.line(data, "battery"))
        r.keys(battery, SECTION_KEYS["battery"], "battery")
        battery_v = r.fill(r.number(battery, "volts_v", "battery"), TYPICAL_BATTERY_V,
                           "battery.volts_v")
        transistors = read_transistors(r, data, battery_v)
        audio = read_audio(r, data, family, [], None)
        output_stage = r.fill(r.choice(data, "output_stage", "", OUTPUT_STAGES),
                              typical_output_stage(transistors), "output_stage")
        profile = Profile(label=label, family=family, battery_v=battery_v,
                          transistors=tuple(transistors), audio=audio, source=str(source),
                          output_stage=output_stage, **fields)
    declared = read_typical_list(r, data, profile)
    return _replace(profile, typical=frozenset(r.typical | declared))


def _replace(profile: Profile, **changes) -> Profile:
    from dataclasses import replace

    return replace(profile, **changes)


def load_profile(path: str | os.PathLike[str],
                 knowledge_dir: str | os.PathLike[str] | None = None) -> Profile:
    """Read, validate and complete a set profile YAML file; ProfileError located on a fault."""
    from faultwise.core.yamlload import load_yaml_file

    try:
        data = load_yaml_file(Path(path))
    except ProfileError:
        raise
    except FaultwiseError as exc:
        raise ProfileError(exc.message, file=exc.file or str(path), line=exc.line, key=exc.key,
                           hint=exc.hint) from None
    return profile_from_dict(data, source=str(path), knowledge_dir=knowledge_dir)
