"""Load-side models: LED strings, perceived brightness, flicker, brushed DC motors,
the low-side MOSFET, the freewheel diode and simple thermal paths.

Split by physics, one module each:

- :mod:`pwmkit.loads.led` — LED string currents and series resistor;
- :mod:`pwmkit.loads.lightness` — CIE 1976 L* and perceptually even duty steps;
- :mod:`pwmkit.loads.flicker` — percent modulation, flicker index, IEEE Std 1789-2015 regions;
- :mod:`pwmkit.loads.motor` — steady-state chopper current (CCM/DCM) and start-up simulation;
- :mod:`pwmkit.loads.mosfet` — gate drive, switching and conduction loss, junction temperature;
- :mod:`pwmkit.loads.diode` — freewheel diode currents, loss, clamp decay;
- :mod:`pwmkit.loads.thermal` — junction temperature through thermal resistance;
- :mod:`pwmkit.loads.heater` — resistive heater element, warm-up, ripple and a thermistor loop.

The names below are re-exported lazily so that ``import pwmkit.loads`` stays cheap.
"""

from __future__ import annotations

from .._lazy import lazy_exports

_EXPORTS = {
    # contract names (see issue: load side)
    "motor_current": "motor",
    "lightness": "lightness",
    "luminance_for_lightness": "lightness",
    "flicker_class": "flicker",
    "led_resistor": "led",
    # more of the load side
    "led_drive": "led",
    "pwm_flicker": "flicker",
    "even_duty_steps": "lightness",
    "MotorParams": "motor",
    "steady_speed": "motor",
    "simulate_startup": "motor",
    "gate_drive": "mosfet",
    "mosfet_losses": "mosfet",
    "freewheel_diode": "diode",
    "clamp_decay": "diode",
    "junction_temperature": "thermal",
    "ThermalPath": "thermal",
    "HeaterResult": "heater",
    "closed_loop": "heater",
    "ClosedLoop": "heater",
    "ntc_resistance": "heater",
    "thermistor_source": "heater",
}

__all__ = sorted(_EXPORTS)

# ``lightness`` is both a submodule and a contract function: bind the function eagerly so the
# attribute stays the function whichever import happens first (numpy-only, cheap).
from .lightness import lightness, luminance_for_lightness  # noqa: E402, F401

__getattr__, __dir__ = lazy_exports(
    __name__, _EXPORTS, ("led", "lightness", "flicker", "motor", "mosfet", "diode", "thermal", "heater"), globals()
)
