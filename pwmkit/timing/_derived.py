"""Closed forms derived with sympy, written out as numpy code. GENERATED — do not edit.

Regenerate with ``python -m pwmkit.timing.generate`` (see :mod:`pwmkit.timing.generate`); the
test ``tests/timing/test_derived_module.py`` derives every form again and compares the text.
Generated with sympy 1.14.0.
"""

# ruff: noqa: E501
from numpy import log


def crossing_time(r, c, v_inf, v_0, v_1):
    """Time for an RC node heading from v_0 toward v_inf to reach v_1 [s] (array-safe, no branches)."""
    t = c*r*log((v_0 - v_inf)/(v_1 - v_inf))
    return (t,)


def timing_classic_general(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'classic' topology, 'general' discharge model, external control [s]."""
    _x0 = -vctl
    _x1 = 2*vcc
    _x2 = ra*vsat
    _x3 = -r_on*vctl - ra*vctl
    t_high = c*(ra + rb)*log((1/2)*(_x0 + _x1)/(_x0 + vcc))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x2 - _x3 - r_on*vcc)/(_x1*r_on + 2*_x2 + _x3))/(r_on + ra)
    return (t_high, t_low,)


def timing_classic_saturation(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'classic' topology, 'saturation' discharge model, external control [s]."""
    _x0 = -vctl
    t_high = c*(ra + rb)*log((1/2)*(_x0 + 2*vcc)/(_x0 + vcc))
    t_low = c*rb*log(2*(vctl - vsat)/(vctl - 2*vsat))
    return (t_high, t_low,)


def timing_classic_resistance(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'classic' topology, 'resistance' discharge model, external control [s]."""
    _x0 = -vctl
    _x1 = r_on*vctl + ra*vctl
    t_high = c*(ra + rb)*log((1/2)*(_x0 + 2*vcc)/(_x0 + vcc))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(_x1 - r_on*vcc)/(-_x1 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_bypass_general(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'bypass' topology, 'general' discharge model, external control [s]."""
    _x0 = ra*vsat
    _x1 = -r_on*vctl - ra*vctl
    t_high = c*ra*log((1/2)*(2*vcc - vctl - 2*vd)/(vcc - vctl - vd))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x0 - _x1 - r_on*vcc)/(2*_x0 + _x1 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_bypass_saturation(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'bypass' topology, 'saturation' discharge model, external control [s]."""
    t_high = c*ra*log((1/2)*(2*vcc - vctl - 2*vd)/(vcc - vctl - vd))
    t_low = c*rb*log(2*(vctl - vsat)/(vctl - 2*vsat))
    return (t_high, t_low,)


def timing_bypass_resistance(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'bypass' topology, 'resistance' discharge model, external control [s]."""
    _x0 = r_on*vctl + ra*vctl
    t_high = c*ra*log((1/2)*(2*vcc - vctl - 2*vd)/(vcc - vctl - vd))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(_x0 - r_on*vcc)/(-_x0 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_steered_general(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'steered' topology, 'general' discharge model, external control [s]."""
    _x0 = 2*vd
    _x1 = ra*vsat
    _x2 = -r_on*vctl - ra*vctl
    t_high = c*ra*log((1/2)*(-_x0 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x1 - _x2 - r_on*vcc - r_on*vd - ra*vd)/(_x0*r_on + _x0*ra + 2*_x1 + _x2 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_steered_saturation(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'steered' topology, 'saturation' discharge model, external control [s]."""
    _x0 = 2*vd
    _x1 = -vctl
    t_high = c*ra*log((1/2)*(-_x0 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*rb*log(2*(-_x1 - vd - vsat)/(-_x0 - _x1 - 2*vsat))
    return (t_high, t_low,)


def timing_steered_resistance(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'steered' topology, 'resistance' discharge model, external control [s]."""
    _x0 = 2*vd
    _x1 = -r_on*vctl - ra*vctl
    t_high = c*ra*log((1/2)*(-_x0 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*(r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x1 - r_on*vcc - r_on*vd - ra*vd)/(_x0*r_on + _x0*ra + _x1 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_pot_general(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'pot' topology, 'general' discharge model, external control [s]."""
    _x0 = pot*wiper
    _x1 = 2*vd
    _x2 = ra*vsat
    _x3 = -r_on*vctl - ra*vctl
    t_high = c*(_x0 + ra)*log((1/2)*(-_x1 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*(-_x0*r_on - _x0*ra + pot*r_on + pot*ra + r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x2 - _x3 - r_on*vcc - r_on*vd - ra*vd)/(_x1*r_on + _x1*ra + 2*_x2 + _x3 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def timing_pot_saturation(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'pot' topology, 'saturation' discharge model, external control [s]."""
    _x0 = pot*wiper
    _x1 = 2*vd
    _x2 = -vctl
    t_high = c*(_x0 + ra)*log((1/2)*(-_x1 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*(-_x0 + pot + rb)*log(2*(-_x2 - vd - vsat)/(-_x1 - _x2 - 2*vsat))
    return (t_high, t_low,)


def timing_pot_resistance(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """(t_high, t_low) of the 'pot' topology, 'resistance' discharge model, external control [s]."""
    _x0 = pot*wiper
    _x1 = 2*vd
    _x2 = -r_on*vctl - ra*vctl
    t_high = c*(_x0 + ra)*log((1/2)*(-_x1 + 2*vcc - vctl)/(vcc - vctl - vd))
    t_low = c*(-_x0*r_on - _x0*ra + pot*r_on + pot*ra + r_on*ra + r_on*rb + ra*rb)*log(-2*(-_x2 - r_on*vcc - r_on*vd - ra*vd)/(_x1*r_on + _x1*ra + _x2 + 2*r_on*vcc))/(r_on + ra)
    return (t_high, t_low,)


def partials_classic(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """t_high, t_low of the 'classic' topology (general discharge) and their partial derivatives in argument order: d t_high/d arg…, then d t_low/d arg…."""
    _x0 = ra + rb
    _x1 = 2*vcc
    _x2 = -vctl
    _x3 = _x1 + _x2
    _x4 = _x2 + vcc
    _x5 = _x4**(-1.0)
    _x6 = (1/2)*_x5
    _x7 = log(_x3*_x6)
    _x8 = _x7*c
    _x9 = ra*vsat
    _x10 = -r_on*vctl - ra*vctl
    _x11 = -_x10 - _x9 - r_on*vcc
    _x12 = _x1*r_on + _x10 + 2*_x9
    _x13 = 2/_x12
    _x14 = log(-_x11*_x13)
    _x15 = _x14*c
    _x16 = r_on + ra
    _x17 = _x16**(-1.0)
    _x18 = r_on*ra + r_on*rb + ra*rb
    _x19 = _x17*_x18
    _x20 = -1/2*_x3/_x4**2
    _x21 = 2*_x0*_x4*c/_x3
    _x22 = _x15*_x18/_x16**2
    _x23 = _x11/_x12**2
    _x24 = 2*_x23
    _x25 = (1/2)*_x12*_x19*c/_x11
    _x26 = 4*_x23
    t_high = _x0*_x8
    t_low = _x15*_x19
    dt_high_dra = _x8
    dt_high_drb = _x8
    dt_high_dpot = 0
    dt_high_dwiper = 0
    dt_high_dc = _x0*_x7
    dt_high_dvcc = _x21*(_x20 + _x5)
    dt_high_dvd = 0
    dt_high_dvsat = 0
    dt_high_dr_on = 0
    dt_high_dvctl = _x21*(-_x20 - _x6)
    dt_low_dra = _x14*_x17*c*(r_on + rb) - _x22 - _x25*(-_x13*(vctl - vsat) - _x24*(vctl - 2*vsat))
    dt_low_drb = _x15
    dt_low_dpot = 0
    dt_low_dwiper = 0
    dt_low_dc = _x14*_x19
    dt_low_dvcc = -_x25*(_x13*r_on + _x26*r_on)
    dt_low_dvd = 0
    dt_low_dvsat = -_x25*(_x13*ra + _x26*ra)
    dt_low_dr_on = _x0*_x14*_x17*c - _x22 - _x25*(_x13*_x4 + _x24*_x3)
    dt_low_dvctl = -_x25*(-_x13*_x16 - _x16*_x24)
    return (t_high, t_low, dt_high_dra, dt_high_drb, dt_high_dpot, dt_high_dwiper, dt_high_dc, dt_high_dvcc, dt_high_dvd, dt_high_dvsat, dt_high_dr_on, dt_high_dvctl, dt_low_dra, dt_low_drb, dt_low_dpot, dt_low_dwiper, dt_low_dc, dt_low_dvcc, dt_low_dvd, dt_low_dvsat, dt_low_dr_on, dt_low_dvctl,)


def partials_bypass(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """t_high, t_low of the 'bypass' topology (general discharge) and their partial derivatives in argument order: d t_high/d arg…, then d t_low/d arg…."""
    _x0 = 2*vcc
    _x1 = _x0 - vctl - 2*vd
    _x2 = vcc - vctl - vd
    _x3 = _x2**(-1.0)
    _x4 = (1/2)*_x3
    _x5 = log(_x1*_x4)
    _x6 = _x5*c
    _x7 = ra*vsat
    _x8 = -r_on*vctl - ra*vctl
    _x9 = -_x7 - _x8 - r_on*vcc
    _x10 = _x0*r_on + 2*_x7 + _x8
    _x11 = 2/_x10
    _x12 = log(-_x11*_x9)
    _x13 = _x12*c
    _x14 = r_on + ra
    _x15 = _x14**(-1.0)
    _x16 = r_on*ra + r_on*rb + ra*rb
    _x17 = _x15*_x16
    _x18 = -1/2*_x1/_x2**2
    _x19 = _x18 + _x3
    _x20 = 2*_x2*c*ra/_x1
    _x21 = _x13*_x16/_x14**2
    _x22 = _x9/_x10**2
    _x23 = 2*_x22
    _x24 = (1/2)*_x10*_x17*c/_x9
    _x25 = 4*_x22
    _x26 = -vctl
    t_high = _x6*ra
    t_low = _x13*_x17
    dt_high_dra = _x6
    dt_high_drb = 0
    dt_high_dpot = 0
    dt_high_dwiper = 0
    dt_high_dc = _x5*ra
    dt_high_dvcc = _x19*_x20
    dt_high_dvd = -_x19*_x20
    dt_high_dvsat = 0
    dt_high_dr_on = 0
    dt_high_dvctl = _x20*(-_x18 - _x4)
    dt_low_dra = _x12*_x15*c*(r_on + rb) - _x21 - _x24*(-_x11*(vctl - vsat) - _x23*(vctl - 2*vsat))
    dt_low_drb = _x13
    dt_low_dpot = 0
    dt_low_dwiper = 0
    dt_low_dc = _x12*_x17
    dt_low_dvcc = -_x24*(_x11*r_on + _x25*r_on)
    dt_low_dvd = 0
    dt_low_dvsat = -_x24*(_x11*ra + _x25*ra)
    dt_low_dr_on = _x12*_x15*c*(ra + rb) - _x21 - _x24*(-_x11*(-_x26 - vcc) - _x23*(-_x0 - _x26))
    dt_low_dvctl = -_x24*(-_x11*_x14 - _x14*_x23)
    return (t_high, t_low, dt_high_dra, dt_high_drb, dt_high_dpot, dt_high_dwiper, dt_high_dc, dt_high_dvcc, dt_high_dvd, dt_high_dvsat, dt_high_dr_on, dt_high_dvctl, dt_low_dra, dt_low_drb, dt_low_dpot, dt_low_dwiper, dt_low_dc, dt_low_dvcc, dt_low_dvd, dt_low_dvsat, dt_low_dr_on, dt_low_dvctl,)


def partials_steered(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """t_high, t_low of the 'steered' topology (general discharge) and their partial derivatives in argument order: d t_high/d arg…, then d t_low/d arg…."""
    _x0 = 2*vcc
    _x1 = 2*vd
    _x2 = _x0 - _x1 - vctl
    _x3 = vcc - vctl - vd
    _x4 = _x3**(-1.0)
    _x5 = (1/2)*_x4
    _x6 = log(_x2*_x5)
    _x7 = _x6*c
    _x8 = ra*vsat
    _x9 = -r_on*vctl - ra*vctl
    _x10 = -_x8 - _x9 - r_on*vcc - r_on*vd - ra*vd
    _x11 = _x0*r_on + _x1*r_on + _x1*ra + 2*_x8 + _x9
    _x12 = _x11**(-1.0)
    _x13 = 2*_x12
    _x14 = log(-_x10*_x13)
    _x15 = _x14*c
    _x16 = r_on + ra
    _x17 = _x16**(-1.0)
    _x18 = r_on*ra + r_on*rb + ra*rb
    _x19 = _x17*_x18
    _x20 = -1/2*_x2/_x3**2
    _x21 = _x20 + _x4
    _x22 = 2*ra
    _x23 = _x22*_x3*c/_x2
    _x24 = _x15*_x18/_x16**2
    _x25 = -vctl
    _x26 = _x25 + vd
    _x27 = _x1 + _x25
    _x28 = _x10/_x11**2
    _x29 = 2*_x28
    _x30 = (1/2)*_x11*_x19*c/_x10
    _x31 = 2*r_on
    _x32 = 4*_x28
    t_high = _x7*ra
    t_low = _x15*_x19
    dt_high_dra = _x7
    dt_high_drb = 0
    dt_high_dpot = 0
    dt_high_dwiper = 0
    dt_high_dc = _x6*ra
    dt_high_dvcc = _x21*_x23
    dt_high_dvd = -_x21*_x23
    dt_high_dvsat = 0
    dt_high_dr_on = 0
    dt_high_dvctl = _x23*(-_x20 - _x5)
    dt_low_dra = _x14*_x17*c*(r_on + rb) - _x24 - _x30*(-_x13*(-_x26 - vsat) - _x29*(-_x27 - 2*vsat))
    dt_low_drb = _x15
    dt_low_dpot = 0
    dt_low_dwiper = 0
    dt_low_dc = _x14*_x19
    dt_low_dvcc = -_x30*(_x12*_x31 + _x32*r_on)
    dt_low_dvd = -_x30*(_x13*_x16 - _x29*(-_x22 - _x31))
    dt_low_dvsat = -_x30*(_x12*_x22 + _x32*ra)
    dt_low_dr_on = _x14*_x17*c*(ra + rb) - _x24 - _x30*(-_x13*(-_x26 - vcc) - _x29*(-_x0 - _x27))
    dt_low_dvctl = -_x30*(-_x13*_x16 - _x16*_x29)
    return (t_high, t_low, dt_high_dra, dt_high_drb, dt_high_dpot, dt_high_dwiper, dt_high_dc, dt_high_dvcc, dt_high_dvd, dt_high_dvsat, dt_high_dr_on, dt_high_dvctl, dt_low_dra, dt_low_drb, dt_low_dpot, dt_low_dwiper, dt_low_dc, dt_low_dvcc, dt_low_dvd, dt_low_dvsat, dt_low_dr_on, dt_low_dvctl,)


def partials_pot(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl):
    """t_high, t_low of the 'pot' topology (general discharge) and their partial derivatives in argument order: d t_high/d arg…, then d t_low/d arg…."""
    _x0 = pot*wiper
    _x1 = _x0 + ra
    _x2 = 2*vcc
    _x3 = 2*vd
    _x4 = _x2 - _x3 - vctl
    _x5 = vcc - vctl - vd
    _x6 = _x5**(-1.0)
    _x7 = (1/2)*_x6
    _x8 = log(_x4*_x7)
    _x9 = _x8*c
    _x10 = ra*vsat
    _x11 = -r_on*vctl - ra*vctl
    _x12 = -_x10 - _x11 - r_on*vcc - r_on*vd - ra*vd
    _x13 = 2*_x10 + _x11 + _x2*r_on + _x3*r_on + _x3*ra
    _x14 = _x13**(-1.0)
    _x15 = 2*_x14
    _x16 = log(-_x12*_x15)
    _x17 = _x16*c
    _x18 = r_on + ra
    _x19 = _x18**(-1.0)
    _x20 = pot*r_on + pot*ra
    _x21 = -_x0*r_on - _x0*ra + _x20 + r_on*ra + r_on*rb + ra*rb
    _x22 = _x19*_x21
    _x23 = -1/2*_x4/_x5**2
    _x24 = _x23 + _x6
    _x25 = 2*_x1*_x5*c/_x4
    _x26 = -_x0 + pot + rb
    _x27 = _x17*_x21/_x18**2
    _x28 = -vctl
    _x29 = _x28 + vd
    _x30 = _x28 + _x3
    _x31 = _x12/_x13**2
    _x32 = 2*_x31
    _x33 = (1/2)*_x13*_x22*c/_x12
    _x34 = _x17*_x19
    _x35 = 2*r_on
    _x36 = 4*_x31
    _x37 = 2*ra
    t_high = _x1*_x9
    t_low = _x17*_x22
    dt_high_dra = _x9
    dt_high_drb = 0
    dt_high_dpot = _x9*wiper
    dt_high_dwiper = _x9*pot
    dt_high_dc = _x1*_x8
    dt_high_dvcc = _x24*_x25
    dt_high_dvd = -_x24*_x25
    dt_high_dvsat = 0
    dt_high_dr_on = 0
    dt_high_dvctl = _x25*(-_x23 - _x7)
    dt_low_dra = _x16*_x19*c*(_x26 + r_on) - _x27 - _x33*(-_x15*(-_x29 - vsat) - _x32*(-_x30 - 2*vsat))
    dt_low_drb = _x17
    dt_low_dpot = _x34*(-r_on*wiper + r_on - ra*wiper + ra)
    dt_low_dwiper = -_x20*_x34
    dt_low_dc = _x16*_x22
    dt_low_dvcc = -_x33*(_x14*_x35 + _x36*r_on)
    dt_low_dvd = -_x33*(_x15*_x18 - _x32*(-_x35 - _x37))
    dt_low_dvsat = -_x33*(_x14*_x37 + _x36*ra)
    dt_low_dr_on = _x16*_x19*c*(_x26 + ra) - _x27 - _x33*(-_x15*(-_x29 - vcc) - _x32*(-_x2 - _x30))
    dt_low_dvctl = -_x33*(-_x15*_x18 - _x18*_x32)
    return (t_high, t_low, dt_high_dra, dt_high_drb, dt_high_dpot, dt_high_dwiper, dt_high_dc, dt_high_dvcc, dt_high_dvd, dt_high_dvsat, dt_high_dr_on, dt_high_dvctl, dt_low_dra, dt_low_drb, dt_low_dpot, dt_low_dwiper, dt_low_dc, dt_low_dvcc, dt_low_dvd, dt_low_dvsat, dt_low_dr_on, dt_low_dvctl,)


#: kind → f(r, c, v_inf, v_0, v_1) -> (t,): the first-order threshold-crossing law
CROSSING = {
    'rc': crossing_time,
}


#: (topology, discharge) → f(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl) -> (t_high, t_low)
TIMING = {
    ('classic', 'general'): timing_classic_general,
    ('classic', 'saturation'): timing_classic_saturation,
    ('classic', 'resistance'): timing_classic_resistance,
    ('bypass', 'general'): timing_bypass_general,
    ('bypass', 'saturation'): timing_bypass_saturation,
    ('bypass', 'resistance'): timing_bypass_resistance,
    ('steered', 'general'): timing_steered_general,
    ('steered', 'saturation'): timing_steered_saturation,
    ('steered', 'resistance'): timing_steered_resistance,
    ('pot', 'general'): timing_pot_general,
    ('pot', 'saturation'): timing_pot_saturation,
    ('pot', 'resistance'): timing_pot_resistance,
}


#: topology → f(ra, rb, pot, wiper, c, vcc, vd, vsat, r_on, vctl) -> (t_high, t_low, ∂t_high…, ∂t_low…)
PARTIALS = {
    'classic': partials_classic,
    'bypass': partials_bypass,
    'steered': partials_steered,
    'pot': partials_pot,
}
