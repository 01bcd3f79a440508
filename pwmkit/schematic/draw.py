"""The public drawing function :func:`draw`."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from .parts import Schematic
from .spec import make_spec
from .style import SchematicStyle, resolve_style

__all__ = ["draw"]


def draw(
    topology: str,
    *,
    ra: Any,
    rb: Any,
    c: Any,
    pot: Any = None,
    wiper: Any = None,
    vctl: Any = None,
    r_cv: Any = None,
    c_cv: Any = 10e-9,
    c_decouple: Any = 100e-9,
    vcc: Any = None,
    load: str | None = None,
    n_series: int = 1,
    n_parallel: int = 1,
    r_led: Any = None,
    r_gate: Any = None,
    v_load: Any = None,
    clamp: str = "diode",
    mosfet_label: str = "Q1",
    diode_part: str = "signal diode",
    timer_part: str = "555-type",
    mosfet_part: str = "N-MOSFET",
    freewheel_part: str = "freewheel diode",
    annotations: Mapping[str, Any] | None = None,
    style: SchematicStyle | Mapping[str, Any] | None = None,
    v_zener: Any = None,
) -> Schematic:
    """Draw an annotated schematic of a 555-type astable PWM driver as SVG.

    The circuit follows the timing model of :mod:`pwmkit.timing.paths` (output high while the
    timing capacitor C1 charges; THR and TRIG tied to C1; RESET tied to VCC). Timing network by
    ``topology``:

    - ``"classic"``: R1 (``ra``) from VCC to DIS, R2 (``rb``) from DIS to the capacitor node;
    - ``"bypass"``: as classic plus D1 across R2, anode at DIS;
    - ``"steered"``: D1 from DIS to the capacitor node (charge), D2 from the capacitor node
      back through R2 to DIS (discharge);
    - ``"pot"``: as steered with potentiometer P1 whose wiper sits at DIS; end A feeds D1 (charge
      resistance ``ra + wiper·pot``), end B returns through R2 and D2 (discharge resistance
      ``rb + (1 − wiper)·pot``). The wiper arrow is drawn at its position along the track.

    ``rb = 0`` leaves R2 out. Pin 5 gets C2 (``c_cv``) to ground, R3 (``r_cv``) to ground or an
    external source V1 (``vctl``); C3 (``c_decouple``) decouples the supply. With a load, OUT drives
    the gate of a low-side N-channel MOSFET through R4 (``r_gate``); the load sits between the load
    supply and the drain: an LED string with series resistor R5, or motor M1 with freewheeling
    diode D3 (plus Zener DZ1 back-to-back with D3 for ``clamp="zener"``).

    Parameters
    ----------
    topology : {"classic", "bypass", "steered", "pot"}
    ra, rb : timing resistors [Ω]; floats or engineering strings such as ``"4k7"``
    c : timing capacitor [F]
    pot : potentiometer end-to-end value, ``"pot"`` only [Ω]
    wiper : fraction of the pot in the charge path, 0–1 (0: wiper at end A, next to the charge diode), ``"pot"`` only [1]
    vctl : control voltage shown at pin 5 [V]
    r_cv : resistor from pin 5 to ground [Ω]
    c_cv : pin-5 bypass capacitor, ``None`` to leave out [F]
    c_decouple : supply decoupling capacitor, ``None`` to leave out [F]
    vcc : timer supply, written on the supply terminal [V]
    load : ``None`` (timer only), ``"led"`` or ``"motor"``
    n_series, n_parallel : LEDs per string and strings in parallel (``"led"``) [1]
    r_led : LED series resistor, one per string; 0 when the module limits its own current [Ω]
    r_gate : gate resistor, ``None`` or 0 for a plain wire [Ω]
    v_load : load supply when it differs from ``vcc`` [V]
    clamp : ``"diode"`` or ``"zener"`` freewheel path for the motor
    mosfet_label : reference of the MOSFET
    diode_part, timer_part, mosfet_part, freewheel_part : part-family labels beside the steering diodes,
        the timer, the MOSFET and the freewheel diode (e.g. "1 A Schottky diode", "CMOS 555-type")
    annotations : computed quantities to write beside the paths: ``t_high``, ``r_charge`` (charge
        path), ``t_low``, ``r_discharge`` (discharge path), ``frequency``, ``period``, ``duty``
        (footer) as numbers in SI units (duty as a fraction), or any key with a text value
    style : a :class:`SchematicStyle` or a dict of its fields
    v_zener : Zener voltage written on DZ1 [V]

    Returns
    -------
    Schematic
        ``svg`` text and ``parts`` (reference, kind, value, nodes; anode and cathode nodes of each
        diode so the orientation can be checked against the model).

    Raises
    ------
    DesignError
        Unknown topology, load or clamp; a missing or unused potentiometer; values that do not
        parse or are out of range; arrays (a drawing shows single values); bad labels or styles.

    Notes
    -----
    Symbols are IEC 60617 style (rectangular resistors). Reference designators are fixed by role
    (R1 = ``ra``, R2 = ``rb``, R3 = ``r_cv``, R4 = ``r_gate``, R5 = ``r_led``) so labels do not
    move when parts come and go; gaps in the numbering are intended. Drawing one schematic takes a
    few milliseconds (see ``benchmarks/bench_schematic.py``).

    Examples
    --------
    >>> from pwmkit.schematic import draw
    >>> sch = draw("steered", ra="4k7", rb="10k", c="100n", vcc=12, load="led", n_series=3, r_led=220)
    >>> sch.part("R1").label, sch.part("D2").anode_node
    ('R1 4.7 kΩ', 'THR')
    """
    spec = make_spec(
        topology, ra=ra, rb=rb, c=c, pot=pot, wiper=wiper, vctl=vctl, r_cv=r_cv, c_cv=c_cv,
        c_decouple=c_decouple, vcc=vcc, load=load, n_series=n_series, n_parallel=n_parallel, r_led=r_led,
        r_gate=r_gate, v_load=v_load, clamp=clamp, v_zener=v_zener, mosfet_label=mosfet_label,
        diode_part=diode_part, timer_part=timer_part, mosfet_part=mosfet_part, freewheel_part=freewheel_part,
        annotations=annotations,
    )
    st = resolve_style(style)
    try:
        from . import _sheet
    except ImportError as exc:  # pragma: no cover - depends on the environment
        raise ImportError("pwmkit.schematic needs schemdraw: pip install 'pwmkit[lab]'") from exc
    from .layout import build

    with _sheet.Paused():
        sheet = _sheet.Sheet(st)
        parts, ties = build(spec, sheet)
        svg = sheet.svg()
    return Schematic(svg=svg, parts=parts, topology=spec.topology, load=spec.load, ties=ties)
