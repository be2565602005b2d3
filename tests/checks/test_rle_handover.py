"""A fully controlled bridge with an R–L–E load fired before the line exceeds E (α < θ1): the
current that starts at θ1 may still flow at α + π, where the other pair fires and takes it
over, so the periodic state starts at α with a current. Compared with an independent
time-domain solution (scipy solve_ivp) of the bridge with ideal switches written here."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import harmonics, rle

REL = 5e-3  # 0.5 %


def simulate(alpha: float, phi: float, m: float, freewheel: bool = False,
             topology: str = "bridge", periods: int = 24) -> dict[str, float]:
    """Per unit (Vm = 1, Z = 1: R = cos φ, ωL = sin φ, E = m), ideal SCRs and diodes. Each
    SCR (pair) is gated from its firing angle for half a cycle (a pulse train): pair 1 over
    [α, α + π), pair 2 of a bridge over [α + π, α + 2π). A gated SCR conducts when it is
    forward-biased: with current flowing (through the other pair or the freewheeling diode)
    it takes the current over at once at its pulse (its line polarity is the higher one
    there), from zero current once its line polarity exceeds E. A conducting SCR stays on
    while the current is positive; with a freewheeling diode the diode takes the current when
    the line reverses (load at 0 V). The last 2π is measured: load current mean/RMS, load
    voltage mean/RMS, SCR 1's current mean/RMS/peak, and the line current (SCR 1's current,
    minus pair 2's) on a uniform grid, each piece from its dense solution."""
    r, x = np.cos(phi), np.sin(phi)
    step = np.pi if topology == "bridge" else 2 * np.pi
    acc = dict(i1=0.0, i2=0.0, v1=0.0, v2=0.0, s1=0.0, s2=0.0)
    peak = 0.0
    n_win = int(round(periods * 2 * np.pi / step))
    first = n_win - int(round(2 * np.pi / step))  # the windows of the last cycle
    line_t: list[np.ndarray] = []
    line_i: list[np.ndarray] = []

    def add(n: int, tt: np.ndarray, ii: np.ndarray, vv: np.ndarray, pair: float) -> None:
        nonlocal peak
        if n < first or tt.size < 2:
            return
        sc = ii if pair > 0 else 0 * ii
        for key, y in (("i1", ii), ("i2", ii**2), ("v1", vv), ("v2", vv**2),
                       ("s1", sc), ("s2", sc**2)):
            acc[key] += np.trapezoid(y, tt)
        peak = max(peak, float(np.max(sc)))
        line_t.append(tt)
        line_i.append(pair * ii)

    def crossing(t: float, t_end: float, g) -> float | None:
        """First θ in [t, t_end] where g(θ) > 0 (grid, then bisection); None if none."""
        grid = np.linspace(t, t_end, 20001)
        pos = g(grid) > 0
        if not pos.any():
            return None
        j = int(np.argmax(pos))
        if j == 0:
            return t
        lo, hi = grid[j - 1], grid[j]
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            lo, hi = (lo, mid) if g(mid) > 0 else (mid, hi)
        return hi

    i, mode = 0.0, "off"
    for n in range(n_win):
        s = 1.0 if (topology != "bridge" or n % 2 == 0) else -1.0
        t, t_end = alpha + n * step, alpha + (n + 1) * step
        gate_end = t + np.pi
        if i > 0.0:
            mode = "scr"  # the pulse takes the flowing current over
        while t < t_end - 1e-12:
            if mode == "off":
                start = None
                if t < gate_end:
                    start = crossing(t, min(gate_end, t_end),
                                     lambda th, s=s: s * np.sin(th) - m)
                stop = t_end if start is None else start
                tt = np.linspace(t, stop, 200)
                add(n, tt, 0 * tt, m + 0 * tt, 0.0)
                t = stop
                mode = "scr" if start is not None else "off"
                continue
            if mode == "scr":
                def rhs(th, y, s=s):
                    return [(s * np.sin(th) - r * y[0] - m) / x]
                src = s
            else:
                def rhs(th, y):
                    return [(-r * y[0] - m) / x]
                src = 0.0

            def zero(th, y):
                return y[0] + 1e-13
            zero.terminal, zero.direction = True, -1

            def vzero(th, y, s=s):
                return s * np.sin(th)
            vzero.terminal, vzero.direction = True, -1
            events = [zero, vzero] if (freewheel and mode == "scr") else [zero]
            sol = solve_ivp(rhs, (t, t_end), [max(i, 0.0)], events=events, rtol=1e-11,
                            atol=1e-13, dense_output=True, max_step=0.005)
            tt = np.linspace(t, sol.t[-1], 8001)
            ii = np.maximum(sol.sol(tt)[0], 0.0)
            add(n, tt, ii, src * np.sin(tt), s if mode == "scr" else 0.0)
            t = float(sol.t[-1])
            i = max(float(sol.y[0][-1]), 0.0)
            if sol.status == 1:
                if events is not None and len(events) == 2 and sol.t_events[1].size:
                    mode = "fw"
                else:
                    i, mode = 0.0, "off"
    w = 2 * np.pi
    order = np.argsort(np.concatenate([tt[:1] for tt in line_t]), kind="stable")
    tl = np.concatenate([line_t[j] for j in order])
    il = np.concatenate([line_i[j] for j in order])
    return {"idc": acc["i1"] / w, "irms": np.sqrt(acc["i2"] / w), "vdc": acc["v1"] / w,
            "vrms": np.sqrt(acc["v2"] / w), "it_av": acc["s1"] / w,
            "it_rms": np.sqrt(acc["s2"] / w), "it_peak": peak, "line_t": tl, "line_i": il}


# (α°, φ°, m): fired before θ1 = asin m with a current from θ1 that is still flowing at α + π.
HANDOVER = [
    # the handed current dies before θ1: discontinuous, the pair starts again at θ1
    (2.0, 60.0, 0.55), (8.0, 40.0, 0.4), (8.0, 80.0, 0.6), (16.0, 65.0, 0.5),
    (6.0, 30.0, 0.35),
    # the handed current outlasts θ1: continuous at α
    (15.0, 80.0, 0.5), (5.0, 60.0, 0.5), (10.0, 75.0, 0.3),
]


# Half-controlled bridge (and half-wave) with a freewheeling diode: the diode's current still
# flows at the next pulse, the SCR takes it over on a line below E and it ends before θ1.
HANDOVER_FW = [("bridge", 4.0, 55.0, 0.5), ("bridge", 2.0, 20.0, 0.25),
               ("half-wave", 0.5, 70.0, 0.15), ("bridge", 10.0, 75.0, 0.3)]

KEYS = ("idc", "irms", "vdc", "vrms", "it_av", "it_rms", "it_peak")


@pytest.fixture(scope="module")
def references() -> dict[tuple, dict[str, float]]:
    out = {}
    for a, p, m in HANDOVER:
        out[("bridge", False, a, p, m)] = simulate(np.radians(a), np.radians(p), m)
    for topo, a, p, m in HANDOVER_FW:
        out[(topo, True, a, p, m)] = simulate(np.radians(a), np.radians(p), m, freewheel=True,
                                              topology=topo)
    return out


@pytest.mark.parametrize("alpha_deg,phi_deg,m", HANDOVER)
def test_handover_against_solve_ivp(references, alpha_deg, phi_deg, m):
    alpha, phi = np.radians(alpha_deg), np.radians(phi_deg)
    assert alpha < np.arcsin(m)
    ref = references[("bridge", False, alpha_deg, phi_deg, m)]
    w = rle.waveform_pu(topology="bridge", freewheel=False, alpha=alpha, phi=phi, m=m)
    for key in KEYS:
        assert float(w[key]) == pytest.approx(ref[key], rel=REL, abs=1e-5), key


@pytest.mark.parametrize("topology,alpha_deg,phi_deg,m", HANDOVER_FW)
def test_freewheel_handover_against_solve_ivp(references, topology, alpha_deg, phi_deg, m):
    alpha, phi = np.radians(alpha_deg), np.radians(phi_deg)
    ref = references[(topology, True, alpha_deg, phi_deg, m)]
    w = rle.waveform_pu(topology=topology, freewheel=True, alpha=alpha, phi=phi, m=m)
    for key in KEYS:
        assert float(w[key]) == pytest.approx(ref[key], rel=REL, abs=1e-5), key


def test_cases_cover_the_handover_states():
    """The simulated cases include both hand-over states: a tail that ends before θ1 and a
    current that never stops."""
    a, p, m = (np.radians([c[0] for c in HANDOVER]), np.radians([c[1] for c in HANDOVER]),
               np.array([c[2] for c in HANDOVER]))
    w = rle.waveform_pu(topology="bridge", freewheel=False, alpha=a, phi=p, m=m)
    assert (w["handed"] > 0).sum() >= 3 and (w["continuous"] > 0).sum() >= 2
    assert np.all((w["tail_b"] < w["theta1"]) | (w["handed"] == 0))


def test_one_array_call_equals_row_by_row():
    """Every case in one call (mixed states, topologies broadcast) gives the rows' values."""
    a, p, m = np.meshgrid(np.radians([0, 3, 8, 15, 40]), np.radians([20, 55, 80]),
                          [0.2, 0.5, 0.7], indexing="ij")
    for fw in (False, True):
        w = rle.waveform_pu(topology="bridge", freewheel=fw, alpha=a, phi=p, m=m)
        for j in np.ndindex(a.shape):
            one = rle.waveform_pu(topology="bridge", freewheel=fw, alpha=a[j], phi=p[j],
                                  m=m[j])
            for key in KEYS:
                assert float(w[key][j]) == pytest.approx(float(one[key]), rel=1e-12,
                                                         abs=1e-14)
        # steady state: V_dc = E + R·I_dc (R = cos φ per unit), the tail included
        np.testing.assert_allclose(w["vdc"], m + np.cos(p) * w["idc"], atol=1e-9)


@pytest.mark.parametrize("alpha_deg,phi_deg,m", [HANDOVER[0], HANDOVER[3], HANDOVER[5]])
def test_line_harmonics_against_fft(references, alpha_deg, phi_deg, m):
    """The line current's spectrum (power.harmonics) against an FFT of the simulated one."""
    ref = references[("bridge", False, alpha_deg, phi_deg, m)]
    tt, ii = ref["line_t"], ref["line_i"]
    n_fft = 1 << 15
    grid = tt[0] + 2 * np.pi * np.arange(n_fft) / n_fft
    sampled = np.interp(grid, tt, ii)
    spec = np.fft.rfft(sampled) / n_fft
    # rotate to θ = 0 (the grid starts at tt[0]); RMS of order n = √2·|c_n|
    orders = np.arange(1, 12, 2)
    fft_rms = np.sqrt(2.0) * np.abs(spec[orders])
    w = rle.waveform_pu(topology="bridge", freewheel=False, alpha=np.radians(alpha_deg),
                        phi=np.radians(phi_deg), m=m)
    wf = dict(w, phi=np.radians(phi_deg), vm=1.0, z=1.0)
    out = harmonics.harmonics_check(waveform=wf, topology="bridge", freewheel=False,
                                    limits={})
    ours = np.array([float(out.values[f"i_h{n}"]) for n in orders])
    np.testing.assert_allclose(ours, fft_rms, rtol=REL, atol=2e-4 * fft_rms[0])
    line_rms = np.sqrt(np.mean(sampled**2))
    assert float(out.values["line_current"]) == pytest.approx(line_rms, rel=REL)


@pytest.mark.parametrize("topology,freewheel,alpha_deg,phi_deg,m", [
    ("bridge", False, *HANDOVER[0]), ("bridge", False, *HANDOVER[5]),
    ("bridge", True, *HANDOVER_FW[0][1:]), ("half-wave", True, *HANDOVER_FW[2][1:])])
def test_plotted_waveform_matches_the_simulation(references, topology, freewheel,
                                                  alpha_deg, phi_deg, m):
    """The workbook's waveform of one cycle integrates to the simulated means and RMS."""
    ref = references[(topology, freewheel, alpha_deg, phi_deg, m)]
    omega = 2 * np.pi * 50
    phi = np.radians(phi_deg)
    r, l_ = 1.0, np.tan(phi) / omega  # Z = 1/cos φ: per unit current × cos φ
    vs = 1 / np.sqrt(2)
    th, v, i = rle.load_waveform(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l_,
                                 omega=omega, alpha=np.radians(alpha_deg), e=m, points=200_001)
    z = np.hypot(r, omega * l_)
    two_pi = 2 * np.pi
    assert np.trapezoid(i, th) / two_pi * z == pytest.approx(ref["idc"], rel=REL)
    assert np.sqrt(np.trapezoid(i * i, th) / two_pi) * z == pytest.approx(ref["irms"],
                                                                          rel=REL)
    assert np.trapezoid(v, th) / two_pi == pytest.approx(ref["vdc"], rel=REL)
