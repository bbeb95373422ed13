"""Helpers for the tests that use ngspice (Debian package) as an independent circuit oracle.

Each test writes a netlist of the SAME circuit our model solves, runs ``ngspice -b`` and
reads back ``.meas`` results. Tests skip with a reason when ngspice is not installed.
"""

from __future__ import annotations

import math
import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from faultwise.calc.rectifier import Diode, RectifierCircuit

_MEAS = re.compile(r"^\s*(\w+)\s*=\s*([-+0-9.eE]+)", re.MULTILINE)


def need_ngspice() -> str:
    """Path of ngspice, or skip the calling test."""
    path = shutil.which("ngspice")
    if path is None and os.environ.get("CI"):
        pytest.fail("ngspice is missing on CI: .ci/run must install the Debian package ngspice")
    if path is None:
        pytest.skip("ngspice is not installed (apt-get install ngspice); the oracle checks need it")
    return path


def run_ngspice(netlist: str, workdir: Path) -> dict[str, float]:
    """Run a batch netlist; return every ``name = value`` line ngspice printed (lower-case names)."""
    exe = need_ngspice()
    path = workdir / "circuit.cir"
    path.write_text(netlist, encoding="ascii")
    proc = subprocess.run([exe, "-b", str(path)], capture_output=True, text=True, timeout=60,
                          check=False,
                          cwd=workdir)
    out = proc.stdout + proc.stderr
    if proc.returncode != 0:
        raise AssertionError(f"ngspice failed ({proc.returncode}):\n{out[-2000:]}")
    return {m.group(1).lower(): float(m.group(2)) for m in _MEAS.finditer(out)}


def _diode_element(name: str, anode: str, cathode: str, d: Diode) -> list[str]:
    """A vacuum diode as a behavioural current source, a junction as a D model."""
    if d.kind == "child":
        return [f"B{name} {anode} {cathode} I = {d.child_k:.9g} * pow(max(V({anode},{cathode}),0),1.5)"]
    return [f"D{name} {anode} {cathode} DM{name}",
            f".model DM{name} D(IS={d.is_a:.9g} N={d.n:.9g} RS={d.rs_ohm:.9g})"]


def rectifier_netlist(c: RectifierCircuit, cycles: int = 30, step_us: float = 10.0) -> str:
    """The rectifier-filter circuit of faultwise.calc.rectifier, with last-cycle measurements."""
    vpk = math.sqrt(2.0) * c.source_rms_v
    f = c.freq_hz
    i2 = c.filter_load_ma / 1000.0
    i1 = c.load_ma / 1000.0 - i2
    ic1 = 0.8 * vpk  # a neutral start; the run settles for many time constants
    ic2 = ic1 - c.filter_ohm * i2
    lines = [f"* faultwise rectifier oracle: {c.circuit}"]
    if c.circuit == "half-wave":
        lines += [f"VS src 0 SIN(0 {vpk:.9g} {f:g})", f"RS src a {c.surge_ohm:.9g}"]
        lines += _diode_element("1", "a", "k", c.diode)
    elif c.circuit == "full-wave":
        lines += [f"VSA srca 0 SIN(0 {vpk:.9g} {f:g})", f"VSB srcb 0 SIN(0 {-vpk:.9g} {f:g})",
                  f"RSA srca a {c.surge_ohm:.9g}", f"RSB srcb b {c.surge_ohm:.9g}"]
        lines += _diode_element("1", "a", "k", c.diode) + _diode_element("2", "b", "k", c.diode)
    else:  # bridge: a floating winding, four rectifiers
        lines += [f"VS src n SIN(0 {vpk:.9g} {f:g})", f"RS src a {c.surge_ohm:.9g}",
                  "RLEAKA a 0 1e9", "RLEAKN n 0 1e9"]
        lines += (_diode_element("1", "a", "k", c.diode) + _diode_element("2", "n", "k", c.diode)
                  + _diode_element("3", "0", "a", c.diode) + _diode_element("4", "0", "n", c.diode))
    t_end = cycles / f
    t_from = (cycles - 1) / f
    lines += [
        f"C1 k 0 {c.first_cap_uf:.9g}u IC={ic1:.9g}",
        f"I1 k 0 DC {i1:.9g}",
        f"RF k flt {c.filter_ohm:.9g}",
        f"C2 flt 0 {c.second_cap_uf:.9g}u IC={ic2:.9g}",
        f"I2 flt 0 DC {i2:.9g}",
        f".tran {step_us:g}u {t_end:.9g} {t_from - 1 / f:.9g} {step_us:g}u uic",
        f".meas tran v1avg AVG v(k) from={t_from:.9g} to={t_end:.9g}",
        f".meas tran v1max MAX v(k) from={t_from:.9g} to={t_end:.9g}",
        f".meas tran v1min MIN v(k) from={t_from:.9g} to={t_end:.9g}",
        f".meas tran v1prev AVG v(k) from={t_from - 1 / f:.9g} to={t_from:.9g}",
        f".meas tran v2avg AVG v(flt) from={t_from:.9g} to={t_end:.9g}",
        ".end",
    ]
    return "\n".join(lines) + "\n"


# Transistor models for the bias oracle: an ideal Gummel-Poon transistor (ngspice defaults:
# no Early effect, no high-injection roll-off), so its current gain is exactly BF and the
# only device fact left is the saturation current, chosen so that Vbe at about 1 mA falls in
# the material's textbook range (silicon 0.6-0.7 V, germanium 0.2-0.3 V).
TRANSISTOR_IS_A = {"silicon": 1e-14, "germanium": 5e-8}


def bias_netlist(polarity: str, material: str, beta: float, vcc_v: float, top_ohm: float,
                 bottom_ohm: float, emitter_ohm: float, collector_ohm: float) -> str:
    """Divider-biased stage, .op; prints vb, ve, vc (to common) and the collector current."""
    sign = 1 if polarity == "npn" else -1
    kind = "NPN" if polarity == "npn" else "PNP"
    rc = f"RC vcc cm {collector_ohm:.9g}" if collector_ohm > 0 else "RC vcc cm 1e-6"
    lines = [
        f"* faultwise bias oracle: {material} {kind}",
        f"VCC vcc 0 DC {sign * vcc_v:.9g}",
        f"R1 vcc b {top_ohm:.9g}",
        f"R2 b 0 {bottom_ohm:.9g}",
        f"RE e 0 {emitter_ohm:.9g}",
        rc,
        # the meter source sits between the collector resistor and the collector; its current
        # is positive for conventional current into an NPN collector / out of a PNP collector
        "VMC cm c DC 0" if polarity == "npn" else "VMC c cm DC 0",
        "Q1 c b e QM",
        f".model QM {kind}(IS={TRANSISTOR_IS_A[material]:.9g} BF={beta:.9g})",
        ".control",
        "op",
        "let vb = v(b)",
        "let ve = v(e)",
        "let vc = v(c)",
        "let ic = i(vmc)",
        "print vb ve vc ic",
        "quit",
        ".endc",
        ".end",
    ]
    return "\n".join(lines) + "\n"
