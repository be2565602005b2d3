"""Triac checks: gate quadrants, currents of a bidirectional switch, and commutation.

A triac conducts both half-cycles of an AC switch in one die. Its gate fires in four
quadrants (the signs of MT2 against MT1 and of the gate current): I (MT2+, G+), II (MT2+, G−),
III (MT2−, G−), IV (MT2−, G+), each with its own IGT and VGT. Its turn-off is the weak point:
at an inductive load's current zero the line's instantaneous voltage is reapplied at once, and
if that voltage rises faster than the commutating rating (dv/dt)c — which holds only while the
current fell no faster than (di/dt)c — the triac turns straight back on in the other direction.

Every function takes keyword arrays that broadcast (SI units) and has no loop per row.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §11
    (AC voltage controllers with R–L loads), §17.6 (dv/dt protection, snubbers).
[2] N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics*, 3rd ed., ch. 20 (triacs).
[3] P. C. Sen, *Power Electronics*, ch. 2 (triac gate quadrants), and common practice.
[4] The series R–L–R_s–C circuit in sinusoidal steady state (phasors): any circuits text.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks import power
from checks.core import FAIL, MARGINAL, PASS, Outcome, cold_value, grade
from checks.rl import extinction_angle

#: Gate quadrants in the order datasheets list them.
QUADRANTS = ("q1", "q2", "q3", "q4")
ROMAN = {"q1": "I", "q2": "II", "q3": "III", "q4": "IV"}

#: Which quadrants a gate drive fires in. A gate current that follows MT2's polarity (a diac,
#: an opto-triac driver from the line: ``ac``) fires in I and III; a negative DC drive in II
#: and III (on both half-cycles the gate is negative); a positive DC drive in I and IV  [3].
MODES: dict[str, tuple[str, ...]] = {
    "ac": ("q1", "q3"),
    "negative-dc": ("q2", "q3"),
    "positive-dc": ("q1", "q4"),
}

#: Common-practice cold factors at −40 °C (the SCR ones, checks.gate): IGT ×2, VGT ×1.5.
K_IGT = 2.0
K_VGT = 1.5


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def quadrants(mode: str) -> tuple[str, ...]:
    """The gate quadrants a drive of ``mode`` fires the triac in.

    >>> quadrants("ac"), quadrants("negative-dc"), quadrants("positive-dc")
    (('q1', 'q3'), ('q2', 'q3'), ('q1', 'q4'))
    """
    try:
        return MODES[mode]
    except KeyError:
        raise ValueError(f"unknown gate drive mode {mode!r}: one of {', '.join(MODES)}") from None


def worst_igt(*, used: tuple[str, ...], igt: Mapping[str, np.ndarray],
              vgt: Mapping[str, np.ndarray] | None = None
              ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The largest IGT over the quadrants ``used``, per row: (IGT [A], its VGT [V], index).

    ``igt`` (and ``vgt``) map a quadrant name to its (cold) value per row; the index is the
    position in ``used`` of the quadrant that sets the IGT. Where two tie the first is taken.
    Without ``vgt`` the VGT returned is NaN. Vectorised: one stack and one argmax.

    >>> i, v, k = worst_igt(used=("q1", "q3"), igt={"q1": np.array([5e-3, 9e-3]),
    ...                     "q3": np.array([7e-3, 8e-3])}, vgt={"q1": 1.0, "q3": 1.2})
    >>> (i * 1e3).round(3).tolist(), v.tolist(), k.tolist()
    ([7.0, 9.0], [1.2, 1.0], [1, 0])
    """
    stack = np.stack(np.broadcast_arrays(*[_a(igt[q]) for q in used]))
    idx = np.argmax(stack, axis=0)
    best = np.take_along_axis(stack, idx[None, ...], axis=0)[0]
    if vgt is None:
        return best, np.full_like(best, np.nan), idx
    vs = np.stack(np.broadcast_arrays(*[_a(vgt[q]) for q in used], best))[:-1]
    return best, np.take_along_axis(vs, idx[None, ...], axis=0)[0], idx


def gate_trigger_check(*, used: tuple[str, ...], drive: np.ndarray, drop: np.ndarray,
                       series_r: np.ndarray, igt: Mapping[str, np.ndarray],
                       vgt: Mapping[str, np.ndarray], t_min: np.ndarray,
                       igt_cold: Mapping[str, np.ndarray], vgt_cold: Mapping[str, np.ndarray],
                       cold_at: np.ndarray, limits: Mapping[str, float],
                       r_gk: np.ndarray | None = None) -> Outcome:
    """``triac.gate-trigger``: the gate current against the cold IGT, in every quadrant used.

    i_G = (V_drive − V_drop − VGT)/R_S − VGT/R_GK per quadrant, with that quadrant's cold VGT
    and IGT; metric min over the quadrants of i_G/IGT_cold (the quadrant with the highest IGT
    need not decide: a higher VGT elsewhere leaves less current). Cold values from the part's
    cold table (interpolated from 25 °C) or the common-practice factors at −40 °C pro rata
    (IGT ×2, VGT ×1.5). drive, drop [V]; series_r, r_gk [Ω]; igt [A], vgt [V] per quadrant;
    t_min, cold_at [K]. ``quadrant`` is the position in ``used`` of the deciding quadrant.

    >>> o = gate_trigger_check(used=("q1", "q3"), drive=np.array([5.0]), drop=0.0,
    ...     series_r=100.0, igt={"q1": 10e-3, "q3": 20e-3}, vgt={"q1": 1.0, "q3": 1.0},
    ...     t_min=298.15, igt_cold={"q1": np.nan, "q3": np.nan},
    ...     vgt_cold={"q1": np.nan, "q3": np.nan}, cold_at=np.nan,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.5})
    >>> round(float(o.values["gate_current"][0]) * 1e3, 3), o.status.tolist()
    (40.0, [0])
    """
    ic = [cold_value(igt[q], t_min, v_cold=igt_cold[q], t_cold=cold_at, k=K_IGT) for q in used]
    vc = [cold_value(vgt[q], t_min, v_cold=vgt_cold[q], t_cold=cold_at, k=K_VGT) for q in used]
    g_gk = 0.0 if r_gk is None else 1.0 / _a(r_gk)
    head = _a(drive) - _a(drop)
    # Quadrants on a leading axis, rows (every input broadcast together) behind it.
    rows = np.broadcast_shapes(head.shape, _a(series_r).shape, np.shape(g_gk),
                               *[np.shape(x) for x in ic + vc])
    i_q = np.stack([np.broadcast_to(_a(x), rows) for x in ic])
    v_q = np.stack([np.broadcast_to(_a(x), rows) for x in vc])
    i_g_q = (head - v_q) / _a(series_r) - v_q * g_gk
    with np.errstate(divide="ignore", invalid="ignore"):
        m_q = i_g_q / i_q
    idx = np.argmin(np.where(np.isnan(m_q), -np.inf, m_q), axis=0)

    def pick(a: np.ndarray) -> np.ndarray:
        return np.take_along_axis(a, idx[None, ...], axis=0)[0]

    i_g, i_req, v_g, metric = pick(i_g_q), pick(i_q), pick(v_q), pick(m_q)
    margin, status = grade(metric, limits)
    # The largest R_S that still gives the wanted ratio in every quadrant (for the fix text).
    k = float(limits.get("marginal_below", 1.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        r_max = np.min((head - v_q) / (k * i_q + v_q * g_gk), axis=0)
    return Outcome({"gate_current": i_g, "igt": i_req, "vgt": v_g,
                    "quadrant": idx.astype(float), "series_r_max": r_max}, margin, status)


def gate_power_check(*, drive: np.ndarray, drop: np.ndarray, series_r: np.ndarray,
                     pg_av: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``triac.gate-power``: a DC drive holds the gate on: its power against PG(AV).

    Whatever the gate's V–I curve, a source V behind R delivers at most V²/4R (matched load),
    so P_G ≤ (V_drive − V_drop)²/(4·R_S) bounds the gate's dissipation from above without the
    gate characteristic; metric PG(AV)/P_G. drive, drop [V]; series_r [Ω]; pg_av [W].

    >>> o = gate_power_check(drive=np.array([12.0]), drop=0.0, series_r=100.0, pg_av=0.5,
    ...                      limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> round(float(o.values["gate_power"][0]), 3), o.status.tolist()
    (0.36, [0])
    """
    p = np.maximum(_a(drive) - _a(drop), 0.0) ** 2 / (4 * _a(series_r))
    with np.errstate(divide="ignore"):
        margin, status = grade(_a(pg_av) / p, limits)
    return Outcome({"gate_power": p}, margin, status)


# --------------------------------------------------------------------------------------------
# Currents

def currents(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray, omega: np.ndarray,  # noqa: E741
             alpha: np.ndarray) -> dict[str, np.ndarray]:
    """The triac's own currents in an AC switch: I_T(RMS) and the mean of |i| [A].

    The triac carries both SCRs' half-cycles of :func:`checks.power.stage_values`
    (``ac-switch``): with control kept (α ≥ φ) I_RMS = √2·I_RMS,SCR and mean|i| =
    2·I_AV,SCR; fired before φ, narrow pulses let only one polarity conduct (a half-wave
    longer than π), a gate held on gives the steady sine from φ: the larger of the two is
    taken (each can be the larger)  [1, §11].
    vs [V RMS]; r [Ω]; l [H]; omega [rad/s]; alpha [rad]. Also returns ``lost`` (1 where α < φ).

    >>> c = currents(vs=120.0, r=10.0, l=0.0, omega=2 * np.pi * 60, alpha=np.pi / 2)
    >>> round(float(c["it_rms"]), 3)  # Rashid 4e Ex 11.1: I_o = 84.85 V / 10 Ω
    8.485
    """
    v = power.stage_values(topology="ac-switch", freewheel=False, vs=vs, r=r, l=l,
                           omega=omega, alpha=alpha, peak=False)
    lost = _a(alpha) < v["phi"] - 1e-12
    it_rms = np.where(lost, v["it_rms"], np.sqrt(2.0) * v["it_rms"])
    it_mean = np.where(lost, v["it_av"], 2.0 * v["it_av"])
    if np.any(lost):
        # A gate held on fires the other polarity as soon as the first stops: the steady sine
        # from φ, both polarities in the one triac, can carry more than the one-polarity
        # half-wave. Which one happens depends on the drive: the larger is taken.
        w = power.stage_values(topology="ac-switch", freewheel=False, vs=vs, r=r, l=l,
                               omega=omega, alpha=np.maximum(_a(alpha), v["phi"]), peak=False)
        it_rms = np.where(lost, np.maximum(it_rms, np.sqrt(2.0) * w["it_rms"]), it_rms)
        it_mean = np.where(lost, np.maximum(it_mean, 2.0 * w["it_av"]), it_mean)
    return {"it_rms": it_rms, "it_mean": it_mean, "lost": lost.astype(float)}


def rms_current_check(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                      omega: np.ndarray, alpha: np.ndarray, it_rms_rating: np.ndarray,
                      limits: Mapping[str, float]) -> Outcome:
    """``triac.rms-current``: I_T(RMS) of :func:`currents` against IT(RMS).

    >>> o = rms_current_check(vs=np.array([230.0]), r=23.0, l=0.0, omega=314.16, alpha=0.0,
    ...                       it_rms_rating=12.0, limits={})
    >>> round(float(o.values["it_rms"][0]), 3), o.status.tolist()
    (10.0, [0])
    """
    cur = currents(vs=vs, r=r, l=l, omega=omega, alpha=alpha)
    with np.errstate(divide="ignore"):
        margin, status = grade(_a(it_rms_rating) / cur["it_rms"], limits)
    return Outcome({"it_rms": cur["it_rms"]}, margin, status)


def junction_check(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                   omega: np.ndarray, alpha: np.ndarray, vt0: np.ndarray, rt: np.ndarray,
                   rth_jc: np.ndarray, rth_cs: np.ndarray, rth_sa: np.ndarray,
                   devices: float = 1.0, tj_max: np.ndarray, t_max_ambient: np.ndarray,
                   t_max_rise: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``triac.junction``: P = VT0·mean|i| + rT·I_RMS² (both half-cycles in one die), then
    Tj = T_a + ΔT_enc + n·P·Rth(s-a) + P·(Rth(j-c) + Rth(c-s)), graded as
    :func:`checks.power.junction_check` (headroom below tj_max)  [1, §17].

    >>> o = junction_check(vs=np.array([230.0]), r=23.0, l=0.0, omega=314.16, alpha=0.0,
    ...     vt0=0.85, rt=0.03, rth_jc=2.0, rth_cs=0.5, rth_sa=4.0, tj_max=398.15,
    ...     t_max_ambient=313.15, t_max_rise=0.0,
    ...     limits={"headroom_fail": 0.0, "headroom_marginal": 25.0})
    >>> round(float(o.values["device_loss"][0]), 3)  # 0.85·9.003 + 0.03·100
    10.653
    """
    cur = currents(vs=vs, r=r, l=l, omega=omega, alpha=alpha)
    p = power.device_loss(it_av=cur["it_mean"], it_rms=cur["it_rms"], vt0=vt0, rt=rt)
    ta = _a(t_max_ambient) + _a(t_max_rise)
    n = float(devices)
    own = _a(rth_jc) + _a(rth_cs)
    tj = ta + n * p * _a(rth_sa) + p * own
    t_fail = _a(tj_max) - float(limits.get("headroom_fail", 0.0))
    t_marg = _a(tj_max) - float(limits.get("headroom_marginal", 25.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        need = np.where(p > 0, (t_marg - ta - p * own) / (n * p), np.inf)
        margin = np.where(tj > ta, (t_fail - tj) / (tj - ta), np.inf)
    status = np.where(tj > t_fail, FAIL, np.where(tj > t_marg, MARGINAL, PASS)).astype(np.int8)
    return Outcome({"device_loss": p, "junction_temperature": tj, "rth_sa_required": need,
                    "it_rms": cur["it_rms"]}, margin, status)


# --------------------------------------------------------------------------------------------
# Commutation

def commutation_angle(*, alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """The angle β of the current zero at which the triac must turn off [rad].

    α ≥ φ: the extinction angle of the R–L current from zero at α (β ≤ α + π,
    :func:`checks.rl.extinction_angle`); β = π + φ at α = φ (the steady sine). α < φ: control
    is lost; with narrow gate pulses one polarity conducts a half-wave to β(α) > α + π, with
    wide ones the steady sine ends at π + φ. The one with the larger |sin β| (the larger
    voltage step and current slope) is taken: the worst case either drive allows.

    >>> np.degrees(commutation_angle(alpha=np.radians([60.0, 90.0]), phi=np.radians(60.0))
    ...            ).round(6).tolist()
    [240.0, 233.218114]
    """
    alpha, phi = np.broadcast_arrays(_a(alpha), np.clip(_a(phi), 0.0, np.pi / 2))
    beta = extinction_angle(alpha=alpha, phi=phi)
    lost = alpha < phi - 1e-12
    steady = np.pi + phi
    beta = np.where(lost, np.where(np.abs(np.sin(beta)) >= np.abs(np.sin(steady)), beta,
                                   steady), np.minimum(beta, alpha + np.pi))
    return beta


def didt_at_zero(*, vm: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                 omega: np.ndarray, beta: np.ndarray) -> np.ndarray:
    """The rate of fall of the load current at its zero β [A/s].

    At i = 0 the inductor takes the whole line voltage: L·di/dt = Vm·sin β, so
    |di/dt| = Vm·|sin β|/L (= ω·Vm/|Z| at β = π + φ, the steady sine); a resistive load gives
    the line's ω·Vm/R at β = π  [1, §11]. vm [V] peak; r [Ω]; l [H]; omega [rad/s]; beta [rad].

    >>> round(float(didt_at_zero(vm=325.0, r=10.0, l=0.0, omega=314.16, beta=np.pi)))
    10210
    """
    vm, r, l, omega, beta = (_a(x) for x in (vm, r, l, omega, beta))  # noqa: E741
    with np.errstate(divide="ignore", invalid="ignore"):
        ind = vm * np.abs(np.sin(beta)) / l
        res = omega * vm / r
    return np.where(l > 0, ind, res)


def _branches(r_tot: np.ndarray, l: np.ndarray, c: np.ndarray  # noqa: E741
              ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """σ = R/2L, ω0 = 1/√(LC), the damped frequency ω_d (ζ < 1) or the decay γ (ζ > 1) as
    one magnitude, and a code (−1 under-, 0 critically, +1 over-damped)."""
    sigma = r_tot / (2 * l)
    w0 = 1.0 / np.sqrt(l * c)
    d2 = sigma**2 - w0**2
    rel = d2 / w0**2
    kind = np.where(rel > 1e-9, 1, np.where(rel < -1e-9, -1, 0))
    return sigma, w0, np.sqrt(np.abs(d2)), kind


def _current(t: np.ndarray, e: np.ndarray, l: np.ndarray, sigma: np.ndarray,  # noqa: E741
             w: np.ndarray, kind: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The loop current of the step and its slope at time t: (i [A], di/dt [A/s])."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        dec = np.exp(-sigma * t)
        ws = np.where(w > 0, w, 1.0)
        s_u, c_u = np.sin(ws * t), np.cos(ws * t)
        s_o, c_o = np.sinh(ws * t), np.cosh(ws * t)
        k = e / l * dec
        i = np.where(kind < 0, k * s_u / ws, np.where(kind > 0, k * s_o / ws, k * t))
        di = np.where(kind < 0, k * (c_u - sigma * s_u / ws),
                      np.where(kind > 0, k * (c_o - sigma * s_o / ws), k * (1 - sigma * t)))
    return i, di


def snubbed_step(*, e: np.ndarray, r_load: np.ndarray, l: np.ndarray,  # noqa: E741
                 r_s: np.ndarray, c: np.ndarray) -> dict[str, np.ndarray]:
    """The voltage reapplied across a triac at the current zero, with an R–C snubber.

    Circuit: a step E = Vm·|sin β| (the line's value at the zero; the line moves by < 1 % over
    the µs the transient lasts) drives the load L, R_load and the snubber R_s–C in series from
    rest (the conducting triac kept C discharged; the load current is zero). The triac voltage
    is v = v_C + R_s·i with L·di/dt = E − (R_load + R_s)·i − v_C  [1, §17.6].

    With σ = (R_load + R_s)/2L, ω0 = 1/√(LC) and i = (E/Lω_d)·e^(−σt)·sin ω_d t (or the
    overdamped / critical forms), dv/dt = i/C + R_s·di/dt. It starts at R_s·E/L and keeps
    falling when L ≤ R_s·(R_load + R_s)·C; else it peaks where di/dt / i = k = R_s/(L − R_s·
    (R_load + R_s)·C): ω_d·t_m = atan2(ω_d, σ + k) (ζ < 1), γ·t_m = atanh(γ/(σ + k)) (ζ > 1),
    t_m = 1/(σ + k) (ζ = 1). The voltage peaks where dv/dt = 0, di/dt / i = −1/(R_s·C):
    ω_d·t_p = atan2(ω_d, σ − 1/R_sC); overdamped only when σ − 1/R_sC > γ (else it rises to E
    without overshoot). e [V]; r_load, r_s [Ω]; l [H]; c [F].

    Returns ``dvdt_max`` [V/s], ``dvdt_time`` [s], ``peak_voltage`` [V], ``damping`` ζ [–].

    >>> s = snubbed_step(e=np.array(200.0), r_load=10.0, l=50e-3, r_s=100.0, c=0.1e-6)
    >>> round(float(s["dvdt_max"]) / 1e6, 4), round(float(s["damping"]), 4)
    (2.5429, 0.0778)
    """
    e, r_load, l, r_s, c = np.broadcast_arrays(*(_a(x) for x in (e, r_load, l, r_s, c)))
    r_tot = r_load + r_s
    sigma, w0, w, kind = _branches(r_tot, l, c)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        d = l - r_s * r_tot * c
        k = np.where(d > 0, r_s / np.where(d > 0, d, 1.0), np.inf)
        ws = np.where(w > 0, w, 1.0)
        t_u = np.arctan2(ws, sigma + k) / ws
        t_o = np.arctanh(np.minimum(ws / (sigma + k), 1.0 - 1e-16)) / ws
        t_c = 1.0 / (sigma + k)
        t_m = np.where(d > 0, np.where(kind < 0, t_u, np.where(kind > 0, t_o, t_c)), 0.0)
        i_m, di_m = _current(t_m, e, l, sigma, w, kind)
        dvdt = np.where(d > 0, i_m / c + r_s * di_m, r_s * e / l)
        m = 1.0 / (r_s * c)
        q = sigma - m
        t_pu = np.arctan2(ws, q) / ws
        over_ok = q > ws
        t_po = np.arctanh(np.minimum(ws / np.where(over_ok, q, np.inf), 1.0 - 1e-16)) / ws
        t_pc = np.where(q > 0, 1.0 / q, np.inf)
        t_p = np.where(kind < 0, t_pu, np.where(kind > 0, np.where(over_ok, t_po, np.inf), t_pc))
        i_p, di_p = _current(t_p, e, l, sigma, w, kind)
        v_pk = np.where(np.isfinite(t_p), e - l * di_p - r_load * i_p, e)
    return {"dvdt_max": dvdt, "dvdt_time": t_m, "peak_voltage": np.maximum(v_pk, e),
            "damping": sigma / w0}


def snubbed_waveform(*, e: float, r_load: float, l: float, r_s: float,  # noqa: E741
                     c: float, points: int = 600) -> tuple[np.ndarray, np.ndarray]:
    """The triac voltage of :func:`snubbed_step` over time, for a plot: (t [s], v [V]).

    v = E − L·di/dt − R_load·i over 0 … 6/σ (the ringing decayed to 0.25 %), at most 12
    periods of ω0. Arguments as :func:`snubbed_step`, scalars.

    >>> t, v = snubbed_waveform(e=220.0, r_load=0.0, l=50e-6, r_s=6.6, c=0.75e-6)
    >>> round(float(v.max()), 1)  # Rashid 4e Ex 17.4 inputs: the 299.29 V peak, sampled
    299.3
    """
    e_a, r_a, l_a, rs_a, c_a = (_a(x) for x in (e, r_load, l, r_s, c))
    sigma, w0, w, kind = _branches(r_a + rs_a, l_a, c_a)
    t_end = float(min(6.0 / sigma, 12 * 2 * np.pi / w0))
    t = np.linspace(0.0, t_end, points)
    i, di = _current(t, e_a, l_a, sigma, w, kind)
    return t, e_a - l_a * di - r_a * i


def max_abs_sin(*, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """max |sin θ| over a ≤ θ ≤ b [–]: 1 where the interval holds an odd multiple of π/2.

    >>> max_abs_sin(a=np.radians([200.0, 240.0]), b=np.radians([230.0, 280.0])).round(4).tolist()
    [0.766, 1.0]
    """
    a, b = _a(a), _a(b)
    k_lo = np.ceil((a - np.pi / 2) / np.pi)
    k_hi = np.floor((b - np.pi / 2) / np.pi)
    return np.where(k_hi >= k_lo, 1.0, np.maximum(np.abs(np.sin(a)), np.abs(np.sin(b))))


#: A load angle up to this (power factor ≥ 0.996) is "nearly resistive": with no snubber its
#: commutation is marginal (an unknown rate of a step below 0.09·Vm), not failed.
NEAR_RESISTIVE = float(np.radians(5.0))

#: The snubber transient is taken to last 4/σ (its ringing decays to 2 %): over that window
#: the line keeps moving, and the step is taken at the largest line value inside it.
SETTLE = 4.0


def divider_gain(*, omega: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                 snub_r: np.ndarray, snub_c: np.ndarray) -> np.ndarray:
    """|H(jω)| of the line through the load to an R–C snubber across the off triac [–].

    H = Z_snub/(Z_load + Z_snub) = (1 + jωR_sC)/(1 − ω²LC + jω(R + R_s)C): the steady
    off-state voltage across a triac that is not fired is Vm·|H|, above the line's peak
    where the load's L and the snubber's C come near resonance (ω²LC towards 1)  [4].
    omega [rad/s]; r, snub_r [Ω]; l [H]; snub_c [F].

    >>> round(float(divider_gain(omega=314.159, r=30.0, l=2.0, snub_r=2800.0, snub_c=1e-6)), 4)
    1.1119
    """
    jw = 1j * _a(omega)
    c = _a(snub_c)
    return np.abs((1 + jw * _a(snub_r) * c)
                  / (1 + jw**2 * _a(l) * c + jw * (_a(r) + _a(snub_r)) * c))


def _sine_rate_bound(*, vm: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                     omega: np.ndarray, beta: np.ndarray, snub_r: np.ndarray,
                     snub_c: np.ndarray, gain: np.ndarray) -> np.ndarray:
    """A second bound on the reapplied rate [V/s]: the exact response to the line from rest
    is its steady state plus a natural response that starts from minus the steady state at
    the zero (phasors), so |dv/dt| ≤ ω·Vm·|H| + max |y(t)|, y the natural response's
    dv/dt = i/C + R_s·di/dt: its envelope amplitude (ζ < 1), its exact maximum (two
    exponentials, ζ > 1), or |y0| + |y0' + σ·y0|/(σ·e) (ζ = 1). Tight where the snubber
    rings long (ζ ≪ 1), where the total-variation bound grows without limit."""
    rs, c = _a(snub_r), _a(snub_c)
    r_tot = r + rs
    sigma, _, w, kind = _branches(r_tot, l, c)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        z = r_tot + 1j * omega * l + 1.0 / (1j * omega * c)
        cur = vm * np.exp(1j * beta) / z
        i0 = -np.imag(cur)
        u0 = -np.imag(cur / (1j * omega * c))
        k1 = 1.0 / c - rs * r_tot / l
        y0 = k1 * i0 - rs / l * u0
        yd = k1 * (-r_tot * i0 - u0) / l - rs / l * i0 / c
        ws = np.where(w > 0, w, 1.0)
        under = np.hypot(y0, (yd + sigma * y0) / ws)
        s1, s2 = sigma - ws, sigma + ws
        a = (yd + s2 * y0) / (s2 - s1)
        b = y0 - a
        ratio = -s2 * b / (s1 * a)
        t_x = np.where(ratio > 1.0, np.log(np.where(ratio > 1.0, ratio, 1.0)) / (s2 - s1), 0.0)
        over = np.maximum(np.abs(y0), np.abs(a * np.exp(-s1 * t_x) + b * np.exp(-s2 * t_x)))
        crit = np.abs(y0) + np.abs(yd + sigma * y0) / (sigma * np.e)
        y_max = np.where(kind < 0, under, np.where(kind > 0, over, crit))
        out = omega * vm * gain + y_max
    return np.where(np.isfinite(out), out, np.inf)


def snubbed_turnoff(*, vm: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                    omega: np.ndarray, beta: np.ndarray, snub_r: np.ndarray,
                    snub_c: np.ndarray) -> dict[str, np.ndarray]:
    """The voltage reapplied across a snubbed triac from the current zero β on, bounded.

    The network (load L, R and the snubber R_s, C in series, from rest) is linear and driven
    by the line from its value E = Vm·|sin β| at the zero. With h the unit step response of
    the triac voltage (h(0) = 0), Duhamel's integral gives dv/dt = E·h'(t) + ∫ s'(τ)·h'(t − τ)
    dτ over 0…t, and with |s'| ≤ ω·Vm: dv/dt ≤ E·max h' + ω·Vm·TV(h), TV the total variation
    of h. The first lobe of h' is its largest (:func:`snubbed_step`: max h' = dvdt_max of a
    unit step); h rises from 0 to its peak 1 + o and its extrema then alternate about 1,
    each q = e^(−σπ/ω_d) of the one before (q = 0 over- or critically damped: at most one
    extremum), so TV(h) = 1 + 2·o/(1 − q). A bound, not a fit: on a nearly resistive load
    (tiny E) it is the line's own slope times TV(h). Where the snubber rings long (ζ ≪ 1, TV
    large) the smaller of that and :func:`_sine_rate_bound` (exact steady state plus the
    natural response's largest rate) is taken: both are bounds, so is the smaller.

    The peak (``peak``) is the larger of the ringing and the steady off state Vm·|H| of
    :func:`divider_gain`. For the ringing the line keeps moving towards its peak while the
    snubber rings (for a large L that lasts a fair part of the half-cycle): the step is taken
    at the largest |line| within 4/σ after the zero (``step_bound``, :func:`max_abs_sin`),
    which bounds the response to the moving line from above. On a resistive load (L = 0) the
    peak is the line at the zero, Vm·|sin β|.

    vm [V] peak; r, snub_r [Ω]; l [H]; omega [rad/s]; beta [rad]; snub_c [F]. Returns
    ``step_bound`` [V], ``dvdt_max`` [V/s], ``dvdt_time`` [s] (of the step's maximum),
    ``damping`` ζ [–], ``ringing_peak`` [V], ``divider_gain`` [–] and ``peak`` [V].

    >>> t = snubbed_turnoff(vm=357.8, r=220.0, l=1.0, omega=314.16, beta=np.radians(230.0),
    ...                     snub_r=3300.0, snub_c=47e-9)
    >>> round(float(t["step_bound"]), 1), round(float(t["peak"]), 1)
    (357.8, 488.2)
    """
    vm, r, l, omega, beta = (_a(x) for x in (vm, r, l, omega, beta))  # noqa: E741
    inductive = l > 0
    l_s = np.where(inductive, l, 1.0)
    sigma = (r + _a(snub_r)) / (2 * l_s)
    window = np.minimum(omega * SETTLE / sigma, np.pi)
    step = vm * np.abs(np.sin(beta))
    step_used = np.where(inductive, vm * max_abs_sin(a=beta, b=beta + window), step)
    s = snubbed_step(e=step_used, r_load=r, l=l_s, r_s=snub_r, c=snub_c)
    unit = snubbed_step(e=np.ones_like(step_used), r_load=r, l=l_s, r_s=snub_r, c=snub_c)
    _, _, w_d, kind = _branches(r + _a(snub_r), l_s, _a(snub_c))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        q = np.where(kind < 0, np.exp(-sigma * np.pi / np.where(w_d > 0, w_d, 1.0)), 0.0)
    tv = 1.0 + 2.0 * np.maximum(unit["peak_voltage"] - 1.0, 0.0) / (1.0 - q)
    gain = divider_gain(omega=omega, r=r, l=l, snub_r=snub_r, snub_c=snub_c)
    rate = np.minimum(step * unit["dvdt_max"] + omega * vm * tv,
                      _sine_rate_bound(vm=vm, r=r, l=l_s, omega=omega, beta=beta,
                                       snub_r=snub_r, snub_c=snub_c, gain=gain))
    ringing = np.where(inductive, s["peak_voltage"], step)
    return {"step_bound": step_used, "dvdt_max": rate,
            "dvdt_time": s["dvdt_time"], "damping": s["damping"], "ringing_peak": ringing,
            "divider_gain": gain + 0 * ringing,
            "peak": np.where(inductive, np.maximum(ringing, vm * gain), step)}


def offstate_peak(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                  omega: np.ndarray, snub_r: np.ndarray, snub_c: np.ndarray,
                  alpha: np.ndarray | None = None) -> dict[str, np.ndarray]:
    """The largest voltage across a snubbed triac while it blocks, per row [V].

    The larger of the steady off state Vm·max(1, |H|) (a triac not fired sees the line
    through load and snubber, :func:`divider_gain`) and the ringing after the current zero β
    of a firing at α (:func:`commutation_angle`, :func:`snubbed_turnoff`, as
    ``triac.commutation`` takes it). NaN α (a trigger that does not fire at that row): the
    triac stays off, the steady state alone. Without ``alpha`` the zero is put at the line's
    peak (β = 3π/2): the largest step any firing can give, a bound. vs [V RMS]; r, snub_r
    [Ω]; l [H] (load and supply in series); omega [rad/s]; snub_c [F]; alpha [rad].
    Returns ``peak``, ``steady_peak``, ``ringing_peak`` [V] and ``divider_gain`` [–].

    >>> o = offstate_peak(vs=253.0, r=30.0, l=2.0, omega=314.159, snub_r=2800.0,
    ...                   snub_c=1e-6, alpha=np.radians(150.0))
    >>> round(float(o["steady_peak"]), 1), round(float(o["divider_gain"]), 4)
    (397.8, 1.1119)
    """
    vm = np.sqrt(2.0) * _a(vs)
    r, l, omega = _a(r), _a(l), _a(omega)  # noqa: E741
    if alpha is None:
        fired = np.True_
        beta = np.full(np.broadcast(vm, r, l).shape, 1.5 * np.pi)
    else:
        a = _a(alpha)
        fired = np.isfinite(a)
        beta = commutation_angle(alpha=np.where(fired, a, np.pi / 2),
                                 phi=np.arctan2(omega * l, r))
    t = snubbed_turnoff(vm=vm, r=r, l=l, omega=omega, beta=beta, snub_r=snub_r, snub_c=snub_c)
    steady = vm * np.maximum(1.0, t["divider_gain"])
    ringing = np.where(fired, t["ringing_peak"], 0.0)
    return {"peak": np.maximum(steady, ringing), "steady_peak": steady + 0 * ringing,
            "ringing_peak": ringing, "divider_gain": t["divider_gain"] + 0 * ringing}


def commutation_check(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                      omega: np.ndarray, alpha: np.ndarray, dvdt_c: np.ndarray,
                      didt_c: np.ndarray, limits: Mapping[str, float],
                      snub_r: np.ndarray | None = None, snub_c: np.ndarray | None = None,
                      vdrm: np.ndarray | None = None) -> Outcome:
    """``triac.commutation``: does the triac turn off at the load current's zero?

    β from :func:`commutation_angle`, the current's slope at the zero from
    :func:`didt_at_zero`, the reapplied voltage step E = Vm·|sin β|. Its rate: with a snubber
    the bound of :func:`snubbed_turnoff`, E·max h' + ω·Vm·TV(h) (the step, and the line's
    own slope through the network: the whole rate on a nearly resistive load, where the step
    is tiny); without one, on an inductive load, a step limited only by the triac's own
    capacitance (NaN here: no finite rate can be claimed, so it fails; on a nearly resistive
    load, φ ≤ 5°, the step is below 0.09·Vm and it is marginal instead: still no pass); on
    a resistive load the line's own ω·Vm (a snubber only slows it).

    metric = min((dv/dt)c / dv/dt, (di/dt)c / di/dt): the (dv/dt)c rating holds only at or
    below the (di/dt)c it is specified at, so a faster fall of current fails however slow the
    reapplied voltage is; with ``vdrm`` the ringing peak counts too (VDRM/peak), since a
    triac that breaks over fires again as surely, and so does the off-state voltage the line
    gives through load and snubber, Vm·|H(jω)|, above Vm near their L–C resonance.
    vs [V RMS]; r [Ω]; l [H]; omega [rad/s]; alpha [rad]; dvdt_c [V/s]; didt_c [A/s];
    snub_r [Ω]; snub_c [F]; vdrm [V].

    >>> o = commutation_check(vs=np.array([230.0]), r=20.0, l=0.1, omega=314.16, alpha=1.5,
    ...     dvdt_c=10e6, didt_c=5e6, limits={"fail_below": 1.0, "marginal_below": 1.5})
    >>> o.status.tolist()  # no snubber on an inductive load
    [2]
    """
    vm = np.sqrt(2.0) * _a(vs)
    r, l, omega, alpha = (_a(x) for x in (r, l, omega, alpha))  # noqa: E741
    phi = np.arctan2(omega * l, r)
    beta = commutation_angle(alpha=alpha, phi=phi)
    didt = didt_at_zero(vm=vm, r=r, l=l, omega=omega, beta=beta)
    step = vm * np.abs(np.sin(beta))
    inductive = l > 0
    nan = np.full(np.broadcast(step, didt).shape, np.nan)
    step_used = step
    if snub_r is not None and snub_c is not None:
        t = snubbed_turnoff(vm=vm, r=r, l=l, omega=omega, beta=beta, snub_r=snub_r,
                            snub_c=snub_c)
        step_used = t["step_bound"]
        dvdt = np.where(inductive, t["dvdt_max"], omega * vm)
        t_m = np.where(inductive, t["dvdt_time"], 0.0)
        zeta = np.where(inductive, t["damping"], np.nan)
        peak = t["peak"]
    else:
        dvdt = np.where(inductive, np.nan, omega * vm)
        t_m, zeta, peak = nan, nan, nan
    with np.errstate(divide="ignore", invalid="ignore"):
        m_dv = np.where(np.isnan(dvdt), 0.0, _a(dvdt_c) / dvdt)
        m_di = _a(didt_c) / didt
        m_v = np.where(np.isnan(peak) | (vdrm is None), np.inf,
                       _a(np.nan if vdrm is None else vdrm) / peak)
    metric = np.minimum(np.minimum(m_dv, m_di), m_v)
    margin, status = grade(metric, limits)
    # No snubber on a nearly resistive load: the small step's rate is still unknown (the
    # triac's own capacitance sets it), so no pass; but nor is it the certain failure of a
    # motor's full step: marginal, for the bench, unless the current's slope fails anyway.
    bare = np.isnan(dvdt) & (phi <= NEAR_RESISTIVE)
    if np.any(bare):
        m_other, s_other = grade(np.minimum(m_di, m_v), limits)
        status = np.where(bare, np.maximum(s_other, MARGINAL), status).astype(np.int8)
        margin = np.where(bare, np.minimum(m_other, 0.0), margin)
    return Outcome({"commutation_angle": beta + 0 * step, "step_voltage": step,
                    "step_bound": step_used + 0 * step, "didt_zero": didt + 0 * step,
                    "dvdt_reapplied": dvdt, "dvdt_time": t_m + 0 * step,
                    "damping": zeta + 0 * step, "reapplied_peak": peak + 0 * step,
                    "dvdt_ratio": m_dv, "didt_ratio": m_di, "vdrm_ratio": m_v + 0 * step,
                    "load_angle": phi + 0 * step},
                   margin, status)


def control_check(*, r: np.ndarray, l: np.ndarray, omega: np.ndarray,  # noqa: E741
                  alpha_lo: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``triac.control``: α_min ≥ φ = atan(ωL/R); fired earlier, a short gate pulse in the
    second half-cycle comes while the triac still conducts the first and is lost, so one
    polarity conducts and DC flows in the load  [1, §11]. metric α_min/φ.

    >>> o = control_check(r=10.0, l=0.0551, omega=314.16, alpha_lo=np.radians([45.0]),
    ...                   limits={})
    >>> round(float(np.degrees(o.values["load_angle"][0])), 2), o.status.tolist()
    (59.99, [2])
    """
    phi = np.arctan2(_a(omega) * _a(l), _a(r))
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.where(phi > 0, _a(alpha_lo) / phi, np.inf)
    margin, status = grade(metric, limits)
    return Outcome({"load_angle": phi + 0 * metric, "alpha_min": _a(alpha_lo) + 0 * metric},
                   margin, status)


def current_after_firing(*, vm: np.ndarray, omega: np.ndarray, r: np.ndarray,
                         l: np.ndarray, alpha: np.ndarray, t: np.ndarray,  # noqa: E741
                         snub_r: np.ndarray | float = np.nan,
                         snub_c: np.ndarray | float = np.nan) -> np.ndarray:
    """Main-terminal current [A] a time ``t`` [s] after firing at ``alpha`` [rad] (positive
    half-cycle; the negative one is its mirror), from zero load current.

    Load (R–L, ideal switch): i = (Vm/Z)·[sin(α + ωt − φ) − sin(α − φ)·e^(−t·R/L)], and with
    L = 0 i = Vm·sin(α + ωt)/R [1]. An R–C snubber across the triac adds its discharge
    v_C(α)/R_s·e^(−t/(R_s·C_s)), v_C the steady off-state capacitor voltage through the
    load: V/(1 + jωC(R + R_s) − ω²LC) [2]; NaN snub_r: no snubber.

    [1] M. H. Rashid, Power Electronics, 4th ed., §11 (R–L AC voltage controller current).
    [2] Series R–L–R_s–C circuit in sinusoidal steady state (phasors).

    >>> round(float(current_after_firing(vm=325.0, omega=314.16, r=100.0, l=0.0,
    ...                                  alpha=np.pi / 2, t=0.0)), 3)
    3.25
    """
    vm, omega, r, l, alpha, t = (_a(x) for x in (vm, omega, r, l, alpha, t))
    z = np.hypot(r, omega * l)
    phi = np.arctan2(omega * l, r)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        decay = np.where(l > 0, np.exp(-t * r / np.where(l > 0, l, 1.0)), 0.0)
    i = vm / z * (np.sin(alpha + omega * t - phi) - np.sin(alpha - phi) * decay)
    rs, cs = _a(snub_r), _a(snub_c)
    snubbed = np.isfinite(rs) & np.isfinite(cs)
    if np.any(snubbed):
        with np.errstate(invalid="ignore", divide="ignore"):
            h = 1.0 / (1.0 + 1j * omega * cs * (r + rs) - omega ** 2 * l * cs)
            vc = vm * np.abs(h) * np.sin(alpha + np.angle(h))
            i_s = np.maximum(vc, 0.0) / rs * np.exp(-t / (rs * cs))
        i = i + np.where(snubbed, i_s, 0.0)
    return i


def latch_time_check(*, vs: np.ndarray, omega: np.ndarray, r: np.ndarray,
                     l: np.ndarray, alpha: np.ndarray, width: np.ndarray,  # noqa: E741
                     il_cold: np.ndarray, limits: Mapping[str, float],
                     snub_r: np.ndarray | float = np.nan,
                     snub_c: np.ndarray | float = np.nan) -> Outcome:
    """``triac.latch-time``: the main-terminal current when a short gate pulse ends.

    A pulse above IGT for ``width`` [s] (a diac's) latches the triac only when the current
    has reached IL by its end — IL is the least current that keeps it on once the gate
    signal is removed [1]. Metric i(width)/IL_cold (:func:`current_after_firing`), graded
    with ``fail_below``/``marginal_below``. The snubber's discharge helps; an inductive load
    alone rises slowly (Vm·sin α/L).

    [1] GE SCR Manual, 6th ed., ch. 1 and 4 (latching current, gate pulse width) — from
        memory.

    >>> o = latch_time_check(vs=230.0, omega=314.16, r=220.0, l=1.0, alpha=np.pi / 2,
    ...                      width=7e-6, il_cold=0.04, limits={})
    >>> int(o.status), round(float(o.values["current_at_end"]) * 1e3, 2)  # Vm·t/L = 2.28 mA
    (2, 2.28)
    """
    vm = np.sqrt(2.0) * _a(vs)
    i_end = current_after_firing(vm=vm, omega=omega, r=r, l=l, alpha=alpha, t=width,
                                 snub_r=snub_r, snub_c=snub_c)
    il = _a(il_cold)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin, status = grade(i_end / il, limits)
    shape = np.broadcast_shapes(np.shape(i_end), np.shape(il), np.shape(width))
    return Outcome({"current_at_end": np.broadcast_to(i_end, shape) + 0.0,
                    "il": np.broadcast_to(il, shape) + 0.0,
                    "pulse_width": np.broadcast_to(_a(width), shape) + 0.0},
                   np.broadcast_to(margin, shape), np.broadcast_to(status, shape))
