"""Sampled motor current waveform against the closed-form steady state (independent numeric route)."""

from __future__ import annotations

import numpy as np
import pytest

from pwmkit import DesignError
from pwmkit.loads.motor import motor_current
from pwmkit.loads.motor_waveform import current_waveform


@pytest.mark.parametrize("f,duty", [(20e3, 0.7), (500.0, 0.6), (2e3, 0.1)])
def test_sampled_waveform_mean_and_rms_match_closed_forms(f: float, duty: float) -> None:
    # Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7, from memory cases (12 V, 6 V back-EMF, 1.5 Ω, 1 mH): the trapezoid integral of the
    # sampled exact segments must reproduce the closed-form mean and RMS
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, duty, f)
    w = current_waveform(mc, duty / f, 1 / f, cycles=1, points_per_cycle=40_000)
    assert np.trapezoid(w.i, w.t) * f == pytest.approx(mc.i_mean, rel=1e-6)
    assert np.sqrt(np.trapezoid(w.i**2, w.t) * f) == pytest.approx(mc.i_rms, rel=1e-6)
    assert w.i.max() == pytest.approx(mc.i_max, rel=1e-6)


def test_waveform_rejects_arrays_and_bad_ranges() -> None:
    mc = motor_current(12.0, 6.0, 1.5, 1e-3, np.array([0.5, 0.6]), 20e3)
    with pytest.raises(DesignError, match="scalar"):
        current_waveform(mc, 1e-5, 5e-5)
    one = motor_current(12.0, 6.0, 1.5, 1e-3, 0.5, 20e3)
    with pytest.raises(DesignError, match="cycles"):
        current_waveform(one, 1e-5, 5e-5, cycles=0)
