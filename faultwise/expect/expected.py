"""Expected readings: profile -> {name: Expected} (DESIGN section 5; the names are a contract).

Each expectation is built from the pure formulas in :mod:`faultwise.calc` with its band by
worst-case evaluation over the stated tolerances (:mod:`faultwise.calc.tolerance`), and a
``basis`` that shows the arithmetic with this set's numbers and says where the band comes
from. ``expectation_names(family)`` lists every name ``expect`` can produce for a family.

The builders live beside this module, one file per part of the set: ``expect_supply``
(line, leakage, rectifier and filter), ``expect_heaters``, ``expect_audio`` (output stage,
speaker), ``expect_bias`` (battery and transistor bias), ``expect_signal`` (detector, IF,
oscillator activity), ``expect_tuning`` (tuning, antenna), ``meter`` (what an AC meter
reads of the ripple) and ``parts`` (replacement part ratings for this set); they share
:class:`faultwise.expect.context.Context`.
"""

from __future__ import annotations

import os
from typing import TYPE_CHECKING

from faultwise.core.vocabulary import STAGES
from faultwise.expect.context import Expected

if TYPE_CHECKING:
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable


__all__ = ["Expected", "STAGES", "expectation_names", "expect", "expect_in_workspace"]



def _tube_roles() -> tuple[str, ...]:
    from faultwise.profile.model import TUBE_ROLES

    return TUBE_ROLES


def _transistor_roles() -> tuple[str, ...]:
    from faultwise.profile.model import TRANSISTOR_ROLES

    return TRANSISTOR_ROLES


def expectation_names(family: str) -> frozenset[str]:
    """Exactly the names ``expect`` can produce for profiles of ``family`` (for the graph lint)."""
    common = {"if.peak_khz", "if.bandwidth_khz", "tuning.lo_low_khz", "tuning.lo_high_khz",
              "tuning.image_low_khz", "tuning.image_high_khz", "tuning.cap_ratio",
              "tuning.antenna_uh", "tuning.osc_uh", "tuning.align_low_khz",
              "tuning.align_high_khz", "tuning.tracking_error_khz", "antenna.half_wave_m",
              "detector.time_constant_us", "detector.avc_v", "output.reflected_ohm",
              "output.voice_coil_ohm"}
    if family == "transistor":
        from faultwise.expect.bias import BIAS_FIELDS

        names = common | {"supply.battery_v", "supply.standby_ma", "oscillator.emitter_shift_v"}
        for role in _transistor_roles():
            names |= {f"bias.{role}.{f}" for f in BIAS_FIELDS}
        names |= {"bias.output.idle_ma", "bias.output.bases_v", "bias.output.midpoint_v"}
        return frozenset(names)
    if family not in ("series-string", "transformer"):
        return frozenset()
    names = common | {"mains.line_v", "safety.leakage_v", "supply.rectifier_out_v",
                      "supply.ripple_vpp", "supply.filtered_v", "supply.filter_drop_v",
                      "output.cathode_v", "output.plate_v", "output.primary_ohm",
                      "oscillator.grid_v"}
    from faultwise.expect.parts import PART_NAMES

    names |= set(PART_NAMES) | {"supply.ripple_meter_vac"}
    if family == "series-string":
        names |= {"heaters.string_v", "heaters.string_ma", "heaters.dropping_ohm"}
    else:
        names |= {"heaters.winding_v", "heaters.total_a", "supply.secondary_v"}
    from faultwise.expect.stages import NO_STAGE_ROLES, STAGE_FIELDS

    for role in _tube_roles():
        names |= {f"heater.{role}.v", f"heater.{role}.cold_ohm"}
        if role not in NO_STAGE_ROLES:
            names |= {f"stage.{role}.{f}" for f in STAGE_FIELDS}
    return frozenset(names)


def expect(profile: Profile, *, tube_table: TubeTable | None = None) -> dict[str, Expected]:
    """Every expectation this profile allows, keyed by name, in stage order.

    ``tube_table``: a :class:`faultwise.profile.tubes.TubeTable` for rectifier and output-tube data
    (default: the bundled table, read once and cached).
    """
    from faultwise.expect.audio import add_output_tube, add_speaker
    from faultwise.expect.bias import add_battery, add_bias
    from faultwise.expect.context import Context
    from faultwise.expect.heaters import add_heaters
    from faultwise.expect.meter import add_ripple_meter
    from faultwise.expect.parts import add_part_ratings
    from faultwise.expect.stages import add_tube_stages
    from faultwise.expect.signal import add_detector, add_if_strip, add_oscillator
    from faultwise.expect.supply import add_mains, add_rectifier
    from faultwise.expect.tuning import add_antenna, add_tuning

    ctx = Context(profile, tube_table)
    if profile.line_powered:
        add_mains(ctx)
        add_heaters(ctx)
        add_rectifier(ctx)
        add_ripple_meter(ctx)
        add_part_ratings(ctx)
        add_output_tube(ctx)
        add_tube_stages(ctx)
    else:
        add_battery(ctx)
        add_bias(ctx)
    add_speaker(ctx)
    add_detector(ctx)
    add_if_strip(ctx)
    add_oscillator(ctx)
    add_tuning(ctx)
    add_antenna(ctx)
    order = {s: i for i, s in enumerate(STAGES)}
    items = sorted(ctx.out.items(), key=lambda kv: order[kv[1].stage])  # stable: build order
    return dict(items)



def expect_in_workspace(profile: Profile,
                        knowledge_dir: str | os.PathLike[str] | None) -> dict[str, Expected]:
    """``expect(profile)`` with the workspace's own tube table when its knowledge has one.

    Every place that turns a set into expectations for a workspace (the walk command, the
    sweep, the bench screens) calls this, so they all expect the same readings.
    """
    from faultwise.profile.tubes import workspace_tube_table

    return expect(profile, tube_table=workspace_tube_table(knowledge_dir))
