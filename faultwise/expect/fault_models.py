"""Fault models: what a fault does to the set, as a change to its profile or its calc model.

A fault node may carry ``model:``, a mapping of *target* to *change*; the injected sweep
(:mod:`faultwise.shop.sweep_inject`) applies it with :func:`faultwise.expect.fault_physics.inject` and
answers the walk with the readings the broken set would give. The vocabulary is small and
is data (:data:`TARGETS`); lint checks every model against it (:func:`model_problems`).

Changes:

* ``xK`` -- a value scaled by K (``x0.1``: a dried capacitor keeps a tenth of its value;
  ``x3``: a resistor drifted to three times its value).
* ``open`` -- the part no longer conducts. Where a meter is the only path left (a transistor
  resistor), the meter's 10 Mohm input stands in for the open part.
* ``short`` -- the part conducts with a small resistance (:data:`SHORT_OHM`); what limits
  the current is the rest of the circuit (the surge or filter resistor).
* ``leaky`` -- a transistor with collector-base leakage (:data:`LEAKY_ICBO_MA`); a tube's
  grid pulled positive through a leaky coupling capacitor (:data:`LEAKY_GRID_V`).
* ``stopped`` -- the oscillator does not oscillate.

Targets (``<role>`` is a tube or transistor role of the profile, e.g. ``output``, ``if``):

==============================  ==================  =============================================
target                          changes             what it is
==============================  ==================  =============================================
supply.first_cap_uf             xK open short leaky first filter (reservoir) capacitor (leaky:
                                                    :data:`LEAKY_CAP_MA` more load)
supply.second_cap_uf            xK open short leaky second filter capacitor (or a B+ bypass
                                                    across it, which is the same node)
supply.surge_ohm                xK open             surge resistor (and winding resistance)
supply.filter_ohm               xK open short       filter resistor between the capacitors
supply.secondary_v              xK open             high-voltage winding (shorted turns: x0.7)
rectifier                       open                rectifier passes nothing (dead tube, open
                                                    element)
rectifier.drop                  xK                  forward drop scaled (weak tube, aged selenium)
line                            open                nothing reaches the set: cord, switch, fuse,
                                                    transformer primary
heaters.dropper                 open                series-string dropping resistor or ballast
heaters.winding                 open                heater winding of a transformer set
heater.<role>                   open                one tube's heater
tube.<role>.emission            xK open             a tube's emission (open: a dead tube)
tube.<role>.screen_ohm          xK open short       a pentode's screen feed resistor
tube.<role>.plate_ohm           xK open short       a stage's plate load (resistor, or the
                                                    transformer primary's DC resistance)
tube.<role>.cathode_ohm         xK open short       a stage's cathode resistor
tube.<role>.grid                leaky               the control grid pulled positive by a leaky
                                                    coupling capacitor (:data:`LEAKY_GRID_V`)
output.primary                  open short          output transformer primary
speaker.voice_coil              open short          voice coil
battery_v                       xK                  battery voltage (a flat battery: x0.7)
battery                         open leaky          the battery circuit is broken: contacts,
                                                    snap lead, switch, a cracked track; leaky:
                                                    something across the supply draws
                                                    :data:`LEAKY_SUPPLY_MA` (a leaky electrolytic)
transistor.<role>               open short leaky    the transistor itself
transistor.<role>.top_ohm       xK open short       bias divider, resistor to the supply
transistor.<role>.bottom_ohm    xK open short       bias divider, resistor to the common rail
transistor.<role>.emitter_ohm   xK open short       emitter resistor
transistor.<role>.collector_ohm xK open             collector load (or the winding feeding it)
transistor.<role>.beta          xK                  current gain
output.bias                     open short          a push-pull pair's bias network: open (no
                                                    base bias, no idle current) or shorted
                                                    (bases at the emitter rail)
oscillator                      stopped xK          oscillation (xK: amplitude, a weak converter)
gang.oscillator, gang.antenna   short               a section of the tuning gang shorted
coil.antenna, coil.if,          open                a coil or winding open
coil.oscillator
signal.<stage>                  open xK             the signal path broken (or its gain scaled)
                                                    at antenna, converter, if, detector or audio
avc                             open xK             the AVC line (open: no AVC voltage)
if.peak                         xK                  the IF strip's peak moved (misaligned)
tuning.low, tuning.high         xK                  the station received at the low (padder,
                                                    oscillator coil core) or high (trimmer)
                                                    alignment mark moved by K
==============================  ==================  =============================================

What the calc model does with them is in :mod:`faultwise.expect.fault_physics`. A model naming a
role the set lacks does not apply to that set (the sweep skips the pair and says so).
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable

SHORT_OHM = 1.0
"""Resistance of a shorted part: about an ohm (a failed electrolytic or a solder bridge,
common practice, no source)."""
OPEN_OHM = 10e6
"""An open part seen through the meter: a digital meter's 10 Mohm input (trade)."""
LEAKY_GRID_V = 2.0
"""Grid of an output tube fed through a leaky coupling capacitor: the first audio plate's tens
of volts divided by the capacitor's leakage (some megohms) and the grid resistor (under a
megohm) put a volt or a few positive on the grid (common practice, no source)."""
LEAKY_CAP_MA = 15.0
"""A filter electrolytic leaky enough to run warm on a line set: some watts at 100-300 V is
about 10-20 mA of leakage (common practice, no source)."""
LEAKY_SUPPLY_MA = 30.0
"""A supply electrolytic leaky enough to run warm: a quarter watt or so at 9 V, about 30 mA
(common practice, no source)."""
LEAKY_ICBO_MA = {"germanium": 0.1, "silicon": 0.01}
"""Collector-base leakage of a transistor called leaky at the bench: ten or more times a
good small-signal part's few uA (germanium) or tens of nA (silicon) (from memory)."""

SIGNAL_STAGES = ("antenna", "converter", "if", "detector", "audio")
GANG_SECTIONS = ("oscillator", "antenna")
COILS = ("antenna", "if", "oscillator")

#: target pattern -> changes it takes. ``<tube>``/``<transistor>`` match a role name.
TARGETS: dict[str, tuple[str, ...]] = {
    "supply.first_cap_uf": ("scale", "open", "short", "leaky"),
    "supply.second_cap_uf": ("scale", "open", "short", "leaky"),
    "supply.surge_ohm": ("scale", "open"),
    "supply.filter_ohm": ("scale", "open", "short"),
    "supply.secondary_v": ("scale", "open"),
    "rectifier": ("open",),
    "rectifier.drop": ("scale",),
    "line": ("open",),
    "heaters.dropper": ("open",),
    "heaters.winding": ("open",),
    "heater.<tube>": ("open",),
    "tube.<tube>.emission": ("scale", "open"),
    "tube.<tube>.screen_ohm": ("scale", "open", "short"),
    "tube.<tube>.plate_ohm": ("scale", "open", "short"),
    "tube.<tube>.cathode_ohm": ("scale", "open", "short"),
    "tube.<tube>.grid": ("leaky",),
    "output.primary": ("open", "short"),
    "speaker.voice_coil": ("open", "short"),
    "battery_v": ("scale",),
    "battery": ("open", "leaky"),
    "transistor.<transistor>": ("open", "short", "leaky"),
    "transistor.<transistor>.top_ohm": ("scale", "open", "short"),
    "transistor.<transistor>.bottom_ohm": ("scale", "open", "short"),
    "transistor.<transistor>.emitter_ohm": ("scale", "open", "short"),
    "transistor.<transistor>.collector_ohm": ("scale", "open"),
    "transistor.<transistor>.beta": ("scale",),
    "output.bias": ("open", "short"),
    "oscillator": ("stopped", "scale"),
    "gang.<gang>": ("short",),
    "coil.<coil>": ("open",),
    "signal.<stage>": ("open", "scale"),
    "avc": ("open", "scale"),
    "if.peak": ("scale",),
    "tuning.low": ("scale",),
    "tuning.high": ("scale",),
}
#: which families each target can apply to (line sets have tubes, battery sets transistors).
LINE_ONLY = ("supply.", "rectifier", "line", "heaters.", "heater.", "tube.", "output.primary")
BATTERY_ONLY = ("battery", "transistor.", "output.bias")
STAGE_PARTS = ("screen_ohm", "plate_ohm", "cathode_ohm", "grid")
"""Tube targets the voltage chart's stage model computes (:mod:`faultwise.expect.stages`); a
tube with no amplifying section (rectifier, tuning eye, ballast) has none of them."""

CHANGE_WORDS = ("open", "short", "leaky", "stopped")
_SCALE = re.compile(r"^x(\d+(?:\.\d*)?|\.\d+)$")


@dataclass(frozen=True)
class Change:
    """One parsed entry: target, kind (scale/open/short/leaky/stopped), factor for scale."""

    target: str
    kind: str
    factor: float = 1.0

    @property
    def parts(self) -> tuple[str, ...]:
        return tuple(self.target.split("."))


def _roles() -> dict[str, tuple[str, ...]]:
    from faultwise.profile.model import TRANSISTOR_ROLES, TUBE_ROLES

    return {"tube": TUBE_ROLES, "transistor": TRANSISTOR_ROLES, "gang": GANG_SECTIONS,
            "coil": COILS, "stage": SIGNAL_STAGES}


def pattern_of(target: str) -> str | None:
    """The :data:`TARGETS` pattern a target matches, or None."""
    if target in TARGETS:
        return target
    roles = _roles()
    bits = target.split(".")
    for pattern in TARGETS:
        pbits = pattern.split(".")
        if len(pbits) != len(bits):
            continue
        if all(p == b or (p.startswith("<") and b in roles[p[1:-1]]) for p, b in zip(pbits, bits)):
            return pattern
    return None


def parse_change(target: str, text: object) -> Change:
    """One ``target: change`` entry; raises ValueError with the reason."""
    pattern = pattern_of(target)
    if pattern is None:
        raise ValueError(f"'{target}' is not a fault-model target")
    word = str(text).strip().lower()
    m = _SCALE.match(word)
    if m:
        kind, factor = "scale", float(m.group(1))
        if factor < 0:
            raise ValueError("a scale factor must be zero or more")
    elif word in CHANGE_WORDS:
        kind, factor = word, 1.0
    else:
        raise ValueError(f"'{text}' is not a change (write xK, open, short, leaky or stopped)")
    if kind not in TARGETS[pattern]:
        takes = ", ".join("xK" if k == "scale" else k for k in TARGETS[pattern])
        raise ValueError(f"'{target}' takes {takes}, not '{text}'")
    return Change(target, kind, factor)


def parse_model(model: Mapping) -> tuple[Change, ...]:
    """Every change of a model (raises ValueError at the first bad entry)."""
    return tuple(parse_change(t, v) for t, v in model.items())


def target_family_ok(target: str, family: str) -> bool:
    """Whether a target can name something in a set of this family."""
    line = family != "transistor"
    if target.startswith(BATTERY_ONLY):
        return not line
    if target.startswith(LINE_ONLY):
        return line
    return True


def model_problems(model: Mapping[str, object], families: Sequence[str]
                   ) -> list[tuple[str, str, str]]:
    """(target, message, hint) for every entry lint must report."""
    out = []
    for target, text in model.items():
        if not isinstance(target, str):
            out.append((str(target), "a model target must be text", "write e.g. 'supply.first_cap_uf'"))
            continue
        try:
            parse_change(target, text)
        except ValueError as exc:
            hint = ("use a target listed in knowledge/README.md, 'Fault models' (e.g. "
                    "'supply.first_cap_uf: x0.1', 'heater.output: open')")
            out.append((target, str(exc), hint))
            continue
        bits = target.split(".")
        if bits[0] == "tube" and len(bits) == 3 and bits[2] in STAGE_PARTS:
            from faultwise.expect.stages import NO_STAGE_ROLES

            if bits[1] in NO_STAGE_ROLES:
                out.append((target, f"a {bits[1]} tube has no amplifier stage with a "
                            f"'{bits[2]}'", "name the role of an amplifying tube (e.g. 'if', "
                            "'output')"))
                continue
        if not any(target_family_ok(target, f) for f in families):
            out.append((target, f"'{target}' names nothing in a set of the fault's families "
                        f"({', '.join(families)})", "use a target of the fault's families"))
    return out


def roles_needed(changes: Iterable[Change]) -> tuple[tuple[str, str], ...]:
    """(kind, role) pairs the profile must have for the model to apply: tube/transistor roles."""
    out = []
    for c in changes:
        p = c.parts
        if p[0] in ("heater", "tube") and len(p) >= 2:
            out.append(("tube", p[1]))
        elif p[0] == "transistor":
            out.append(("transistor", p[1]))
    return tuple(out)


def stage_part_ohm(profile: Profile, role: str, part: str,
                   table: TubeTable | None = None) -> float | None:
    """The resistor a stage's chart uses for ``part`` (the profile's, else the family's
    typical one); 0 or None when the stage has none (a screen fed straight from B+)."""
    from faultwise.expect.context import Context
    from faultwise.expect.stages import role_kind, stage_circuit, stage_operation

    tube = profile.tube(role)
    if tube is None:
        return None
    ctx = Context(profile, table)
    op, _ = stage_operation(ctx, tube)
    if op is None:
        return None
    circuit, _ = stage_circuit(ctx, tube, role_kind(role, op))
    return getattr(circuit, part, None)


def applies_to(changes: Sequence[Change], profile: Profile) -> str:
    """'' when the model can be applied to this profile, else why not."""
    for c in changes:
        if not target_family_ok(c.target, profile.family):
            return f"'{c.target}' names nothing in a {profile.family} set"
    for kind, role in roles_needed(changes):
        have = profile.tube(role) if kind == "tube" else profile.transistor(role)
        if have is None:
            return f"the set has no {role} {kind}"
    for c in changes:
        p = c.parts
        if p[0] == "tube" and len(p) == 3 and p[2].endswith("_ohm") and c.kind == "scale":
            if not stage_part_ohm(profile, p[1], p[2]):
                return f"the set's {p[1]} stage has no {p[2][:-4]} resistor to drift"
    if any(c.target == "output.bias" for c in changes):
        from faultwise.expect.output_pair import is_pair

        if not is_pair(profile):
            return "the set's output stage is not a push-pull pair"
    if any(c.target == "heaters.dropper" for c in changes) and profile.family != "series-string":
        return "only a series-string set has a dropping resistor"
    return ""
