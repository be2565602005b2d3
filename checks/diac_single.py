"""The running firing angle of a single RC section, every row at once, with few passes.

The same periodic state as :func:`checks.diac.running_excess` (one capacitor: the 2×2
network collapses to one exponential), solved the same way — the first root of the excess over
(floor, π) bracketed on a grid of the half-cycle, then narrowed by false position (Illinois)
— but without a nested root find in every step: with an R–L load the current's zero β(α)
is solved by a Newton iteration on all grid points at once from a linear first guess, and in
the narrowing warm-started from the bracket's ends, which the iteration keeps.

For φ < α < π the load current is positive at π and negative at π + φ (the transient term
sin(α − φ)·e^(…) only pulls it down from the steady sin(θ − φ)), so β lies in (π, π + φ]
and the safeguarded Newton iteration (:func:`extinction`) has a sign change to keep.

References
----------
[1] M. H. Rashid, *Power Electronics*, 4th ed., §10–11 (the R–L current and its extinction
    angle).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

_F_TOL = 1e-12  # excess [V] per volt of VBO at which a row's narrowing stops
_TOL = 4e-15  # [rad] Newton step at which β has converged (as checks.rl)
_GRID_NEWTON = 4  # Newton steps for β on the grid (bracketing only; the ends are redone)


def extinction(alpha: np.ndarray, phi: np.ndarray, guess: np.ndarray | None = None,
               max_iter: int = 60) -> np.ndarray:
    """β [rad] of an R–L load fired at α, for rows with 0 < φ ≤ π/2 and 0 ≤ α < π: the root
    of sin(β − φ) = sin(α − φ)·exp(−(β − α)/tan φ) in [π, min(π + φ, 2π − α)] (α > φ) or
    [π + φ, 2π − α] (α ≤ φ), by Newton
    steps from ``guess`` (NaN or default: :func:`_guess`),
    bisecting where a step leaves the bracket, until every step is below 4e-15 rad (or
    the bracket below 1.6e-14 rad).

    >>> from checks import rl
    >>> a, p = np.radians([45.0, 120.0]), np.radians([30.0, 60.0])
    >>> bool(np.allclose(extinction(a, p), rl.extinction_angle(alpha=a, phi=p), atol=1e-13))
    True
    """
    inv = 1.0 / np.tan(phi)
    k0 = np.sin(alpha - phi)
    after = alpha > phi  # else the current ends after the steady zero: (π + φ, 2π − α]
    lo = np.where(after, np.pi, np.pi + phi)
    hi = np.where(after, np.minimum(np.pi + phi, 2 * np.pi - alpha), 2 * np.pi - alpha)
    if guess is None:
        b = _guess(alpha, phi)
    else:
        miss = ~np.isfinite(guess)
        b = np.where(miss, _guess(alpha, phi), guess) if miss.any() else guess
    b = np.array(np.clip(b, lo, hi), dtype=float)
    shape = b.shape
    with np.errstate(over="ignore", under="ignore", invalid="ignore", divide="ignore"):
        # As checks.rl: a bracket without a sign change (rounding at α → π) is its end.
        g_lo = np.sin(lo - phi) - k0 * np.exp(-(lo - alpha) * inv)
        end, lo_end = g_lo <= 0.0, lo
        out = b.ravel()  # rows leave the iteration (into ``out``) once most have converged
        rows = np.arange(out.size)
        al, ph, k0, inv, lo, hi, b = (np.broadcast_to(x, shape).ravel() for x in (
            alpha, phi, k0, inv, lo, hi, b))
        for _ in range(max_iter):
            k = k0 * np.exp(-(b - al) * inv)
            x = b - ph
            g = np.sin(x) - k
            pos = g > 0.0
            lo = np.where(pos, b, lo)
            hi = np.where(pos, hi, b)
            step = b - g / (np.cos(x) + k * inv)
            inside = (step >= lo) & (step <= hi)
            new = np.where(g == 0.0, b, np.where(inside, step, 0.5 * (lo + hi)))
            # A bracket of a few ulps can cycle (g is rounding noise there): done too.
            done = (np.abs(new - b) <= _TOL) | (hi - lo <= 4 * _TOL)
            b = new
            n_done = int(np.count_nonzero(done))
            if n_done == done.size:
                break
            if 4 * n_done >= done.size:
                out[rows[done]] = b[done]
                keep = ~done
                rows, al, ph, k0, inv, lo, hi, b = (x[keep] for x in (
                    rows, al, ph, k0, inv, lo, hi, b))
        out[rows] = b
    return np.where(end, lo_end, out.reshape(shape))


def _guess(alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """A first β for Newton's method (about 1e-5 rad after two steps on any row).

    With δ = β − π and h(δ) = ln sin(φ − δ) + δ/tan φ − ln sin(α − φ) + (π − α)/tan φ (the
    extinction equation in logarithms: h(0) > 0, h'(0) = 0, h'' = −1/sin²(φ − δ)), the root
    lies above δ_a = φ − asin(sin φ·e^(−h(0))) (where the term δ/tan φ is left out), and
    near δ = 0 it is δ_q = sin φ·√(2h(0)) (h to second order): the larger of δ_a and δ_q
    kept below the middle of (δ_a, φ).
    """
    with np.errstate(over="ignore", under="ignore", invalid="ignore", divide="ignore"):
        sp = np.sin(phi)
        h0 = np.log(sp) - np.log(np.sin(alpha - phi)) + (np.pi - alpha) / np.tan(phi)
        da = phi - np.arcsin(sp * np.exp(-h0))
        dq = sp * np.sqrt(2 * np.maximum(h0, 0.0))
        d = np.maximum(da, np.minimum(dq, 0.5 * (da + phi)))
    return np.pi + np.where(np.isfinite(d), d, 0.5 * phi)


def _grid_beta(alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """β on a grid, for bracketing: plain Newton steps from :func:`_guess`, kept in the
    bracket (about 1e-8 rad at worst; the bracket's ends are then solved exactly)."""
    inv = 1.0 / np.tan(phi)
    k0 = np.sin(alpha - phi)
    hi = np.minimum(np.pi + phi, 2 * np.pi - alpha)
    b = _guess(alpha, phi)
    with np.errstate(over="ignore", under="ignore", invalid="ignore", divide="ignore"):
        for _ in range(_GRID_NEWTON):
            k = k0 * np.exp(-(b - alpha) * inv)
            x = b - phi
            b = np.clip(b - (np.sin(x) - k) / (np.cos(x) + k * inv), np.pi, hi)
    return b


def _distinct(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The distinct values of a 1-D array, sorted, and each element's index among them
    (np.unique without its import of numpy.ma)."""
    order = np.argsort(x, kind="stable")
    srt = x[order]
    new = np.empty(srt.size, dtype=bool)
    new[:1] = True
    new[1:] = srt[1:] != srt[:-1]
    vals = srt[new]
    inv = np.empty(x.size, dtype=np.intp)
    inv[order] = np.cumsum(new) - 1
    return vals, inv


Groups = list[tuple[np.ndarray | None, tuple[np.ndarray, ...]]]


def _grid(lo: np.ndarray, phi: np.ndarray, rl: np.ndarray, u: np.ndarray,
          top: float = np.pi * (1 - 1e-12)) -> tuple[np.ndarray, np.ndarray, Groups]:
    """The grid of 1-D rows: θ and β(θ) (rows × points; β = π for resistive rows) and groups
    of rows with the grid's sin θ, cos θ, sin γ, cos γ and θ − γ (γ = β − π the restart).
    A row's grid depends only on its floor and φ, so rows sharing them (a corner table
    varies the pot and the line far more often than the load) share one solution, in a group
    of their own (its row indices, the arrays one row of points each); a table of nearly
    distinct rows (a Monte Carlo chunk) is one group of every row (indices None)."""
    key_phi = np.where(rl, phi, -1.0)
    pairs = lo + 1j * key_phi  # one sortable key for (floor, φ)
    vals, inv = _distinct(pairs)
    shared = 4 * vals.size <= pairs.size
    if shared:
        v_lo, v_phi = vals.real[:, None], vals.imag[:, None]
    else:
        v_lo, v_phi = lo[:, None], key_phi[:, None]
    t = v_lo + (top - v_lo) * u
    ok = (v_phi > 0) & (t > v_phi)
    ph = np.where(v_phi > 0, v_phi, 0.5)
    beta = np.where(ok, _grid_beta(np.where(ok, t, 0.5 * (ph + np.pi)), ph), np.pi)
    gam = beta - np.pi
    trig = (np.sin(t), np.cos(t), np.sin(gam), np.cos(gam), t - gam)
    if not shared:
        return t, beta, [(None, trig)]
    order = np.argsort(inv, kind="stable")
    bounds = np.searchsorted(inv[order], np.arange(vals.size + 1))
    groups = [(order[bounds[j]:bounds[j + 1]], tuple(x[j] for x in trig))
              for j in range(vals.size)]
    return t[inv], beta[inv], groups


class _Rows:
    """Per-row constants of the single section (1-D rows)."""

    def __init__(self, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                 vbo: np.ndarray, dv: np.ndarray, phi: np.ndarray) -> None:
        tau = omega * np.maximum(r1, 1.0) * c1  # as checks.diac._system: R1 ≥ 1 Ω
        self.k = 1.0 / tau
        self.amp = vm / np.sqrt(1.0 + tau * tau)
        self.psi = np.arctan(tau)
        self.e_pi = np.exp(-np.pi * self.k)
        self.vbo, self.dv, self.phi = vbo, dv, phi
        self.rl = phi > 0

    def take(self, idx: np.ndarray | None, col: bool = False) -> _Rows:
        """The rows ``idx`` (None: all), as columns (a trailing axis) with ``col``."""
        out = object.__new__(_Rows)
        out.__dict__ = {k: (v if idx is None else v[idx])[:, None] if col else
                        (v if idx is None else v[idx]) for k, v in self.__dict__.items()}
        return out

    def excess(self, alpha: np.ndarray, beta: np.ndarray) -> np.ndarray:
        """v(α⁻) − VBO with the network restarting at γ = β − π (β = π: resistive)."""
        gam = np.where(self.rl, beta - np.pi, 0.0)
        gam = np.where(self.rl & ~(alpha > self.phi), np.nan, gam)
        k, amp, psi = self.k, self.amp, self.psi
        xs_a = amp * np.sin(alpha - psi)
        xs_g = amp * np.sin(gam - psi)
        x0 = (self.e_pi * xs_g - np.exp(-k * (np.pi + gam - alpha)) * (xs_a - self.dv)) \
            / (1.0 + self.e_pi)
        return xs_a + np.exp(-k * (alpha - gam)) * (x0 - xs_g) - self.vbo

    def excess_grid(self, s_t: np.ndarray, c_t: np.ndarray, s_g: np.ndarray,
                    c_g: np.ndarray, d: np.ndarray) -> np.ndarray:
        """(1 + e^(−kπ)) × :meth:`excess` (rows as columns: the same sign, for the grid) from
        the grid's sines and cosines of α and γ and d = α − γ (0 < d < π).

        With e₁ = e^(−kd) and e^(−k(π − d))·e₁ = e^(−kπ) the periodic state's start drops
        out: (1 + e^(−kπ))·(v(α⁻) − VBO) = xs(α) − e₁·xs(γ) + e^(−kπ)·ΔV − (1 + e^(−kπ))·VBO,
        with xs(θ) = A·(sin θ·cos ψ − cos θ·sin ψ).
        """
        a1, a2 = self.amp * np.cos(self.psi), self.amp * np.sin(self.psi)
        e1 = np.exp(-self.k * d)
        out = a1 * (s_t - e1 * s_g)
        out -= a2 * (c_t - e1 * c_g)
        out += self.e_pi * self.dv - (1.0 + self.e_pi) * self.vbo
        return out


def _grid_values(rows: _Rows, groups: Groups, n: int, points: int) -> np.ndarray:
    """The excess of every row at its grid points (n × points), group by group."""
    vals = np.empty((n, points))
    for idx, trig in groups:
        got = rows.take(idx, col=True).excess_grid(*trig)
        if idx is None:
            return got
        vals[idx] = got
    return vals


def grid_fires(*, vm: np.ndarray, omega: np.ndarray, c1: np.ndarray, vbo: np.ndarray,
               breakback: np.ndarray, phi: np.ndarray, floor: np.ndarray, u: np.ndarray,
               top: float) -> Callable[[np.ndarray], np.ndarray]:
    """For a search over R1 (:func:`checks.diac.limit_r`): a function of R1 telling, per row,
    whether the running excess is non-negative at some point θ = floor + (top − floor)·u of
    its grid. The grid and its β, which do not depend on R1, are solved once."""
    shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, c1, vbo, breakback, phi,
                                                         floor)))
    vm, omega, c1, vbo, dv, ph, lo = (
        np.broadcast_to(np.asarray(x, dtype=float), shape).ravel()
        for x in (vm, omega, c1, vbo, breakback, phi, floor))
    rl = ph > 0
    with np.errstate(all="ignore"):
        _, _, groups = _grid(lo, np.where(rl, ph, 0.5), rl, u, top)

    def fires(r1: np.ndarray) -> np.ndarray:
        r = np.broadcast_to(np.asarray(r1, dtype=float), shape).ravel()
        with np.errstate(all="ignore"):
            rows = _Rows(vm, omega, r, c1, vbo, dv, ph)
            return (_grid_values(rows, groups, lo.size, u.size) >= 0).any(axis=-1).reshape(
                shape)

    return fires


def running_angle(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                  vbo: np.ndarray, breakback: np.ndarray, phi: np.ndarray, floor: np.ndarray,
                  grid: int, steps: int = 20) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """First root α of the single section's running excess over (floor, π(1 − 1e-12)], per
    row of the broadcast inputs; NaN without one. Also the excess at the floor (≥ 0 there
    with an R–L load: no consistent state) and a mask of rows whose exact excess at the grid
    bracket's ends did not confirm the bracket (to be solved again by the general code; none
    expected).

    The grid: ``grid`` points θ_i = floor + (π(1 − 1e-12) − floor)·i/grid, i = 1 … grid,
    as :func:`checks.diac._root_in`; then up to ``steps`` Illinois steps, each row leaving
    once its bracket is below 1e-12 rad or its excess below 1e-12·VBO.
    """
    shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, r1, c1, vbo, breakback,
                                                         phi, floor)))
    vm, omega, r1, c1, vbo, dv, ph, lo = (
        np.broadcast_to(np.asarray(x, dtype=float), shape).ravel()
        for x in (vm, omega, r1, c1, vbo, breakback, phi, floor))
    n = lo.size
    rows = _Rows(vm, omega, r1, c1, vbo, dv, ph)
    rl = rows.rl
    any_rl = bool(rl.any())
    ph_safe = np.where(rl, ph, 0.5)  # resistive rows: any angle, β is not used

    def beta_exact(a: np.ndarray, sel: np.ndarray | None = None,
                   guess: np.ndarray | None = None) -> np.ndarray:
        if not any_rl:
            return np.full(a.shape, np.pi)
        p, r = (ph_safe, rl) if sel is None else (ph_safe[sel], rl[sel])
        ok = r & (a > p) & (a < np.pi)
        b = extinction(np.where(ok, a, 0.5 * (p + np.pi)), p, guess)
        return np.where(ok, b, np.pi)

    u = np.linspace(0.0, 1.0, grid + 1)[1:]
    with np.errstate(all="ignore"):
        th, b_grid, groups = _grid(lo, ph_safe, rl, u)
        up = _grid_values(rows, groups, n, u.size) >= 0
        has = up.any(axis=-1)
        i = np.argmax(up, axis=-1)[:, None]
        im = np.maximum(i - 1, 0)
        first = i[:, 0] == 0
        take = np.take_along_axis
        b = take(th, i, axis=-1)[:, 0]
        a = np.where(first, lo, take(th, im, axis=-1)[:, 0])
        beta_b = beta_exact(b, guess=take(b_grid, i, axis=-1)[:, 0])
        beta_a = beta_exact(a, guess=np.where(first, np.nan, take(b_grid, im, axis=-1)[:, 0]))
        f_lo = rows.excess(lo, beta_exact(lo))
        fb = rows.excess(b, beta_b)
        fa = np.where(first, f_lo, rows.excess(a, beta_a))
        # The exact ends must confirm the grid's bracket (a sign read from the grid's β).
        recheck = has & (~(fb >= 0) | (~first & ~(fa < 0)))
        fa = np.where(fa >= 0, -1e-300, fa)
        out = np.where(has, b, np.nan)
        act = np.flatnonzero(has)  # rows still narrowing their bracket
        a, b, fa, fb, beta_a, beta_b = (x[act] for x in (a, b, fa, fb, beta_a, beta_b))
        side = np.zeros(act.size, dtype=int)
        sub = rows.take(act)
        for _ in range(steps):
            if not act.size:
                break
            x = np.where(fb != fa, b - fb * (b - a) / (fb - fa), 0.5 * (a + b))
            x = np.where((x > a) & (x < b), x, 0.5 * (a + b))
            w = np.where(b > a, (x - a) / (b - a), 0.5)
            bx = beta_exact(x, act, beta_a + (beta_b - beta_a) * w)
            fx = sub.excess(x, bx)
            pos = fx >= 0
            fa = np.where(pos & (side == 1), 0.5 * fa, fa)
            fb = np.where(~pos & (side == -1), 0.5 * fb, fb)
            b, fb, beta_b = np.where(pos, x, b), np.where(pos, fx, fb), np.where(pos, bx,
                                                                                beta_b)
            a, fa, beta_a = np.where(pos, a, x), np.where(pos, fa, fx), np.where(pos, beta_a,
                                                                                bx)
            side = np.where(pos, 1, -1)
            # Converged: a bracket of 1e-12 rad, or a value at the rounding level of the
            # excess (its terms are ~VBO; β's last digits move it by ~1e-11 V) at x.
            tiny = np.abs(fx) <= _F_TOL * vbo[act]
            out[act] = np.where(tiny, x, b)
            keep = ~((b - a <= 1e-12) | tiny)
            if not keep.all():
                act, a, b, fa, fb, beta_a, beta_b, side = (
                    x[keep] for x in (act, a, b, fa, fb, beta_a, beta_b, side))
                sub = sub.take(np.flatnonzero(keep))
    return out.reshape(shape), f_lo.reshape(shape), recheck.reshape(shape)
