"""Trigger oscillator stages (UJT and PUT relaxation oscillators) and the ``osc.*`` checks."""

from __future__ import annotations

from checks import oscillator
from reviewer.fmt import eng, span
from reviewer.model import Stage, Value
from reviewer.registry import (
    Bound,
    CheckDef,
    Context,
    Param,
    Reduced,
    StageKind,
    register,
    register_kind,
)
from reviewer.schema import OSC

V = "value"
_COMMON = {
    "supply": Param(V, "voltage", required=True),
    "timing_r": Param(V, "resistance", required=True),
    "timing_c": Param(V, "capacitance", required=True),
    "sync": Param("choice", choices=("free", "line")),
    "zener": Param(V, "voltage"),
    "target": Param("target"),
    "supply_ripple": Param(V, "voltage", allow_zero=True),
    "leakage": Param(V, "current", allow_zero=True),
}

UJT_OSC = register_kind(StageKind("ujt-oscillator", {
    "ujt": Param("part", required=True, part_type="ujt"),
    "base1_r": Param(V, "resistance", required=True),
    "base2_r": Param(V, "resistance", allow_zero=True),
    **_COMMON,
}, "relaxation oscillator with a unijunction transistor"))

PUT_OSC = register_kind(StageKind("put-oscillator", {
    "put": Param("part", required=True, part_type="put"),
    "gate_r_upper": Param(V, "resistance", required=True),
    "gate_r_lower": Param(V, "resistance", required=True),
    "cathode_r": Param(V, "resistance", required=True),
    **_COMMON,
}, "relaxation oscillator with a programmable unijunction transistor"))


def device_of(kind: str) -> str:
    """``ujt`` or ``put`` for an oscillator stage kind."""
    return "ujt" if kind == "ujt-oscillator" else "put"


def bind_device(ctx: Context, b: Bound, stage: Stage | None = None) -> str:
    """Add the oscillator's supply and device inputs shared by the ``osc.*`` checks.

    With ``sync = "line"`` the oscillator runs from the clamp plateau, so ``v1`` is the Zener
    voltage. Returns the device (``ujt`` or ``put``), also set as option ``device``.
    """
    st = stage or ctx.stage
    dev = device_of(st.kind)
    b.options["device"] = dev
    if st.get("sync") == "line":
        ctx.need(b, "v1", ctx.stage_path("zener", st))
    else:
        ctx.need(b, "v1", ctx.stage_path("supply", st))
    part = ctx.part(dev, st)
    assert part is not None  # the loader checks the link
    pre = f"parts.{part.ref}."
    for key in ("vv", "ip"):
        ctx.need(b, key, pre + key)
    if dev == "ujt":
        for key in ("eta", "rbb", "vd"):
            ctx.need(b, key, pre + key)
        ctx.need(b, "r1", ctx.stage_path("base1_r", st))
        ctx.read(b, "r2", ctx.stage_path("base2_r", st), default=0.0, dim="resistance",
                 unit="ohm")
    else:
        ctx.need(b, "offset", pre + "offset")
        ctx.need(b, "r_upper", ctx.stage_path("gate_r_upper", st))
        ctx.need(b, "r_lower", ctx.stage_path("gate_r_lower", st))
    return dev


def _bind_window(ctx: Context) -> Bound:
    b = Bound()
    dev = bind_device(ctx, b)
    part = ctx.part(dev)
    assert part is not None
    iv = ctx.read(b, "iv", f"parts.{part.ref}.iv")
    if iv is None:
        b.not_applicable = None
        b.notes.append("no guaranteed valley current given")
        b.add("iv", f"parts.{part.ref}.iv#none", Value.fixed(float("nan"), "current", "A"))
    ctx.need(b, "rt", ctx.stage_path("timing_r"))
    return b


def _sum_window(r: Reduced) -> str:
    rt = r.bound.inputs["rt"].value
    text = (f"timing R {span(rt.lo, rt.hi, 'ohm')} against the oscillation window "
            f"{eng(r.hi['r_min'], 'ohm')} – {eng(r.lo['r_max'], 'ohm')} over every corner")
    if r.status == "fail":
        if r.worst["timing_r"] <= r.worst["r_min"]:
            text += f"; fails: R_T must exceed {eng(r.hi['r_min'], 'ohm')} (device stays on)"
        else:
            k = r.limits.get("fail_below", 1.2)
            text += f"; fails: needs R_T ≤ {eng(r.lo['r_max'] / k, 'ohm')} (device never fires)"
    elif r.status == "marginal":
        k = r.limits.get("marginal_below", 2.0)
        text += f"; marginal: R_T ≤ {eng(r.lo['r_max'] / k, 'ohm')} would pass"
    return text + "; IP and IV are 25 °C limits"


register(CheckDef(
    id="osc.window", kinds=OSC,
    question="Does it oscillate at every corner? The timing R must supply more than IP at the "
             "peak point and less than IV at the valley.",
    method="r_min = (V1 − VV)/IV < R_T < r_max = (V1 − VP)/IP at every corner, with R_T,max "
           "inside r_max by 1.2 (fail) / 2 (marginal); VP includes the external base resistors.",
    source="Rashid, Power Electronics 4th ed. §9 (UJT/PUT triggers); Boylestad & Nashelsky ch. 17",
    fn=oscillator.window_check, bind=_bind_window,
    units={"peak_voltage": "V", "r_min": "ohm", "r_max": "ohm", "timing_r": "ohm"},
    summarise=_sum_window,
    fix="Choose R_T between r_min and r_max/2, or change C_T to move the frequency instead.",
))
