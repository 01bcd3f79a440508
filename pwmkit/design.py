"""Design objects: one PWM driver described as data (design layer).

A :class:`Design` combines the timing network, the timer family, the output
stage (low-side MOSFET, freewheel diode) and the load (an LED string or a
brushed DC motor/fan), plus the requirements it must meet and the ambient
conditions. It holds no physics: methods call the model functions
(:func:`pwmkit.timing.astable` …). Values may be given as engineering strings
at construction ("4k7", "100n"); they are stored as floats in SI units.

:func:`demo_designs` returns the project's demo scenario — a 12 V greenhouse
propagator with an LED grow-bar dimmer and a ventilation-fan speed control
(invented values, for demonstration only).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any, Literal

from ._validate import quantity
from .errors import DesignError

__all__ = ["CRITERIA", "Requirements", "Timing", "LedLoad", "MotorLoad", "HeaterLoad", "Switch", "Freewheel",
           "Design", "demo_designs"]

_TOPOLOGIES = ("classic", "bypass", "steered", "pot", "two-timer")
#: Timing fields used only by the two-timer topology (astable clock + voltage-controlled monostable).
_TWO_TIMER_FIELDS = ("r_mono", "c_mono", "vctl_min", "vctl_max", "r_ctl_source")
_DIELECTRICS = ("c0g", "x7r", "film", "electrolytic")
#: Acceptance criteria of a requirement (see :class:`Requirements`).
CRITERIA = ("worst-case", "yield")


def _num(obj: Any, name: str, *, unit: str = "", optional: bool = False, **limits: Any) -> None:
    value = getattr(obj, name)
    if value is None:
        if optional:
            return
        raise DesignError(f"{type(obj).__name__.lower()}.{name}: a value is required ({unit or 'number'})")
    try:
        v = quantity(value, f"{type(obj).__name__.lower()}.{name}", unit=unit, **limits)
    except DesignError:
        raise
    if not isinstance(v, float):
        raise DesignError(f"{type(obj).__name__.lower()}.{name}: expected one number, got an array")
    object.__setattr__(obj, name, v)


def _ranged(obj: Any, name: str, *, optional: bool = False, key: str | None = None) -> None:
    """Read and check a field against its row of :data:`pwmkit.ranges.RANGES` (the API's table too)."""
    from .ranges import range_of

    r = range_of(key or name)
    path = f"{type(obj).__name__.lower()}.{name}"
    value = getattr(obj, name)
    if value is not None:
        from .ranges import checked

        v = checked(value, path, key or name)
        if not isinstance(v, float):
            raise DesignError(f"{path}: expected one number, got an array")
        object.__setattr__(obj, name, v)
        return
    _num(obj, name, unit=r.unit, optional=optional, **r.limits())


#: Characters refused in names and notes: C0/C1 controls (ANSI escapes start with ESC), DEL, and the
#: Unicode bidirectional overrides/isolates that can make text read differently than it is stored.
_BIDI = frozenset("\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


def _bad_char(text: str, multiline: bool) -> str | None:
    for ch in text:
        code = ord(ch)
        if multiline and ch in "\n\t":
            continue
        if code < 0x20 or 0x7F <= code < 0xA0 or ch in _BIDI or code in (0x2028, 0x2029):
            return ch
    return None


def _plain_text(obj: Any, name: str, *, multiline: bool = False) -> None:
    """Refuse control characters, ANSI escapes and bidi overrides (they would print raw to terminals).

    Used for the design name, which every output prints (terminal, Markdown headings, code
    comments); free-text notes may hold any character and are escaped where they are written.
    """
    text = getattr(obj, name)
    ch = _bad_char(text, multiline)
    if ch is not None:
        allowed = "printable text, line breaks and tabs" if multiline else "printable text on one line"
        raise DesignError(f"{type(obj).__name__.lower()}.{name}: contains the control character U+{ord(ch):04X}; "
                          f"allowed: {allowed} (no control, escape or bidirectional-override characters)")


def _choice(obj: Any, name: str, allowed: tuple[str, ...]) -> None:
    value = getattr(obj, name)
    if not isinstance(value, str) or value.strip().lower() not in allowed:
        raise DesignError(f"{type(obj).__name__.lower()}.{name}: {value!r} is not allowed; "
                          f"allowed: {', '.join(allowed)}")
    object.__setattr__(obj, name, value.strip().lower())


@dataclass(frozen=True)
class Requirements:
    """What the driver must achieve.

    Attributes
    ----------
    frequency : target PWM frequency [Hz] (None = no target)
    frequency_tolerance : allowed relative deviation of the frequency [1]
    duty : target duty (fixed-duty topologies) [1]
    duty_min, duty_max : duty range the control must reach (pot topology) or
        the window a fixed duty must stay in [1]
    flicker : required IEEE Std 1789-2015 region for LED loads:
        "no-effect", "low-risk" or None
    criterion : how the tolerance spread is judged against the frequency window and the duty
        requirement: "worst-case" — every worst-case corner (parts, supply range, ambient range,
        timer) must stay inside; "yield" — the Monte Carlo share inside must reach ``min_yield``
    min_yield : the share of builds that must meet the requirement with ``criterion = "yield"`` [1]

    The supply range and the ambient range the requirement must hold over are the design's
    ``vcc_min … vcc_max`` and ``t_ambient_min_c … t_ambient_max_c``; the load is the design's load.
    """

    frequency: Any = None
    frequency_tolerance: Any = 0.1
    duty: Any = None
    duty_min: Any = None
    duty_max: Any = None
    flicker: str | None = None
    criterion: str = "worst-case"
    min_yield: Any = 0.99

    def __post_init__(self) -> None:
        _ranged(self, "frequency", optional=True)
        _num(self, "frequency_tolerance", minimum=0.0, maximum=1.0)
        for name in ("duty", "duty_min", "duty_max"):
            _num(self, name, optional=True, minimum=0.0, maximum=1.0)
        if self.duty_min is not None and self.duty_max is not None and self.duty_min > self.duty_max:
            raise DesignError(f"requirements.duty_min: {self.duty_min} is above duty_max {self.duty_max}; "
                              "allowed duty_min <= duty_max")
        if self.flicker is not None:
            _choice(self, "flicker", ("no-effect", "low-risk"))
        _choice(self, "criterion", CRITERIA)
        _num(self, "min_yield", minimum=0.0, maximum=1.0, min_inclusive=False)

    @property
    def frequency_window(self) -> tuple[float, float] | None:
        """(low, high) required frequency [Hz], or None without a frequency requirement."""
        if self.frequency is None:
            return None
        return (self.frequency * (1.0 - self.frequency_tolerance), self.frequency * (1.0 + self.frequency_tolerance))

    def criterion_text(self) -> str:
        """The acceptance criterion in words, e.g. ``"worst case"`` or ``"yield ≥ 99 %"``."""
        return "worst case" if self.criterion == "worst-case" else f"yield ≥ {100 * self.min_yield:.4g} %"


@dataclass(frozen=True)
class Timing:
    """The astable timing network and timer family.

    Attributes
    ----------
    topology : "classic", "bypass", "steered" or "pot"
    ra, rb : resistors [Ω] (ra = R1 of the pot topology, rb = its end resistor)
    c : timing capacitor [F]
    pot : potentiometer end-to-end [Ω] ("pot" only); wiper : position 0–1
    vd : steering-diode drop [V] (None = default small-signal silicon diode)
    vsat, r_on : discharge switch overrides [V], [Ω] (None = timer family values)
    vctl : control-pin voltage [V] (None = internal divider)
    r_cv : resistor from the control pin to ground [Ω] (None = none)
    cv_bypass : control-pin bypass capacitor [F] (None = none fitted)
    timer : "bipolar" or "cmos"
    diode : steering-diode family name (see :mod:`pwmkit.parts.diodes`)
    c_dielectric : timing-capacitor dielectric ("c0g", "x7r", "film", "electrolytic")
    r_series, c_series : preferred-value series the parts come from
    r_tolerance, c_tolerance, pot_tolerance : relative tolerances [1]
    r_mono, c_mono : "two-timer" only: monostable timing resistor and capacitor [Ω], [F]; the clock
        is a classic astable on ra, rb, c
    vctl_min, vctl_max : "two-timer" only: control-voltage range the duty is set over (source
        open-circuit voltage) [V]; ``vctl`` is the nominal point (default: the middle)
    r_ctl_source : "two-timer" only: source resistance of the control voltage, working against the
        internal divider [Ω] (None = stiff source)
    """

    topology: str = "steered"
    ra: Any = 10e3
    rb: Any = 10e3
    c: Any = 100e-9
    pot: Any = None
    wiper: Any = None
    vd: Any = None
    vsat: Any = None
    r_on: Any = None
    vctl: Any = None
    r_cv: Any = None
    cv_bypass: Any = 10e-9
    timer: str = "bipolar"
    diode: str = "small-signal-silicon"
    c_dielectric: str = "film"
    r_series: str = "E24"
    c_series: str = "E12"
    r_tolerance: Any = 0.05
    c_tolerance: Any = 0.05
    pot_tolerance: Any = 0.2
    r_mono: Any = None
    c_mono: Any = None
    vctl_min: Any = None
    vctl_max: Any = None
    r_ctl_source: Any = None

    def __post_init__(self) -> None:
        _choice(self, "topology", _TOPOLOGIES)
        _choice(self, "timer", ("bipolar", "cmos"))
        _choice(self, "c_dielectric", _DIELECTRICS)
        _ranged(self, "ra")
        _ranged(self, "rb")
        _ranged(self, "c")
        if self.topology == "pot":
            _ranged(self, "pot")
            _ranged(self, "wiper")
        elif self.pot is not None or self.wiper is not None:
            raise DesignError(f"timing.pot: only the 'pot' topology uses a potentiometer (topology is "
                              f"{self.topology!r}); remove pot and wiper")
        for name in ("vd", "vsat", "r_on", "vctl", "r_cv", "cv_bypass"):
            _ranged(self, name, optional=True)
        if self.vctl is not None and self.r_cv is not None:
            raise DesignError("timing.vctl: give either a control voltage (vctl) or a control-pin resistor "
                              "(r_cv), not both")
        from . import eseries

        for name in ("r_series", "c_series"):
            value = getattr(self, name)
            if not isinstance(value, str) or value.upper() not in eseries.SERIES:
                raise DesignError(f"timing.{name}: {value!r} is not allowed; allowed: {', '.join(eseries.SERIES)}")
            object.__setattr__(self, name, value.upper())
        for name in ("r_tolerance", "c_tolerance", "pot_tolerance"):
            _num(self, name, minimum=0.0, maximum=0.9)
        from .parts.diodes import DIODES

        if not isinstance(self.diode, str) or self.diode not in DIODES:
            raise DesignError(f"timing.diode: {self.diode!r} is not a known diode family; allowed: "
                              f"{', '.join(DIODES)}")
        self._check_two_timer()

    def _check_two_timer(self) -> None:
        if self.topology != "two-timer":
            used = [n for n in _TWO_TIMER_FIELDS if getattr(self, n) is not None]
            if used:
                raise DesignError(f"timing.{used[0]}: only the 'two-timer' topology uses {', '.join(used)} "
                                  f"(topology is {self.topology!r}); remove it")
            return
        _num(self, "r_mono", unit="Ω", minimum=0.0, min_inclusive=False)
        _num(self, "c_mono", unit="F", minimum=0.0, min_inclusive=False)
        _num(self, "vctl_min", unit="V", minimum=0.0, min_inclusive=False, maximum=100.0)
        _num(self, "vctl_max", unit="V", minimum=0.0, min_inclusive=False, maximum=100.0)
        _num(self, "r_ctl_source", unit="Ω", optional=True, minimum=0.0)
        if not self.vctl_min < self.vctl_max:
            raise DesignError(f"timing.vctl_min: {self.vctl_min} V is not below vctl_max {self.vctl_max} V; "
                              "allowed vctl_min < vctl_max")
        if self.rb is not None and self.rb == 0:
            raise DesignError("timing.rb: the two-timer clock needs rb > 0 (its output-low time is the trigger "
                              "pulse)")
        if self.r_cv is not None:
            raise DesignError("timing.r_cv: the two-timer topology drives the control pin from vctl "
                              "(with r_ctl_source); remove r_cv")
        if self.vctl is not None and not self.vctl_min <= self.vctl <= self.vctl_max:
            raise DesignError(f"timing.vctl: {self.vctl} V lies outside the control range {self.vctl_min} … "
                              f"{self.vctl_max} V")

    @property
    def vctl_nominal(self) -> float:
        """Two-timer: nominal control (source) voltage, ``vctl`` or the middle of the range [V]."""
        if self.vctl is not None:
            return float(self.vctl)
        return 0.5 * (float(self.vctl_min) + float(self.vctl_max))

    def steering_vd(self) -> float:
        """Steering-diode drop used when ``vd`` is not fixed [V].

        The design's diode family at :data:`pwmkit.timing.astable.DEFAULT_VD_CURRENT`
        (1 mA) and 25 °C; for the default small-signal silicon diode this equals
        :func:`pwmkit.timing.default_vd`.
        """
        if self.vd is not None:
            return float(self.vd)
        from .parts.diodes import get_diode
        from .timing.astable import DEFAULT_VD_CURRENT

        return float(get_diode(self.diode).vf(DEFAULT_VD_CURRENT))

    def two_timer_kwargs(self, vcc: float) -> dict[str, Any]:
        """Circuit keywords of :func:`pwmkit.timing.two_timer_pwm` at supply ``vcc`` (without ``vctl``)."""
        kw: dict[str, Any] = dict(ra=self.ra, rb=self.rb, c=self.c, r_mono=self.r_mono, c_mono=self.c_mono,
                                  vcc=vcc, timer=self.timer)
        if self.vsat is not None:
            kw["vsat"] = self.vsat
        return kw

    def control_pin_voltage(self, v_source: Any, vcc: float) -> Any:
        """Two-timer: control-pin voltage for a control (source) voltage, with ``r_ctl_source`` [V]."""
        if self.r_ctl_source is None or self.r_ctl_source == 0:
            return v_source
        from .timing.monostable import control_pin_drive

        try:
            return control_pin_drive(v_source, self.r_ctl_source, vcc, self.timer).vctl
        except DesignError as exc:
            raise DesignError(f"timing.r_ctl_source: a control source resistance needs the timer's internal divider "
                              f"value, and for the {self.timer} family it is not known ({exc}); use a stiff source "
                              "(r_ctl_source none) or the bipolar family") from None

    def astable_kwargs(self, vcc: float) -> dict[str, Any]:
        """Keyword arguments for :func:`pwmkit.timing.astable` at supply ``vcc`` (the clock for "two-timer")."""
        if self.topology == "two-timer":
            kw0: dict[str, Any] = dict(ra=self.ra, rb=self.rb, c=self.c, vcc=vcc, timer=self.timer)
            if self.vsat is not None:
                kw0["vsat"] = self.vsat
            return kw0
        kw: dict[str, Any] = dict(ra=self.ra, rb=self.rb, c=self.c, vcc=vcc, timer=self.timer)
        if self.topology == "pot":
            kw.update(pot=self.pot, wiper=self.wiper)
        if self.topology != "classic" and self.vd is None:
            kw["vd"] = self.steering_vd()
        for name in ("vd", "vsat", "r_on"):
            if getattr(self, name) is not None:
                kw[name] = getattr(self, name)
        if self.vctl is not None:
            kw["vctl"] = self.vctl
        elif self.r_cv is not None:
            from .timing import control_voltage_from_divider

            kw["vctl"] = control_voltage_from_divider(vcc, self.r_cv, self.timer)
        return kw


@dataclass(frozen=True)
class LedLoad:
    """LED strings switched by the low-side MOSFET.

    Attributes
    ----------
    n_series : LEDs in each string; n_parallel : strings
    vf : forward voltage per LED at the operating current [V]
    vf_spread : ± spread of vf per LED [V]
    r_series : series resistor per string [Ω]
    r_power_rating : power rating of that resistor at 70 °C [W]
    colour : colour name (see :data:`pwmkit.loads.led.TYPICAL_VF`)
    """

    n_series: Any = 3
    n_parallel: Any = 1
    vf: Any = 3.1
    vf_spread: Any = 0.2
    r_series: Any = 130.0
    r_power_rating: Any = 0.25
    colour: str = "white"
    kind: Literal["led"] = field(default="led", init=False)

    def __post_init__(self) -> None:
        for name in ("n_series", "n_parallel"):
            v = getattr(self, name)
            if isinstance(v, bool) or not isinstance(v, int) or not 1 <= v <= 1000:
                raise DesignError(f"led.{name}: {v!r} is not allowed; allowed whole numbers 1–1000")
        _num(self, "vf", unit="V", minimum=0.5, maximum=10.0)
        _num(self, "vf_spread", unit="V", minimum=0.0, maximum=2.0)
        _num(self, "r_series", unit="Ω", minimum=0.0, min_inclusive=False)
        _num(self, "r_power_rating", unit="W", minimum=0.0, min_inclusive=False, maximum=100.0)
        if self.vf_spread >= self.vf:
            raise DesignError(f"led.vf_spread: {self.vf_spread} V is not below vf {self.vf} V; allowed "
                              "0 <= vf_spread < vf")
        if not isinstance(self.colour, str) or not 0 < len(self.colour) <= 40:
            raise DesignError(f"led.colour: {self.colour!r} is not allowed; give a colour name")


@dataclass(frozen=True)
class MotorLoad:
    """Brushed DC motor (or fan) switched by the low-side MOSFET.

    Attributes
    ----------
    r : armature resistance [Ω]; l : armature inductance [H]
    ke : back-EMF constant [V·s/rad] (torque constant kt = ke in SI)
    b : viscous friction [N·m·s/rad]; t_load : constant load torque [N·m]
    j : rotor + load inertia [kg·m²]
    """

    r: Any = 1.5
    l: Any = 1e-3  # noqa: E741 - the trade's symbol for inductance
    ke: Any = 0.01
    b: Any = 1e-6
    t_load: Any = 0.0
    j: Any = 1e-5
    kind: Literal["motor"] = field(default="motor", init=False)

    def __post_init__(self) -> None:
        _num(self, "r", unit="Ω", minimum=0.0, min_inclusive=False)
        _num(self, "l", unit="H", minimum=0.0, min_inclusive=False)
        _num(self, "ke", unit="V·s/rad", minimum=0.0, min_inclusive=False)
        _num(self, "b", unit="N·m·s/rad", minimum=0.0)
        _num(self, "t_load", unit="N·m", minimum=0.0)
        _num(self, "j", unit="kg·m²", minimum=0.0, min_inclusive=False)


@dataclass(frozen=True)
class HeaterLoad:
    """Resistive heater element (heat mat, small element) switched by the low-side MOSFET.

    Attributes
    ----------
    r_cold : element resistance at ``t_ref_c`` [Ω]
    alpha : temperature coefficient of resistance [1/K]
    t_ref_c : temperature of ``r_cold`` [°C]
    r_th : thermal resistance element → ambient [K/W]
    c_th : heat capacity of the element and what it warms [J/K]
    t_surface_max_c : highest surface temperature allowed for the use [°C]
    ntc_r25, ntc_beta : thermistor at the element, β model [Ω], [K] (None = no thermistor loop)
    r_set : set resistor above the thermistor in the divider feeding the control pin [Ω]
    tau_sensor : thermistor lag behind the element [s]
    t_cutout_c : opening temperature of a thermal cut-out in series with the element [°C]
        (None = none fitted)
    r_tolerance : relative tolerance of the element resistance [1]
    ntc_tolerance : relative tolerance of the thermistor's R25 [1] (5 %: typical value — check
        your part's data sheet)
    """

    r_cold: Any = 8.0
    alpha: Any = 0.0
    t_ref_c: Any = 25.0
    r_th: Any = 2.5
    c_th: Any = 800.0
    t_surface_max_c: Any = 40.0
    ntc_r25: Any = None
    ntc_beta: Any = 3950.0
    r_set: Any = None
    tau_sensor: Any = 60.0
    t_cutout_c: Any = None
    r_tolerance: Any = 0.1
    ntc_tolerance: Any = 0.05
    kind: Literal["heater"] = field(default="heater", init=False)

    def __post_init__(self) -> None:
        _num(self, "r_cold", unit="Ω", minimum=0.0, min_inclusive=False)
        _num(self, "alpha", unit="1/K", minimum=-0.005, maximum=0.02)
        _num(self, "t_ref_c", unit="°C", minimum=-60.0, maximum=150.0)
        _num(self, "r_th", unit="K/W", minimum=0.0, min_inclusive=False)
        _num(self, "c_th", unit="J/K", minimum=0.0, min_inclusive=False)
        _num(self, "t_surface_max_c", unit="°C", minimum=0.0, maximum=500.0)
        _num(self, "ntc_r25", unit="Ω", optional=True, minimum=0.0, min_inclusive=False)
        _num(self, "ntc_beta", unit="K", minimum=100.0, maximum=10000.0)
        _num(self, "r_set", unit="Ω", optional=True, minimum=0.0, min_inclusive=False)
        _num(self, "tau_sensor", unit="s", minimum=0.0)
        _num(self, "t_cutout_c", unit="°C", optional=True, minimum=0.0, maximum=500.0)
        _num(self, "r_tolerance", minimum=0.0, maximum=0.9)
        _num(self, "ntc_tolerance", minimum=0.0, maximum=0.9)
        if (self.ntc_r25 is None) != (self.r_set is None):
            raise DesignError("heater.ntc_r25: the thermistor loop needs both ntc_r25 and r_set (or neither)")

    @property
    def has_loop(self) -> bool:
        """True when a thermistor divider feeds the control pin."""
        return self.ntc_r25 is not None


@dataclass(frozen=True)
class Switch:
    """Low-side MOSFET and its gate resistor."""

    mosfet: str = "logic-level-30v"
    r_gate: Any = 10.0

    def __post_init__(self) -> None:
        if not isinstance(self.mosfet, str) or not self.mosfet:
            raise DesignError(f"switch.mosfet: {self.mosfet!r} is not a MOSFET family name")
        _num(self, "r_gate", unit="Ω", minimum=0.0)


@dataclass(frozen=True)
class Freewheel:
    """Freewheel diode across an inductive load, optionally with a Zener clamp."""

    diode: str = "schottky-1a"
    clamp: str = "diode"
    v_zener: Any = None

    def __post_init__(self) -> None:
        _choice(self, "clamp", ("diode", "zener"))
        if self.clamp == "zener":
            _num(self, "v_zener", unit="V", minimum=1.0, maximum=200.0)
        elif self.v_zener is not None:
            raise DesignError("freewheel.v_zener: only used with clamp = 'zener'")


@dataclass(frozen=True)
class Design:
    """A complete PWM driver: requirements, timing, output stage, load, ambient.

    Attributes
    ----------
    name : short identifier
    vcc : timer supply [V]
    timing : Timing
    load : LedLoad, MotorLoad or None
    v_load : load supply [V] (None = same as vcc)
    switch : Switch; freewheel : Freewheel
    vcc_min, vcc_max : supply range for the spread analysis [V] (None = vcc)
    t_ambient_c : nominal ambient [°C]; t_ambient_min_c, t_ambient_max_c : range [°C]
    requirements : Requirements
    notes : free text for the design record
    revision : revision note for the design record, e.g. "rev B: R2 4k7 → 3k9 after the bench test"
    bench : bench readings of the built driver, tuple of :class:`pwmkit.bench.BenchReading`
        (``[[bench]]`` in the design file; compared with the design by :func:`pwmkit.bench.reconcile`)
    """

    name: str = "design"
    vcc: Any = 12.0
    timing: Timing = field(default_factory=Timing)
    load: LedLoad | MotorLoad | HeaterLoad | None = None
    v_load: Any = None
    switch: Switch = field(default_factory=Switch)
    freewheel: Freewheel = field(default_factory=Freewheel)
    vcc_min: Any = None
    vcc_max: Any = None
    t_ambient_c: Any = 25.0
    t_ambient_min_c: Any = 0.0
    t_ambient_max_c: Any = 40.0
    requirements: Requirements = field(default_factory=Requirements)
    notes: str = ""
    revision: str = ""
    bench: tuple[Any, ...] = ()

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip() or len(self.name) > 200:
            raise DesignError(f"design.name: {self.name!r} is not allowed; give 1–200 characters")
        _plain_text(self, "name")
        _ranged(self, "vcc")
        for name in ("v_load", "vcc_min", "vcc_max"):
            _ranged(self, name, optional=True)
        for name in ("t_ambient_c", "t_ambient_min_c", "t_ambient_max_c"):
            _ranged(self, name, key="t_ambient_c")
        if self.vcc_min is not None and self.vcc_max is not None and self.vcc_min > self.vcc_max:
            raise DesignError(f"design.vcc_min: {self.vcc_min:g} V is above vcc_max {self.vcc_max:g} V; allowed "
                              "vcc_min <= vcc <= vcc_max")
        if self.t_ambient_min_c > self.t_ambient_max_c:
            raise DesignError(f"design.t_ambient_min_c: {self.t_ambient_min_c:g} °C is above t_ambient_max_c "
                              f"{self.t_ambient_max_c:g} °C; allowed t_ambient_min_c <= t_ambient_max_c")
        if not self.t_ambient_min_c <= self.t_ambient_c <= self.t_ambient_max_c:
            raise DesignError(f"design.t_ambient_c: {self.t_ambient_c} °C lies outside the ambient range "
                              f"{self.t_ambient_min_c}…{self.t_ambient_max_c} °C")
        lo = self.vcc if self.vcc_min is None else self.vcc_min
        hi = self.vcc if self.vcc_max is None else self.vcc_max
        if not lo <= self.vcc <= hi:
            raise DesignError(f"design.vcc: {self.vcc} V lies outside the supply range {lo}…{hi} V")
        for name, cls in (("timing", Timing), ("switch", Switch), ("freewheel", Freewheel),
                          ("requirements", Requirements)):
            if not isinstance(getattr(self, name), cls):
                raise DesignError(f"design.{name}: expected a {cls.__name__}, got {type(getattr(self, name)).__name__}")
        if self.load is not None and not isinstance(self.load, (LedLoad, MotorLoad, HeaterLoad)):
            raise DesignError(f"design.load: expected LedLoad, MotorLoad, HeaterLoad or None, got "
                              f"{type(self.load).__name__}")
        if isinstance(self.load, HeaterLoad) and self.load.has_loop and self.timing.topology != "two-timer":
            raise DesignError("heater.ntc_r25: the thermistor loop drives the control pin of the two-timer PWM; "
                              f"use topology 'two-timer' (topology is {self.timing.topology!r})")
        if not isinstance(self.notes, str):
            raise DesignError("design.notes: expected text")
        if not isinstance(self.revision, str) or len(self.revision) > 2000:
            raise DesignError(f"design.revision: {self.revision!r:.60} is not allowed; give text of at most "
                              "2000 characters")
        self._check_bench()

    def _check_bench(self) -> None:
        """Readings must be BenchReading objects.

        A reading's wiper on a design without a pot is allowed here (a dashboard may switch the
        topology while exploring; :func:`pwmkit.bench.reconcile_design` then ignores that wiper);
        design files refuse it (:func:`pwmkit.bench.readings.check_conditions`).
        """
        if not self.bench:
            object.__setattr__(self, "bench", ())
            return
        from .bench.readings import BenchReading

        if not isinstance(self.bench, (tuple, list)):
            raise DesignError(f"bench: expected a sequence of BenchReading, got {type(self.bench).__name__}")
        object.__setattr__(self, "bench", tuple(self.bench))
        for i, reading in enumerate(self.bench):
            if not isinstance(reading, BenchReading):
                raise DesignError(f"bench[{i}]: expected a BenchReading, got {type(reading).__name__}")
            reading.check(i)

    def with_reading(self, reading: Any) -> Design:
        """A copy with one more bench reading (a :class:`pwmkit.bench.BenchReading`) at the end."""
        return dataclasses.replace(self, bench=(*self.bench, reading))


    # -- convenience -------------------------------------------------------------------------
    @property
    def load_supply(self) -> float:
        """Load supply voltage [V]."""
        return self.vcc if self.v_load is None else self.v_load

    @property
    def supply_range(self) -> tuple[float, float]:
        """(minimum, maximum) timer supply [V]."""
        return (self.vcc if self.vcc_min is None else self.vcc_min,
                self.vcc if self.vcc_max is None else self.vcc_max)

    def astable_kwargs(self) -> dict[str, Any]:
        """Keyword arguments of :func:`pwmkit.timing.astable` for this design (without topology)."""
        return self.timing.astable_kwargs(self.vcc)

    def astable(self) -> Any:
        """Timing at the nominal design point (:class:`pwmkit.timing.AstableResult`).

        For the "two-timer" topology: the PWM output (clock period, monostable pulse) at the
        operating control voltage (:func:`pwmkit.two_timer_design.operating_point` — the
        closed-loop point of a thermistor-controlled heater), as an AstableResult with topology
        "two-timer".
        """
        from .timing import astable

        if self.timing.topology == "two-timer":
            from .timing import two_timer_pwm
            from .two_timer_design import as_astable_result, operating_point

            v_pin = operating_point(self)[0]
            return as_astable_result(two_timer_pwm(vctl=v_pin, **self.timing.two_timer_kwargs(self.vcc)), self)
        return astable(self.timing.topology, **self.astable_kwargs())

    def replace(self, **changes: Any) -> Design:
        """A copy with top-level fields changed (validated again)."""
        return dataclasses.replace(self, **changes)

    def with_timing(self, **changes: Any) -> Design:
        """A copy with timing fields changed (validated again)."""
        return dataclasses.replace(self, timing=dataclasses.replace(self.timing, **changes))

    def to_dict(self) -> dict[str, Any]:
        """Plain nested dict (JSON/TOML-ready; None values kept; ``bench`` only when there are readings)."""
        out = dataclasses.asdict(self)
        if not self.bench:
            out.pop("bench")
        return out

    def _repr_html_(self) -> str:
        """Notebook display: the part values, then what the presentation layer registered.

        :mod:`pwmkit.schematic` registers the annotated schematic (see :mod:`pwmkit._display`), so
        this design layer imports no drawing code; without it the table is shown alone.
        """
        import html

        from ._display import extra_html
        from .values import format_value

        t = self.timing
        rows = [("topology", f"{t.topology}, {t.timer} timer"), ("supply", format_value(self.vcc, "V")),
                ("ra / rb", f"{format_value(t.ra, 'Ω')} / {format_value(t.rb, 'Ω')}"),
                ("timing capacitor", f"{format_value(t.c, 'F')} ({t.c_dielectric})")]
        if t.topology == "pot":
            rows.append(("potentiometer", f"{format_value(t.pot, 'Ω')}, wiper {100 * t.wiper:.0f} %"))
        if t.topology == "two-timer":
            rows += [("monostable R / C", f"{format_value(t.r_mono, 'Ω')} / {format_value(t.c_mono, 'F')}"),
                     ("control range", f"{format_value(t.vctl_min, 'V')} … {format_value(t.vctl_max, 'V')}")]
        if self.load is not None:
            rows.append(("load", self.load.kind))
        body = "".join(f"<tr><th style='text-align:left;padding-right:1em'>{html.escape(k)}</th>"
                       f"<td>{html.escape(v)}</td></tr>" for k, v in rows)
        return (f"<div class='pwmkit-design'><strong>{html.escape(self.name)}</strong>"
                f"<table>{body}</table>{extra_html('design', self)}</div>")


def demo_designs() -> dict[str, Design]:
    """The demo scenario: a 12 V greenhouse propagator (invented values, for demos only).

    ``"grow-bar"``
        LED grow-bar dimmer on a regulated 12 V adapter (±5 %): pot-steered
        CMOS timer near 6 kHz (above the IEEE 1789 no-effect corner for full
        on/off PWM), three strings of three deep-red LEDs with 270 Ω, ½ W
        resistors.
    ``"fan"``
        Ventilation-fan speed control: pot-steered bipolar timer above the
        audible band (every worst-case corner above 20 kHz), small brushed DC fan
        motor with a Schottky freewheel diode.
    ``"heat-mat"``
        Seed-tray heat mat (8 Ω, 18 W at 12 V) on a two-timer fixed-frequency
        PWM near 240 Hz: a bipolar clock triggers a bipolar monostable whose
        control pin is fed by a 4.7 kΩ NTC thermistor divider at the mat (set
        resistor 22 kΩ) — a proportional thermostat — and a 45 °C thermal cut-out
        in series with the mat.
    """
    grow = Design(
        name="grow-bar",
        vcc=12.0,
        vcc_min=11.4,
        vcc_max=12.6,
        timing=Timing(topology="pot", ra=1e3, rb=1e3, pot=100e3, wiper=0.5, c=2.2e-9, timer="cmos",
                      c_dielectric="c0g", c_tolerance=0.05, r_tolerance=0.05, pot_tolerance=0.2),
        load=LedLoad(n_series=3, n_parallel=3, vf=2.1, vf_spread=0.1, r_series=270.0, r_power_rating=0.5,
                     colour="red"),
        switch=Switch(mosfet="logic-level-30v", r_gate=10.0),
        freewheel=Freewheel(diode="schottky-1a"),
        t_ambient_c=25.0,
        t_ambient_min_c=5.0,
        t_ambient_max_c=40.0,
        requirements=Requirements(frequency=6e3, frequency_tolerance=0.3, duty_min=0.05, duty_max=0.95,
                                  flicker="no-effect", criterion="worst-case"),
        notes="LED grow-bar dimmer for a 12 V greenhouse propagator (demo values).",
        revision="rev A: first demo build (demo values)",
    )
    fan = Design(
        name="fan",
        vcc=12.0,
        vcc_min=11.4,
        vcc_max=13.8,
        timing=Timing(topology="pot", ra=1e3, rb=1e3, pot=50e3, wiper=0.6, c=0.82e-9, timer="bipolar",
                      c_dielectric="c0g"),
        load=MotorLoad(r=6.0, l=1.5e-3, ke=0.012, b=2e-6, t_load=2e-4, j=2e-6),
        switch=Switch(mosfet="logic-level-30v", r_gate=22.0),
        freewheel=Freewheel(diode="schottky-1a"),
        t_ambient_c=30.0,
        t_ambient_min_c=5.0,
        t_ambient_max_c=45.0,
        requirements=Requirements(frequency=31e3, frequency_tolerance=0.35, duty_min=0.2, duty_max=0.9,
                                  criterion="worst-case"),
        notes="Ventilation-fan speed control for the same propagator (demo values).",
        revision="rev A: first demo build (demo values)",
    )
    mat = Design(
        name="heat-mat",
        vcc=12.0,
        vcc_min=11.4,
        vcc_max=12.6,
        timing=Timing(topology="two-timer", ra=56e3, rb=2.2e3, c=100e-9, r_mono=22e3, c_mono=100e-9,
                      vctl_min=3.5, vctl_max=7.5, timer="bipolar", c_dielectric="film"),
        load=HeaterLoad(r_cold=8.0, alpha=0.0004, r_th=2.5, c_th=800.0, t_surface_max_c=45.0, ntc_r25=4.7e3,
                        ntc_beta=3950.0, r_set=22e3, tau_sensor=60.0, t_cutout_c=45.0),
        switch=Switch(mosfet="logic-level-30v", r_gate=100.0),
        freewheel=Freewheel(diode="schottky-1a"),
        t_ambient_c=15.0,
        t_ambient_min_c=5.0,
        t_ambient_max_c=30.0,
        requirements=Requirements(frequency=240.0, frequency_tolerance=0.2, duty_min=0.25, duty_max=0.38),
        notes="Seed-tray heat mat with a thermistor set point for the same propagator (demo values).",
    )
    return {"grow-bar": grow, "fan": fan, "heat-mat": mat}
