"""Tests of pwmkit.schematic: SVG output, labels, and agreement of the drawn circuit with the model.

The strongest check here reads the drawn netlist back (parts, their nodes and value labels) and
computes the charge and discharge resistances with ideal diodes by nodal analysis; these must equal
the model's :func:`pwmkit.timing.paths.paths` for every topology. The drawing and the model are
written independently, so a swapped diode or a pot end on the wrong side fails here.
"""

from __future__ import annotations

import itertools
import re
import subprocess
import sys
import xml.etree.ElementTree as ET

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reach import reached, reaching

from pwmkit import DesignError
from pwmkit.schematic import DEFAULT_STYLE, PartLabel, Schematic, SchematicStyle, draw
from pwmkit.timing.paths import TOPOLOGIES, paths
from pwmkit.values import format_value, parse_value

SVG_NS = "{http://www.w3.org/2000/svg}"

BASE = {"ra": "4k7", "rb": "10k", "c": "100n", "vcc": 12}
POT = {"pot": "100k", "wiper": 0.3}
LOADS = {
    "none": {},
    "led": {"load": "led", "n_series": 3, "r_led": 220, "r_gate": 100},
    "motor": {"load": "motor", "r_gate": 47},
    "motor_zener": {"load": "motor", "clamp": "zener", "v_zener": 24, "r_gate": 47},
}


def _draw(topology: str, **kw: object) -> Schematic:
    args = dict(BASE)
    if topology == "pot":
        args.update(POT)
    args.update(kw)
    return draw(topology, **args)  # type: ignore[arg-type]


def svg_lines(svg: str) -> list[str]:
    """Every text line of the drawing (one per <tspan>)."""
    root = ET.fromstring(svg)
    return ["".join(t.itertext()) for t in root.iter(f"{SVG_NS}tspan")]


def svg_text(svg: str) -> str:
    return "\n".join(svg_lines(svg))


# -- rendering ---------------------------------------------------------------------------------

@pytest.mark.parametrize(("topology", "load"), list(itertools.product(TOPOLOGIES, LOADS)))
def test_every_topology_and_load_renders_parseable_svg(topology: str, load: str) -> None:
    sch = _draw(topology, **LOADS[load])
    root = ET.fromstring(sch.svg)  # well-formed XML
    assert root.tag == f"{SVG_NS}svg"
    assert float(root.get("width", "0pt").removesuffix("pt")) > 100
    text = svg_text(sch.svg)
    for part in sch.parts:  # every recorded part has its reference and value on the page
        assert part.reference in text, part
        assert part.value.split(" × ")[0] in text, part
    assert sch.topology == topology and sch.load == LOADS[load].get("load")
    kinds = {p.kind for p in sch.parts}
    expected = {"none": set(), "led": {"led", "mosfet"}, "motor": {"motor", "mosfet"},
                "motor_zener": {"motor", "mosfet", "zener"}}[load]
    assert expected <= kinds
    if load == "none":
        assert not kinds & {"led", "motor", "mosfet", "zener"}


def test_labels_show_values_in_engineering_notation() -> None:
    # SI prefix writing with a space before the unit (BIPM SI Brochure, 9th ed., §5.4.3) — the
    # strings come from pwmkit.values.format_value
    sch = _draw("classic", load="led", n_series=2, r_led=470, r_gate=100)
    text = svg_text(sch.svg)
    for expected in ("4.7 kΩ", "10 kΩ", "100 nF", "10 nF", "470 Ω", "100 Ω", "VCC 12 V"):
        assert expected in text
    assert sch.part("R1").label == "R1 4.7 kΩ"
    assert sch.part("C1").label == "C1 100 nF"
    assert sch.part("C2").label == "C2 10 nF"  # default control-pin bypass
    assert sch.part("C3").label == "C3 100 nF"  # default supply decoupling


def test_changing_a_value_changes_the_label() -> None:
    a = _draw("steered")
    b = _draw("steered", ra="5k6", c="47n")
    assert a.part("R1").value == "4.7 kΩ" and b.part("R1").value == "5.6 kΩ"
    assert "5.6 kΩ" in svg_text(b.svg) and "4.7 kΩ" not in svg_text(b.svg)
    assert "47 nF" in svg_text(b.svg)
    assert a.svg != b.svg


def test_strings_and_floats_draw_the_same() -> None:
    assert _draw("bypass").svg == draw("bypass", ra=4700.0, rb=10e3, c=100e-9, vcc=12.0).svg


@reaching()
@given(ra=st.floats(1.0, 1e7), rb=st.floats(0.0, 1e7), c=st.floats(1e-12, 1e-2),
       topology=st.sampled_from(TOPOLOGIES), wiper=st.floats(0.0, 1.0))
@settings(max_examples=25, deadline=None)
def test_property_any_valid_values_draw_and_label(ra: float, rb: float, c: float, topology: str,
                                                  wiper: float) -> None:
    reached()  # no early return: every example reaches the assertions
    extra = {"pot": 1e5, "wiper": wiper} if topology == "pot" else {}
    sch = draw(topology, ra=ra, rb=rb, c=c, **extra)  # type: ignore[arg-type]
    ET.fromstring(sch.svg)
    assert sch.part("R1").value == format_value(ra, "Ω")
    assert sch.part("C1").value == format_value(c, "F")
    assert ("R2" in {p.reference for p in sch.parts}) == (rb > 0)  # rb = 0 leaves R2 out
    assert not re.search(r"\bnan\b|\binf\b", sch.svg, flags=re.IGNORECASE)  # no NaN/inf coordinates


# -- agreement with the model ------------------------------------------------------------------

def _timing_parts(sch: Schematic) -> list[PartLabel]:
    return [p for p in sch.parts if p.role in ("ra", "rb", "pot", "d_charge", "d_discharge")]


@pytest.mark.parametrize(("topology", "diodes", "pots"),
                         [("classic", 0, 0), ("bypass", 1, 0), ("steered", 2, 0), ("pot", 2, 1)])
def test_timing_part_counts_match_model(topology: str, diodes: int, pots: int) -> None:
    # pwmkit.timing.paths: classic has no timing diodes, bypass one across rb, steered two, pot two + pot
    sch = _draw(topology, load="motor")
    timing = _timing_parts(sch)
    assert sum(p.kind == "diode" for p in timing) == diodes
    assert sum(p.kind == "pot" for p in timing) == pots
    assert sum(p.kind == "resistor" for p in timing) == 2
    assert sum(p.kind == "capacitor" and p.role == "c" for p in sch.parts) == 1
    assert sum(p.kind == "timer" for p in sch.parts) == 1


def _equivalent_resistance(sch: Schematic, source: str, sink: str, pot: float, wiper: float,
                           cut: set[str]) -> float:
    """Resistance from source to sink with ideal diodes, read from the drawn netlist.

    Ties (plain wires standing in for a left-out part) join their nodes. A diode conducts when some path from source to sink runs through it anode-first; conducting
    diodes short their nodes, the others are open. Nodes in ``cut`` are left out (a switch that is
    off). Solved by nodal analysis on the reduced network.
    """
    edges: list[tuple[str, str, float]] = []
    diodes: list[tuple[str, str]] = []
    for p in _timing_parts(sch):
        if any(n in cut for n in p.nodes):
            continue
        if p.kind == "resistor":
            edges.append((p.nodes[0], p.nodes[1], parse_value(p.value)))
        elif p.kind == "pot":
            end_a, end_b, wiper_node = p.nodes
            edges.append((wiper_node, end_a, wiper * pot))
            edges.append((wiper_node, end_b, (1.0 - wiper) * pot))
        elif p.kind == "diode":
            diodes.append((p.anode_node, p.cathode_node))  # type: ignore[arg-type]
    # which diodes lie on a forward path from source to sink (depth-first over simple paths)
    adjacency: dict[str, list[tuple[str, object]]] = {}
    for a, b, _ in edges:
        adjacency.setdefault(a, []).append((b, None))
        adjacency.setdefault(b, []).append((a, None))
    for a, b in sch.ties:  # plain wires where a part was left out
        adjacency.setdefault(a, []).append((b, None))
        adjacency.setdefault(b, []).append((a, None))
    for i, (a, k) in enumerate(diodes):
        adjacency.setdefault(a, []).append((k, i))
    conducting: set[int] = set()

    def walk(node: str, seen: set[str], used: set[int]) -> None:
        if node == sink:
            conducting.update(used)
            return
        for nxt, diode in adjacency.get(node, []):
            if nxt not in seen:
                walk(nxt, seen | {nxt}, used | ({diode} if diode is not None else set()))

    walk(source, {source}, set())
    # merge nodes shorted by conducting diodes
    parent: dict[str, str] = {}

    def find(n: str) -> str:
        while parent.get(n, n) != n:
            n = parent[n]
        return n

    shorts = [(a, b) for a, b, r in edges if r == 0.0]  # a pot end at the wiper
    for a, k in [diodes[i] for i in conducting] + list(sch.ties) + shorts:
        parent[find(a)] = find(k)
    s, t = find(source), find(sink)
    if s == t:
        return 0.0
    nodes = sorted({find(n) for a, b, _ in edges for n in (a, b)} | {s, t})
    index = {n: i for i, n in enumerate(nodes)}
    g = np.zeros((len(nodes), len(nodes)))
    for a, b, r in edges:
        i, j = index[find(a)], index[find(b)]
        if i != j:
            g[i, i] += 1 / r
            g[j, j] += 1 / r
            g[i, j] -= 1 / r
            g[j, i] -= 1 / r
    # inject 1 A at the source, hold the sink at 0 V
    keep = [i for i in range(len(nodes)) if i != index[t]]
    current = np.zeros(len(nodes))
    current[index[s]] = 1.0
    v = np.linalg.lstsq(g[np.ix_(keep, keep)], current[keep], rcond=None)[0]
    return float(v[keep.index(index[s])])


@pytest.mark.parametrize("topology", TOPOLOGIES)
@pytest.mark.parametrize("rb", [10e3, 0.0])
def test_drawn_paths_give_model_resistances(topology: str, rb: float) -> None:
    # model: pwmkit.timing.paths.paths with ideal diodes (vd = 0) and an ideal discharge switch
    # (r_on = 0, so the discharge path ends at DIS and R1 is out of it)
    pot, wiper = 100e3, 0.3
    sch = _draw(topology, rb=rb)
    model = paths(topology, ra=4.7e3, rb=rb, pot=pot, wiper=wiper, vcc=12.0, vd=0.0, vsat=0.0, r_on=0.0)
    r_charge = _equivalent_resistance(sch, "VCC", "THR", pot, wiper, cut=set())
    r_discharge = _equivalent_resistance(sch, "THR", "DIS", pot, wiper, cut={"VCC"})
    assert r_charge == pytest.approx(model.r_charge, rel=1e-9)
    assert r_discharge == pytest.approx(model.r_discharge, rel=1e-9)


@pytest.mark.parametrize("wiper", [0.0, 0.25, 1.0])
def test_pot_wiper_splits_track_as_model(wiper: float) -> None:
    # pwmkit.timing.paths, 'pot': charge ra + wiper·pot, discharge rb + (1 − wiper)·pot
    sch = _draw("pot", wiper=wiper)
    assert f"wiper {100 * wiper:.3g} %" in svg_text(sch.svg)
    r_charge = _equivalent_resistance(sch, "VCC", "THR", 100e3, wiper, cut=set())
    r_discharge = _equivalent_resistance(sch, "THR", "DIS", 100e3, wiper, cut={"VCC"})
    assert r_charge == pytest.approx(4.7e3 + wiper * 100e3)
    assert r_discharge == pytest.approx(10e3 + (1 - wiper) * 100e3)


def test_diode_orientation_matches_model() -> None:
    # pwmkit.timing.paths: bypass diode anode at DIS; steered/pot D2 anode at the capacitor node
    d1 = _draw("bypass").part("D1")
    assert (d1.anode_node, d1.cathode_node) == ("DIS", "THR")
    steered = _draw("steered")
    assert (steered.part("D1").anode_node, steered.part("D1").cathode_node) == ("DIS", "THR")
    assert steered.part("D2").anode_node == "THR"
    assert steered.part("D2").cathode_node in steered.part("R2").nodes
    pot = _draw("pot")
    assert (pot.part("D1").anode_node, pot.part("D1").cathode_node) == ("POT_A", "THR")
    assert pot.part("D2").anode_node == "THR"
    assert pot.part("P1").nodes[2] == "DIS"  # the wiper sits at DIS


def test_freewheel_diode_cathode_at_supply() -> None:
    # common practice: the freewheeling diode's cathode goes to the load supply, anode to the drain;
    # with a Zener clamp the two are in series back-to-back (cathodes joined)
    plain = _draw("classic", load="motor")
    assert (plain.part("D3").anode_node, plain.part("D3").cathode_node) == ("DRAIN", "VCC")
    zener = _draw("classic", load="motor", clamp="zener", v_load=24)
    d3, dz = zener.part("D3"), zener.part("DZ1")
    assert (d3.anode_node, d3.cathode_node) == ("DRAIN", "CLAMP")
    assert (dz.cathode_node, dz.anode_node) == ("CLAMP", "VLOAD")
    assert dz.kind == "zener"
    assert "VLOAD 24 V" in svg_text(zener.svg)


def _diode_triangles(svg: str, scale: float) -> tuple[int, int]:
    """(down, up) counts of the vertical diode triangles drawn (bodies 0.5 unit wide)."""
    down = up = 0
    for poly in ET.fromstring(svg).iter(f"{SVG_NS}polygon"):
        pts = [tuple(map(float, p.split(","))) for p in poly.get("points", "").split()]
        if len(pts) != 3:
            continue
        ys = sorted(y for _, y in pts)
        xs = sorted(x for x, _ in pts)
        width = (xs[-1] - xs[0]) / (72 * scale)
        if abs(ys[0] - ys[1]) < 1e-6 and width > 0.4:  # flat top: apex below -> points down
            down += 1
        elif abs(ys[1] - ys[2]) < 1e-6 and width > 0.4:
            up += 1
    return down, up


@pytest.mark.parametrize(("topology", "down", "up"),
                         [("classic", 0, 0), ("bypass", 1, 0), ("steered", 1, 1), ("pot", 1, 1)])
def test_drawn_diode_symbols_point_as_model(topology: str, down: int, up: int) -> None:
    # the discharge pin is drawn above the capacitor node, so a charge diode (anode DIS side) must
    # point down the page and a discharge diode (anode at the capacitor node) up
    sch = _draw(topology)
    assert _diode_triangles(sch.svg, DEFAULT_STYLE.scale) == (down, up)


def test_motor_zener_symbols_point_as_recorded() -> None:
    # D3 anode at the drain (below) points up; DZ1 anode at the supply (above) points down
    # (the MOSFET's small body-diode triangle is below the width filter)
    sch = _draw("classic", load="motor", clamp="zener")
    assert _diode_triangles(sch.svg, DEFAULT_STYLE.scale) == (1, 1)


# -- loads and the control pin -----------------------------------------------------------------

def test_led_string_symbols_and_counts() -> None:
    sch = _draw("classic", load="led", n_series=6, n_parallel=3, r_led=470)
    led = sch.of_kind("led")[0]
    assert led.count == 18 and led.reference == "LED1–LED6"
    text = svg_text(sch.svg)
    assert "6 in series" in text and "× 3 strings" in text and "each string" in text
    assert _diode_triangles(sch.svg, DEFAULT_STYLE.scale)[0] == 3  # 2 + ellipsis + 1 drawn
    few = _draw("classic", load="led", n_series=4, r_led=470)
    assert _diode_triangles(few.svg, DEFAULT_STYLE.scale)[0] == 4
    bare = _draw("classic", load="led", n_series=1, r_led=0)
    assert "R5" not in {p.reference for p in bare.parts}
    assert bare.part("LED1").anode_node == "VCC"


def test_control_pin_variants() -> None:
    default = _draw("classic")
    assert default.part("C2").nodes == ("CV", "GND")
    source = _draw("classic", vctl=6)
    assert source.part("V1").label == "V1 Vctl 6 V" and "Vctl" in svg_text(source.svg)
    divider = _draw("classic", vctl=6, r_cv="10k", c_cv=None)
    assert divider.part("R3").value == "10 kΩ" and "Vctl 6 V" in svg_text(divider.svg)
    assert "C2" not in {p.reference for p in divider.parts}
    bare = _draw("classic", c_cv=None, c_decouple=None)
    assert not {"C2", "C3"} & {p.reference for p in bare.parts}


def test_mosfet_label_and_gate_resistor() -> None:
    sch = _draw("classic", load="motor", mosfet_label="Q7", r_gate="220")
    assert sch.part("Q7").kind == "mosfet" and sch.part("R4").nodes == ("OUT", "GATE")
    assert "R4" not in {p.reference for p in _draw("classic", load="motor").parts}


# -- annotations, style, notebook ----------------------------------------------------------------

def test_annotations_are_written_and_paths_highlighted() -> None:
    st_ = DEFAULT_STYLE
    plain = _draw("steered")
    noted = _draw("steered", annotations={"t_high": 1.39e-3, "t_low": 0.69e-3, "frequency": 480.0,
                                          "duty": 0.667, "note": "fan at 60 %"})
    text = svg_text(noted.svg)
    for expected in ("t_high 1.39 ms", "t_low 690 µs", "f 480 Hz", "duty 66.7 %", "note fan at 60 %",
                     "charge path", "discharge path"):
        assert expected in text
    assert st_.charge_tint in noted.svg and st_.discharge_tint in noted.svg
    assert st_.charge_tint not in plain.svg
    forced = _draw("steered", style={"highlight_paths": True})
    assert st_.charge_tint in forced.svg


def _luminance(hex_colour: str) -> float:
    # WCAG 2.1 "relative luminance": sRGB channels linearised (threshold 0.03928 as printed in WCAG,
    # from memory), weights 0.2126/0.7152/0.0722
    rgb = [int(hex_colour[i:i + 2], 16) / 255 for i in (1, 3, 5)]
    lin = [c / 12.92 if c <= 0.03928 else ((c + 0.055) / 1.055) ** 2.4 for c in rgb]
    return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]


def _lightness(hex_colour: str) -> float:
    # CIE 1976 L* (CIE 15:2018; CIE 15:2018, CIE 1976 L*) with Y/Yn = relative luminance
    t = _luminance(hex_colour)
    return 116 * t ** (1 / 3) - 16 if t > 216 / 24389 else 24389 / 27 * t


def test_palette_contrast_wcag21_and_lightness_cie15() -> None:
    st_ = DEFAULT_STYLE
    bg = _luminance(st_.background)
    for colour in (st_.ink, st_.muted, st_.charge, st_.discharge):
        ratio = (max(bg, _luminance(colour)) + 0.05) / (min(bg, _luminance(colour)) + 0.05)
        assert ratio >= 4.5, colour  # WCAG 2.1 SC 1.4.3 contrast (minimum) for normal text
    # the two path colours differ in lightness, so they stay apart without hue (any colour vision)
    assert abs(_lightness(st_.charge) - _lightness(st_.discharge)) >= 15
    # check values of the L* formula itself (CIE 15:2018, CIE 1976 L* (regression pin): Y/Yn = 0.18 -> L* = 49.496)
    assert 116 * 0.18 ** (1 / 3) - 16 == pytest.approx(49.496, abs=5e-4)


def test_notebook_reprs_and_save(tmp_path: object) -> None:
    sch = _draw("pot", load="led", n_series=2, r_led=330)
    assert sch._repr_svg_() == sch.svg and sch.svg.startswith("<svg")
    html = sch._repr_html_()
    assert "<svg" in html and html.count("<tr>") == len(sch.parts) + 1
    assert "Schematic(topology='pot'" in repr(sch) and "R1 4.7 kΩ" in repr(sch)
    path = tmp_path / "driver.svg"  # type: ignore[operator]
    sch.save(path)
    saved = path.read_text(encoding="utf-8")
    assert saved.startswith("<?xml") and ET.fromstring(saved.split("\n", 1)[1]).tag == f"{SVG_NS}svg"
    with pytest.raises(DesignError, match=r"path: .*'\.svg'"):
        sch.save(tmp_path / "driver.png")  # type: ignore[operator]


def test_user_schemdraw_drawing_is_not_touched() -> None:
    import schemdraw
    import schemdraw.elements as elm

    with schemdraw.Drawing(canvas="svg", show=False) as d:
        elm.Resistor()
        _draw("classic", load="motor")
        elm.Capacitor()
    assert len(d.elements) == 2


def test_import_of_schematic_is_light() -> None:
    code = "import sys, pwmkit.schematic; print('schemdraw' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_text_is_escaped_not_markup() -> None:
    sch = _draw("classic", mosfet_label="Q<1>&", load="motor",
                annotations={"note": "a & b $x$ <i>"})
    text = svg_text(sch.svg)
    assert "Q<1>&" in text and "a & b" in text and "<i>" in text


# -- bad input -----------------------------------------------------------------------------------

@pytest.mark.parametrize(("topology", "kw", "match"), [
    ("ladder", {}, r"topology: 'ladder' is not known; allowed: classic, bypass, steered, pot"),
    ("pot", {"pot": None}, r"pot, wiper: the 'pot' topology needs both"),
    ("classic", {"pot": "100k", "wiper": 0.5}, r"pot, wiper: only the 'pot' topology"),
    ("pot", {"wiper": 1.5}, r"wiper: 1\.5 is out of range"),
    ("classic", {"ra": "4k7x"}, r"ra: "),
    ("classic", {"ra": -1.0}, r"ra: -1 Ω is out of range"),
    ("classic", {"rb": -5.0}, r"rb: -5 Ω is out of range"),
    ("classic", {"c": 0.0}, r"c: 0 F is out of range"),
    ("classic", {"ra": [1e3, 2e3]}, r"ra: an array of shape \(2,\)"),
    ("classic", {"ra": float("nan")}, r"ra: nan is not a finite number"),
    ("classic", {"load": "lamp"}, r"load: 'lamp' is not known"),
    ("classic", {"load": "motor", "clamp": "tvs"}, r"clamp: 'tvs' is not known"),
    ("classic", {"load": "led"}, r"r_led: the 'led' load needs"),
    ("classic", {"load": "led", "r_led": 100, "n_series": 0}, r"n_series: 0 is not allowed"),
    ("classic", {"load": "led", "r_led": 100, "n_parallel": 2.5}, r"n_parallel: 2\.5 is not allowed"),
    ("classic", {"load": "motor", "v_zener": 24}, r"v_zener: .* only load='motor' with clamp='zener'"),
    ("classic", {"mosfet_label": "Q1\nX"}, r"mosfet_label: .* printable characters"),
    ("classic", {"mosfet_label": ""}, r"mosfet_label: "),
    ("classic", {"annotations": {"speed": 3.0}}, r"annotations\['speed'\]: a number needs a known key"),
    ("classic", {"annotations": {"duty": 1.5}}, r"annotations\['duty'\]: 1\.5 is out of range"),
    ("classic", {"annotations": [1, 2]}, r"annotations: list is not allowed"),
    ("classic", {"style": {"ink": "red"}}, r"style\.ink: 'red' is not a colour"),
    ("classic", {"style": {"inc": "#000000"}}, r"style: unknown field\(s\) inc"),
    ("classic", {"style": {"font_family": "x;}</style>"}}, r"style\.font_family: .* is not allowed"),
    ("classic", {"style": {"scale": 0.0}}, r"style\.scale: 0\.0 is out of range"),
    ("classic", {"style": 3}, r"style: int is not allowed"),
])
def test_bad_input_raises_design_error(topology: str, kw: dict[str, object], match: str) -> None:
    with pytest.raises(DesignError, match=match):
        _draw(topology, **kw)


def test_style_dataclass_checks_itself() -> None:
    with pytest.raises(DesignError, match=r"style\.charge: '#12345' is not a colour"):
        SchematicStyle(charge="#12345")
    custom = SchematicStyle(charge="#000080")
    assert "#000080" in _draw("classic", style=custom, annotations={"t_high": 1e-3}).svg


def test_reference_lookup_names_what_is_drawn() -> None:
    with pytest.raises(DesignError, match=r"reference: 'D1' is not in this schematic; drawn: R1"):
        _draw("classic").part("D1")
    assert re.search(r"^R1 4\.7 kΩ$", _draw("classic").part("R1").label)
