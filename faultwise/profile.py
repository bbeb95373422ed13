"""Set profile: what is known of the set on the bench (DESIGN section 4, a contract).

The data model is fixed here so that every layer can rely on it. Values are plain floats in
the unit that ends the field name. ``typical`` holds the dotted keys (``supply.surge_ohm``,
``tubes.output.cathode_ohm``, ``transistors.if.beta``) that were filled with the family's
typical value because the profile did not give them.

The loader and validator (``load_profile``, ``profile_from_dict``) are below the model.
"""

from __future__ import annotations

from dataclasses import dataclass, field

FAMILIES = ("series-string", "transformer", "transistor")
LINE_FAMILIES = ("series-string", "transformer")
TUBE_ROLES = ("rf", "converter", "mixer", "oscillator", "if", "if2", "detector", "audio",
              "output", "output2", "rectifier", "tuning-eye", "ballast")
RECTIFIERS = ("tube", "silicon", "selenium")
CIRCUITS = ("half-wave", "full-wave", "bridge")


@dataclass(frozen=True)
class Tube:
    role: str
    type: str
    heater_v: float
    heater_a: float
    cathode_ohm: float | None = None
    cathode_ma: float | None = None


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
