"""Bill of materials of a design: one row per part, as data or CSV.

Reference designators follow the schematic (:func:`pwmkit.schematic.draw`) so that the list and
the drawing agree: R1 = ``ra``, R2 = ``rb``, P1 = potentiometer, C1 = timing capacitor, C2 =
control-pin bypass, C3 = supply decoupling, R3 = control-pin resistor, D1/D2 = steering diodes,
U1 = timer, Q1 = MOSFET, R4 = gate resistor, R5 = LED series resistors, D3 = freewheel diode,
DZ1 = Zener clamp, LED1… = LEDs, M1 = motor.

Values are written with :func:`pwmkit.values.format_value`; notes say whether a value lies on its
preferred-value series (IEC 60063) and, with an evaluation, the power a resistor dissipates.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass
from typing import Any

from ..design import Design, LedLoad, MotorLoad
from ..errors import DesignError
from ..glossary import plural

__all__ = ["BomRow", "bom_rows", "bom_csv", "BOM_COLUMNS"]

#: Column names of :func:`bom_csv`.
BOM_COLUMNS = ("ref", "qty", "part", "value", "series", "tolerance", "notes")

#: Supply decoupling capacitor written into the list (common practice: 100 nF ceramic at the timer).
DECOUPLING_C = 100e-9


@dataclass(frozen=True)
class BomRow:
    """One line of the bill of materials.

    Attributes
    ----------
    ref : reference designator(s)
    qty : number of parts
    part : what the part is
    value : value in engineering notation ("" for semiconductors)
    series : preferred-value series ("" when it does not apply)
    tolerance : tolerance as text ("" when it does not apply)
    notes : rating, dielectric, family data, series check
    """

    ref: str
    qty: int
    part: str
    value: str
    series: str
    tolerance: str
    notes: str

    def as_tuple(self) -> tuple[str, ...]:
        return (self.ref, str(self.qty), self.part, self.value, self.series, self.tolerance, self.notes)


def _fv(x: float, unit: str, digits: int = 3) -> str:
    from ..values import format_value

    return format_value(x, unit, digits)


def _pct(x: float) -> str:
    return f"±{100 * x:.3g} %"


def _series_note(x: float, series: str, unit: str) -> str:
    """'on E24' or 'not an E24 value (nearest 4.7 kΩ)' (IEC 60063 series)."""
    from .. import eseries

    near = float(eseries.nearest(x, series))
    if math.isclose(near, x, rel_tol=1e-9):
        return f"on {series}"
    return f"not an {series} value (nearest {_fv(near, unit)})"


_DIELECTRIC_WORDS = {"c0g": "C0G/NP0 ceramic", "x7r": "X7R ceramic", "film": "film (PET or PP)",
                     "electrolytic": "aluminium electrolytic"}


def bom_rows(design: Design, evaluation: Any = None) -> list[BomRow]:
    """The parts of a design, in reference order.

    Parameters
    ----------
    design : Design
    evaluation : pwmkit.evaluate.Evaluation, optional
        Adds computed figures to the notes (LED resistor power and suggested rating).

    Returns
    -------
    list of BomRow

    Examples
    --------
    >>> from pwmkit.design import demo_designs
    >>> [r.ref for r in bom_rows(demo_designs()["fan"])][:4]
    ['U1', 'R1', 'R2', 'P1']
    """
    if not isinstance(design, Design):
        raise DesignError(f"design: expected a pwmkit.design.Design, got {type(design).__name__}")
    from ..parts.diodes import get_diode
    from ..parts.mosfets import get_mosfet
    from ..parts.timers import get_timer

    t = design.timing
    v_max = design.supply_range[1]
    rows: list[BomRow] = []
    fam = get_timer(t.timer)
    rows.append(BomRow("U1", 1, "555-type timer" + (", astable clock" if t.topology == "two-timer" else ""), "", "", "",
                       f"{fam.description}; supply {fam.vcc_min:g}…{fam.vcc_max:g} V"))
    rows.append(BomRow("R1", 1, "resistor, charge path (ra)", _fv(t.ra, "Ω"), t.r_series, _pct(t.r_tolerance),
                       _series_note(t.ra, t.r_series, "Ω")))
    if t.rb > 0:
        role = "end resistor, discharge path (rb)" if t.topology == "pot" else "resistor, discharge path (rb)"
        rows.append(BomRow("R2", 1, role, _fv(t.rb, "Ω"), t.r_series, _pct(t.r_tolerance),
                           _series_note(t.rb, t.r_series, "Ω")))
    if t.topology == "pot":
        rows.append(BomRow("P1", 1, "potentiometer, linear (duty control)", _fv(t.pot, "Ω"), "", _pct(t.pot_tolerance),
                           f"wiper at {100 * t.wiper:.3g} % of its travel in the design"))
    dielectric = _DIELECTRIC_WORDS.get(t.c_dielectric, t.c_dielectric)
    rows.append(BomRow("C1", 1, "capacitor, timing", _fv(t.c, "F"), t.c_series, _pct(t.c_tolerance),
                       f"{dielectric}; rated above {v_max:g} V; {_series_note(t.c, t.c_series, 'F')}"))
    if t.cv_bypass is not None:
        rows.append(BomRow("C2", 1, "capacitor, control-pin bypass", _fv(t.cv_bypass, "F"), "", "",
                           f"ceramic; rated above {v_max:g} V"))
    rows.append(BomRow("C3", 1, "capacitor, supply decoupling", _fv(DECOUPLING_C, "F"), "", "",
                       "ceramic at the timer's supply pins (common practice; not stored in the design file)"))
    if t.r_cv is not None:
        rows.append(BomRow("R3", 1, "resistor, control pin to ground", _fv(t.r_cv, "Ω"), t.r_series,
                           _pct(t.r_tolerance), _series_note(t.r_cv, t.r_series, "Ω")))
    if t.vctl is not None:
        rows.append(BomRow("V1", 1, "control-voltage source at pin 5", _fv(t.vctl, "V"), "", "",
                           "external source sets the upper threshold"))
    if t.topology in ("bypass", "steered", "pot"):
        dio = get_diode(t.diode)
        refs = "D1" if t.topology == "bypass" else "D1, D2"
        vd = f"drop {_fv(t.vd, 'V')} in the design" if t.vd is not None else "drop from the diode model"
        rows.append(BomRow(refs, 1 if t.topology == "bypass" else 2, "diode, steering", "", "", "",
                           f"{dio.name} ({dio.kind}); {vd}"))
    if t.topology == "two-timer":
        from .bom_two_timer import two_timer_rows

        rows += two_timer_rows(design, BomRow, _fv, _pct, _series_note)
    if design.load is not None:
        mos = get_mosfet(design.switch.mosfet)
        rows.append(BomRow("Q1", 1, "N-channel MOSFET, low side", "", "", "",
                           f"{mos.name}: {mos.level}-level gate, V_DS ≤ {mos.v_ds_max:g} V, I_D ≤ {mos.i_d_max:g} A, "
                           f"R_DS(on) {_fv(mos.rds_on, 'Ω')}"))
        if design.switch.r_gate > 0:
            rows.append(BomRow("R4", 1, "resistor, gate", _fv(design.switch.r_gate, "Ω"), t.r_series, "",
                               _series_note(design.switch.r_gate, t.r_series, "Ω")))
    load = design.load
    if isinstance(load, LedLoad):
        note = _series_note(load.r_series, t.r_series, "Ω")
        rating_given = getattr(load, "r_power_rating", None)
        if rating_given is not None:
            note += f"; rated {_fv(float(rating_given), 'W')}"
        led = getattr(evaluation, "led", None) if evaluation is not None else None
        if led is not None:
            p_on = getattr(led, "p_resistor_on", None)
            rating = getattr(led, "resistor_rating", None)
            if p_on is not None:
                note += f"; {_fv(float(p_on), 'W')} while on"
            if rating:
                from ..glossary import rating_text
                from ..loads.led import resistor_derating

                t_max = design.t_ambient_max_c
                # usable share: 2× margin on the IEC 60115-1 derated rating (common practice)
                derated = 0.5 * float(resistor_derating(t_max)) * float(rating)
                note += f"; fit ≥ {rating_text(float(rating), derated, t_max)}"
        rows.append(BomRow("R5", load.n_parallel, "resistor, LED string series", _fv(load.r_series, "Ω"),
                           t.r_series, "", note))
        n = load.n_series * load.n_parallel
        rows.append(BomRow(f"LED1…LED{n}" if n > 1 else "LED1", n, f"LED, {load.colour}", "", "", "",
                           f"{plural(load.n_parallel, 'string')} of {load.n_series}; V_F {_fv(load.vf, 'V')} "
                           f"± {_fv(load.vf_spread, 'V')}"))
    elif isinstance(load, MotorLoad):
        fw = get_diode(design.freewheel.diode)
        rows.append(BomRow("D3", 1, "diode, freewheel (across the motor)", "", "", "", f"{fw.name} ({fw.kind})"))
        if design.freewheel.clamp == "zener":
            rows.append(BomRow("DZ1", 1, "Zener diode, clamp in series with D3", _fv(design.freewheel.v_zener, "V"),
                               "", "", "faster current decay at switch-off"))
        rows.append(BomRow("M1", 1, "brushed DC motor / fan", "", "", "",
                           f"R {_fv(load.r, 'Ω')}, L {_fv(load.l, 'H')}, k_e {load.ke:.4g} V·s/rad"))
    elif load is not None and load.kind == "heater":
        from .bom_two_timer import heater_rows

        rows += heater_rows(design, BomRow, _fv, _series_note)
    return rows


def bom_csv(design: Design, evaluation: Any = None) -> str:
    """The bill of materials as CSV text (header :data:`BOM_COLUMNS`, UTF-8, ``\\n`` line ends).

    Cells that start with ``=``, ``+``, ``-`` or ``@`` get a leading apostrophe so that a
    spreadsheet does not take them for formulas.
    """
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(BOM_COLUMNS)
    for row in bom_rows(design, evaluation):
        writer.writerow([_cell(c) for c in row.as_tuple()])
    return buf.getvalue()


def _cell(text: str) -> str:
    return "'" + text if text[:1] in ("=", "+", "-", "@") else text
