"""Set profile: what is known of the set on the bench (DESIGN section 4, a contract).

The data model is fixed here so that every layer can rely on it. Values are plain floats in
the unit that ends the field name. ``typical`` holds the dotted keys (``supply.surge_ohm``,
``tubes.output.cathode_ohm``, ``transistors.if.beta``) that were filled with the family's
typical value because the profile did not give them.

The loader and validator (``load_profile``, ``profile_from_dict``) are below the model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

from faultwise.errors import FaultwiseError, InputError, ProfileError

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

# --- typical values --------------------------------------------------------------------
# Trade practice for AM broadcast receivers of the tube and early transistor years, from
# memory unless a source is named. Every value filled from here is listed in
# Profile.typical (its dotted key) and shown as typical wherever it is used.

TYPICAL_MAINS_V = 120.0          # ANSI C84.1 nominal service voltage in North America
TYPICAL_MAINS_HZ = 60.0          # North American line frequency
TYPICAL_BAND_KHZ = (540.0, 1600.0)   # dial range of North American sets (trade)
TYPICAL_IF_KHZ = 455.0           # US practice after about 1940 (secondary source)
TYPICAL_GANG_PF = (10.0, 365.0, 15.0)  # the common 365 pF broadcast gang: min, max, stray (trade)
TYPICAL_BATTERY_V = 9.0          # the usual portable battery (trade)

# Supply and filter by family (trade practice, from memory):
# series-string: half-wave from the line, 22 ohm surge resistor, 50 uF / 30 uF electrolytics
# with a 1000 ohm filter resistor; transformer: full-wave centre-tapped, 250 V each half,
# 20 uF / 20 uF with a 1500 ohm filter resistor (or field coil), and about 100 ohm of
# source resistance in the winding (half the secondary plus the reflected primary).
TYPICAL_SUPPLY = {
    "series-string": {"circuit": "half-wave", "surge_ohm": 22.0, "first_cap_uf": 50.0,
                      "filter_ohm": 1000.0, "second_cap_uf": 30.0},
    "transformer": {"circuit": "full-wave", "surge_ohm": 100.0, "first_cap_uf": 20.0,
                    "filter_ohm": 1500.0, "second_cap_uf": 20.0, "secondary_v": 250.0},
}
# DC drawn by each small-signal tube through the filter resistor, mA (trade estimates at
# about 90-100 V B+ in series-string sets and 250 V in transformer sets, from memory of
# handbook typical operation, reduced for AVC bias and oscillator grid bias).
TYPICAL_STAGE_MA = {
    "series-string": {"rf": 5.0, "converter": 4.0, "mixer": 3.0, "oscillator": 3.0, "if": 5.0,
                      "if2": 5.0, "detector": 1.0, "audio": 1.0, "tuning-eye": 1.0},
    "transformer": {"rf": 8.0, "converter": 8.0, "mixer": 5.0, "oscillator": 5.0, "if": 8.0,
                    "if2": 8.0, "detector": 1.0, "audio": 1.0, "tuning-eye": 1.0},
}
# Output stage when the tube table has no typical operation for the output type:
# cathode ohm, cathode mA, plate load ohm (handbook typical operation of the 50C5 and
# the 6V6GT, from memory).
TYPICAL_OUTPUT = {"series-string": (150.0, 53.0, 2500.0), "transformer": (250.0, 49.5, 5000.0)}
SCREEN_SHARE = 0.08              # screen part of a beam tube's cathode current (handbook, memory)
TYPICAL_SPEAKER_OHM = {"series-string": 3.2, "transformer": 3.2, "transistor": 8.0}  # trade

# Transistors (trade practice, from memory): beta by material; polarity by material
# (germanium portables are mostly PNP, silicon mostly NPN); divider bias by role for a
# 9 V portable: a stage current of about 0.5-1 mA for converter and IF, 1-2 mA driver,
# a few mA idle in a class-B output pair; for another battery the top resistor is
# rescaled to keep the base voltage (see _typical_bias). A real set's parts always win.
TYPICAL_BETA = {"germanium": 60.0, "silicon": 120.0}
TYPICAL_POLARITY = {"germanium": "pnp", "silicon": "npn"}
TYPICAL_MATERIAL = "germanium"
_ROLE_GROUP = {"rf": "converter", "converter": "converter", "mixer": "converter",
               "oscillator": "converter", "if": "if", "if2": "if", "if3": "if",
               "detector": "detector", "audio": "audio", "driver": "driver",
               "output": "output", "output2": "output"}
TYPICAL_BIAS = {  # (top_ohm, bottom_ohm, emitter_ohm, collector_ohm)
    "germanium": {"converter": (56e3, 8.2e3, 1e3, 0.0), "if": (68e3, 10e3, 1e3, 0.0),
                  "detector": (150e3, 10e3, 1e3, 0.0), "audio": (100e3, 22e3, 2.2e3, 4.7e3),
                  "driver": (33e3, 4.7e3, 470.0, 0.0), "output": (3.3e3, 100.0, 10.0, 0.0)},
    "silicon": {"converter": (56e3, 10e3, 1e3, 0.0), "if": (68e3, 10e3, 1e3, 0.0),
                "detector": (150e3, 22e3, 2.2e3, 0.0), "audio": (100e3, 22e3, 1e3, 4.7e3),
                "driver": (33e3, 6.8e3, 470.0, 0.0), "output": (12e3, 1e3, 10.0, 0.0)},
}

# --- schema ------------------------------------------------------------------------------

_UNIT_OF_SUFFIX = (("_khz", "kHz"), ("_ohm", "ohm"), ("_uf", "uF"), ("_pf", "pF"),
                   ("_uh", "uH"), ("_hz", "Hz"), ("_ma", "mA"), ("_v", "V"), ("_a", "A"))
_TOP_KEYS = ("format", "label", "family", "mains", "battery", "band", "if_khz", "gang",
             "tubes", "heater_winding_v", "supply", "audio", "transistors", "typical")
_SECTION_KEYS = {
    "mains": ("volts_v", "freq_hz"), "battery": ("volts_v",), "band": ("low_khz", "high_khz"),
    "gang": ("min_pf", "max_pf", "stray_pf"),
    "supply": ("rectifier", "circuit", "surge_ohm", "first_cap_uf", "filter_ohm",
               "second_cap_uf", "load_ma", "filter_load_ma", "secondary_v"),
    "audio": ("speaker_ohm", "output_turns_ratio"),
}
_TUBE_KEYS = ("role", "type", "heater_v", "heater_a", "cathode_ohm", "cathode_ma")
_TRANSISTOR_KEYS = ("role", "material", "polarity", "beta", "bias")
_BIAS_KEYS = ("top_ohm", "bottom_ohm", "emitter_ohm", "collector_ohm")


def _unit_for(key: str) -> str:
    for suffix, unit in _UNIT_OF_SUFFIX:
        if key.endswith(suffix):
            return unit
    return "ratio"


def _nearest(word, choices, cutoff: float = 60) -> str | None:
    """The choice closest to ``word`` (rapidfuzz ratio of at least ``cutoff``), or None."""
    from rapidfuzz import fuzz, process

    found = process.extractOne(str(word), list(choices), scorer=fuzz.ratio, score_cutoff=cutoff)
    return found[0] if found else None


class _Reader:
    """Reads one profile mapping, raising ProfileError located by file, line and key."""

    def __init__(self, source: str) -> None:
        self.source = source
        self.typical: set[str] = set()

    # errors and lines
    def error(self, message: str, key: str | None, line: int | None, hint: str) -> ProfileError:
        return ProfileError(_printable(message), file=self.source, line=line,
                            key=_printable(key) if key else None, hint=_printable(hint))

    @staticmethod
    def line(container, key=None) -> int | None:
        from faultwise.yamlload import line_of

        if key is None:
            line = getattr(container, "line", 0)
            return line or None
        return line_of(container, key) or _Reader.line(container)

    # structure
    def mapping(self, data, path: str, line: int | None) -> dict:
        if data is None:
            return {}
        if not isinstance(data, dict):
            raise self.error(f"{path or 'the profile'} must be a mapping, not {_what(data)}",
                             path or None, line,
                             "write key: value pairs (see the contract in DESIGN section 4)")
        return data

    def sequence(self, data, path: str, line: int | None) -> list:
        if data is None:
            return []
        if not isinstance(data, list):
            raise self.error(f"{path} must be a list, not {_what(data)}", path, line,
                             "write one '- {role: ..., ...}' item per stage")
        return data

    def keys(self, data: dict, allowed, path: str) -> None:
        for key in data:
            if key not in allowed:
                near = _nearest(key, allowed)
                hint = f"the nearest valid key is '{near}'" if near else \
                    "valid keys here: " + ", ".join(allowed)
                raise self.error(f"unknown key '{key}'", _join(path, str(key)),
                                 self.line(data, key), hint)

    def forbid(self, data: dict, key: str, path: str, why: str, hint: str) -> None:
        if data.get(key) is not None:
            raise self.error(f"'{key}' does not apply: {why}", _join(path, key),
                             self.line(data, key), hint)

    # values
    def number(self, data: dict, key: str, path: str, *, minimum: float = 0.0,
               strict: bool = True) -> float | None:
        """A number in the key's unit; ``strict``: must be above ``minimum``, else at least."""
        value = data.get(key)
        dotted = _join(path, key)
        line = self.line(data, key)
        unit = _unit_for(key)
        if value is None:
            return None
        if isinstance(value, bool) or isinstance(value, (list, dict)):
            raise self.error(f"{key} must be a number, not {_what(value)}", dotted, line,
                             f"write a number in {unit}" + (" or text with a unit"
                                                            if unit != "ratio" else ""))
        if isinstance(value, str):
            from faultwise.units import parse_reading

            try:
                number = parse_reading(value, unit)
            except InputError as exc:
                raise self.error(exc.message, dotted, line,
                                 exc.hint or f"write a number in {unit}") from None
        elif isinstance(value, (int, float)):
            try:
                number = float(value)
            except OverflowError:
                number = math.inf
        else:
            raise self.error(f"{key} must be a number, not {_what(value)}", dotted, line,
                             f"write a number in {unit}")
        if not math.isfinite(number):
            raise self.error(f"{key} must be a finite number", dotted, line,
                             f"write a number in {unit}")
        if strict and number <= minimum or not strict and number < minimum:
            bound = "above" if strict else "at least"
            raise self.error(f"{key} must be {bound} {minimum:g}, not {number:g}", dotted, line,
                             "check the value and its unit")
        return number

    def text(self, data: dict, key: str, path: str, required: bool = False) -> str | None:
        value = data.get(key)
        dotted = _join(path, key)
        if value is None:
            if required:
                raise self.error(f"missing '{key}'", dotted, self.line(data),
                                 f"give {key} (it is required)")
            return None
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            raise self.error(f"{key} must be text, not {_what(value)}", dotted,
                             self.line(data, key), f"write {key} as plain text")
        text = str(value).strip()
        if not text:
            raise self.error(f"{key} is empty", dotted, self.line(data, key), f"write {key}")
        return text

    def choice(self, data: dict, key: str, path: str, choices, required: bool = False) -> str | None:
        value = data.get(key)
        if value is None and not required:
            return None
        text = self.text(data, key, path, required=required)
        low = text.lower()
        if low not in choices:
            near = _nearest(low, choices)
            hint = "use one of " + ", ".join(choices) + (f" (the nearest is '{near}')"
                                                         if near else "")
            raise self.error(f"unknown {key} '{text}'", _join(path, key), self.line(data, key),
                             hint)
        return low

    def fill(self, value, typical_value, dotted: str):
        """``value`` if given, else ``typical_value`` with ``dotted`` marked typical."""
        if value is not None:
            return value
        self.typical.add(dotted)
        return typical_value


def _what(value) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, str):
        return f"the text '{value[:40]}'"
    return repr(value)[:40]


def _printable(text: str) -> str:
    """Text safe for a one-line message: control characters shown as escapes."""
    return "".join(c if c.isprintable() else c.encode("unicode_escape").decode("ascii")
                   for c in str(text))


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


# --- sections ----------------------------------------------------------------------------

def _read_common(r: _Reader, data: dict, family: str) -> dict:
    out: dict = {}
    band = r.mapping(data.get("band"), "band", r.line(data, "band"))
    r.keys(band, _SECTION_KEYS["band"], "band")
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
    r.keys(gang, _SECTION_KEYS["gang"], "gang")
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


def _read_tubes(r: _Reader, data: dict, family: str, table) -> list[Tube]:
    from faultwise.tubes import lookup, normalise_name

    rows = r.sequence(data.get("tubes"), "tubes", r.line(data, "tubes"))
    if not rows:
        raise r.error(f"a {family} set needs its tube lineup", "tubes",
                      r.line(data, "tubes") or r.line(data),
                      "list the tubes, e.g. tubes: [{role: converter, type: 12BE6}, ...]")
    tubes: list[Tube] = []
    roles: dict[str, int] = {}
    for i, raw in enumerate(rows):
        path = f"tubes[{i}]"
        item = r.mapping(raw, path, _item_line(rows, i))
        r.keys(item, _TUBE_KEYS, path)
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
            near = _nearest(normalise_name(typed), table, cutoff=50)
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
            cathode_ohm=r.number(item, "cathode_ohm", path),
            cathode_ma=r.number(item, "cathode_ma", path)))
    if "output" not in roles:
        raise r.error("no tube has the role 'output'", "tubes", r.line(data, "tubes"),
                      "mark the audio output tube with role: output")
    return tubes


def _item_line(rows, i: int) -> int | None:
    from faultwise.yamlload import line_of

    return line_of(rows, i)


def _check_role_fits(r: _Reader, item: dict, path: str, role: str, known) -> None:
    if role == "rectifier" and not known.is_rectifier:
        raise r.error(f"{known.name} is a {known.kind}, not a rectifier", f"{path}.type",
                      r.line(item, "type"), "check the type or the role")
    if role != "rectifier" and known.is_rectifier:
        raise r.error(f"{known.name} is a rectifier, but its role is '{role}'", f"{path}.role",
                      r.line(item, "role"), "give it role: rectifier")


def _fill_output_tubes(r: _Reader, tubes: list[Tube], family: str, table) -> list[Tube]:
    """Cathode resistor and current of the output tube(s) from the table's typical operation."""
    from faultwise.tubes import lookup

    out = []
    for tube in tubes:
        if tube.role in OUTPUT_ROLES:
            op = getattr(lookup(tube.type, table), "operation", None)
            rk, ik, _ = TYPICAL_OUTPUT[family]
            if op is not None:
                rk, ik = op.cathode_ohm, op.cathode_ma
            tube = Tube(tube.role, tube.type, tube.heater_v, tube.heater_a,
                        cathode_ohm=r.fill(tube.cathode_ohm, rk, f"tubes.{tube.role}.cathode_ohm"),
                        cathode_ma=r.fill(tube.cathode_ma, ik, f"tubes.{tube.role}.cathode_ma"))
        out.append(tube)
    return out


def _check_series_string(r: _Reader, data: dict, tubes: list[Tube], mains_v: float,
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


def _heater_winding(r: _Reader, data: dict, tubes: list[Tube]) -> float:
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


def _read_supply(r: _Reader, data: dict, family: str, tubes: list[Tube], table) -> Supply:
    from faultwise.tubes import lookup

    sup = r.mapping(data.get("supply"), "supply", r.line(data, "supply"))
    r.keys(sup, _SECTION_KEYS["supply"], "supply")
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


def _loads(r: _Reader, sup: dict, family: str, tubes: list[Tube], table) -> tuple[float, float]:
    """DC load on the first capacitor and the part of it through the filter resistor."""
    from faultwise.tubes import lookup

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


def _read_audio(r: _Reader, data: dict, family: str, tubes: list[Tube], table) -> Audio:
    from faultwise.tubes import lookup

    aud = r.mapping(data.get("audio"), "audio", r.line(data, "audio"))
    r.keys(aud, _SECTION_KEYS["audio"], "audio")
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


def _typical_bias(material: str, role: str, battery_v: float) -> tuple[float, ...]:
    """Role's typical divider for a 9 V set; top resistor rescaled for another battery.

    The base keeps the divider voltage of the 9 V design, Vth = 9 V * Rb / (Rt + Rb), so
    Rt' = Rb * (Vbatt / Vth - 1), rounded to the IEC 60063 E24 series.
    """
    from faultwise.codes import nearest_preferred

    top, bottom, emitter, collector = TYPICAL_BIAS[material][_ROLE_GROUP[role]]
    vth = TYPICAL_BATTERY_V * bottom / (top + bottom)
    if battery_v != TYPICAL_BATTERY_V and battery_v > 1.5 * vth:
        top = nearest_preferred(bottom * (battery_v / vth - 1.0), "E24")
    return top, bottom, emitter, collector


def _read_transistors(r: _Reader, data: dict, battery_v: float) -> list[Transistor]:
    rows = r.sequence(data.get("transistors"), "transistors", r.line(data, "transistors"))
    if not rows:
        raise r.error("a transistor set needs its transistor stages", "transistors",
                      r.line(data, "transistors") or r.line(data),
                      "list them, e.g. transistors: [{role: converter, material: germanium}, ...]")
    items = []
    for i, raw in enumerate(rows):
        path = f"transistors[{i}]"
        item = r.mapping(raw, path, _item_line(rows, i))
        r.keys(item, _TRANSISTOR_KEYS, path)
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
        r.keys(bias, _BIAS_KEYS, f"{path}.bias")
        typ = _typical_bias(material, role, battery_v)
        vals = []
        for name, typical_value in zip(_BIAS_KEYS, typ):
            strict = name in ("top_ohm", "bottom_ohm")
            vals.append(r.fill(r.number(bias, name, f"{path}.bias", strict=strict),
                               typical_value, f"{key}.bias.{name}"))
        out.append(Transistor(role=role, material=material, polarity=polarity, beta=beta,
                              bias=Bias(*vals)))
    return out


def _read_typical_list(r: _Reader, data: dict, profile: Profile) -> set[str]:
    rows = r.sequence(data.get("typical"), "typical", r.line(data, "typical"))
    valid = _dotted_keys(profile)
    out = set()
    for i, key in enumerate(rows):
        if not isinstance(key, str) or key not in valid:
            near = _nearest(key, valid) if isinstance(key, str) else None
            raise r.error(f"typical lists {_what(key)}, which is not a key of this profile",
                          f"typical[{i}]", _item_line(rows, i) or r.line(data, "typical"),
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


# --- entry points ------------------------------------------------------------------------

def profile_from_dict(data, source: str = "<profile>", knowledge_dir=None) -> Profile:
    """Validate a profile mapping (from YAML or a case file) and fill the family's typicals."""
    r = _Reader(str(source))
    data = r.mapping(data, "", r.line(data) if isinstance(data, dict) else None)
    if not data:
        raise r.error("the set profile is empty", None, None,
                      "write at least label, family and the tube or transistor lineup")
    r.keys(data, _TOP_KEYS, "")
    fmt = data.get("format")
    if fmt is not None and fmt != FORMAT:
        raise r.error(f"unknown format '{fmt}'", "format", r.line(data, "format"),
                      f"write format: {FORMAT} (or leave it out)")
    label = r.text(data, "label", "", required=True)
    family = r.choice(data, "family", "", FAMILIES, required=True)
    fields = _read_common(r, data, family)
    tube_family = family in LINE_FAMILIES
    if tube_family:
        for key in ("battery", "transistors"):
            r.forbid(data, key, "", f"a {family} set is line-powered with tubes",
                     "remove it, or make the family transistor")
        if family == "series-string":
            r.forbid(data, "heater_winding_v", "", "a series-string set has no heater winding",
                     "remove it, or make the family transformer")
        from faultwise.tubes import load_tube_table

        table = load_tube_table(knowledge_dir)
        mains = r.mapping(data.get("mains"), "mains", r.line(data, "mains"))
        r.keys(mains, _SECTION_KEYS["mains"], "mains")
        mains_v = r.fill(r.number(mains, "volts_v", "mains"), TYPICAL_MAINS_V, "mains.volts_v")
        mains_hz = r.fill(r.number(mains, "freq_hz", "mains"), TYPICAL_MAINS_HZ, "mains.freq_hz")
        tubes = _read_tubes(r, data, family, table)
        winding = None
        if family == "series-string":
            _check_series_string(r, data, tubes, mains_v, "mains.volts_v" in r.typical)
        else:
            winding = _heater_winding(r, data, tubes)
        tubes = _fill_output_tubes(r, tubes, family, table)
        supply = _read_supply(r, data, family, tubes, table)
        audio = _read_audio(r, data, family, tubes, table)
        profile = Profile(label=label, family=family, mains_v=mains_v, mains_hz=mains_hz,
                          tubes=tuple(tubes), heater_winding_v=winding, supply=supply,
                          audio=audio, source=str(source), **fields)
    else:
        for key in ("mains", "tubes", "heater_winding_v", "supply"):
            r.forbid(data, key, "", "a transistor set runs from its battery",
                     "remove it, or make the family series-string or transformer")
        battery = r.mapping(data.get("battery"), "battery", r.line(data, "battery"))
        r.keys(battery, _SECTION_KEYS["battery"], "battery")
        battery_v = r.fill(r.number(battery, "volts_v", "battery"), TYPICAL_BATTERY_V,
                           "battery.volts_v")
        transistors = _read_transistors(r, data, battery_v)
        audio = _read_audio(r, data, family, [], None)
        profile = Profile(label=label, family=family, battery_v=battery_v,
                          transistors=tuple(transistors), audio=audio, source=str(source),
                          **fields)
    declared = _read_typical_list(r, data, profile)
    return _replace(profile, typical=frozenset(r.typical | declared))


def _replace(profile: Profile, **changes) -> Profile:
    from dataclasses import replace

    return replace(profile, **changes)


def load_profile(path, knowledge_dir=None) -> Profile:
    """Read, validate and complete a set profile YAML file; ProfileError located on a fault."""
    from faultwise.yamlload import load_yaml_file

    try:
        data = load_yaml_file(Path(path))
    except ProfileError:
        raise
    except FaultwiseError as exc:
        raise ProfileError(exc.message, file=exc.file or str(path), line=exc.line, key=exc.key,
                           hint=exc.hint) from None
    return profile_from_dict(data, source=str(path), knowledge_dir=knowledge_dir)


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
                                  "cathode_ma": t.cathode_ma}) for t in p.tubes]
        if p.heater_winding_v is not None:
            d["heater_winding_v"] = p.heater_winding_v
        s = p.supply
        d["supply"] = _drop_none({k: getattr(s, k) for k in _SECTION_KEYS["supply"]})
    d["audio"] = _drop_none({"speaker_ohm": p.audio.speaker_ohm,
                             "output_turns_ratio": p.audio.output_turns_ratio})
    if not p.line_powered:
        d["transistors"] = [
            {"role": t.role, "material": t.material, "polarity": t.polarity, "beta": t.beta,
             "bias": {k: getattr(t.bias, k) for k in _BIAS_KEYS}} for t in p.transistors]
    if with_typical:
        d["typical"] = sorted(p.typical)
    return d


def _drop_none(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}
