"""Line-current harmonics and power factor of phase control, in closed form.

The line current of every phase-controlled stage is made of SCR conduction segments

    i(θ) = (Vm/Z)·[sin(θ − φ) − k + C·e^(−(θ − a)/tan φ)]   on (a, b),

(k the back EMF in units of E/R, 0 without one), once per cycle (half-wave) or twice with
alternating sign (bridge, ac-switch; a half-controlled bridge's freewheeling current stays in
the diode leg, off the line). The Fourier coefficient of each piece is an exact integral of
complex exponentials, so the spectrum up to any order comes without sampling or aliasing:

    c_n = (1/π)·∫ i(θ)·e^(−jnθ) dθ over one cycle,  I_n = |c_n|/√2 (RMS),  I_0 = c_0/2.

With a sinusoidal line voltage only the fundamental carries power:
displacement factor cos φ1 = −Im(c_1)/|c_1| (the voltage is sin θ), distortion factor I_1/I,
power factor = their product, THD = √(Σ_{n=2..40} I_n²)/I_1 (the orders the limits table uses).

The limits of IEC 61000-3-2 (Table 1, Class A: equipment up to 16 A per phase on 220–240 V
public low-voltage systems) are facts of that public standard; Class B is 1.5 × Class A. A
comparison here is an engineering estimate from the ideal waveform that shows where a design
stands. It is never a compliance test, which needs the standard's source, test conditions and
measuring equipment.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §11 (AC
    voltage controllers: Fourier analysis of the output, input power factor, Ex 11.1).
[2] N. Mohan, T. M. Undeland & W. P. Robbins, *Power Electronics: Converters, Applications, and
    Design*, ch. 5–6 (line-current harmonics, displacement and distortion factors).
[3] IEC 61000-3-2, *Electromagnetic compatibility — Limits for harmonic current emissions
    (equipment input current ≤ 16 A per phase)*, Table 1 (Class A), Table 2 (Class B).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

import numpy as np

from checks.core import MARGINAL, Outcome, cap_status, distinct_rows, grade

ORDERS = np.arange(0, 41)  # DC and the harmonics up to the 40th


def class_a_limits() -> np.ndarray:
    """IEC 61000-3-2 Table 1 (Class A) maximum harmonic currents [A RMS] for orders 0..40
    (inf where the table sets none: DC and the fundamental)  [3].

    Odd: 3 → 2.30, 5 → 1.14, 7 → 0.77, 9 → 0.40, 11 → 0.33, 13 → 0.21, 15 ≤ n ≤ 39 →
    0.15·15/n. Even: 2 → 1.08, 4 → 0.43, 6 → 0.30, 8 ≤ n ≤ 40 → 0.23·8/n.

    >>> lim = class_a_limits()
    >>> lim[[2, 3, 5, 15, 21, 40]].round(4).tolist()
    [1.08, 2.3, 1.14, 0.15, 0.1071, 0.046]
    """
    lim = np.full(ORDERS.shape, np.inf)
    fixed = {2: 1.08, 3: 2.30, 4: 0.43, 5: 1.14, 6: 0.30, 7: 0.77, 9: 0.40, 11: 0.33,
             13: 0.21}
    for n, v in fixed.items():
        lim[n] = v
    odd = np.arange(15, 40, 2)
    lim[odd] = 0.15 * 15 / odd
    even = np.arange(8, 41, 2)
    lim[even] = 0.23 * 8 / even
    return lim


def _f(m: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """∫_a^b e^(jmθ) dθ for integer m (b − a where m = 0)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        val = (np.exp(1j * m * b) - np.exp(1j * m * a)) / (1j * m)
    return np.where(m == 0, (b - a) + 0j, val)


def segment_coefficients(*, a: np.ndarray, b: np.ndarray, c: np.ndarray, phi: np.ndarray,
                         k: np.ndarray | float = 0.0,
                         orders: np.ndarray = ORDERS) -> np.ndarray:
    """∫_a^b [sin(θ − φ) − k + C·e^(−(θ − a)/tan φ)]·e^(−jnθ) dθ for every order n [per unit].

    Closed form, with E(θ) = e^(−jnθ): the sine gives E(b)·G(b − φ) − E(a)·G(a − φ),
    G(u) = −(cos u + j·n·sin u)/(1 − n²) (for n = ±1 the term with F(0) = b − a instead, from
    sin(θ − φ) = [e^(j(θ−φ)) − e^(−j(θ−φ))]/2j and F(m) = ∫_a^b e^(jmθ) dθ); the constant gives
    −k·(E(b) − E(a))/(−jn) (−k·(b − a) for n = 0); the exponential
    C·τ·(E(a) − e^(−L/τ)·E(b))/(1 + jnτ), τ = tan φ, L = b − a (0 for τ = 0 or b ≤ a).
    a, b, phi [rad]; c, k [per unit]; rows broadcast against orders on a new last axis. Two
    complex exponentials per row and order (E at a and at b) serve every term.

    >>> co = segment_coefficients(a=0.0, b=np.pi, c=0.0, phi=0.0, orders=np.array([1]))
    >>> np.round(co / np.pi, 12).tolist()  # half a sine: c_1 = −j/2 per cycle-π
    [-0.5j]
    """
    a, b, c, phi, k = (np.asarray(x, dtype=float)[..., None] for x in (a, b, c, phi, k))
    n = np.asarray(orders)
    nf = n.astype(float)
    tau = np.tan(np.clip(phi, 0.0, np.arctan(1e12)))
    unit = np.abs(n) == 1  # 1 − n² = 0: those orders take the F(0) form below
    with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
        ea, eb = np.exp(-1j * nf * a), np.exp(-1j * nf * b)  # E(a), E(b)
        g = np.where(unit, 0.0, -1.0 / (1.0 - nf * nf))
        gn = g * nf
        ua, ub = a - phi, b - phi
        total = eb * (np.cos(ub) * g + 1j * (np.sin(ub) * gn))
        total -= ea * (np.cos(ua) * g + 1j * (np.sin(ua) * gn))
        # the constant: −k·(E(b) − E(a))/(−jn) = −j·k·(E(b) − E(a))/n
        zero = n == 0
        kn = np.where(zero, 0.0, k / np.where(zero, 1.0, nf))
        total -= 1j * kn * (eb - ea)
        if zero.any():
            total[..., zero] -= k * (b - a)
        # the exponential, only where τ > 0 and the segment has a length
        live = (tau > 1e-12) & (b > a)
        safe = np.where(live, tau, 1.0)
        decay = np.exp(-np.where(live, b - a, 0.0) / safe)
        weight = np.where(live, c * safe, 0.0)
        total += weight * (ea - decay * eb) / (1.0 + 1j * nf * safe)
        if unit.any():
            m = n[unit]
            total[..., unit] += (np.exp(-1j * phi) * _f(1 - m, a, b)
                                 - np.exp(1j * phi) * _f(-1 - m, a, b)) / 2j
    return total


#: Rows of distinct segments worked at once: a block's complex temporaries (16 B per row and
#: order) then stay in a core's cache; a Monte Carlo chunk of 7000 rows took 1.5× as long
#: in one piece. The same numbers as in one piece (bit for bit on the demos and a Monte Carlo
#: run; numpy's complex loops may round the last bit differently by array size).
_BLOCK = 2048


def _blocked(cols: list[np.ndarray], n: np.ndarray) -> np.ndarray:
    """:func:`segment_coefficients` of the distinct rows ``cols`` (a, b, c, φ, k), by blocks."""
    a, b, c, p, k = cols
    if a.size <= 2 * _BLOCK:
        return segment_coefficients(a=a, b=b, c=c, phi=p, k=k, orders=n)
    return np.concatenate([segment_coefficients(a=a[i:i + _BLOCK], b=b[i:i + _BLOCK],
                                                c=c[i:i + _BLOCK], phi=p[i:i + _BLOCK],
                                                k=k[i:i + _BLOCK], orders=n)
                           for i in range(0, a.size, _BLOCK)])


def spectrum(*, seg_a: np.ndarray, seg_b: np.ndarray, seg_c: np.ndarray, phi: np.ndarray,
             offset: np.ndarray | float, symmetric: bool, amplitude: np.ndarray,
             orders: np.ndarray = ORDERS) -> np.ndarray:
    """Complex Fourier coefficients c_n of the line current [A peak; c_0 is twice the mean].

    One segment per cycle (``symmetric`` False: half-wave), or the segment and its negative
    half a cycle later (``symmetric``: bridge, ac-switch), which doubles the odd orders and
    cancels the even ones. ``amplitude`` = Vm/Z [A].

    >>> c = spectrum(seg_a=np.pi / 2, seg_b=np.pi, seg_c=0.0, phi=0.0, offset=0.0,
    ...              symmetric=True, amplitude=1.0, orders=np.array([3, 5]))
    >>> np.abs(c).round(4).tolist()  # R load at 90°: 1/π and 1/(3π)
    [0.3183, 0.1061]
    """
    n = np.asarray(orders)
    cols, back = distinct_rows(seg_a, seg_b, seg_c, phi, offset)
    if not symmetric:
        co = _blocked(cols, n)[back]
        return co * np.asarray(amplitude, dtype=float)[..., None] / np.pi
    # The negative copy half a cycle later cancels every even order exactly (1 − e^(−jπn) = 0
    # for even n, up to the rounding of π): only the odd orders are worked, half the cost; the
    # even ones are 0 (NaN where the row is NaN), the odd ones bit for bit as on all orders.
    odd = np.abs(n) % 2 == 1
    part = _blocked(cols, n[odd])[back]
    part = part * (1 - np.exp(-1j * np.pi * n[odd]))
    part = part * np.asarray(amplitude, dtype=float)[..., None] / np.pi
    co = np.zeros(part.shape[:-1] + n.shape, dtype=complex)
    co[..., odd] = part
    if part.shape[-1]:
        co[..., ~odd] = 0.0 * part[..., :1]
    return co


def line_quality(*, coeffs: np.ndarray, line_rms: np.ndarray) -> dict[str, np.ndarray]:
    """Harmonic RMS currents and the factors from coefficients (:func:`spectrum`, orders
    0..40) and the exact line RMS current [A]: ``harmonics`` [A RMS, orders 0..40; order 0 the
    mean], ``fundamental``, ``thd`` (orders 2..40), ``displacement_factor``,
    ``distortion_factor``, ``power_factor``.

    >>> c = spectrum(seg_a=np.pi / 2, seg_b=np.pi, seg_c=0.0, phi=0.0, offset=0.0,
    ...              symmetric=True, amplitude=1.0)
    >>> q = line_quality(coeffs=c, line_rms=0.5)
    >>> round(float(q["power_factor"]), 4), round(float(q["displacement_factor"]), 4)
    (0.7071, 0.8436)
    """
    h = np.abs(coeffs) / np.sqrt(2.0)
    h[..., 0] = np.abs(coeffs[..., 0].real) / 2
    i1 = h[..., 1]
    c1 = coeffs[..., 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        disp = np.where(i1 > 0, -c1.imag / np.abs(c1), np.nan)
        dist = np.where(line_rms > 0, i1 / line_rms, np.nan)
        thd = np.where(i1 > 0, np.sqrt(np.sum(h[..., 2:] ** 2, axis=-1)) / i1, np.nan)
    return {"harmonics": h, "fundamental": i1, "thd": thd, "displacement_factor": disp,
            "distortion_factor": dist, "power_factor": disp * dist}


def harmonics_check(*, waveform: Mapping[str, np.ndarray], topology: str, freewheel: bool,
                    limits: Mapping[str, float]) -> Outcome:
    """``power.harmonics``: the line current's harmonics against the Class A table [3].

    ``waveform`` holds the SI stage values of :func:`checks.power.stage_values` (or
    :func:`checks.rle.stage_values`): ``seg_a``, ``seg_b``, ``seg_c``, ``phi``, ``vm``,
    ``it_rms`` and optionally ``offset``, plus ``z`` [Ω]. Metric = min over n of
    class_factor·limit_n/I_n, graded with ``fail_below``/``marginal_below``; with
    ``advisory`` = 1 the status is at worst marginal (an estimate, never a compliance test).
    Rows whose line current exceeds 16 A RMS are outside the table's scope (``in_scope`` 0):
    they are still graded against it, so a larger current never reads better.
    Values: ``line_current``, ``thd``, ``displacement_factor``,
    ``distortion_factor``, ``power_factor``, ``limit_ratio`` (the metric), ``worst_order``,
    and ``i_h0`` … ``i_h40`` [A RMS].
    """
    w = waveform
    symmetric = topology != "half-wave"
    offset = w.get("offset", 0.0)
    amp = np.asarray(w["vm"], dtype=float) / np.asarray(w["z"], dtype=float)
    co = spectrum(seg_a=w["seg_a"], seg_b=w["seg_b"], seg_c=w["seg_c"], phi=w["phi"],
                  offset=offset, symmetric=symmetric, amplitude=amp)
    if "handed" in w and np.any(np.asarray(w["handed"]) > 0):
        # A bridge fired before θ1 that takes a current over at α + π: each SCR also carries
        # the tail (α, γ) of that current (checks.rle.waveform_pu).
        co = co + spectrum(seg_a=w["tail_a"], seg_b=w["tail_b"], seg_c=w["tail_c"],
                           phi=w["phi"], offset=offset, symmetric=symmetric, amplitude=amp)
    pieces = 2.0 if symmetric else 1.0
    line_rms = np.sqrt(pieces) * np.asarray(w["it_rms"], dtype=float)
    q = line_quality(coeffs=co, line_rms=line_rms)
    h = q["harmonics"]
    lim = class_a_limits() * float(limits.get("class_factor", 1.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        ratios = np.where(h > 1e-12, lim / h, np.inf)
    ratios[..., :2] = np.inf
    worst = np.argmin(ratios, axis=-1)
    metric = np.min(ratios, axis=-1)
    # Above 16 A per phase the table is out of its scope; the rows are still graded against
    # it (a larger current must never read better), and the summary says so.
    in_scope = line_rms <= 16.0
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    if float(limits.get("advisory", 1.0)) >= 0.5:
        status = cap_status(status, MARGINAL)
    values = {"line_current": line_rms, "thd": q["thd"],
              "displacement_factor": q["displacement_factor"],
              "distortion_factor": q["distortion_factor"], "power_factor": q["power_factor"],
              "limit_ratio": np.where(np.isfinite(metric), metric, np.nan),
              "worst_order": worst.astype(float),
              "in_scope": in_scope.astype(float)}
    values.update({f"i_h{n}": h[..., n] for n in ORDERS})
    return Outcome(values, margin, status)


_GOLDEN = 0.5 * (np.sqrt(5.0) - 1.0)


def refine_min(f: Callable[[np.ndarray], np.ndarray], x: np.ndarray, lo: float, hi: float,
               half: float, points: int = 9, steps: int = 40) -> tuple[np.ndarray, np.ndarray]:
    """The least of f over [x − half, x + half] ∩ [lo, hi], for every row at once:
    ``points`` samples of the interval, then golden-section steps on the bracket of the best
    sample and its neighbours (the bracket shrinks by 0.618 a step, 40 steps: 4e-9 of it).
    f maps an array of x (one per row) to one value per row. Returns (x_min, f_min); f_min
    is never above f at the samples or at x itself.

    >>> x, v = refine_min(lambda t: (t - 0.3) ** 2, np.array([0.0]), -1.0, 1.0, 0.5)
    >>> round(float(x[0]), 6), float(v[0]) < 1e-12
    (0.3, True)
    """
    x = np.asarray(x, dtype=float)
    a0 = np.clip(x - half, lo, hi)
    b0 = np.clip(x + half, lo, hi)
    frac = np.linspace(0.0, 1.0, points)
    grid = a0[:, None] + (b0 - a0)[:, None] * frac
    vals = np.stack([f(grid[:, k]) for k in range(points)], axis=1)
    k = np.argmin(np.where(np.isnan(vals), np.inf, vals), axis=1)
    rows = np.arange(x.size)
    best_x, best_v = grid[rows, k], vals[rows, k]
    a = grid[rows, np.maximum(k - 1, 0)]
    b = grid[rows, np.minimum(k + 1, points - 1)]
    def fv(t: np.ndarray) -> np.ndarray:
        v = np.asarray(f(t), dtype=float)
        return np.where(np.isnan(v), np.inf, v)

    c = b - _GOLDEN * (b - a)
    d = a + _GOLDEN * (b - a)
    fc, fd = fv(c), fv(d)
    for _ in range(steps):
        left = fc < fd  # the least lies in [a, d]
        a, b = np.where(left, a, c), np.where(left, d, b)
        p = np.where(left, b - _GOLDEN * (b - a), a + _GOLDEN * (b - a))
        fp = fv(p)
        c, d = np.where(left, p, d), np.where(left, c, p)
        fc, fd = np.where(left, fp, fd), np.where(left, fc, fp)
    for t, ft in ((c, fc), (d, fd)):
        better = ft < best_v
        best_x, best_v = np.where(better, t, best_x), np.where(better, ft, best_v)
    return best_x, best_v
