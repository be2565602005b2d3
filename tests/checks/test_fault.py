"""A short at the load: Rashid's fuse-coordination example and the three outcomes of the
rule (rides through, fuse clears first, nothing clears it)."""

from __future__ import annotations

import numpy as np
import pytest

from checks import fault
from checks.core import FAIL, MARGINAL, PASS

W60 = 2 * np.pi * 60


def test_fuse_coordination_example():
    # Rashid 4e Ex 17.6 [book inputs]: 240 V, 60 Hz, L_s = 0.07 mH; device I²t = 300 kA²s at
    # 8.33 ms, ITSM 10 kA [memory: the unit is inferred]; fuse clearing I²t 280 kA²s in 8 ms.
    # Answers [recomputed] (power-stage.md P8): I_sc = 9095 A RMS, symmetrical peak 12.86 kA
    # (above ITSM: a fuse is needed); device I²t at 8 ms 294.0 kA²s > 280 kA²s: pass.
    i_sc = fault.fault_current(vs=240.0, omega=W60, l_s=0.07e-3)
    assert float(i_sc) == pytest.approx(9095, rel=2e-4)
    assert float(np.sqrt(2) * i_sc) == pytest.approx(12.86e3, rel=5e-4)
    o = fault.fault_check(vs=np.array([240.0]), omega=W60, l_s=0.07e-3, itsm=10e3,
                          t_sm=8.33e-3, i2t=300e3, fuse_i2t=280e3, t_fuse=8e-3, limits={})
    assert o.status.tolist() == [PASS]
    assert float(o.values["device_i2t"][0]) == pytest.approx(294.0e3, rel=2e-4)
    # The prospective I²t of a half-cycle, I_sc²·π/ω, is far above the fuse's: it clears.
    assert float(o.values["fault_i2t"][0]) == pytest.approx(9095.0**2 / 120, rel=5e-4)
    assert float(o.margin[0]) == pytest.approx(294.0 / 280 - 1, rel=2e-3)


def test_the_three_outcomes():
    kw = dict(vs=np.array([24.0]), omega=2 * np.pi * 50, itsm=300.0, t_sm=0.01, i2t=450.0,
              limits={})
    # A soft supply: I_sc = 24/(ω·1 mH) = 76.4 A, first peak 216 A < ITSM: rides through
    # the first half-cycle; with no fuse it fires into the short every half-cycle after, so
    # marginal at best (ITSM is a one-half-cycle rating). A fuse that a half-cycle of it
    # (76.4² × 10 ms = 58 A²s) clears makes it a pass; one that needs 300 A²s leaves the SCR
    # firing into the short every half-cycle, as with none: still marginal.
    assert fault.fault_check(l_s=1e-3, **kw).status.tolist() == [MARGINAL]
    assert fault.fault_check(l_s=1e-3, fuse_i2t=50.0, **kw).status.tolist() == [PASS]
    assert fault.fault_check(l_s=1e-3, fuse_i2t=300.0, **kw).status.tolist() == [MARGINAL]
    # A stiff one (0.1 mH: peak 2.16 kA) without a fuse: nothing clears it.
    assert fault.fault_check(l_s=0.1e-3, **kw).status.tolist() == [FAIL]
    # With a fuse of 300 A²s: prospective 764² × 10 ms = 5.8 kA²s clears it, under 450 A²s.
    assert fault.fault_check(l_s=0.1e-3, fuse_i2t=300.0, **kw).status.tolist() == [PASS]
    # A 500 A²s fuse lets through more than the SCR's 450 A²s.
    assert fault.fault_check(l_s=0.1e-3, fuse_i2t=500.0, **kw).status.tolist() == [FAIL]
    # A fault too weak to melt the fuse within the half-cycle (0.4 mH: 365 A²s prospective
    # against a 4 kA²s fuse) leaves the SCR to carry it: fail.
    o = fault.fault_check(l_s=0.4e-3, fuse_i2t=4e3, **{**kw, "i2t": 1e4})
    assert o.status.tolist() == [FAIL]
