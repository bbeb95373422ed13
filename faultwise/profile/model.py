"""Set profile: what is known of the set on the bench (DESIGN section 4, a contract).

The data model is fixed here so that every layer can rely on it. Values are plain floats in
the unit that ends the field name. ``typical`` holds the dotted keys (``supply.surge_ohm``,
``tubes.output.cathode_ohm``, ``transistors.if.beta``) that were filled with the family's
typical value because the profile did not give them.

The writer ``profile_to_dict`` is at the end; the loader and validator (``load_profile``,
``profile_from_dict``) are in :mod:`faultwise.profile.load`. They read through
:class:`faultwise.profile.fields.ProfileReader`; the section readers are in
:mod:`faultwise.profile.sections` (band, IF, gang, supply, audio, the typical list) and
:mod:`faultwise.profile.lineup` (tubes, heaters, transistors), the typical values in
:mod:`faultwise.profile.typical` (re-exported here).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from faultwise.calc.rectifier import CIRCUITS
from faultwise.core.vocabulary import FAMILIES, LINE_FAMILIES
from faultwise.profile.fields import BIAS_KEYS, SECTION_KEYS
from faultwise.profile.typical import (  # re-exported: the typical tables
    SCREEN_SHARE, TYPICAL_BAND_KHZ, TYPICAL_BATTERY_V, TYPICAL_BETA, TYPICAL_BIAS,
    TYPICAL_GANG_PF, TYPICAL_IF_KHZ, TYPICAL_MAINS_HZ, TYPICAL_MAINS_V, TYPICAL_MATERIAL,
    TYPICAL_OUTPUT, TYPICAL_POLARITY, TYPICAL_SPEAKER_OHM, TYPICAL_STAGE_MA, TYPICAL_SUPPLY,
)

__all__ = [
    "FAMILIES", "LINE_FAMILIES", "TUBE_ROLES", "RECTIFIERS", "CIRCUITS", "FORMAT",
    "TRANSISTOR_ROLES", "MATERIALS", "POLARITIES", "OUTPUT_ROLES", "OUTPUT_STAGES",
    "Tube", "Bias", "Transistor", "Supply", "Audio", "Profile", "profile_to_dict",
    # the typical tables, from faultwise.profile.typical
    "TYPICAL_MAINS_V", "TYPICAL_MAINS_HZ", "TYPICAL_BAND_KHZ", "TYPICAL_IF_KHZ",
    "TYPICAL_GANG_PF", "TYPICAL_BATTERY_V", "TYPICAL_SUPPLY", "TYPICAL_STAGE_MA",
    "TYPICAL_OUTPUT", "SCREEN_SHARE", "TYPICAL_SPEAKER_OHM", "TYPICAL_BETA",
    "TYPICAL_POLARITY", "TYPICAL_MATERIAL", "TYPICAL_BIAS",
]

TUBE_ROLES = ("rf", "converter", "mixer", "oscillator", "if", "if2", "detector", "audio",
              "output", "output2", "rectifier", "tuning-eye", "ballast")
RECTIFIERS = ("tube", "silicon", "selenium")


@dataclass(frozen=True)
class Tube:
    role: str
    type: str
    heater_v: float
    heater_a: float
    cathode_ohm: float | None = None
    cathode_ma: float | None = None
    plate_ohm: float | None = None     # plate load: transformer primary DC or plate resistor
    screen_ohm: float | None = None    # screen dropping resistor; 0 = fed directly
    grid_ohm: float | None = None      # grid leak / oscillator grid resistor
    supply: str | None = None          # first | second: the filter point the plate returns to


@dataclass(frozen=True)
class Bias:
    top_ohm: float
    bottom_ohm: float
    emitter_ohm: float
    collector_ohm: float = 0.0


@dataclass(frozen=True)
class Transistor:
    role: str
    material: str          # germanium | silicon
    polarity: str          # pnp | npn
    beta: float
    bias: Bias


@dataclass(frozen=True)
class Supply:
    rectifier: str | None = None      # tube | silicon | selenium (None for battery sets)
    circuit: str | None = None        # half-wave | full-wave | bridge
    surge_ohm: float | None = None
    first_cap_uf: float | None = None
    filter_ohm: float | None = None
    second_cap_uf: float | None = None
    load_ma: float | None = None
    filter_load_ma: float | None = None
    secondary_v: float | None = None   # transformer family: each half of the HV winding, RMS


@dataclass(frozen=True)
class Audio:
    speaker_ohm: float | None = None
    output_turns_ratio: float | None = None


@dataclass(frozen=True)
class Profile:
    label: str
    family: str
    band_low_khz: float
    band_high_khz: float
    if_khz: float
    gang_min_pf: float
    gang_max_pf: float
    gang_stray_pf: float
    mains_v: float | None = None
    mains_hz: float | None = None
    battery_v: float | None = None
    tubes: tuple[Tube, ...] = ()
    heater_winding_v: float | None = None
    supply: Supply = field(default_factory=Supply)
    audio: Audio = field(default_factory=Audio)
    transistors: tuple[Transistor, ...] = ()
    output_stage: str | None = None    # transistor: push-pull-transformer | complementary | single-ended
    typical: frozenset[str] = frozenset()
    source: str | None = None          # the file it came from, for messages

    def is_typical(self, key: str) -> bool:
        """True when ``key`` (dotted) was filled with a typical value."""
        return key in self.typical

    def tube(self, role: str) -> Tube | None:
        return next((t for t in self.tubes if t.role == role), None)

    def transistor(self, role: str) -> Transistor | None:
        return next((t for t in self.transistors if t.role == role), None)

    @property
    def line_powered(self) -> bool:
        return self.family in LINE_FAMILIES


# ---------------------------------------------------------------------------------------
# Loader and validator
# ---------------------------------------------------------------------------------------
#
# Transistor role vocabulary (roles are unique within a set): rf (RF amplifier), converter
# (self-oscillating mixer), mixer and oscillator (separate stages), if, if2, if3 (IF stages
# in signal order), detector (a transistor detector; most sets use a diode), audio (first
# audio, RC coupled), driver (transformer-coupled driver), output and output2 (the output
# transistor, or the two halves of a push-pull pair).

FORMAT = "faultwise-set/1"
TRANSISTOR_ROLES = ("rf", "converter", "mixer", "oscillator", "if", "if2", "if3", "detector",
                    "audio", "driver", "output", "output2")
MATERIALS = ("germanium", "silicon")
POLARITIES = ("pnp", "npn")
OUTPUT_ROLES = ("output", "output2")
OUTPUT_STAGES = ("push-pull-transformer", "complementary", "single-ended")


# --- writer ----------------------------------------------------------------------------

def profile_to_dict(profile: Profile, with_typical: bool = True) -> dict:
    """The contract shape (DESIGN section 4), every value included, plus ``typical: [keys]``."""
    p = profile
    d: dict = {"format": FORMAT, "label": p.label, "family": p.family}
    if p.line_powered:
        d["mains"] = {"volts_v": p.mains_v, "freq_hz": p.mains_hz}
    else:
        d["battery"] = {"volts_v": p.battery_v}
    d["band"] = {"low_khz": p.band_low_khz, "high_khz": p.band_high_khz}
    d["if_khz"] = p.if_khz
    d["gang"] = {"min_pf": p.gang_min_pf, "max_pf": p.gang_max_pf, "stray_pf": p.gang_stray_pf}
    if p.line_powered:
        d["tubes"] = [_drop_none({"role": t.role, "type": t.type, "heater_v": t.heater_v,
                                  "heater_a": t.heater_a, "cathode_ohm": t.cathode_ohm,
                                  "cathode_ma": t.cathode_ma, "plate_ohm": t.plate_ohm,
                                  "screen_ohm": t.screen_ohm, "grid_ohm": t.grid_ohm,
                                  "supply": t.supply}) for t in p.tubes]
        if p.heater_winding_v is not None:
            d["heater_winding_v"] = p.heater_winding_v
        s = p.supply
        d["supply"] = _drop_none({k: getattr(s, k) for k in SECTION_KEYS["supply"]})
    d["audio"] = _drop_none({"speaker_ohm": p.audio.speaker_ohm,
                             "output_turns_ratio": p.audio.output_turns_ratio})
    if not p.line_powered:
        d["transistors"] = [
            {"role": t.role, "material": t.material, "polarity": t.polarity, "beta": t.beta,
             "bias": {k: getattr(t.bias, k) for k in BIAS_KEYS}} for t in p.transistors]
        if p.output_stage is not None:
            d["output_stage"] = p.output_stage
    if with_typical:
        d["typical"] = sorted(p.typical)
    return d


def _drop_none(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}
