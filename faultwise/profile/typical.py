"""Typical values by family: what fills a profile field the profile does not give.

The tables and the typical transistor bias divider, used by the profile readers
(:mod:`faultwise.profile.sections`, :mod:`faultwise.profile.lineup`).
"""

from __future__ import annotations

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
# rescaled to keep the base voltage (see typical_bias). A real set's parts always win.
TYPICAL_BETA = {"germanium": 60.0, "silicon": 120.0}
TYPICAL_POLARITY = {"germanium": "pnp", "silicon": "npn"}
TYPICAL_MATERIAL = "germanium"
ROLE_GROUP = {"rf": "converter", "converter": "converter", "mixer": "converter",
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


def typical_bias(material: str, role: str, battery_v: float) -> tuple[float, ...]:
    """Role's typical divider for a 9 V set; top resistor rescaled for another battery.

    The base keeps the divider voltage of the 9 V design, Vth = 9 V * Rb / (Rt + Rb), so
    Rt' = Rb * (Vbatt / Vth - 1), rounded to the IEC 60063 E24 series.
    """
    from faultwise.core.codes import nearest_preferred

    top, bottom, emitter, collector = TYPICAL_BIAS[material][ROLE_GROUP[role]]
    vth = TYPICAL_BATTERY_V * bottom / (top + bottom)
    if battery_v != TYPICAL_BATTERY_V and battery_v > 1.5 * vth:
        top = nearest_preferred(bottom * (battery_v / vth - 1.0), "E24")
    return top, bottom, emitter, collector
