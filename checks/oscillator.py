"""UJT and PUT relaxation oscillators: peak point, charge and discharge, firing angle, checks.

All arguments are SI magnitudes (V, Ω, F, s, A, W, J, K, rad) that broadcast over numpy arrays;
every function works on whole corner tables at once. Device parameters for the peak point are
passed as keywords: UJT ``eta, rbb, r1, r2, vd``; PUT ``r_upper, r_lower, offset``.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §9 (UJT and
    PUT trigger circuits, Examples 9.5 and 9.6; the base-2 compensation rule of thumb).
[2] R. L. Boylestad & L. Nashelsky, *Electronic Devices and Circuit Theory*, ch. 17 (UJT
    oscillator analysis: window, charge and discharge times).
[3] D. Chattopadhyay & P. C. Rakshit, *Electronics: Fundamentals and Applications*, ch. 16
    (the period shortcut T ≈ R·C·ln[1/(1 − η)]).
[4] R. S. Sedha, *A Textbook of Electronic Circuits*, ch. 12 (peak point and standoff ratio).
[5] Any first-order circuit text: the response of an R–C network to a sinusoidal source is the
    forced response plus the natural one, v = p(t) + (v0 − p(t0))·e^(−(t − t0)/τ).
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome, cap_status, grade
from checks.memo import memoised

# The first-crossing search (see _first_crossing): grid points where no monotonicity bound
# applies, and the safeguarded Newton iteration's cap and stopping step (relative).
_RAMP_GRID = 32
_FALL_GRID = 64
_TAIL_GRID = 64
_NEWTON_MAX = 60
_NEWTON_TOL = 1e-15
_T0C = 273.15


def _arr(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


# ----------------------------------------------------------------------------- peak point

def ujt_peak_voltage(*, v1: np.ndarray, eta: np.ndarray, rbb: np.ndarray, r1: np.ndarray,
                     r2: np.ndarray, vd: np.ndarray) -> np.ndarray:
    """UJT peak-point voltage with the external base resistors in the divider [V].

    VP = VD + V1·(η·RBB + R1)/(RBB + R1 + R2)  [1, §9], the open-emitter divider of the bar
    (η·RBB below the emitter point, (1 − η)·RBB above) in series with R1 and R2.

    v1 [V] interbase supply; eta [–] intrinsic standoff ratio; rbb [Ω] interbase resistance;
    r1, r2 [Ω] base-1 and base-2 resistors; vd [V] emitter diode drop. Valid while the emitter
    draws no current (up to the peak point).

    >>> round(float(ujt_peak_voltage(v1=12, eta=0.6, rbb=5e3, r1=100, r2=0, vd=0.7)), 4)
    7.9941
    """
    return vd + v1 * divider_ratio(device="ujt", eta=eta, rbb=rbb, r1=r1, r2=r2)


def put_peak_voltage(*, v1: np.ndarray, r_upper: np.ndarray, r_lower: np.ndarray,
                     offset: np.ndarray) -> np.ndarray:
    """PUT peak-point voltage VP = V1·RGK/(RGA + RGK) + VOFF [V]  [1, §9].

    v1 [V] supply; r_upper [Ω] supply→gate (R_GA); r_lower [Ω] gate→common (R_GK); offset [V]
    anode above gate at firing. Valid while the gate divider is not loaded by the gate current.

    >>> float(put_peak_voltage(v1=12, r_upper=5e3, r_lower=10e3, offset=0.7))
    8.7
    """
    return v1 * r_lower / (r_upper + r_lower) + offset


def divider_ratio(*, device: str, **p: np.ndarray) -> np.ndarray:
    """The fraction a of the supply that sets the peak point, VP = a·V1 + d [–].

    UJT: a = (η·RBB + R1)/(RBB + R1 + R2) [1]; PUT: a = η_p = RGK/(RGA + RGK) [1].

    >>> float(divider_ratio(device="put", r_upper=60e3, r_lower=30e3))
    0.3333333333333333
    """
    if device == "ujt":
        return (p["eta"] * p["rbb"] + p["r1"]) / (p["rbb"] + p["r1"] + p["r2"])
    return p["r_lower"] / (p["r_upper"] + p["r_lower"])


def _peak_offset(device: str, p: Mapping[str, np.ndarray]) -> np.ndarray:
    return _arr(p["vd"] if device == "ujt" else p["offset"])


def peak_voltage(*, device: str, v1: np.ndarray, **p: np.ndarray) -> np.ndarray:
    """Peak-point voltage for either device [V]: UJT keys eta, rbb, r1, r2, vd (see
    :func:`ujt_peak_voltage`); PUT keys r_upper, r_lower, offset (:func:`put_peak_voltage`).

    v1 [V] the supply; other units as in those functions  [1, §9].

    >>> float(peak_voltage(device="put", v1=12, r_upper=5e3, r_lower=10e3, offset=0.7))
    8.7
    """
    if device == "ujt":
        return ujt_peak_voltage(v1=v1, eta=p["eta"], rbb=p["rbb"], r1=p["r1"], r2=p["r2"],
                                vd=p["vd"])
    return put_peak_voltage(v1=v1, r_upper=p["r_upper"], r_lower=p["r_lower"],
                            offset=p["offset"])


def shortcut_eta(*, device: str, **p: np.ndarray) -> np.ndarray:
    """The ratio the textbook shortcut uses [–]: UJT the intrinsic η; PUT η_p = RGK/(RGA+RGK).

    >>> float(shortcut_eta(device="ujt", eta=0.6))
    0.6
    """
    return _arr(p["eta"]) if device == "ujt" else divider_ratio(device="put", **p)


# ----------------------------------------------------------------------------- free running

def charge_time(*, r: np.ndarray, c: np.ndarray, v1: np.ndarray, v0: np.ndarray,
                vp: np.ndarray) -> np.ndarray:
    """Time for C charging through R from v0 toward v1 to reach vp [s]  [2].

    t = R·C·ln[(V1 − V0)/(V1 − VP)]; r [Ω], c [F], v1, v0, vp [V]. NaN where VP ≥ V1 (it
    never gets there) or V0 ≥ VP.

    >>> round(float(charge_time(r=50e3, c=0.1e-6, v1=12, v0=1, vp=7.99412)) * 1e3, 4)
    5.0507
    """
    r, c, v1, v0, vp = (_arr(x) for x in (r, c, v1, v0, vp))
    ok = (vp < v1) & (v0 < vp)
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = np.where(ok, (v1 - v0) / np.where(ok, v1 - vp, 1.0), 1.0)
        return np.where(ok, r * c * np.log(ratio), np.nan)


def discharge_time(*, r_discharge: np.ndarray, c: np.ndarray, vp: np.ndarray,
                   vv: np.ndarray) -> np.ndarray:
    """Discharge time from the peak point to the valley, t2 = R_dis·C·ln(VP/VV) [s]  [2].

    r_discharge [Ω]: UJT r_on + R1, PUT R_K; c [F]; vp, vv [V]. Approximate: the device's
    on-resistance varies with its current. NaN where VP ≤ VV.

    >>> round(float(discharge_time(r_discharge=200, c=0.1e-6, vp=7.9941, vv=1)) * 1e6, 2)
    41.57
    """
    vp, vv = _arr(vp), _arr(vv)
    ok = (vp > vv) & (vv > 0)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(ok, r_discharge * c * np.log(np.where(ok, vp / np.where(ok, vv, 1.0),
                                                              1.0)), np.nan)


def free_running(*, device: str, v1: np.ndarray, rt: np.ndarray, ct: np.ndarray,
                 vv: np.ndarray, r_discharge: np.ndarray,
                 **peak_params: np.ndarray) -> dict[str, np.ndarray]:
    """Steady-state free-running timing: charge from VV to VP, discharge back to VV  [1, 2, 3].

    charge_time t1 = R_T·C_T·ln[(V1 − VV)/(V1 − VP)]; discharge_time t2 = R_dis·C_T·ln(VP/VV);
    period T = t1 + t2; frequency 1/T; approx_period = R_T·C_T·ln[1/(1 − η)] (the shortcut, η
    the intrinsic ratio for a UJT, η_p for a PUT). Also returns ``peak_voltage`` [V].

    device "ujt" or "put"; v1 [V]; rt [Ω]; ct [F]; vv [V]; r_discharge [Ω] (UJT r_on + R1, PUT
    R_K); peak_params as in :func:`peak_voltage`. NaN where the device never fires (VP ≥ V1).

    >>> out = free_running(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0, r_discharge=200.0,
    ...                    eta=0.6, rbb=5e3, r1=100.0, r2=0.0, vd=0.7)
    >>> round(float(out["period"]) * 1e3, 4), round(float(out["frequency"]), 2)
    (5.0922, 196.38)
    >>> round(1 / float(out["approx_period"]), 2)
    218.27
    """
    vp = peak_voltage(device=device, v1=v1, **peak_params)
    t1 = charge_time(r=rt, c=ct, v1=v1, v0=vv, vp=vp)
    t2 = discharge_time(r_discharge=r_discharge, c=ct, vp=vp, vv=vv)
    period = t1 + t2
    with np.errstate(divide="ignore", invalid="ignore"):
        freq = 1.0 / period
        approx = _arr(rt) * ct * np.log(1.0 / (1.0 - shortcut_eta(device=device,
                                                                    **peak_params)))
    return {"charge_time": t1, "discharge_time": t2, "period": period, "frequency": freq,
            "approx_period": approx, "peak_voltage": vp}


# ----------------------------------------------------------------------------- line sync

def _forced(t: np.ndarray, vm: np.ndarray, omega: np.ndarray, tau: np.ndarray) -> np.ndarray:
    """Forced (particular) response of τ·v' + v = Vm·sin ωt."""
    wt = omega * tau
    return vm / (1.0 + wt * wt) * (np.sin(omega * t) - wt * np.cos(omega * t))


def _sine_resp(t: np.ndarray, t0: np.ndarray, v0: np.ndarray, vm: np.ndarray,
               omega: np.ndarray, tau: np.ndarray) -> np.ndarray:
    return _forced(t, vm, omega, tau) + (v0 - _forced(t0, vm, omega, tau)) * \
        np.exp(-(t - t0) / tau)


def _plateau_resp(t: np.ndarray, t0: np.ndarray, v0: np.ndarray, vz: np.ndarray,
                  tau: np.ndarray) -> np.ndarray:
    return vz - (vz - v0) * np.exp(-(t - t0) / tau)


def clamp_onset(*, vm: np.ndarray, vz: np.ndarray) -> np.ndarray:
    """Clamp onset angle θz = asin(VZ/Vm) [rad]; π/2 where VZ ≥ Vm (the clamp never acts).

    vm [V] peak of the rectified line; vz [V] clamp (Zener) voltage.

    >>> round(float(np.degrees(clamp_onset(vm=230 * 2 ** 0.5, vz=20.0))), 3)
    3.525
    """
    return np.arcsin(np.clip(_arr(vz) / _arr(vm), 0.0, 1.0))


def _last(x: np.ndarray) -> np.ndarray:
    """Add a trailing axis (rows → rows × grid points)."""
    return np.asarray(x)[..., None]


class _LineSync:
    """The piecewise-analytic capacitor voltage of a line-synchronised oscillator.

    Half-cycle 0 ≤ t ≤ π/ω: ramp up Vm·sin ωt until tz = θz/ω, plateau VZ until π/ω − tz, ramp
    down. State given at (t0, v0); every array broadcasts over rows.
    """

    def __init__(self, *, vm: np.ndarray, omega: np.ndarray, vz: np.ndarray, tau: np.ndarray,
                 t0: np.ndarray, v0: np.ndarray) -> None:
        self.vm, self.omega, self.vz, self.tau = vm, omega, vz, tau
        # sin and cos of the clamp onset θz (and, mirrored, of the plateau's end), exactly
        self.s_z = np.clip(_arr(vz) / _arr(vm), 0.0, 1.0)
        self.c_z = np.sqrt((1.0 - self.s_z) * (1.0 + self.s_z))
        self.tz = np.arcsin(self.s_z) / omega
        self.t3 = np.pi / omega - self.tz
        self.t_end = np.pi / omega
        self.vz_eff = np.minimum(vz, vm)
        self.t0, self.v0 = t0, v0
        # state entering the plateau and entering the falling ramp
        on_ramp = t0 < self.tz
        self.tb = np.where(on_ramp, self.tz, t0)
        wt = omega * tau
        amp = vm / (1.0 + wt * wt)
        p_tz = amp * (self.s_z - wt * self.c_z)  # the forced response at tz
        p_t0 = (-amp * wt if not np.any(t0) else _forced(_arr(t0), vm, omega, tau))
        with np.errstate(over="ignore"):
            v_tz = p_tz + (v0 - p_t0) * np.exp(-(self.tz - t0) / tau)
        self.vb = np.where(on_ramp, v_tz, v0)
        on_plateau = self.tb < self.t3
        self.tc = np.where(on_plateau, self.t3, self.tb)
        self.vc = np.where(on_plateau, _plateau_resp(self.t3, self.tb, self.vb, self.vz_eff, tau),
                           self.vb)

    def supply(self, t: np.ndarray) -> np.ndarray:
        """V_b at times ``t`` of shape (rows…, N)."""
        e = _last
        return np.minimum(e(self.vm) * np.abs(np.sin(e(self.omega) * t)), e(self.vz_eff))

    def v(self, t: np.ndarray) -> np.ndarray:
        """v_C at times ``t`` of shape (rows…, N), t ≥ t0."""
        e = _last
        vm, om, tau = e(self.vm), e(self.omega), e(self.tau)
        with np.errstate(over="ignore", invalid="ignore"):
            up = _sine_resp(t, e(self.t0), e(self.v0), vm, om, tau)
            flat = _plateau_resp(t, e(self.tb), e(self.vb), e(self.vz_eff), tau)
            down = _sine_resp(t, e(self.tc), e(self.vc), vm, om, tau)
        return np.where(t <= e(self.tz), up, np.where(t <= e(self.t3), flat, down))


class _Ramp:
    """g = v_C − (a·V_b + d) and dg/dt on a ramp (V_b = Vm·sin ωt) from the state (ts, vs).

    One sine, one cosine and one exponential per evaluation (the sine and cosine can be given
    where they are known); every array is 1-D over the rows being searched (or that with a
    trailing grid axis, see :meth:`search`). Used inside :func:`_first_crossing`, whose
    ``np.errstate`` covers its floating-point warnings (and those of :func:`_refine`).
    """

    def __init__(self, *, vm: np.ndarray, om: np.ndarray, tau: np.ndarray, a: np.ndarray,
                 d: np.ndarray, ts: np.ndarray, vs: np.ndarray,
                 sc: tuple[np.ndarray, np.ndarray] | None = None) -> None:
        self.vm, self.om, self.tau, self.a, self.d, self.ts = vm, om, tau, a, d, ts
        self.wt = om * tau
        self.amp = vm / (1.0 + self.wt * self.wt)
        s, c = sc if sc is not None else (np.sin(om * ts), np.cos(om * ts))
        self.c0 = vs - self.amp * (s - self.wt * c)  # natural-response amplitude v0 − p(ts)

    def __call__(self, t: np.ndarray, *, ex: bool = False,
                 sc: tuple[np.ndarray, np.ndarray] | None = None
                 ) -> tuple[np.ndarray, np.ndarray]:
        p = [_last(x) if ex else x for x in (self.vm, self.om, self.tau, self.a, self.d,
                                             self.ts, self.wt, self.amp, self.c0)]
        vm, om, tau, a, d, ts, wt, amp, c0 = p
        s, c = sc if sc is not None else (np.sin(om * t), np.cos(om * t))
        v = amp * (s - wt * c) + c0 * np.exp(-(t - ts) / tau)
        vb = vm * s
        return v - a * vb - d, (vb - v) / tau - a * vm * om * c

    def search(self, lo: np.ndarray, hi: np.ndarray, n: int) -> np.ndarray:
        """First t in [lo, hi] with g ≥ 0: an n-point grid brackets it, Newton refines it."""
        u = np.linspace(0.0, 1.0, n)
        tg = lo[:, None] + (hi - lo)[:, None] * u
        g, _ = self(tg, ex=True)
        hit = g >= 0.0
        k = np.argmax(hit, axis=-1)
        rows = np.arange(len(k))
        t_hi = tg[rows, k]
        t_lo = tg[rows, np.maximum(k - 1, 0)]
        t = _refine(self, t_lo, t_hi, 0.5 * (t_lo + t_hi))
        t = np.where(k == 0, tg[:, 0], t)
        return np.where(hit.any(axis=-1), t, np.nan)


def _refine(gap: _Ramp, lo: np.ndarray, hi: np.ndarray, t: np.ndarray) -> np.ndarray:
    """The root of g in [lo, hi] (g(lo) < 0 ≤ g(hi)) by Newton, bisecting whenever a step would
    leave the bracket; stops when every row's step is below 1e-15 of the bracket's end."""
    tol = _NEWTON_TOL * np.abs(hi)
    for _ in range(_NEWTON_MAX):
        g, dg = gap(t)
        up = g >= 0.0
        hi = np.where(up, t, hi)
        lo = np.where(up, lo, t)
        step = t - g / dg
        inside = (step >= lo) & (step <= hi) & np.isfinite(step)
        t_new = np.where(g == 0.0, t, np.where(inside, step, 0.5 * (lo + hi)))
        done = (np.abs(t_new - t) <= tol) | (hi - lo <= tol) | ~np.isfinite(t_new)
        t = t_new
        if done.all():
            break
    return t


def _first_crossing(ls: _LineSync, a: np.ndarray, d: np.ndarray) -> np.ndarray:
    """First t ≥ t0 in the half-cycle where v_C reaches a·V_b(t) + d; NaN when it does not.

    Segment by segment, each row stopping at its first crossing:

    * rising ramp: from rest at the zero (t0 = 0, v0 = 0) v ≤ ∫V_b/τ = Vm(1 − cos ωt)/(ωτ)
      = V_b·tan(ωt/2)/(ωτ), so with κ = tan(θz/2)/(ωτ) ≤ a and d > 0 it cannot fire there;
      other rows search the ramp on a grid;
    * plateau: v = VZ − (VZ − v_b)·e^(−(t − tb)/τ) against the constant a·VZ + d, solved in
      closed form, t = tb + τ·ln[(VZ − v_b)/(VZ − a·VZ − d)];
    * falling ramp: while V_b ≥ d/(1 − a) (0 ≤ a < 1, d ≥ 0), g < 0 implies v < V_b, hence
      dg/dt = (V_b − v)/τ − a·V_b' > 0: g crosses zero at most once there, and a safeguarded
      Newton from the regula-falsi point finds it; only the last stretch (V_b < d/(1 − a)) and
      rows outside those bounds are searched on a grid.
    """
    with np.errstate(all="ignore"):  # NaN rows and empty brackets are handled explicitly
        return _crossing(ls, a, d)


def _crossing(ls: _LineSync, a: np.ndarray, d: np.ndarray) -> np.ndarray:
    """The body of :func:`_first_crossing` (floating-point warnings off)."""
    shape = np.broadcast_shapes(*(np.shape(x) for x in (
        ls.vm, ls.omega, ls.tau, ls.vz_eff, ls.t0, ls.v0, a, d)))

    def flat(x: object) -> np.ndarray:
        if isinstance(x, np.ndarray) and x.shape == shape and x.dtype == np.float64:
            return x.ravel()
        return np.broadcast_to(np.asarray(x, dtype=float), shape).ravel()

    vm, om, tau, vze = flat(ls.vm), flat(ls.omega), flat(ls.tau), flat(ls.vz_eff)
    t0, v0, tz, t3, t_end = flat(ls.t0), flat(ls.v0), flat(ls.tz), flat(ls.t3), flat(ls.t_end)
    tb, vb, tc, vc = flat(ls.tb), flat(ls.vb), flat(ls.tc), flat(ls.vc)
    s_z, c_z = flat(ls.s_z), flat(ls.c_z)
    a, d = flat(a), flat(d)
    n = vm.size
    out = np.full(n, np.nan)

    def ramp(m: _Sel, ts: np.ndarray, vs: np.ndarray,
             sc: tuple[np.ndarray, np.ndarray] | None = None) -> _Ramp:
        return _Ramp(vm=vm[m], om=om[m], tau=tau[m], a=a[m], d=d[m], ts=ts[m], vs=vs[m], sc=sc)

    # at t0 itself (from rest at the zero: V_b = 0, g = −d)
    vb0 = np.minimum(vm * np.abs(np.sin(om * t0)), vze) if np.any(t0) else 0.0
    g0 = v0 - (a * vb0 + d)
    at_start = g0 >= 0.0
    out[at_start] = t0[at_start]
    open_ = ~at_start  # rows still looking for their crossing

    # rising ramp
    on_ramp = open_ & (t0 < tz)
    kappa = np.tan(0.5 * om * tz) / (om * tau)
    clear = (t0 == 0.0) & (v0 == 0.0) & (d > 0.0) & (kappa <= a)
    m = _rows(on_ramp & ~clear)
    if m is not None:
        t = ramp(m, t0, v0).search(t0[m], tz[m], _RAMP_GRID)
        hit = np.isfinite(t)
        out[m] = np.where(hit, t, out[m])
        open_[m] &= ~hit

    # plateau: closed form
    thr = a * vze + d
    t_flat = tb + tau * np.log((vze - vb) / (vze - thr))
    fires = open_ & (tb < t3) & (vze > thr) & (vb < thr) & (t_flat <= t3)
    out[fires] = t_flat[fires]
    open_ &= ~fires

    # falling ramp
    on_fall = open_ & (tc < t_end)
    mono = (a >= 0.0) & (a < 1.0) & (d >= 0.0)
    m = _rows(on_fall & ~mono)
    if m is not None:
        out[m] = ramp(m, tc, vc).search(tc[m], t_end[m], _FALL_GRID)
    m = _rows(on_fall & mono)
    if m is not None:
        lo, vc_m, t_end_m = tc[m], vc[m], t_end[m]
        # Rows that came over the plateau start at t3, where sin ωt = sin θz, cos = −cos θz
        # and V_b = VZ; a row starting inside the ramp has its g0 already.
        at_t3 = lo == t3[m]
        s_lo = np.where(at_t3, s_z[m], np.sin(om[m] * lo)) if not at_t3.all() else s_z[m]
        c_lo = np.where(at_t3, -c_z[m], np.cos(om[m] * lo)) if not at_t3.all() else -c_z[m]
        gap = ramp(m, tc, vc, sc=(s_lo, c_lo))
        g_lo = np.where(at_t3, vc_m - thr[m], g0[m])
        ratio = np.clip(d[m] / ((1.0 - a[m]) * vm[m]), 0.0, 1.0)
        t_d = (np.pi - np.arcsin(ratio)) / om[m]  # where V_b falls to d/(1 − a)
        hi = np.clip(t_d, lo, t_end_m)
        moved = hi != t_d
        if moved.any():
            g_hi, _ = gap(hi)
        else:  # sin ωt_d = ratio, cos ωt_d = −√(1 − ratio²)
            g_hi, _ = gap(hi, sc=(ratio, -np.sqrt((1.0 - ratio) * (1.0 + ratio))))
        now = g_lo >= 0.0  # only by rounding: the plateau's closed form just missed it
        one = ~now & (g_hi >= 0.0) & (hi > lo)
        res = np.where(now, lo, np.nan)
        k = _rows(one)
        if k is not None:
            sub = _Ramp(vm=gap.vm[k], om=gap.om[k], tau=gap.tau[k], a=gap.a[k], d=gap.d[k],
                        ts=gap.ts[k], vs=vc_m[k], sc=(s_lo[k], c_lo[k]))
            l, h, gl, gh = lo[k], hi[k], g_lo[k], g_hi[k]
            guess = l - gl * (h - l) / (gh - gl)
            guess = np.where((guess > l) & (guess < h), guess, 0.5 * (l + h))
            res[k] = _refine(sub, l, h, guess)
        tail = np.flatnonzero(~now & ~one & (hi < t_end_m))
        if tail.size:
            g = _Ramp(vm=gap.vm[tail], om=gap.om[tail], tau=gap.tau[tail], a=gap.a[tail],
                      d=gap.d[tail], ts=gap.ts[tail], vs=vc_m[tail],
                      sc=(s_lo[tail], c_lo[tail]))
            res[tail] = g.search(hi[tail], t_end_m[tail], _TAIL_GRID)
        out[m] = res
    return out.reshape(shape)


_Sel = slice | np.ndarray


def _rows(mask: np.ndarray) -> _Sel | None:
    """Rows selected by ``mask``: all of them as a slice (views, no copies), some as indices,
    none as None."""
    if mask.all():
        return slice(None)
    idx = np.flatnonzero(mask)
    return idx if idx.size else None


def _line_rows(vm: object, omega: object, vz: object, rt: object, ct: object,
               peak_params: Mapping[str, object]) -> tuple[np.ndarray, ...]:
    arrays = [_arr(x) for x in (vm, omega, vz, rt, ct, *peak_params.values())]
    shape = np.broadcast_shapes(*(x.shape for x in arrays))
    vm, omega, vz, rt, ct = (np.broadcast_to(x, shape).astype(float) for x in arrays[:5])
    return vm, omega, vz, rt * ct, shape


@memoised
def line_sync_firing_angle(*, device: str, vm: np.ndarray, omega: np.ndarray, vz: np.ndarray,
                           rt: np.ndarray, ct: np.ndarray,
                           **peak_params: np.ndarray) -> np.ndarray:
    """Firing angle of a line-synchronised oscillator: the first pulse after the zero [rad].

    The capacitor starts from 0 V at the zero crossing and charges through R_T from the
    clamped supply V_b(t) = min(Vm·|sin ωt|, VZ): R_T·C_T·dv/dt = V_b − v. It fires at the
    first t where v reaches the instantaneous peak point a·V_b(t) + d (UJT a = (η·RBB + R1)/
    (RBB + R1 + R2), d = VD; PUT a = η_p, d = VOFF); α = ω·t  [1, §9], [5]. Solved exactly:
    during the ramps v = p(t) + (v0 − p(t0))·e^(−(t−t0)/τ) with p the forced response
    Vm/(1 + ω²τ²)·(sin ωt − ωτ·cos ωt); on the plateau v = VZ − (VZ − v0)·e^(−(t−t0)/τ). The
    first crossing is found on a coarse grid and refined by bisection, all rows at once.

    device "ujt"/"put"; vm [V] peak of the rectified line; omega [rad/s]; vz [V]; rt [Ω];
    ct [F]; peak_params as in :func:`peak_voltage`. NaN where it does not fire in the half-cycle.
    Valid for a stiff clamp (the dropping resistor's drop before the Zener conducts neglected)
    and a capacitor fully discharged at each zero crossing.

    >>> a = line_sync_firing_angle(device="ujt", vm=230 * 2 ** 0.5, omega=2 * np.pi * 50,
    ...     vz=20.0, rt=np.array([10e3, 22e3, 47e3]), ct=0.1e-6, eta=0.63, rbb=7e3, r1=0.0,
    ...     r2=0.0, vd=0.5)
    >>> np.degrees(a).round(2).tolist()
    [20.95, 43.92, 91.8]
    """
    vm, omega, vz, tau, shape = _line_rows(vm, omega, vz, rt, ct, peak_params)
    a = np.broadcast_to(divider_ratio(device=device, **peak_params), shape).astype(float)
    d = np.broadcast_to(_peak_offset(device, peak_params), shape).astype(float)
    zero = np.zeros(shape)
    ls = _LineSync(vm=vm, omega=omega, vz=vz, tau=tau, t0=zero, v0=zero)
    return omega * _first_crossing(ls, a, d)


def firing_angle_shortcut(*, vm: np.ndarray, omega: np.ndarray, vz: np.ndarray,
                          rt: np.ndarray, ct: np.ndarray, vp: np.ndarray) -> np.ndarray:
    """The textbook estimate α ≈ θz + ω·R_T·C_T·ln[VZ/(VZ − VP)] [rad]  [1, §9].

    Late by about θz/2 (the capacitor already charges on the ramp); reported beside the exact
    :func:`line_sync_firing_angle`. vm, vz, vp [V]; omega [rad/s]; rt [Ω]; ct [F].

    >>> round(float(np.degrees(firing_angle_shortcut(vm=230 * 2 ** 0.5, omega=2 * np.pi * 50,
    ...     vz=20.0, rt=10e3, ct=0.1e-6, vp=13.1))), 2)
    22.68
    """
    t1 = charge_time(r=rt, c=ct, v1=vz, v0=0.0, vp=vp)
    return clamp_onset(vm=vm, vz=vz) + omega * t1


def capacitor_waveform(*, device: str, rt: float, ct: float, vv: float, r_discharge: float,
                       v1: float | None = None, vm: float | None = None,
                       omega: float | None = None, vz: float | None = None, periods: float = 3.0,
                       points: int = 2000, **peak_params: float) -> dict[str, np.ndarray]:
    """The timing capacitor's voltage for plotting, with the peak point and the pulse times.

    Free-running (give ``v1``): steady state from VV over ``periods`` periods; the charge is
    V1 − (V1 − VV)·e^(−t/(R_T·C_T)), the discharge VP·e^(−t/(R_dis·C_T)) down to VV  [2].
    Line-synchronised (give ``vm``, ``omega``, ``vz``): one half-cycle from 0 V, the first pulse
    at :func:`line_sync_firing_angle`, then free-running pulses from VV on the clamped supply
    until the half-cycle ends  [1, §9], [5].

    Returns numpy arrays ``t`` [s], ``v_c`` [V], ``v_peak_point`` [V], ``supply`` [V] (the
    clamped supply for line sync, V1 otherwise) and ``pulse_times`` [s]. Scalars only (one
    design point); units as in :func:`free_running` and :func:`line_sync_firing_angle`.

    >>> w = capacitor_waveform(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0,
    ...     r_discharge=200.0, eta=0.6, rbb=5e3, r1=100.0, r2=0.0, vd=0.7)
    >>> len(w["pulse_times"]), round(float(w["v_c"].max()), 2)
    (3, 7.99)
    """
    pp = {k: float(v) for k, v in peak_params.items()}
    if vm is None:
        if v1 is None:
            raise ValueError("give v1 (free-running) or vm, omega and vz (line sync)")
        fr = free_running(device=device, v1=v1, rt=rt, ct=ct, vv=vv, r_discharge=r_discharge,
                          **pp)
        t1, t2, vp = (float(fr[k]) for k in ("charge_time", "discharge_time", "peak_voltage"))
        period = t1 + t2
        if not np.isfinite(period):
            t = np.linspace(0.0, 5 * rt * ct, points)
            vc = v1 - (v1 - vv) * np.exp(-t / (rt * ct))
            return {"t": t, "v_c": vc, "v_peak_point": np.full_like(t, vp),
                    "supply": np.full_like(t, v1), "pulse_times": np.array([])}
        t = np.linspace(0.0, periods * period, points)
        ph = np.mod(t, period)
        charging = ph < t1
        vc = np.where(charging, v1 - (v1 - vv) * np.exp(-ph / (rt * ct)),
                      vp * np.exp(-(ph - t1) / (r_discharge * ct)))
        pulses = t1 + period * np.arange(int(np.floor(periods - t1 / period)) + 1)
        return {"t": t, "v_c": vc, "v_peak_point": np.full_like(t, vp),
                "supply": np.full_like(t, v1), "pulse_times": pulses[pulses <= t[-1]]}
    if omega is None or vz is None:
        raise ValueError("line sync needs vm, omega and vz")
    a = float(divider_ratio(device=device, **pp))
    d = float(_peak_offset(device, pp))
    tau = rt * ct
    t_half = np.pi / omega
    t = np.linspace(0.0, t_half, points)
    vc = np.empty_like(t)
    pulses: list[float] = []
    t0, v0 = 0.0, 0.0
    # Successive pulses are sequential in time: one loop step per pulse of one design point.
    for _ in range(1000):
        ls = _LineSync(vm=np.array(vm), omega=np.array(omega), vz=np.array(vz),
                       tau=np.array(tau), t0=np.array(t0), v0=np.array(v0))
        tf = float(_first_crossing(ls, np.array(a), np.array(d)))
        seg = (t >= t0) & (t <= (tf if np.isfinite(tf) else t_half))
        vc[seg] = ls.v(t[seg])
        if not np.isfinite(tf) or (pulses and tf <= t0):
            break  # no further pulse (or the peak point fell below VV: no fresh charge cycle)
        vpk = float(ls.v(np.array([tf]))[0])
        if pulses and vpk <= 1.01 * vv:
            break  # the peak point has collapsed onto the valley: the device stays on
        pulses.append(tf)
        t_dis = float(discharge_time(r_discharge=r_discharge, c=ct, vp=vpk, vv=vv))
        if not np.isfinite(t_dis):
            break
        seg = (t > tf) & (t <= tf + t_dis)
        vc[seg] = vpk * np.exp(-(t[seg] - tf) / (r_discharge * ct))
        t0, v0 = tf + t_dis, vv
        if t0 >= t_half:
            break
    ls0 = _LineSync(vm=np.array(vm), omega=np.array(omega), vz=np.array(vz), tau=np.array(tau),
                    t0=np.array(0.0), v0=np.array(0.0))
    vb = ls0.supply(t)
    return {"t": t, "v_c": vc, "v_peak_point": a * vb + d, "supply": vb,
            "pulse_times": np.array(pulses)}


def ripple_shift(*, v1: np.ndarray, vp: np.ndarray, rt: np.ndarray, ct: np.ndarray,
                 a: np.ndarray, ripple: np.ndarray) -> np.ndarray:
    """Shift of the firing instant for a supply ripple ΔV1: Δt ≈ a·ΔV1/(dv_C/dt at VP) [s]  [1].

    dv_C/dt = (V1 − VP)/(R_T·C_T); a [–] the peak-point fraction of the supply (η for the
    shortcut); v1, vp, ripple [V]; rt [Ω]; ct [F]. Small-signal: valid for ΔV1 ≪ V1 − VP.

    >>> round(float(ripple_shift(v1=30, vp=15.8, rt=46.728e3, ct=0.5e-6, a=0.51, ripple=1.0))
    ...       * 1e3, 3)
    0.839
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return a * ripple * rt * ct / (v1 - vp)


# ----------------------------------------------------------------------------- the checks

def window(*, v1: np.ndarray, vp: np.ndarray, vv: np.ndarray, ip: np.ndarray,
           iv: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The oscillation window for the timing resistor: (r_min, r_max) [Ω].

    r_min = (V1 − VV)/IV (below it the resistor holds the device on past the valley) and
    r_max = (V1 − VP)/IP (above it the resistor cannot supply IP at the peak)  [1, §9]; [2].
    v1, vp, vv [V]; ip, iv [A].

    >>> r_min, r_max = window(v1=12, vp=7.9941, vv=1, ip=10e-6, iv=10e-3)
    >>> round(float(r_min)), round(float(r_max) / 1e3, 1)
    (1100, 400.6)
    """
    return (v1 - vv) / iv, (v1 - vp) / ip


def window_check(*, device: str, v1: np.ndarray, rt: np.ndarray, vv: np.ndarray,
                 ip: np.ndarray, iv: np.ndarray, limits: Mapping[str, float],
                 rg: np.ndarray | float = np.nan, **p: np.ndarray) -> Outcome:
    """``osc.window``: is the timing resistor inside the oscillation window at every corner?

    r_min = (V1 − VV)/IV < R_T < r_max = (V1 − VP)/IP  [1, §9], [2]. Margin per row =
    min(R_T/r_min − 1, r_max/(k·R_T) − 1) with k = ``fail_below`` (1.2); marginal when
    R_T > r_max/``marginal_below`` (2). A NaN IV (no guaranteed valley current) fails: turn-off
    is not assured. For a PUT, ``rg`` [Ω] (the R_G the part data were taken at) is compared
    with R_GA∥R_GK and a mismatch over 10 % is noted. Units as in :func:`window`; rt [Ω].

    >>> out = window_check(device="ujt", v1=np.array([12.0]), rt=np.array([50e3]), vv=1.0,
    ...                    ip=10e-6, iv=10e-3, eta=0.6, rbb=5e3, r1=100.0, r2=0.0, vd=0.7,
    ...                    limits={"fail_below": 1.2, "marginal_below": 2.0})
    >>> out.status.tolist(), round(float(out.margin[0]), 3)
    ([0], 5.676)
    """
    vp = peak_voltage(device=device, v1=v1, **p)
    r_min, r_max = window(v1=v1, vp=vp, vv=vv, ip=ip, iv=iv)
    k_fail = float(limits.get("fail_below", 1.2))
    k_marg = float(limits.get("marginal_below", 2.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        low = rt / r_min - 1.0
        high = r_max / (k_fail * rt) - 1.0
    bad = np.isnan(r_min) | np.isnan(r_max) | (r_max <= 0)
    margin = np.where(bad, -1.0, np.minimum(low, high))
    status = np.where(bad | (rt <= r_min) | (rt * k_fail > r_max), FAIL,
                      np.where(rt * k_marg > r_max, MARGINAL, PASS)).astype(np.int8)
    notes = []
    if np.isnan(_arr(iv)).any():
        notes.append("no guaranteed valley current at this R_G: turn-off is not assured")
    rg = _arr(rg)
    if device == "put" and np.isfinite(rg).any():
        r_g = p["r_upper"] * p["r_lower"] / (p["r_upper"] + p["r_lower"])
        rel = np.abs(_arr(r_g) / rg - 1.0)
        if np.nanmax(rel) > 0.10:
            notes.append(f"IP and IV were taken at R_G = {float(np.ravel(rg)[0]) / 1e3:.3g} kΩ "
                         f"but this circuit has R_G = {float(np.ravel(r_g)[0]) / 1e3:.3g} kΩ: "
                         "enter the part's IP and IV for this R_G")
    return Outcome({"peak_voltage": vp, "r_min": r_min, "r_max": r_max, "timing_r": rt},
                   margin, status, notes)


def _coverage(lo_end: np.ndarray, hi_end: np.ndarray, t_lo: np.ndarray, t_hi: np.ndarray,
              rt: np.ndarray, rt_lo: np.ndarray, rt_hi: np.ndarray,
              lo_at_rt_lo: bool) -> np.ndarray:
    """Ratio ≥ 1 when the produced range [lo_end, hi_end] covers the target [t_lo, t_hi].

    Rows at an end of the R_T span carry the ratio of the end that R_T sets (so the worst
    corner names the R_T end at fault); other rows carry the smaller of the two.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        m_lo = np.where(lo_end > 0, t_lo / lo_end, np.where(t_lo > 0, np.inf, 1.0))
        m_hi = hi_end / t_hi
    both = np.minimum(m_lo, m_hi)
    m_at_lo, m_at_hi = (m_lo, m_hi) if lo_at_rt_lo else (m_hi, m_lo)
    return np.where(rt <= rt_lo, m_at_lo, np.where(rt >= rt_hi, m_at_hi, both))


def _inside(x: np.ndarray, t_lo: np.ndarray, t_hi: np.ndarray) -> np.ndarray:
    """Ratio ≥ 1 when x lies inside the target [t_lo, t_hi]."""
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.minimum(np.where(t_lo > 0, x / t_lo, np.inf), t_hi / x)


def timing_check(*, device: str, v1: np.ndarray, rt: np.ndarray, ct: np.ndarray,
                 vv: np.ndarray, r_discharge: np.ndarray, limits: Mapping[str, float],
                 sync: str = "free", adjustable: bool = False, rt_lo: np.ndarray | float = np.nan,
                 rt_hi: np.ndarray | float = np.nan, target_lo: np.ndarray | float = np.nan,
                 target_hi: np.ndarray | float = np.nan, line_v: np.ndarray | float = np.nan,
                 line_f: np.ndarray | float = np.nan, ripple: np.ndarray | float = np.nan,
                 **p: np.ndarray) -> Outcome:
    """``osc.timing``: the period (free-running) or the firing angle (line sync) and the target.

    Free-running: :func:`free_running` at V1 (line sync: at V1 = VZ, the rate inside the clamp
    window). Line sync: ``firing_angle`` by :func:`line_sync_firing_angle` with Vm = √2·line_v
    (line_v [V] RMS), ω = 2π·line_f (line_f [Hz]) and v1 = VZ  [1, §9], [2], [3].

    Target (``target_lo``, ``target_hi``; Hz free-running, rad line sync; NaN: none): with an
    ``adjustable`` R_T (ends ``rt_lo``, ``rt_hi`` [Ω]) the range the R_T span gives must cover
    the target at every corner; with a fixed R_T every corner must lie inside it. The metric is
    the smaller ratio of the two ends (≥ 1 passes), graded with ``fail_below``. Without a target
    only a device that never fires fails. ``ripple`` [V] adds ``ripple_shift`` [s].
    Other units as in :func:`free_running`; ct [F].

    >>> out = timing_check(device="ujt", v1=np.array([12.0]), rt=50e3, ct=0.1e-6, vv=1.0,
    ...     r_discharge=200.0, eta=0.6, rbb=5e3, r1=100.0, r2=0.0, vd=0.7, target_lo=150.0,
    ...     target_hi=250.0, limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> out.status.tolist(), round(float(out.values["frequency"][0]), 2)
    ([0], 196.38)
    """
    fr = free_running(device=device, v1=v1, rt=rt, ct=ct, vv=vv, r_discharge=r_discharge, **p)
    values = {k: fr[k] for k in ("period", "frequency", "charge_time", "discharge_time",
                                 "approx_period")}
    vp = fr["peak_voltage"]
    values["peak_voltage"] = vp
    a = divider_ratio(device=device, **p)
    t_lo, t_hi = _arr(target_lo), _arr(target_hi)
    has_target = bool(np.isfinite(t_lo).all() and np.isfinite(t_hi).all())
    notes: list[str] = []
    if sync == "line":
        vm, omega = np.sqrt(2.0) * _arr(line_v), 2.0 * np.pi * _arr(line_f)
        alpha = line_sync_firing_angle(device=device, vm=vm, omega=omega, vz=v1, rt=rt, ct=ct,
                                       **p)
        values["firing_angle"] = alpha
        values["firing_angle_shortcut"] = firing_angle_shortcut(vm=vm, omega=omega, vz=v1,
                                                                rt=rt, ct=ct, vp=vp)
        values["clamp_onset"] = clamp_onset(vm=vm, vz=v1) + 0.0 * alpha
        late = np.pi  # no pulse in the half-cycle: the SCR is not fired (as late as it gets)
        if adjustable:
            a_lo = line_sync_firing_angle(device=device, vm=vm, omega=omega, vz=v1, rt=rt_lo,
                                          ct=ct, **p)
            a_hi = line_sync_firing_angle(device=device, vm=vm, omega=omega, vz=v1, rt=rt_hi,
                                          ct=ct, **p)
            values["covered_lo"], values["covered_hi"] = a_lo, np.where(np.isnan(a_hi), late, a_hi)
            metric = _coverage(a_lo, values["covered_hi"], t_lo, t_hi, rt, rt_lo, rt_hi, True)
        else:
            metric = _inside(alpha, t_lo, t_hi)
        if not np.isfinite(alpha).all():
            notes.append("no firing in this half-cycle at some corners")
        # adjustable: the R_T max end may legitimately not fire (full off); R_T min must
        never = ~np.isfinite(values["covered_lo"] if adjustable else alpha)
    else:
        if adjustable:
            f_fast = free_running(device=device, v1=v1, rt=rt_lo, ct=ct, vv=vv,
                                  r_discharge=r_discharge, **p)["frequency"]
            f_slow = free_running(device=device, v1=v1, rt=rt_hi, ct=ct, vv=vv,
                                  r_discharge=r_discharge, **p)["frequency"]
            values["covered_lo"], values["covered_hi"] = f_slow, f_fast
            metric = _coverage(f_slow, f_fast, t_lo, t_hi, rt, rt_lo, rt_hi, False)
        else:
            metric = _inside(fr["frequency"], t_lo, t_hi)
        never = ~np.isfinite(fr["period"])
    if np.isfinite(_arr(ripple)).all():
        values["ripple_shift"] = ripple_shift(v1=v1, vp=vp, rt=rt, ct=ct, a=a, ripple=ripple)
    if has_target:
        margin, status = grade(metric, limits)
    else:
        margin = np.where(never, -1.0, np.nan)
        status = np.where(never, FAIL, PASS).astype(np.int8)
        notes.append("no target given: reported, not judged")
    status = np.where(never, FAIL, status).astype(np.int8)
    margin = np.where(never, -1.0, margin)
    return Outcome(values, margin, status, notes)


def idle_gate_check(*, device: str, vgd: np.ndarray, series_r: np.ndarray,
                    limits: Mapping[str, float], gate_cathode_r: np.ndarray | float = np.inf,
                    v1: np.ndarray | float = np.nan, rbb: np.ndarray | float = np.nan,
                    r1: np.ndarray | float = np.nan, r2: np.ndarray | float = 0.0,
                    ip: np.ndarray | float = np.nan,
                    cathode_r: np.ndarray | float = np.nan) -> Outcome:
    """``osc.idle-gate``: the idle voltage the oscillator leaves on a directly coupled gate.

    UJT: V_idle = R1·V1/(R1 + RBB + R2) (the interbase current through R1); at the gate with a
    gate–cathode resistor R_GKx: v_GK = V_idle·R_GKx/(R1∥(RBB + R2) + R_S + R_GKx)  [1, §9].
    PUT: the pre-firing anode current IP into R_K: v_GK = IP·(R_K∥(R_S + R_GKx))·R_GKx/
    (R_S + R_GKx), or IP·R_K without R_GKx. Metric VGD/v_GK graded with ``fail_below`` (1) and
    ``marginal_below`` (1.25, i.e. 0.8·VGD). gate_cathode_r = inf when none is fitted.

    vgd [V] at Tj,max; series_r, gate_cathode_r, rbb, r1, r2, cathode_r [Ω]; v1 [V]; ip [A].

    >>> out = idle_gate_check(device="ujt", vgd=0.2, series_r=0.0, v1=12.0, rbb=5e3, r1=100.0,
    ...                       r2=0.0, limits={"fail_below": 1.0, "marginal_below": 1.25})
    >>> round(float(out.values["idle_voltage"]), 3), out.status.tolist()
    (0.235, 2)
    """
    rgk = _arr(gate_cathode_r)
    fitted = np.isfinite(rgk)
    rgk_f = np.where(fitted, rgk, 1.0)
    if device == "ujt":
        v_idle = r1 * v1 / (r1 + rbb + r2)
        r_src = r1 * (rbb + r2) / (r1 + rbb + r2)
        v_gk = np.where(fitted, v_idle * rgk_f / (r_src + series_r + rgk_f), v_idle)
    else:
        v_idle = ip * cathode_r
        r_par = cathode_r * (series_r + rgk_f) / (cathode_r + series_r + rgk_f)
        v_gk = np.where(fitted, ip * r_par * rgk_f / (series_r + rgk_f), v_idle)
    with np.errstate(divide="ignore"):
        metric = np.where(v_gk > 0, vgd / v_gk, np.inf)
    margin, status = grade(metric, limits)
    return Outcome({"idle_voltage": v_gk, "vgd": vgd + 0.0 * v_gk,
                    "open_voltage": v_idle + 0.0 * v_gk}, margin, status)


def discharge_check(*, device: str, v1: np.ndarray, ct: np.ndarray,
                    limits: Mapping[str, float], r_pulse: np.ndarray,
                    series_r: np.ndarray | float = np.inf, turns: np.ndarray | float = 1.0,
                    rb1_on: np.ndarray | float = 0.0,
                    vf: np.ndarray | float = np.nan, current_rating: np.ndarray | float = np.nan,
                    energy_rating: np.ndarray | float = np.nan, **p: np.ndarray) -> Outcome:
    """``osc.discharge``: the capacitor's discharge against the device's ratings.

    UJT: i_pk = (VP − VD)/(r_on + R1′) against ``current_rating`` (ie_peak); PUT:
    i_pk = (VP − VF)/R_K′ against ``current_rating`` (itrm) and ½·C_T·VP² against
    ``energy_rating``  [1, §9]. R′ = R, or R∥n²·R_S when a gate loads the pulse resistor
    (``series_r``, inf when none; ``turns`` n the pulse transformer's ratio, 1 when
    DC-coupled: an ideal transformer reflects R_S as n²·R_S), the gate treated as a short
    (conservative). Metric = the smaller rating/stress
    ratio over the ratings given (NaN rating: not judged). pulse_energy is reported for both.

    v1, vf [V]; ct [F]; r_pulse [Ω] R1 or R_K; series_r, rb1_on [Ω]; current_rating [A];
    energy_rating [J]; peak_params as in :func:`peak_voltage`.

    >>> out = discharge_check(device="ujt", v1=30.0, ct=0.5e-6, r_pulse=100.0, rb1_on=10.0,
    ...     current_rating=2.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0, vd=0.5,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> round(float(out.values["peak_current"]) * 1e3, 1), out.status.tolist()
    (129.1, 0)
    """
    vp = peak_voltage(device=device, v1=v1, **p)
    s = _arr(series_r) * _arr(turns) ** 2
    r_eff = np.where(np.isfinite(s), r_pulse * s / (r_pulse + np.where(np.isfinite(s), s, 0.0)),
                     r_pulse)
    i_pk = (vp - p["vd"]) / (rb1_on + r_eff) if device == "ujt" else (vp - vf) / r_eff
    energy = 0.5 * ct * vp * vp
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.fmin(_arr(current_rating) / i_pk,
                         _arr(energy_rating) / energy if device == "put" else np.nan)
    margin, status = grade(metric, limits)
    return Outcome({"peak_current": i_pk, "pulse_energy": energy, "peak_voltage": vp},
                   margin, status)


def allowed_power(*, pd: np.ndarray, t_amb: np.ndarray) -> np.ndarray:
    """Power rating derated linearly from 25 °C to zero at 125 °C [W] (common practice).

    P_allowed = pd·(125 − T)/100 for 25 ≤ T ≤ 125 °C, pd below 25 °C, 0 above 125 °C.
    pd [W]; t_amb [K] the hottest ambient including the enclosure rise.

    >>> round(float(allowed_power(pd=0.3, t_amb=328.15)), 3)
    0.21
    """
    t_c = _arr(t_amb) - _T0C
    return pd * np.clip((125.0 - t_c) / 100.0, 0.0, 1.0)


def dissipation_check(*, device: str, v1: np.ndarray, pd: np.ndarray, t_max_ambient: np.ndarray,
                      t_max_rise: np.ndarray, limits: Mapping[str, float],
                      rt: np.ndarray | float = np.nan, ct: np.ndarray | float = np.nan,
                      vv: np.ndarray | float = np.nan, vf: np.ndarray | float = np.nan,
                      r_discharge: np.ndarray | float = np.nan, **p: np.ndarray) -> Outcome:
    """``osc.dissipation``: the device's dissipation against its derated rating.

    UJT: P = I_BB²·RBB with I_BB = V1/(RBB + R1 + R2) (the bar's own share; the resistors take
    the rest)  [1, §9]. PUT: P ≈ f·VF·C_T·(VP − VV), the charge per pulse times VF, at the
    free-running f (:func:`free_running`); the divider's V1²/(RGA + RGK) is returned as
    ``divider_power`` for the summary. Rating :func:`allowed_power` at T_a,max + ΔT_enc.
    Metric allowed/P graded with ``fail_below``.

    v1, vv, vf [V]; pd [W]; t_max_ambient [K]; t_max_rise [K]; rt, r_discharge [Ω]; ct [F];
    peak_params as in :func:`peak_voltage`.

    >>> out = dissipation_check(device="ujt", v1=30.0, pd=0.3, t_max_ambient=328.15,
    ...     t_max_rise=0.0, eta=0.51, rbb=5e3, r1=100.0, r2=654.0, vd=0.5,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> round(float(out.values["dissipation"]), 3), out.status.tolist()
    (0.136, 0)
    """
    allowed = allowed_power(pd=pd, t_amb=_arr(t_max_ambient) + t_max_rise)
    values: dict[str, np.ndarray] = {}
    if device == "ujt":
        ibb = v1 / (p["rbb"] + p["r1"] + p["r2"])
        power = ibb * ibb * p["rbb"]
        values["circuit_power"] = v1 * ibb
    else:
        fr = free_running(device=device, v1=v1, rt=rt, ct=ct, vv=vv, r_discharge=r_discharge,
                          **p)
        power = np.nan_to_num(fr["frequency"]) * vf * ct * (fr["peak_voltage"] - vv)
        values["divider_power"] = v1 * v1 / (p["r_upper"] + p["r_lower"])
    with np.errstate(divide="ignore"):
        metric = np.where(power > 0, allowed / power, np.inf)
    margin, status = grade(metric, limits)
    values |= {"dissipation": power, "allowed_power": allowed + 0.0 * power}
    return Outcome(values, margin, status, ["pd derated linearly to zero at 125 °C from 25 °C "
                                            "(assumed)"])


def leakage_check(*, device: str, v1: np.ndarray, rt: np.ndarray, ip: np.ndarray,
                  leakage: np.ndarray, ct: np.ndarray, limits: Mapping[str, float],
                  leakage_given: bool = True, **p: np.ndarray) -> Outcome:
    """``osc.leakage``: the charging current at the peak point against IP plus leakage.

    charge_current = (V1 − VP)/R_T; metric = charge_current/(IP + I_leak) graded with
    ``fail_below`` (1) and ``marginal_below`` (2)  [1, §9], [2]. Without leakage data
    (``leakage_given`` false, leakage 0) it says so; a C_T of 1 µF or more is flagged as a likely
    electrolytic with the common-practice leakage max(0.01·C[µF]·V µA, 3 µA).

    v1 [V]; rt [Ω]; ip, leakage [A]; ct [F]; peak_params as in :func:`peak_voltage`.

    >>> out = leakage_check(device="put", v1=30.0, rt=82.21e3, ip=5e-6, leakage=0.0, ct=0.5e-6,
    ...     r_upper=60e3, r_lower=30e3, offset=0.0, limits={"fail_below": 1.0,
    ...     "marginal_below": 2.0})
    >>> round(float(out.values["charge_current"]) * 1e6), out.status.tolist()
    (243, 0)
    """
    vp = peak_voltage(device=device, v1=v1, **p)
    i_ch = (v1 - vp) / rt
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = i_ch / (ip + leakage)
    margin, status = grade(metric, limits)
    notes = []
    if not leakage_given:
        notes.append("no leakage data: judged on IP alone")
        if np.any(_arr(ct) >= 1e-6):
            c_uf = float(np.max(ct)) * 1e6
            est = max(0.01 * c_uf * float(np.max(v1)), 3.0) * 1e-6
            worst = float(np.nanmin(i_ch / (ip + est)))
            notes.append(f"C_T ≥ 1 µF suggests an electrolytic: its typical leakage "
                         f"{est * 1e6:.3g} µA would leave a ratio of {worst:.3g}")
    return Outcome({"charge_current": i_ch, "ip": ip + 0.0 * i_ch, "leakage": leakage + 0.0 * i_ch,
                    "peak_voltage": vp}, margin, status, notes)


def base2_rule(*, eta: np.ndarray, v1: np.ndarray) -> np.ndarray:
    """Rule-of-thumb base-2 resistor for temperature compensation, R2 = 10⁴/(η·V1) [Ω]  [1].

    eta [–] nominal intrinsic standoff ratio; v1 [V]. A rule of thumb (it corresponds to
    k_D/TC_BB·R_BB = 10⁴ V·Ω).

    >>> round(float(base2_rule(eta=0.51, v1=30.0)), 1)
    653.6
    """
    return 1e4 / (eta * v1)


def base2_physical(*, eta: np.ndarray, rbb: np.ndarray, r1: np.ndarray, v1: np.ndarray,
                   tc_bb: np.ndarray, k_d: float = 2e-3) -> np.ndarray:
    """Base-2 resistor that makes dVP/dT = 0, solved exactly [Ω].

    From VP = VD + V1·(η·RBB + R1)/(RBB + R1 + R2) with dVD/dT = −k_D and dRBB/dT = TC_BB·RBB:
    η·R2 − (1 − η)·R1 = k_D·(RBB + R1 + R2)²/(V1·TC_BB·RBB), the smaller root of that quadratic
    in R2; NaN where it has none. The small-resistor form is
    R2 ≈ (k_D/TC_BB)·RBB/(η·V1) + (1 − η)·R1/η  [1, §9].

    eta [–]; rbb, r1 [Ω]; v1 [V]; tc_bb [1/K]; k_d [V/K] (about 2 mV/K, common practice).

    >>> round(float(base2_physical(eta=0.51, rbb=7e3, r1=100.0, v1=30.0, tc_bb=0.005)))
    301
    """
    c = k_d / (v1 * tc_bb * rbb)
    s = rbb + r1
    # c·(s + x)² − η·x + (1 − η)·R1 = 0  →  c·x² + (2cs − η)·x + c·s² + (1 − η)·R1 = 0
    qa, qb, qc = c, 2 * c * s - eta, c * s * s + (1 - eta) * r1
    disc = qb * qb - 4 * qa * qc
    with np.errstate(invalid="ignore"):
        return np.where(disc >= 0, (-qb - np.sqrt(np.maximum(disc, 0.0))) / (2 * qa), np.nan)


def temp_comp_check(*, eta: np.ndarray, v1: np.ndarray, r2: np.ndarray,
                    limits: Mapping[str, float], rbb: np.ndarray | float = np.nan,
                    r1: np.ndarray | float = np.nan,
                    tc_bb: np.ndarray | float = np.nan) -> Outcome:
    """``osc.temp-comp`` (UJT, advisory): base-2 resistor against the rule of thumb.

    Pass inside ``low``·R2,rule … ``high``·R2,rule (0.3–3) with R2,rule = :func:`base2_rule`
    at the nominal η; otherwise marginal, never fail  [1]. Metric = min(R2/(low·rule),
    high·rule/R2); margin = metric − 1. With ``tc_bb`` the physical value
    (:func:`base2_physical`) is returned as ``base2_r_physical`` for the summary.

    eta [–]; v1 [V]; r2, rbb, r1 [Ω]; tc_bb [1/K].

    >>> out = temp_comp_check(eta=0.51, v1=30.0, r2=654.0, limits={"low": 0.3, "high": 3.0})
    >>> round(float(out.values["base2_r_rule"]), 1), out.status.tolist()
    (653.6, 0)
    """
    low = float(limits.get("low", 0.3))
    high = float(limits.get("high", 3.0))
    rule = base2_rule(eta=eta, v1=v1)
    r2 = _arr(r2)
    with np.errstate(divide="ignore"):
        metric = np.minimum(r2 / (low * rule), np.where(r2 > 0, high * rule / r2, np.inf))
    status = cap_status(np.where(metric >= 1.0, PASS, MARGINAL), MARGINAL)
    values = {"base2_r": r2 + 0.0 * rule, "base2_r_rule": rule}
    if np.isfinite(_arr(tc_bb)).all():
        values["base2_r_physical"] = base2_physical(eta=eta, rbb=rbb, r1=r1, v1=v1, tc_bb=tc_bb)
    return Outcome(values, metric - 1.0, status)
