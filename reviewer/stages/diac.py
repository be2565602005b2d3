"""The diac–RC trigger stage (``diac-rc``) and the ``diac.*`` checks.

An RC phase-shift network across the triac (fed from the line through the load: with an
R–L load, diac.firing-range, diac.snap-on and the power stage's firing range model the load's
drop while the triac is off; with a resistive load, and in diac.symmetry, it is neglected)
charges a capacitor to the diac's breakover voltage.
Single time constant: ``pot`` + ``series_r`` charge ``c``; double: then ``r2`` charges ``c2``,
across which the diac sits. :func:`bind_firing` / :func:`firing_from` give a power stage
whose gate is this stage its firing range.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from checks import diac
from checks.core import Outcome
from reviewer.errors import ProjectError
from reviewer.fmt import at_least, at_most, eng, span
from reviewer.model import Part, Stage, Value
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
from reviewer.schema import DIAC

V = "value"

DIAC_RC = register_kind(StageKind("diac-rc", {
    "diac": Param("part", required=True, part_type="diac"),
    "triac": Param("part", required=True, part_type="triac"),
    "pot": Param(V, "resistance", required=True, allow_zero=True,
                 help='the variable R as a range: pot = { min = "0 ohm", max = "250 kohm" }'),
    "series_r": Param(V, "resistance", allow_zero=True),
    "c": Param(V, "capacitance", required=True),
    "r2": Param(V, "resistance"),
    "c2": Param(V, "capacitance"),
    "target": Param(V, "angle", allow_zero=True,
                    help='target = { min = "30 deg", max = "150 deg" }'),
    "gate_r": Param(V, "resistance", allow_zero=True),
    "load_r": Param(V, "resistance"),
}, "a diac fired from an RC phase-shift network on the line, triggering a triac"))

_LOAD_NOTE = ("the network sits across the triac: the load's drop is neglected while the "
              "triac is off, and the triac conducts to the line zero (a resistive load)")
_RL_NOTE = ("the network sits across the triac: the load's drop is neglected while the triac "
            "is off; with the R–L load of `{}` the triac conducts to the current's zero, and "
            "the network restarts there")
_FED_NOTE = ("the network sits across the triac and is fed through the R–L load of `{}` while "
             "the triac is off (its drop modelled{}); the triac conducts to the current's "
             "zero, and the network restarts there")
POWER_KINDS = ("triac-phase-control",)


# --------------------------------------------------------------------------- binding helpers

def _part(ctx: Context, key: str, stage: Stage | None = None) -> Part:
    part = ctx.part(key, stage)
    assert part is not None  # the loader checks the link
    return part


def _double(ctx: Context, stage: Stage | None = None) -> bool:
    st = stage or ctx.stage
    has_r2, has_c2 = isinstance(st.get("r2"), Value), isinstance(st.get("c2"), Value)
    if has_r2 != has_c2:
        raise ProjectError("a second RC section needs both r2 and c2 (or neither: a single "
                           "time constant)", st.where)
    return has_r2


def _bind_network(ctx: Context, b: Bound, stage: Stage | None = None, prefix: str = "",
                  pot: str = "ends", sweep: int = 0, fed: bool = True,
                  snubber: bool = True) -> None:
    """Line, network and diac inputs. ``pot``: "ends" adds r_lo/r_hi (pot ends + series R),
    "none" leaves the pot out, "swept" adds the pot itself (with ``sweep``) and its ends.
    ``fed``: the check models the network fed through an R–L load (:func:`_bind_load`), with
    a snubber's current through it (``snubber``)."""
    st = stage or ctx.stage
    if ctx.project.supply.get("kind") != "ac":
        raise ProjectError("a diac-rc stage needs an ac supply (the line it phase-shifts)",
                           st.where)
    ctx.need(b, "vs", "supply.voltage")
    if "freq" not in b.inputs:
        ctx.need(b, prefix + "freq" if prefix else "freq", "supply.frequency")
    d = _part(ctx, "diac", st)
    ctx.need(b, prefix + "vbo", f"parts.{d.ref}.vbo")
    ctx.need(b, prefix + "breakback", f"parts.{d.ref}.breakback")
    ctx.need(b, prefix + "c1", ctx.stage_path("c", st))
    ctx.read(b, prefix + "series_r", ctx.stage_path("series_r", st), default=0.0,
             dim="resistance", unit="ohm")
    b.notes[:] = [n for n in b.notes if not n.startswith("series_r not given")]
    if _double(ctx, st):
        ctx.need(b, prefix + "r2", ctx.stage_path("r2", st))
        ctx.need(b, prefix + "c2", ctx.stage_path("c2", st))
    _bind_load(ctx, b, st, prefix, fed, snubber)
    if pot != "none":
        pv: Value = st.get("pot")
        path = ctx.stage_path("pot", st)
        if pot == "swept":
            b.add(prefix + "pot", path, pv, sweep=sweep if pv.varies else 0)
        b.add(prefix + "pot_lo", path + "#min", pv.at(pv.lo))
        b.add(prefix + "pot_hi", path + "#max", pv.at(pv.hi))


def _power_stage(ctx: Context, st: Stage) -> Stage | None:
    """The triac stage diac-rc stage ``st`` fires: the binding one, or the one naming it."""
    if ctx.stage.kind in POWER_KINDS and ctx.stage.get("gate") == st.id:
        return ctx.stage
    fired = ctx.stages_of(POWER_KINDS, "gate", st.id)
    if len(fired) > 1:
        raise ProjectError(f"stage `{st.id}` is the gate of several triac stages ("
                           + ", ".join(f"`{f.id}`" for f in fired) + "): give each triac "
                           "stage a diac-rc stage of its own", st.where)
    return fired[0] if fired else None


def _bind_load(ctx: Context, b: Bound, st: Stage, prefix: str, fed: bool = True,
               snubber: bool = True) -> None:
    """The R–L load of the triac stage this trigger fires, as ``rl_r``/``rl_l`` inputs
    (prefixed), only where its ``load.l`` is given: a resistive load's inputs stay as they
    are. ``fed``: the check feeds the network through that load while the triac is off,
    with the current of an R–C snubber across the triac stage (``rs``/``cs``, option
    ``rl_fed``); otherwise the load's drop is neglected and a second RC section with an
    R–L load is not modelled (the check is incomplete)."""
    power = _power_stage(ctx, st)
    lv = ctx.project.lookup(ctx.stage_path("load.l", power)) if power is not None else None
    if power is None or not isinstance(lv, Value):
        b.notes.append(_LOAD_NOTE)
        return
    ctx.need(b, prefix + "rl_r", ctx.stage_path("load.r", power))
    b.add(prefix + "rl_l", ctx.stage_path("load.l", power), lv)
    if fed:
        b.options[prefix + "rl_fed"] = True
        snubs = ctx.stages_of(("rc-snubber",), "across", power.id) if snubber else []
        for sn in snubs[:1]:
            ctx.need(b, prefix + "rs", ctx.stage_path("r", sn))
            ctx.need(b, prefix + "cs", ctx.stage_path("c", sn))
        extra = f", with the snubber `{snubs[0].id}`'s current" if snubs else ""
        if len(snubs) > 1:
            b.unmodelled = (f"several snubbers across `{power.id}`: the network's feed "
                            "through the load is modelled with one")
        b.notes.append(_FED_NOTE.format(power.id, extra))
        return
    b.notes.append(_RL_NOTE.format(power.id))
    if _double(ctx, st):
        b.unmodelled = (f"a second RC section (stages.{st.id}.r2, c2) firing the R–L load of "
                        f"`{power.id}` (load.l given) is not modelled here: simulate the "
                        "netlist (latchbook export --spice), or use a single section")


def _fed_load(kw: dict[str, Any], prefix: str = "") -> dict[str, Any] | None:
    """Pop the fed load's inputs (:func:`_bind_load`): rl_r, rl_l, rs, cs, or None."""
    if not kw.pop(prefix + "rl_fed", False):
        return None
    out = {"rl_r": kw.pop(prefix + "rl_r"), "rl_l": kw.pop(prefix + "rl_l"),
           "rs": kw.pop(prefix + "rs", np.nan), "cs": kw.pop(prefix + "cs", np.nan)}
    return out


def _load_angle(kw: dict[str, Any], omega: Any, prefix: str = "") -> Any:
    """Pop the R–L load's inputs: its angle φ = atan(ωL/R) [rad], 0 without them."""
    r, ll = kw.pop(prefix + "rl_r", None), kw.pop(prefix + "rl_l", None)
    if r is None or ll is None:
        return 0.0
    return np.arctan2(np.asarray(omega, dtype=float) * np.asarray(ll, dtype=float),
                      np.asarray(r, dtype=float))


def _net(kw: dict[str, Any], prefix: str = "") -> dict[str, Any]:
    """Pop the network inputs: series R, c1 and the second section (NaN when single)."""
    out = {"series_r": kw.pop(prefix + "series_r"), "c1": kw.pop(prefix + "c1"),
           "r2": kw.pop(prefix + "r2", np.nan), "c2": kw.pop(prefix + "c2", np.nan)}
    return out


def bind_firing(ctx: Context, b: Bound, stage: Stage, *, sweep: int = 0,
                extra: tuple[float, ...] = ()) -> None:
    """Add the inputs of the firing range a power stage takes from diac-rc ``stage``.

    The pot is swept (``sweep`` points, for a per-row angle) besides its ends, and where
    ``extra`` angles [rad] are asked for (α = 90°, where currents and losses peak) the pot
    settings that fire there at each combination of the other inputs' ends are added to the
    sweep. The inputs are prefixed ``dt_`` (the line is ``vs``/``freq``); option
    ``diac_trigger`` marks them for :func:`firing_from`. The angles are the running state's.
    A corner that does not fire gives NaN angles, which no check passes.
    """
    had_vs, had_f = "vs" in b.inputs, "freq" in b.inputs
    # The snubber's current through the load is left out here (it delays the firing by
    # about a degree at a fan's low end: the earlier angle is the heavier duty for the
    # triac's currents, and its corners would multiply every power check's rows by four).
    _bind_network(ctx, b, stage, prefix="dt_", pot="swept", sweep=max(sweep, 2) if sweep
                  else 0, snubber=False)
    if not had_vs:
        b.options["firing_vs_only"] = True
    if not had_f:
        b.options["firing_freq_only"] = True
    b.options["diac_trigger"] = True
    b.notes.append(f"firing range from the diac-RC trigger `{stage.id}` (the running state)")
    pot = b.inputs["dt_pot"].value
    if sweep and extra and pot.varies:
        b.inputs["dt_pot"].extra = _pot_at_angles(b, extra)


_POT_GRID = 32  # pot settings per row bracketing the angle (then false position)


def _pot_at_angles(b: Bound, angles: tuple[float, ...]) -> tuple[float, ...]:
    """The pot settings inside its range that fire at ``angles`` (running), for every
    combination of the other inputs' ends: the first crossing of each angle on a grid of
    the pot's range (the angle rises with R; a setting that does not fire counts as late),
    narrowed by false position (Illinois) where both ends fire and halving where one does
    not, every row and angle at once, to 1e-12 of the pot's range; settings closer than
    1e-9 of the pot's top are one."""
    fixed = ("dt_pot", "dt_pot_lo", "dt_pot_hi")  # the load's R and L are ends like the rest
    names = [n for n in b.inputs if n.startswith("dt_") and n not in fixed] + ["vs"]
    if "freq" in b.inputs:
        names.append("freq")
    # sorted and distinct without np.unique (which imports numpy.ma: 10 ms of every check)
    ends = [sorted({b.inputs[n].value.lo, b.inputs[n].value.hi}) for n in names]
    grid = dict(zip(names, (g.ravel() for g in np.meshgrid(*ends, indexing="ij")),
                    strict=True))
    f = grid.get("freq", grid.get("dt_freq"))
    pot = b.inputs["dt_pot"].value
    phi = (np.arctan2(2 * np.pi * f * grid["dt_rl_l"], grid["dt_rl_r"])
           if "dt_rl_l" in grid else 0.0)
    n = grid["vs"].shape[0]

    def col(x: Any) -> Any:
        return np.asarray(x, dtype=float)[..., None] if np.ndim(x) else x

    load = ({k: col(grid.get("dt_" + k, np.nan)) for k in ("rl_r", "rl_l", "rs", "cs")}
            if b.options.get("dt_rl_fed") else {})

    def angle(p: np.ndarray) -> np.ndarray:  # p: rows × k
        with np.errstate(all="ignore"):
            return diac.firing_angle(
                vm=col(np.sqrt(2.0) * grid["vs"]), omega=col(2 * np.pi * f),
                r1=p + col(grid["dt_series_r"]), c1=col(grid["dt_c1"]),
                vbo=col(grid["dt_vbo"]), breakback=col(grid["dt_breakback"]), running=True,
                r2=col(grid.get("dt_r2", np.nan)), c2=col(grid.get("dt_c2", np.nan)),
                phi=col(phi), **load)

    targets = np.asarray(angles, dtype=float)
    pts = pot.lo + (pot.hi - pot.lo) * np.linspace(0.0, 1.0, _POT_GRID + 1)
    a_grid = angle(np.broadcast_to(pts, (n, pts.size)))  # rows × points
    # rows × targets × points: where the angle is no longer below the target (NaN: late)
    late = ~(a_grid[:, None, :] < targets[None, :, None])
    has = late.any(axis=-1) & ~late[..., 0]  # a crossing inside the range
    i = np.argmax(late, axis=-1)
    lo, hi = pts[np.maximum(i - 1, 0)], pts[i]
    take = np.take_along_axis
    f_lo = take(a_grid, np.maximum(i - 1, 0), axis=-1) - targets
    f_hi = take(a_grid, i, axis=-1) - targets  # ≥ 0 or NaN
    side = np.zeros(lo.shape, dtype=int)
    tol = 1e-13 * max(pot.hi - pot.lo, 1.0)
    for _ in range(60):
        run = has & (hi - lo > tol)
        if not run.any():
            break
        fin = np.isfinite(f_hi)
        with np.errstate(divide="ignore", invalid="ignore"):  # those rows take the midpoint
            x = np.where(fin & (f_hi != f_lo), lo - f_lo * (hi - lo) / (f_hi - f_lo),
                         0.5 * (lo + hi))
        x = np.where((x > lo) & (x < hi), x, 0.5 * (lo + hi))
        fx = angle(np.where(run, x, lo)) - targets
        up = ~(fx < 0)
        f_lo = np.where(run & up & (side == 1), 0.5 * f_lo, f_lo)
        f_hi = np.where(run & ~up & (side == -1), 0.5 * f_hi, f_hi)
        hi, f_hi = np.where(run & up, x, hi), np.where(run & up, fx, f_hi)
        lo, f_lo = np.where(run & ~up, x, lo), np.where(run & ~up, fx, f_lo)
        side = np.where(run, np.where(up, 1, -1), side)
    x = 0.5 * (lo + hi)
    inside = has & (x > pot.lo + 1e-9 * pot.hi) & (x < pot.hi * (1 - 1e-9))
    out: list[float] = []
    for v in sorted(float(v) for v in x[inside]):
        # rows that differ only in what does not move the angle: one setting
        if not out or v - out[-1] > 1e-9 * pot.hi:
            out.append(v)
    return tuple(out)


def firing_from(kw: dict[str, Any]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Pop :func:`bind_firing`'s inputs from ``kw``: (α per row, α at the pot's low end, α at
    its high end) [rad], the running firing angles (NaN: no firing there)."""
    kw.pop("diac_trigger")
    vs = kw.pop("vs") if kw.pop("firing_vs_only", False) else kw["vs"]
    freq = kw.pop("dt_freq") if kw.pop("firing_freq_only", False) else kw["freq"]
    vm = np.sqrt(2.0) * np.asarray(vs, dtype=float)
    omega = 2 * np.pi * np.asarray(freq, dtype=float)
    net = _net(kw, "dt_")
    vbo, dv = kw.pop("dt_vbo"), kw.pop("dt_breakback")
    pot, lo, hi = kw.pop("dt_pot", None), kw.pop("dt_pot_lo"), kw.pop("dt_pot_hi")
    load = _fed_load(kw, "dt_") or {}
    phi = _load_angle(kw, omega, "dt_")

    def at(p: np.ndarray) -> np.ndarray:
        return diac.firing_angle(vm=vm, omega=omega, r1=p + net["series_r"], c1=net["c1"],
                                 vbo=vbo, breakback=dv, running=True, r2=net["r2"],
                                 c2=net["c2"], phi=phi, **load)

    a_lo, a_hi = at(lo), at(hi)
    return (at(pot) if pot is not None else a_lo), a_lo, a_hi


def _deg(x: float) -> str:
    return eng(x, "deg")


def _pot(x: float) -> str:
    return eng(max(x, 0.0), "ohm")


# --------------------------------------------------------------------------- diac.firing-range

def _bind_range(ctx: Context) -> Bound:
    b = Bound()
    _bind_network(ctx, b)
    target = ctx.stage.get("target")
    path = ctx.stage_path("target")
    if isinstance(target, Value):
        b.add("target_lo", path + "#min", target.at(target.lo))
        b.add("target_hi", path + "#max", target.at(target.hi))
    else:
        b.missing.append(path)
    return b


def _fn_range(**kw: Any) -> Outcome:
    net = _net(kw)
    sr = net["series_r"]
    omega = 2 * np.pi * np.asarray(kw["freq"], dtype=float)
    load = _fed_load(kw)
    phi = _load_angle(kw, omega)
    return diac.firing_range_check(
        vs=kw["vs"], freq=kw["freq"], r_lo=kw["pot_lo"] + sr, r_hi=kw["pot_hi"] + sr,
        c1=net["c1"], vbo=kw["vbo"], breakback=kw["breakback"], target_lo=kw["target_lo"],
        target_hi=kw["target_hi"], series_r=sr, r2=net["r2"], c2=net["c2"],
        limits=kw["limits"], phi=phi, load=load)


def _sum_range(r: Reduced) -> str:
    t_lo = r.bound.inputs["target_lo"].value.nom
    t_hi = r.bound.inputs["target_hi"].value.nom
    pot_hi = r.bound.inputs["pot_hi"].value.nom
    lo_w, hi_w = r.hi["alpha_lo"], r.lo["alpha_hi"]
    text = (f"firing angle {_deg(r.nom['alpha_lo'])} at the pot's low end to "
            f"{_deg(r.nom['alpha_hi'])} at its high end nominal, running (from off the first "
            f"half-cycle fires later, {_deg(r.nom['alpha_lo_start'])} to "
            f"{_deg(r.nom['alpha_hi_start'])}); at worst {span(lo_w, hi_w, 'deg')} against "
            f"target {span(t_lo, t_hi, 'deg')}")
    if "load_angle" in r.hi:
        text += (f"; the triac conducts to the R–L load's current zero (φ up to "
                 f"{_deg(r.hi['load_angle'])}), which delays the running state")
    if r.hi.get("refires", 0.0) > 0:
        return ("fails: not resolved: at some corners C1 brings C2 back to VBO while the "
                "triac conducts into the R–L load (the diac fires again within the "
                "half-cycle), which this model does not follow; simulate the netlist "
                "(latchbook export --spice), or a larger R2 or smaller C1 against C2")
    fires_up_to = r.lo["fires_up_to"]
    if not fires_up_to >= pot_hi or not math.isfinite(lo_w):
        where = (f"above a pot setting of {_pot(fires_up_to)}" if math.isfinite(fires_up_to)
                 else "at any pot setting")
        return (f"fails: at some corners the capacitor never reaches VBO {where} (the pot "
                f"goes to {_pot(pot_hi)}): no firing there; needs pot max ≤ "
                f"{at_most(max(fires_up_to, 0.0), 'ohm')}, or a smaller C or a lower VBO"
                if math.isfinite(fires_up_to) else
                "fails: the capacitor never reaches VBO at some corners: a smaller R·C")
    if r.status != "pass":
        fixes = []
        phi = r.hi.get("load_angle", 0.0)
        if not lo_w <= t_lo and t_lo <= phi:
            fixes.append(f"a target low end above the load angle φ {_deg(phi)} (the triac "
                         "fires again only after the load's current has ended)")
        elif not lo_w <= t_lo:
            fixes.append(f"an earlier low end (α ≤ {at_most(t_lo, 'deg')}: a smaller series R "
                         "or C)")
        if not hi_w >= t_hi:
            fixes.append(f"a later high end (α ≥ {at_least(t_hi, 'deg')}: a larger pot, "
                         f"up to {_pot(fires_up_to)} still starts)")
        text += ("; " + r.status + ": needs " + " and ".join(fixes) if fixes
                 else "; " + r.status + ": close to the target's ends")
    return text


register(CheckDef(
    id="diac.firing-range", kinds=DIAC,
    question="Which firing angles does the pot give at every corner, and does every setting "
             "fire?",
    method="Steady-state phasor of the RC network (single: 1/(1 + jωR1C1); double: "
           "1/[(1 + jωR1C1)(1 + jωR2C2) + jωR1C2]); the diac starts firing at the first "
           "crossing of VBO, α = ψ + asin(VBO/(Vm·G)). Running (firing every half-cycle, the "
           "network shorted while the triac conducts, the capacitor dropped by ΔV at each "
           "firing) the periodic state is solved in closed form and α found as its first "
           "root over the half-cycle (grid bracket + bisection). With an R–L load (the "
           "triac stage whose gate this is gives load.l) the network is shorted until the "
           "current's zero β(α) (R–L extinction angle) and restarts there from the line's "
           "value, the root sought above the load angle φ; while the triac is off the "
           "network (and a snubber across the triac) is fed through the load: off- and "
           "on-state matrices of (load current, C1, C2, snubber C), exp(A·θ) by "
           "eigen-decomposition, the periodic state closed per half-cycle. A second "
           "section that brings C2 back to VBO refires within the half-cycle, followed by "
           "Newton's method on the cycle map (resistive load; with an R–L load such a "
           "corner is reported unresolved). The ends are the running "
           "angles (the state the load is in); every setting must also start from off.",
    source="GE SCR Manual 6th ed. ch. 9 (diac–RC phase control) — from memory; Maloney, "
           "Modern Industrial Electronics 5th ed. ch. 7 — from memory; checked against "
           "solve_ivp of the network, and of the whole circuit with an R–L load",
    fn=_fn_range, bind=_bind_range,
    units={"alpha_lo": "deg", "alpha_hi": "deg", "alpha_lo_start": "deg", "alpha_hi_start": "deg",
           "fires_up_to": "ohm", "amplitude_hi": "V", "load_angle": "deg", "refires": ""},
    summarise=_sum_range,
    cautions=("The RC network, the diac and the pot sit at mains potential: the pot's shaft "
              "and any metal knob need the full insulation of a live part.",
              "The heatsink tab of most triacs is connected to MT2: it is live."),
    fix="Move the ends with the series R (low end) and the pot's value (high end); C moves "
        "both. A pot setting that never fires is a dead zone: reduce the pot or C.",
    optional=frozenset({"alpha_hi", "alpha_hi_start", "alpha_lo", "alpha_lo_start",
                        "fires_up_to"}),
))


# --------------------------------------------------------------------------- diac.snap-on

def _bind_snap(ctx: Context) -> Bound:
    b = Bound()
    _bind_network(ctx, b)  # the pot's ends only say whether its travel reaches the snap
    return b


def _fn_snap(**kw: Any) -> Outcome:
    kw.pop("pot_lo")
    kw.pop("pot_hi")
    net = _net(kw)
    load = _fed_load(kw)
    phi = _load_angle(kw, 2 * np.pi * np.asarray(kw["freq"], dtype=float))
    return diac.snap_on_check(vs=kw["vs"], freq=kw["freq"], c1=net["c1"], vbo=kw["vbo"],
                              breakback=kw["breakback"], series_r=net["series_r"],
                              r2=net["r2"], c2=net["c2"], limits=kw["limits"], phi=phi,
                              load=load)


def _sum_snap(r: Reduced) -> str:
    limit = r.limits.get("max_jump_deg", 35.0)
    dbl = "r2" in r.bound.inputs
    text = (f"the load snaps on at a pot setting of {_pot(r.nom['pot_on'])} (nominal) with the "
            f"firing angle jumping by {_deg(r.nom['jump'])} "
            f"({_deg(r.nom['alpha_start'])} → {_deg(r.nom['alpha_run'])}, "
            f"{r.nom['snap_power'] * 100:.3g} % of full power at once); it drops out only at "
            f"{_pot(r.nom['pot_off'])} (each firing takes ΔQ = C·ΔV = "
            f"{eng(r.nom['charge_removed'], 'C')} from the diac's capacitor, and the triac "
            f"shorts the network to the line's zero); the largest jump {_deg(r.hi['jump'])} "
            f"against {limit:g}° allowed")
    pot_hi = r.bound.inputs["pot_hi"].value.nom
    if r.lo["pot_on"] > pot_hi:
        text += (f"; the pot's travel (to {_pot(pot_hi)}) ends before it at every corner: "
                 "turned to its end the load stays on (it needs a switch to go off)")
    if r.status != "pass":
        text += ("; " + r.status + ": " + ("a smaller C2 against C1 or a larger R2 narrows "
                 "it (then check diac.firing-range again)" if dbl else "a second RC section "
                 "(R2–C2: C1 recharges C2 after each firing) narrows it") + "; a diac with "
                 "a smaller breakback helps too")
    return text


register(CheckDef(
    id="diac.snap-on", kinds=DIAC,
    question="How far does the firing angle jump when the load snaps on at the low end?",
    method="R_on: the largest R1 at which the steady sine on the capacitor reaches VBO "
           "(bisection in log R); there the running state (network shorted while the triac "
           "conducts, ΔV taken at each firing) fires at once at α_run < α_start. Jump = "
           "α_start − α_run; R_off: where the running state stops firing. The power a "
           "resistive load snaps on to: 1 − α/π + sin 2α/(2π). With an R–L load the "
           "running state follows the current's zero (as in diac.firing-range).",
    source="GE SCR Manual 6th ed. ch. 9 (hysteresis, double time constant) — from memory; "
           "Rashid, Power Electronics 4th ed. §10 (AC switch output); checked against "
           "solve_ivp of the network with the diac and triac switching",
    fn=_fn_snap, bind=_bind_snap,
    units={"jump": "deg", "alpha_start": "deg", "alpha_run": "deg", "snap_power": "",
           "pot_on": "ohm", "pot_off": "ohm", "charge_removed": "C"},
    summarise=_sum_snap,
    cautions=("A lamp or fan that snaps on at a large fraction of its power surprises the "
              "user; a motor load may not start below it either.",),
    fix="Add a second RC section (R2–C2, C2 below C1) or use a diac with a smaller "
        "breakback.",
    optional=frozenset({"jump", "alpha_start", "alpha_run", "snap_power", "pot_on",
                        "pot_off"}),
))


# --------------------------------------------------------------------------- diac.gate-pulse

def bind_pulse(ctx: Context) -> Bound:
    """The inputs of the pulse the diac of stage ``ctx.stage`` drives into its triac's gate
    (``diac.gate-pulse``; ``triac.latch-time`` reads the same through its gate stage)."""
    b = Bound()
    d = _part(ctx, "diac")
    t = _part(ctx, "triac")
    ctx.need(b, "breakback", f"parts.{d.ref}.breakback")
    c_key = "c2" if _double(ctx) else "c"
    ctx.need(b, "c_diac", ctx.stage_path(c_key))
    nan = Value.fixed(math.nan, "", "")
    at = t.cold.get("at")
    for key in ("igt_q1", "igt_q3", "vgt_q1", "vgt_q3"):
        ctx.need(b, key, f"parts.{t.ref}.{key}")
        cv = t.cold.get(key)
        if cv is not None and at is not None:
            b.add(key + "_cold", f"parts.{t.ref}.cold.{key}", cv)
        else:
            b.add(key + "_cold", f"parts.{t.ref}.cold.{key}#none", nan)
    if at is not None:
        b.add("cold_at", f"parts.{t.ref}.cold.at", at)
    else:
        b.add("cold_at", f"parts.{t.ref}.cold.at#none", nan)
    ctx.ambient_min(b)
    gr = ctx.read(b, "gate_r", ctx.stage_path("gate_r"))
    ron = ctx.read(b, "r_on", f"parts.{d.ref}.r_on")
    if gr is None and ron is None:
        b.missing.append(ctx.stage_path("gate_r"))
    elif gr is None:
        b.add("gate_r", ctx.stage_path("gate_r") + "#none", Value.fixed(0.0, "resistance"))
    elif ron is None:
        b.add("r_on", f"parts.{d.ref}.r_on#none", Value.fixed(0.0, "resistance"))
        b.notes.append("the diac's r_on not given: the path is the gate resistor alone "
                       "(a higher peak than the real one)")
    ctx.read(b, "i_pulse", f"parts.{d.ref}.i_pulse")
    if at is None:
        b.notes.append("no cold table for the triac: IGT ×2 and VGT ×1.5 at −40 °C, pro rata "
                       "(common practice)")
    return b


def pulse_outcome(**kw: Any) -> Outcome:
    """:func:`bind_pulse`'s inputs → the pulse (peak, width above IGT, …)."""
    kw["r_path"] = kw.pop("gate_r") + kw.pop("r_on")
    return diac.gate_pulse_check(**kw)


def _sum_pulse(r: Reduced) -> str:
    text = (f"the breakback drives {eng(r.lo['peak_current'], 'A')} peak into the gate at "
            f"worst (charge {eng(r.lo['charge'], 'C')}, above IGT for "
            f"{eng(r.lo['width'], 's')}) against IGT {eng(r.hi['igt_cold'], 'A')} (quadrant "
            f"{'III' if r.hi['quadrant'] > 2 else 'I'}, the worse of I and III, cold): "
            f"{r.lo['drive_ratio']:.3g}×")
    if "i_pulse" in r.hi:
        text += f"; the diac's pulse rating {eng(r.lo['i_pulse'], 'A')}"
    if r.status != "pass":
        need = r.limits.get("marginal_below", 2.0) * r.hi["igt_cold"]
        text += (f"; {r.status}: needs a peak ≥ {at_least(need, 'A')}: a smaller gate "
                 "resistor, a larger capacitor at the diac, or a triac with a lower IGT")
        if "i_pulse" in r.hi and not r.hi["peak_current"] <= r.lo["i_pulse"]:
            text += "; the peak exceeds the diac's pulse rating: a larger gate resistor"
    return text


register(CheckDef(
    id="diac.gate-pulse", kinds=DIAC,
    question="Does the diac's pulse fire the triac in quadrants I and III at the coldest "
             "ambient?",
    method="ΔV = the breakback; charge C·ΔV; peak I = (ΔV − VGT)/(gate R + the diac's r_on) "
           "with VGT of the quadrant that sets IGT, "
           "decaying with R·C, its width above IGT R·C·ln(I/IGT). IGT: the worse of "
           "quadrants I and III (a diac fires in those), cold. I/IGT graded like a gate "
           "drive; a peak above the diac's pulse rating fails.",
    source="GE SCR Manual 6th ed. ch. 4 and 9 (gate triggering, diac pulse) — from memory; "
           "P. C. Sen, Power Electronics, ch. 2 (triac gate quadrants); the common-practice "
           "cold factors at −40 °C (IGT ×2, VGT ×1.5)",
    fn=pulse_outcome, bind=bind_pulse,
    units={"peak_current": "A", "igt_cold": "A", "vgt_cold": "V", "quadrant": "",
           "charge": "C", "width": "s", "drive_ratio": "", "i_pulse": "A"},
    summarise=_sum_pulse,
    cautions=("The gate circuit is at mains potential: nothing on it may be touched or "
              "probed with an earthed instrument.",),
    fix="A smaller gate resistor or a larger capacitor at the diac; a triac with a lower IGT "
        "in quadrant III.",
))


# --------------------------------------------------------------------------- diac.symmetry

def _bind_symmetry(ctx: Context) -> Bound:
    b = Bound()
    d = _part(ctx, "diac")
    _bind_network(ctx, b, fed=False)  # the pair of half-cycles neglects the load's drop
    if ctx.want(b, "asymmetry", f"parts.{d.ref}.vbo_asymmetry") is None:
        return b
    ctx.read(b, "load_r", ctx.stage_path("load_r"))
    return b


def _fn_symmetry(**kw: Any) -> Outcome:
    net = _net(kw)
    sr = net["series_r"]
    phi = _load_angle(kw, 2 * np.pi * np.asarray(kw["freq"], dtype=float))
    return diac.symmetry_check(
        vs=kw["vs"], freq=kw["freq"], r_lo=kw["pot_lo"] + sr, r_hi=kw["pot_hi"] + sr,
        c1=net["c1"], vbo=kw["vbo"], asymmetry=kw["asymmetry"], breakback=kw["breakback"],
        r2=net["r2"], c2=net["c2"], load_r=kw.get("load_r", np.nan), limits=kw["limits"],
        phi=phi)


def _sum_symmetry(r: Reduced) -> str:
    limit = r.limits.get("max_dc_fraction", 0.01)
    if not math.isfinite(r.hi["dc_fraction"]):
        return ("fails: at some corners and pot settings no steady firing pattern was found, "
                "so the DC component is not known; simulate the netlist (latchbook export "
                "--spice) at those settings")
    text = (f"the VBO asymmetry fires the half-cycles up to "
            f"{_deg(abs(r.hi['alpha_pos'] - r.hi['alpha_neg']))} apart: a DC component of "
            f"{r.hi['dc_fraction'] * 100:.3g} % of Vm ({eng(r.hi['dc_voltage'], 'V')}) at "
            f"worst, against {limit * 100:g} %")
    if "dc_current" in r.hi:
        text += f"; {eng(r.hi['dc_current'], 'A')} DC through the load's resistance"
    if r.status != "pass":
        text += (f"; {r.status}: a diac with a smaller asymmetry, or a load that tolerates "
                 "DC (not a transformer or a motor winding)")
    return text


register(CheckDef(
    id="diac.symmetry", kinds=DIAC,
    question="How much DC does the diac's asymmetry put on the load?",
    method="One half-cycle fires at VBO, the other at VBO − the asymmetry; the running state "
           "over the whole cycle (each half an affine map of its starting state) is solved by "
           "Newton's method for the two angles; mean load voltage (cos α₊ − cos α₋)/(2π)·Vm, "
           "the largest over 49 pot settings (25 with a second section, whose refirings are "
           "followed, averaged over the pattern where it is longer than a cycle); a half "
           "that no longer fires is a half-wave.",
    source="Rashid, Power Electronics 4th ed. §10 (AC switch output); GE SCR Manual 6th ed. "
           "ch. 9 (diac symmetry) — from memory; checked against solve_ivp",
    fn=_fn_symmetry, bind=_bind_symmetry,
    units={"dc_fraction": "", "dc_voltage": "V", "at_r": "ohm", "alpha_pos": "deg",
           "alpha_neg": "deg", "dc_current": "A"},
    summarise=_sum_symmetry,
    cautions=("DC on a transformer primary or a motor winding saturates the core: the "
              "current it draws can be many times the rated one.",),
    fix="A diac with a tighter asymmetry; keep the pot out of the range where one half "
        "drops out.",
    optional=frozenset({"alpha_pos", "alpha_neg"}),
))
