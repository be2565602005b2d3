"""``power.fault``: a short at the load of a phase-control stage, against ITSM and the fuse."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from checks import fault
from checks.core import Outcome
from reviewer.fmt import at_most, eng
from reviewer.model import Value
from reviewer.registry import Bound, CheckDef, Context, Reduced, register
from reviewer.stages import power as pw


def _bind(ctx: Context) -> Bound:
    b = Bound()
    ls = ctx.project.supply.get("inductance")
    if not isinstance(ls, Value) or ls.lo <= 0:
        b.not_applicable = ("no supply inductance: the fault current is bounded only by what "
                            "the project does not give; give supply.inductance (source and "
                            "wiring)")
        return b
    if not pw._hot_or_na(ctx, b, {"itsm": "itsm"}):
        return b
    ctx.need(b, "vs", "supply.voltage")
    ctx.need(b, "freq", "supply.frequency")
    ctx.need(b, "l_s", "supply.inductance")
    pw.bind_device_i2t(ctx, b)
    if "i2t" not in b.inputs:
        b.options["i2t_from_itsm"] = True
    fuse = ctx.stage.get("fuse")
    if isinstance(fuse, dict):
        ctx.need(b, "fuse_i2t", pw._sp(ctx, "fuse.i2t"))
        ctx.read(b, "t_fuse", pw._sp(ctx, "fuse.clearing_time"))
    return b


def _fn(*, vs: Any, freq: Any, l_s: Any, itsm: Any, t_sm: Any, limits: Mapping[str, float],
        i2t: Any = None, i2t_from_itsm: bool = False, fuse_i2t: Any = None,
        t_fuse: Any = None) -> Outcome:
    t_sm = np.asarray(t_sm, dtype=float)
    dev = pw.device_i2t(i2t=i2t, itsm=itsm, t_sm=t_sm)
    return fault.fault_check(vs=vs, omega=2 * np.pi * np.asarray(freq, dtype=float), l_s=l_s,
                             itsm=itsm, t_sm=t_sm, i2t=dev, fuse_i2t=fuse_i2t, t_fuse=t_fuse,
                             limits=limits)


def _summarise(r: Reduced) -> str:
    text = (f"a short at the load draws {eng(r.hi['fault_current'], 'A')} RMS from the supply "
            f"inductance at high line, a first peak of up to {eng(r.hi['fault_peak'], 'A')} "
            f"against ITSM {eng(r.lo['itsm_at_line'], 'A')}")
    if r.lo["fault_peak"] <= r.lo["itsm_at_line"] and r.status == "pass":
        return text + ": the SCR rides through a half-cycle of it"
    if "fuse_i2t" not in r.bound.inputs and r.status == "marginal":
        return text + ("; marginal: the SCR rides through the first half-cycle, but with no "
                       "fuse it fires into the short again every half-cycle, which ITSM does not "
                       "cover: fit a semiconductor-protection fuse (then see power.fuse), or "
                       "make sure the protection upstream clears within a half-cycle")
    if "fuse_i2t" not in r.bound.inputs:
        return text + ("; fails: nothing clears it before the SCR's surge rating is spent: fit "
                       "a semiconductor-protection fuse whose clearing I²t is below the SCR's "
                       "(then see power.fuse)")
    fuse_i2t = r.bound.inputs["fuse_i2t"].value.hi
    text += (f"; the fuse must clear within the half-cycle: prospective I²t "
             f"{eng(r.lo['fault_i2t'], 'A^2*s')}, fuse clearing {eng(fuse_i2t, 'A^2*s')}, "
             f"SCR {eng(r.lo['device_i2t'], 'A^2*s')}")
    if r.status == "marginal":
        return text + ("; marginal: the SCR rides through the first half-cycle, but a "
                       "half-cycle of the fault does not clear the fuse, so the SCR fires into "
                       "the short again every half-cycle, which ITSM does not cover, until the "
                       "fuse clears (never, if the fault is below its rating): a fuse with a "
                       f"clearing I²t ≤ {at_most(r.lo['fault_i2t'], 'A^2*s')}, or protection "
                       "upstream that clears within a half-cycle")
    if r.status != "pass":
        if r.lo["fault_i2t"] < fuse_i2t:
            text += "; fails: the fault is too small for the fuse to clear that fast"
        else:
            text += "; fails: the fuse lets through more I²t than the SCR can take"
    return text


register(CheckDef(
    id="power.fault", kinds=("phase-control",),
    question="Does the SCR survive a short circuit at the load, from the supply's impedance?",
    method="I_sc = V_s,max/(ω·L_s) RMS; first peak up to 2√2·I_sc (a fault at a voltage zero); "
           "within ITSM (at the line's half-cycle) passes if a fuse clears within the "
           "half-cycle (marginal without one, or with one that does not); above it the fuse "
           "must clear within the half-cycle: the prospective I²t I_sc²·π/ω reaches its "
           "clearing I²t, which stays below the SCR's I²t on the fuse's time base.",
    source="Rashid 4e §17 (fault current, fuse coordination, Ex 17.6); Bimbhra ch. 4",
    fn=_fn, bind=_bind,
    units={"fault_current": "A", "fault_peak": "A", "fault_i2t": "A^2*s"},
    summarise=_summarise,
    fix="A semiconductor-protection fuse with a clearing I²t below the SCR's, an SCR with a "
        "larger ITSM and I²t, or more source impedance (a line choke).",
    cautions=("The supply inductance given bounds the fault current; a stiffer supply makes "
              "it larger. A battery on the load side adds its own short-circuit current, which "
              "no mains fuse limits.",),
    optional=frozenset({"device_i2t"}),  # no fuse: no time base to convert the SCR's I²t to
))
