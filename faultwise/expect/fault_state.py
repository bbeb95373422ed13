"""A fault model folded into the facts the calculation needs, and a transistor stage's point.

:func:`fold` turns the parsed changes (:func:`faultwise.expect.fault_models.parse_model`)
into one :class:`State`: which parts are open or shorted, the scale of each value, the
emission of each tube, the changes per transistor and per tube stage. :func:`stage_point`
solves a divider-biased transistor stage with the changes (the Thevenin solution of
:func:`faultwise.calc.bias.divider_bias`, with collector-base leakage, a collector-emitter
short and a saturation solution that keeps Ie = Ic + Ib); :func:`transistor_points` does it
for every stage of a set. The constants below say what a broken part reads. The readings
themselves are :mod:`faultwise.expect.fault_physics` (with ``fault_physics_line`` and
``fault_physics_chart``), which all build on this module.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from faultwise.expect.fault_models import (LEAKY_CAP_MA, LEAKY_ICBO_MA, OPEN_OHM, SHORT_OHM,
                                           STAGE_PARTS, Change)

if TYPE_CHECKING:
    from faultwise.profile.model import Profile

VCE_SAT_V = 0.2
"""Collector-emitter voltage of a saturated small-signal transistor (as calc.bias)."""
SCREEN_OPEN_CURRENT = 0.05
"""A pentode with no screen voltage passes a few per cent of its plate current (tube curves,
from memory)."""
VOICE_COIL_SHORT = 0.05
"""A shorted voice coil (burned turns, leads touching) reads a few per cent of its value."""
OPEN_READ = 1e9
"""What a power-off resistance reading of an open winding or heater is taken to be: infinite."""


@dataclass
class State:
    """The parsed model, folded into the facts the calculation needs."""

    line_open: bool = False
    dropper_open: bool = False
    winding_open: bool = False
    heater_open: tuple[str, ...] = ()
    rect_open: bool = False
    rect_drop: float = 1.0
    secondary_open: bool = False
    first_short: bool = False
    second_short: bool = False
    filter_open: bool = False
    surge_open: bool = False
    emission: dict = field(default_factory=dict)       # tube role -> emission factor
    cathode: str = ""                  # '', open, short
    cathode_scale: float = 1.0
    primary: str = ""
    voice_coil_open: bool = False
    voice_coil_short: bool = False
    leak_first_ma: float = 0.0         # a leaky first / second filter capacitor's current
    leak_second_ma: float = 0.0
    battery_open: bool = False
    supply_leak: bool = False
    osc: float = 1.0
    signal: float = 1.0
    avc: float = 1.0
    if_peak: float = 1.0
    tuning: dict = field(default_factory=dict)         # 'low'/'high' -> factor
    transistors: dict = field(default_factory=dict)    # role -> {field: Change}
    stage: dict = field(default_factory=dict)          # tube role -> {part: Change}
    pair_bias: str = ""                                # '', open, short (output.bias)
    profile_scale: dict = field(default_factory=dict)  # profile field -> factor


def fold(changes: tuple[Change, ...]) -> State:
    """The model's changes as one :class:`State` (an open capacitor keeps 1 % of its value)."""
    st = State()
    for c in changes:
        p, kind, k = c.parts, c.kind, c.factor
        head = p[0]
        if c.target == "line":
            st.line_open = True
        elif c.target == "heaters.dropper":
            st.dropper_open = True
        elif c.target == "heaters.winding":
            st.winding_open = True
        elif head == "heater":
            st.heater_open += (p[1],)
        elif c.target == "rectifier":
            st.rect_open = True
        elif c.target == "rectifier.drop":
            st.rect_drop *= k
        elif head == "tube" and p[2] in STAGE_PARTS:
            st.stage.setdefault(p[1], {})[p[2]] = c
            if c.target == "tube.output.cathode_ohm":
                st.cathode, st.cathode_scale = ("" if kind == "scale" else kind), k
        elif head == "tube":
            st.emission[p[1]] = st.emission.get(p[1], 1.0) * (0.0 if kind == "open" else k)
        elif c.target == "output.bias":
            st.pair_bias = kind
        elif c.target == "output.primary":
            st.primary = kind
        elif c.target == "speaker.voice_coil":
            if kind == "short":
                st.voice_coil_short = True
            else:
                st.voice_coil_open = True
        elif c.target == "battery":
            if kind == "leaky":
                st.supply_leak = True
            else:
                st.battery_open = True
        elif head == "transistor":
            field = p[2] if len(p) > 2 else "self"
            st.transistors.setdefault(p[1], {})[field] = c
        elif head == "oscillator":
            st.osc *= 0.0 if kind == "stopped" else k
        elif head in ("gang", "coil"):
            if p[1] in ("oscillator",):
                st.osc = 0.0
            elif p[1] == "antenna" and head == "coil":
                st.signal *= 0.1            # the rod's coupling winding still picks a little up
            else:
                st.signal = 0.0
        elif head == "signal":
            if p[1] != "audio":
                st.signal *= 0.0 if kind == "open" else k
        elif head == "avc":
            st.avc *= 0.0 if kind == "open" else k
        elif c.target == "if.peak":
            st.if_peak *= k
        elif head == "tuning":
            st.tuning[p[1]] = st.tuning.get(p[1], 1.0) * k
        elif head == "supply" and kind == "leaky":
            if p[1] == "first_cap_uf":
                st.leak_first_ma += LEAKY_CAP_MA
            else:
                st.leak_second_ma += LEAKY_CAP_MA
        elif head == "supply":
            fld = p[1]
            if fld == "first_cap_uf" and kind == "short":
                st.first_short = True
            elif fld == "second_cap_uf" and kind == "short":
                st.second_short = True
            elif fld == "filter_ohm" and kind == "open":
                st.filter_open = True
            elif fld == "surge_ohm" and kind == "open":
                st.surge_open = True
            elif fld == "secondary_v" and kind == "open":
                st.secondary_open = True
            else:
                factor = {"scale": k, "open": 0.01, "short": 0.0}[kind]
                if fld == "filter_ohm" and kind == "short":
                    factor = SHORT_OHM / 1e6
                st.profile_scale[fld] = st.profile_scale.get(fld, 1.0) * factor
        elif c.target == "battery_v":
            st.profile_scale["battery_v"] = st.profile_scale.get("battery_v", 1.0) * k
    return st


# ----------------------------------------------------------------------- transistor stage

@dataclass(frozen=True)
class StagePoint:
    vb_v: float
    ve_v: float
    ic_ma: float
    vc_v: float
    draw_ma: float      # collector current plus divider current: what the stage takes from the battery


def _res(base: float, c: Change | None, *, open_ohm: float = OPEN_OHM) -> float:
    if c is None:
        return base
    if c.kind == "open":
        return open_ohm
    if c.kind == "short":
        return SHORT_OHM * 1e-3 if base > 0 else 0.0
    return base * c.factor


def stage_point(vcc: float, top: float, bottom: float, re: float, rc: float, beta: float,
                vbe: float, *, icbo_ma: float = 0.0, state: str = "") -> StagePoint:
    """A divider-biased stage (magnitudes): Thevenin solution with leakage and saturation.

    Active region: Ib = (Vth - Vbe - (beta+1) Icbo Re) / (Rth + (beta+1) Re),
    Ie = (beta+1)(Ib + Icbo), Ic = Ie - Ib. Saturation (Vc < Ve + 0.2 V): Ve from
    Ve (1 + Re/Rc + Re/Rth) = Re ((Vcc - 0.2)/Rc + (Vth - Vbe)/Rth). ``state``: '' (good),
    'open' (no junction conducts: Vb = Vth, Ve = 0, Vc = Vcc), 'short' (collector to emitter).
    """
    vth = vcc * bottom / (top + bottom)
    rth = top * bottom / (top + bottom)
    icbo = icbo_ma / 1000.0
    divider = lambda vb: max(vcc - vb, 0.0) / top * 1000.0
    if state == "open":
        return StagePoint(vth, 0.0, 0.0, vcc, divider(vth))
    if state == "short":
        ic = vcc / (rc + re) if rc + re > 0 else vcc / (SHORT_OHM * 1e-3)
        ve = ic * re
        vb = min(vth, ve + vbe)
        return StagePoint(vb, ve, ic * 1000.0, ve, ic * 1000.0 + divider(vb))
    ib = (vth - vbe - (beta + 1) * icbo * re) / (rth + (beta + 1) * re)
    ib = max(ib, -icbo) if vth > vbe or icbo > 0 else 0.0
    ie = (beta + 1) * (ib + icbo)
    if vth <= vbe and icbo == 0:
        ie = 0.0
    ic = ie - ib
    ve = ie * re
    vc = vcc - ic * rc
    vb = ve + vbe if ie > 0 else vth
    if rc > 0 and vc < ve + VCE_SAT_V:
        ve = re * ((vcc - VCE_SAT_V) / rc + (vth - vbe) / rth) / (1 + re / rc + re / rth)
        ve = max(ve, 0.0)
        vc = ve + VCE_SAT_V
        ic = (vcc - vc) / rc
        vb = ve + vbe
    return StagePoint(vb, ve, ic * 1000.0, vc, ic * 1000.0 + divider(vb))


def transistor_points(profile: Profile, st: State, vcc: float) -> dict[str, StagePoint]:
    """Every stage's point at battery ``vcc`` with the model's changes."""
    from faultwise.calc.tolerance import vbe_v

    out = {}
    for tr in profile.transistors:
        ch = st.transistors.get(tr.role, {})
        b = tr.bias
        me = ch.get("self")
        state = me.kind if me is not None and me.kind in ("open", "short") else ""
        leak = LEAKY_ICBO_MA[tr.material] if me is not None and me.kind == "leaky" else 0.0
        beta = tr.beta * (ch["beta"].factor if "beta" in ch else 1.0)
        out[tr.role] = stage_point(
            vcc, _res(b.top_ohm, ch.get("top_ohm"), open_ohm=1e12),
            _res(b.bottom_ohm, ch.get("bottom_ohm"), open_ohm=1e12),
            _res(b.emitter_ohm, ch.get("emitter_ohm")), _res(b.collector_ohm, ch.get("collector_ohm")),
            beta, vbe_v(tr.material).nominal, icbo_ma=leak, state=state)
    return out
