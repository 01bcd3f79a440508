"""Safety cautions shown with every design (design layer).

pwmkit is a design aid for low-voltage PWM drivers. Wherever a design can hurt someone — hot
MOSFETs, resistors and motors, the voltage kick of an inductive load, very bright LEDs, anything
near mains — the report and the widgets show a caution. :func:`cautions_for` picks them for a
design; with an evaluation it fills in the computed temperatures and voltages.

The texts are our own words. They never replace the part makers' data sheets, local codes or
licensed practice.
"""

from __future__ import annotations

import html
from dataclasses import dataclass
from typing import Any

from .errors import DesignError

__all__ = ["Caution", "CAUTION_IDS", "cautions_for", "SAFETY_EXTRA_LOW_VOLTAGE_DC"]

#: DC voltage above which a circuit is no longer safety extra-low voltage (60 V ripple-free DC,
#: common practice after IEC 61140's voltage bands) [V].
SAFETY_EXTRA_LOW_VOLTAGE_DC = 60.0
_HOT_SURFACE_C = 60.0  # surfaces above this hurt on touch (common practice)
_HOT_RESISTOR_W = 0.25  # resistor power worth a warning (as pwmkit.loads.led)
_BRIGHT_LED_W = 0.2  # electrical power per LED above which eye safety is stressed (as pwmkit.loads.led)

#: Every caution id, in display order.
CAUTION_IDS: tuple[str, ...] = ("design-aid", "bench", "codes", "hot-parts", "inductive-kick", "eye-safety",
                                "high-voltage", "heater")


@dataclass(frozen=True)
class Caution:
    """One safety caution.

    Attributes
    ----------
    id : str
        Stable id (see :data:`CAUTION_IDS`).
    title : str
        Short heading.
    text : str
        The caution in plain language.
    """

    id: str
    title: str
    text: str

    def __post_init__(self) -> None:
        if self.id not in CAUTION_IDS:
            raise DesignError(f"caution id: {self.id!r} is not allowed; allowed: {', '.join(CAUTION_IDS)}")
        if not self.title or not self.text:
            raise DesignError(f"caution {self.id}: title and text must not be empty")

    def to_dict(self) -> dict[str, str]:
        """JSON-ready dict."""
        return {"id": self.id, "title": self.title, "text": self.text}

    def _repr_html_(self) -> str:
        return f"<p><b>{html.escape(self.title)}.</b> {html.escape(self.text)}</p>"


def _fmt_c(t: float | None) -> str | None:
    return None if t is None else f"{t:.0f} °C"


def _hot_parts(design: Any, ev: Any) -> Caution:
    parts: list[str] = []
    if ev is not None:
        t_amb = design.t_ambient_max_c
        mos = ev.mosfet
        if mos is not None:
            if mos.runaway:
                parts.append("the MOSFET has no stable temperature (thermal runaway)")
            else:
                parts.append(f"the MOSFET junction reaches about {_fmt_c(mos.tj_c)}")
        fw = ev.freewheel
        if fw is not None:
            parts.append("the freewheel diode has no stable temperature" if fw.runaway
                         else f"the freewheel diode reaches about {_fmt_c(fw.tj_c)}")
        led = ev.led
        if led is not None:
            parts.append(f"each LED resistor dissipates {1e3 * led.p_resistor_on:.0f} mW while on")
        if ev.motor_speed is not None:
            parts.append(f"the motor winding dissipates {1e3 * float(ev.motor_speed.p_copper):.0f} mW running and "
                         f"far more when stalled ({float(ev.motor_stall.i_mean):.3g} A mean)"
                         if ev.motor_stall is not None else
                         f"the motor winding dissipates {1e3 * float(ev.motor_speed.p_copper):.0f} mW")
        hp = getattr(ev, "heater", None)
        if hp is not None:
            parts.append(f"the heater element reaches about {_fmt_c(float(hp.hot.t_element_c))}")
        where = f" at {t_amb:g} °C ambient" if parts else ""
        computed = ("Computed" + where + ": " + "; ".join(parts) + ". ") if parts else ""
    else:
        computed = ""
    parts_hot = [] if ev is None else [p for p in (ev.mosfet, ev.freewheel) if p is not None and
                                       (p.runaway or p.tj_c > _HOT_SURFACE_C)]
    resistor_hot = ev is not None and ev.led is not None and ev.led.p_resistor_on >= _HOT_RESISTOR_W
    lead = ("Parts here run hot enough to burn skin. " if parts_hot or resistor_hot else
            "Power parts get warm and can get hot in a fault (stalled motor, shorted load). ")
    return Caution("hot-parts", "Hot parts", lead + computed +
                   f"Surfaces above about {_HOT_SURFACE_C:.0f} °C hurt on touch: give the MOSFET, diode and "
                   "resistors copper area or a heat sink, keep them away from plastics, wiring and fingers, and "
                   "fuse the supply.")


def _heater_caution(design: Any, ev: Any) -> Caution:
    computed = ""
    hp = None if ev is None else getattr(ev, "heater", None)
    if hp is not None:
        computed = (f" Here the element runs at about {_fmt_c(float(hp.hot.t_element_c))} at "
                    f"{design.t_ambient_max_c:g} °C ambient and reaches about {_fmt_c(hp.t_fault_c)} at full power "
                    "if the control fails.")
    return Caution("heater", "Heaters: hot surfaces and fire",
                   "A heater is meant to get hot: its surface can burn skin and scorch or ignite what lies on or "
                   "against it. Do not leave a heater running unattended until it has been proven over days, "
                   "keep it away from flammable material, and fit a thermal cut-out (or thermal fuse) in series "
                   "with the element that opens independently of the PWM control — a shorted MOSFET or a lost "
                   "thermistor otherwise leaves it at full power. Heaters run from mains (or from a mains "
                   "supply built for the purpose) need qualified review under the local electrical codes."
                   + computed)


def cautions_for(design: Any, evaluation: Any = None) -> tuple[Caution, ...]:
    """The safety cautions that apply to a design.

    Always: the design-aid scope, bench verification, local codes and licensed practice, and hot
    parts. By load: the inductive kick of a motor (freewheel diode, drain peak voltage), eye
    safety for LEDs, and for heaters hot surfaces, fire risk when unattended, thermal cut-outs and
    qualified review of mains heaters. Above safety extra-low voltage (60 V DC, common practice): work by a qualified
    person. With an evaluation the texts carry the computed temperatures and voltages.

    Parameters
    ----------
    design : pwmkit.design.Design
        The design.
    evaluation : pwmkit.evaluate.Evaluation, optional
        Its evaluation, for the computed figures.

    Returns
    -------
    tuple of Caution
        In :data:`CAUTION_IDS` order.

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> [c.id for c in cautions_for(demo_designs()["fan"])]
    ['design-aid', 'bench', 'codes', 'hot-parts', 'inductive-kick']
    """
    from .design import Design

    if not isinstance(design, Design):
        raise DesignError(f"design: expected a Design, got {type(design).__name__}")
    ev = evaluation
    out = [
        Caution("design-aid", "A design aid for low-voltage circuits",
                "pwmkit estimates timing, currents and temperatures of low-voltage PWM drivers from generic "
                "part data and simple models. It is a design aid, not a certification: the real parts' data "
                "sheets govern, and the figures carry the tolerances of those models."),
        Caution("bench", "Verify on the bench",
                "Build and measure before relying on a design: frequency and duty with an oscilloscope, part "
                "temperatures after warm-up at the highest ambient and supply, and the drain voltage at turn-off. "
                "Power up through a current-limited supply first."),
        Caution("codes", "Local codes and licensed practice",
                "Follow the electrical codes and licensed practice where the device is installed. Anything "
                "connected to or near mains — including the supply that feeds this circuit — must be designed, "
                "built and inspected by a qualified person."),
        _hot_parts(design, ev),
    ]
    v_max = max(design.supply_range[1], design.load_supply if design.v_load is not None else 0.0)
    if design.load is not None and design.load.kind == "motor":
        peak = ""
        if ev is not None and ev.conditions.v_clamp is not None:
            v_peak = ev.conditions.load_supply_max + ev.conditions.v_clamp
            peak = (f" Here the drain rises to about {v_peak:.3g} V at every turn-off at the highest load supply "
                    f"{ev.conditions.load_supply_max:.3g} V (supply plus clamp), before wiring ringing.")
        clamp = ("The Zener clamp ends the current faster but raises the drain voltage. "
                 if design.freewheel.clamp == "zener" else "")
        out.append(Caution("inductive-kick", "Inductive kick",
                           "A motor winding keeps its current flowing when the switch opens. The freewheel diode "
                           "across the motor must be fitted, rated for the stall current and placed close to the "
                           "motor terminals; without it the voltage spike destroys the MOSFET and can shock. "
                           + clamp + peak.strip()))
    if design.load is not None and design.load.kind == "led":
        strong = ""
        if ev is not None and ev.led is not None and ev.led.p_led_on >= _BRIGHT_LED_W:
            strong = (f" Each LED here takes about {ev.led.p_led_on:.2g} W while on: treat the bar as a "
                      "high-brightness source.")
        out.append(Caution("eye-safety", "Eye safety with bright LEDs",
                           "Do not look into high-brightness LEDs at close range; diffuse or shield them, and take "
                           "special care with blue, violet, UV and infrared parts (the last two look dim or "
                           "invisible while still harmful). Photobiological safety of lamps is covered by "
                           "IEC 62471 and the LED maker's risk-group rating (common practice)." + strong))
    if design.load is not None and design.load.kind == "heater":
        out.append(_heater_caution(design, ev))
    if v_max > SAFETY_EXTRA_LOW_VOLTAGE_DC:
        out.append(Caution("high-voltage", "Above safety extra-low voltage",
                           f"The supply reaches {v_max:.3g} V, above the {SAFETY_EXTRA_LOW_VOLTAGE_DC:g} V DC "
                           "safety extra-low-voltage band: touchable parts can give a dangerous shock. Such circuits "
                           "need insulation, enclosures and protective measures designed by a qualified person."))
    return tuple(out)
