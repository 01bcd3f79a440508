"""Result objects of :func:`pwmkit.schematic.draw`: the SVG and the list of labelled parts.

Node names used in :attr:`PartLabel.nodes` (they follow the timer pins and the model in
:mod:`pwmkit.timing.paths`):

``VCC``, ``GND``
    timer supply and common ground;
``DIS``
    discharge pin 7 (and the wiper of the pot in the ``pot`` topology);
``THR``
    the timing-capacitor node, tied to threshold pin 6 and trigger pin 2;
``POT_A``, ``POT_B``
    the potentiometer ends on the charge (A) and discharge (B) side; wiper = 0 sits at A;
``D2_K``
    junction between the discharge diode D2 (its cathode) and RB;
``CV``, ``OUT``
    control-voltage pin 5 and output pin 3;
``GATE``, ``DRAIN``
    the low-side MOSFET; its source is ``GND``;
``VLOAD``
    load supply when it differs from ``VCC`` (otherwise the load hangs from ``VCC``);
``LED_A``
    junction between the LED series resistor and the first LED anode;
``CLAMP``
    junction between the freewheel diode D3 and the Zener DZ1 (``clamp="zener"``).
"""

from __future__ import annotations

import html
import os
from dataclasses import dataclass
from typing import Literal

from ..errors import DesignError

__all__ = ["PartKind", "PartLabel", "Schematic"]

PartKind = Literal["resistor", "capacitor", "diode", "pot", "mosfet", "led", "motor", "zener", "timer", "source"]


@dataclass(frozen=True)
class PartLabel:
    """One labelled part of a schematic.

    Attributes
    ----------
    reference : reference designator, e.g. ``"R1"`` (``"LED1–LED6"`` for an LED string)
    kind : part kind (``"resistor"``, ``"capacitor"``, ``"diode"``, ``"pot"``, ``"mosfet"``, ``"led"``,
        ``"motor"``, ``"zener"``, ``"timer"`` or ``"source"``)
    value : value text as drawn, e.g. ``"4.7 kΩ"``
    label : the whole label, reference and value, e.g. ``"R1 4.7 kΩ"``
    role : the part's job in the circuit, e.g. ``"ra"``, ``"rb"``, ``"c"``, ``"d_charge"``,
        ``"d_discharge"``, ``"c_cv"``, ``"c_decouple"``, ``"r_gate"``, ``"freewheel"``
    nodes : the nodes the part connects, in terminal order (see the module docstring)
    anode_node, cathode_node : for diodes, Zeners and LED strings, where the anode and cathode sit
    count : number of physical parts this entry stands for (LED strings: series × parallel)
    """

    reference: str
    kind: PartKind
    value: str
    label: str
    role: str
    nodes: tuple[str, ...]
    anode_node: str | None = None
    cathode_node: str | None = None
    count: int = 1


@dataclass(frozen=True, repr=False)
class Schematic:
    """An annotated circuit schematic.

    Attributes
    ----------
    svg : the drawing as SVG text (UTF-8, no XML declaration)
    parts : every labelled part, in drawing order
    topology : timing topology drawn
    load : load drawn (``None``, ``"led"`` or ``"motor"``)
    ties : pairs of node names joined by a plain wire because a part was left out (``rb = 0`` in
        ``classic``/``bypass`` ties DIS to THR; no gate resistor ties OUT to GATE)
    """

    svg: str
    parts: tuple[PartLabel, ...]
    topology: str
    load: str | None
    ties: tuple[tuple[str, str], ...] = ()

    def part(self, reference: str) -> PartLabel:
        """The part with this reference designator (``DesignError`` if there is none)."""
        for p in self.parts:
            if p.reference == reference:
                return p
        known = ", ".join(p.reference for p in self.parts)
        raise DesignError(f"reference: {reference!r} is not in this schematic; drawn: {known}")

    def of_kind(self, kind: str) -> tuple[PartLabel, ...]:
        """All parts of one kind, e.g. ``"diode"``."""
        return tuple(p for p in self.parts if p.kind == kind)

    def save(self, path: str | os.PathLike[str]) -> None:
        """Write the SVG to ``path`` (the name must end in ``.svg``)."""
        name = os.fspath(path)
        if not str(name).lower().endswith(".svg"):
            raise DesignError(f"path: {name!r} does not end in '.svg'; the schematic is SVG only")
        with open(name, "w", encoding="utf-8") as fh:
            fh.write('<?xml version="1.0" encoding="UTF-8"?>\n')
            fh.write(self.svg)

    def __repr__(self) -> str:
        labels = "; ".join(p.label for p in self.parts)
        return (f"Schematic(topology={self.topology!r}, load={self.load!r}, {len(self.parts)} parts: {labels}; "
                f"svg {len(self.svg) / 1000:.1f} kB)")

    def _repr_svg_(self) -> str:
        return self.svg

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{html.escape(p.reference)}</td><td>{html.escape(p.kind)}</td>"
            f"<td>{html.escape(p.value)}</td><td>{html.escape(' – '.join(p.nodes))}</td></tr>"
            for p in self.parts
        )
        svg = self.svg.replace("<svg ", '<svg style="max-width:100%;height:auto" ', 1)
        return (
            f'<div class="pwmkit-schematic">{svg}<details><summary>parts ({len(self.parts)})</summary>'
            "<table><thead><tr><th>ref</th><th>kind</th><th>value</th><th>nodes</th></tr></thead>"
            f"<tbody>{rows}</tbody></table></details></div>"
        )
