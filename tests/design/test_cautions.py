"""Safety cautions: always the general ones, and the load-specific ones with the computed figures."""

from __future__ import annotations

import dataclasses as dc

import pytest

from pwmkit.cautions import CAUTION_IDS, SAFETY_EXTRA_LOW_VOLTAGE_DC, Caution, cautions_for
from pwmkit.design import Freewheel, LedLoad, demo_designs
from pwmkit.errors import DesignError
from pwmkit.evaluate import evaluate
from pwmkit.loads.led import LED_EYE_SAFETY_NOTE

DEMOS = demo_designs()
FAN, GROW = DEMOS["fan"], DEMOS["grow-bar"]
ALWAYS = ("design-aid", "bench", "codes", "hot-parts")


def ids(cautions) -> list[str]:
    return [c.id for c in cautions]


@pytest.mark.parametrize("design", [FAN, GROW, GROW.replace(load=None)], ids=["fan", "grow-bar", "no-load"])
@pytest.mark.parametrize("with_evaluation", [False, True])
def test_general_cautions_always_present(design, with_evaluation: bool) -> None:
    ev = evaluate(design, spread=False) if with_evaluation else None
    out = cautions_for(design, ev)
    assert ids(out)[:4] == list(ALWAYS)
    assert ids(out) == [i for i in CAUTION_IDS if i in ids(out)]  # display order
    text = " ".join(c.text for c in out)
    # design aid for low-voltage circuits; verify on the bench; local codes and licensed practice;
    # mains needs a qualified person (brief, common practice)
    for phrase in ("design aid", "low-voltage", "measure", "codes and licensed practice", "mains", "qualified person"):
        assert phrase in text, phrase


def test_motor_gets_inductive_kick_with_computed_drain_voltage() -> None:
    ev = evaluate(FAN, spread=False)
    kick = {c.id: c for c in ev.cautions}["inductive-kick"]
    # drain peak = highest load supply + clamp voltage (first-order RL decay: Alexander & Sadiku, Fundamentals of Electric Circuits, 6th ed., ch. 7), here 13.8 V + ≈ 0.27 V
    v_peak = ev.conditions.load_supply_max + ev.conditions.v_clamp
    assert f"{v_peak:.3g} V" in kick.text
    assert "freewheel diode" in kick.text and "must be fitted" in kick.text
    assert "eye-safety" not in ids(ev.cautions)
    assert "inductive-kick" in ids(cautions_for(FAN))  # also without an evaluation, without numbers


def test_zener_clamp_mentioned() -> None:
    d = FAN.replace(freewheel=Freewheel(diode="schottky-1a", clamp="zener", v_zener=12.0))
    kick = {c.id: c for c in cautions_for(d, evaluate(d, spread=False))}["inductive-kick"]
    assert "Zener" in kick.text


def test_led_gets_eye_safety_in_our_own_words() -> None:
    out = {c.id: c for c in cautions_for(GROW, evaluate(GROW, spread=False))}
    eye = out["eye-safety"]
    # do not look into high-brightness LEDs at close range; photobiological safety per IEC 62471
    assert "close range" in eye.text and "IEC 62471" in eye.text
    assert eye.text != LED_EYE_SAFETY_NOTE
    assert "inductive-kick" not in out
    assert "high-brightness source" not in eye.text  # 3 × 20 mA white LEDs: about 64 mW each


def test_bright_leds_strengthen_the_eye_caution() -> None:
    # 3.1 V × 100 mA = 0.31 W per LED while on (mid-power LEDs start at about 0.2 W)
    d = GROW.replace(load=LedLoad(n_series=3, n_parallel=1, vf=3.1, vf_spread=0.1, r_series=27.0))
    eye = {c.id: c for c in cautions_for(d, evaluate(d, spread=False))}["eye-safety"]
    assert "high-brightness source" in eye.text


def test_hot_parts_carry_computed_temperatures() -> None:
    ev = evaluate(FAN, spread=False)
    hot = {c.id: c for c in ev.cautions}["hot-parts"]
    assert f"{ev.mosfet.tj_c:.0f} °C" in hot.text
    assert f"{ev.freewheel.tj_c:.0f} °C" in hot.text
    assert f"{FAN.t_ambient_max_c:g} °C ambient" in hot.text
    assert "burn" not in hot.text  # nothing above 60 °C here
    runaway = GROW.replace(load=dc.replace(GROW.load, n_parallel=1000))
    hot2 = {c.id: c for c in cautions_for(runaway, evaluate(runaway, spread=False))}["hot-parts"]
    assert "burn skin" in hot2.text and "thermal runaway" in hot2.text


def test_high_voltage_caution_above_safety_extra_low_voltage() -> None:
    # 60 V DC: upper end of the safety extra-low-voltage band (common practice, IEC 61140 voltage bands)
    assert SAFETY_EXTRA_LOW_VOLTAGE_DC == 60.0
    d = GROW.replace(v_load=80.0, load=LedLoad(n_series=24, n_parallel=1, vf=3.1, vf_spread=0.1, r_series=330.0))
    out = cautions_for(d)
    assert "high-voltage" in ids(out)
    assert "80 V" in {c.id: c for c in out}["high-voltage"].text
    assert "high-voltage" not in ids(cautions_for(GROW))


def test_bad_input() -> None:
    with pytest.raises(DesignError, match="expected a Design"):
        cautions_for("fan")
    with pytest.raises(DesignError, match="caution id"):
        Caution("nope", "t", "x")
    with pytest.raises(DesignError, match="must not be empty"):
        Caution("bench", "", "x")


def test_caution_serialises_and_renders() -> None:
    c = cautions_for(FAN)[0]
    assert c.to_dict() == {"id": c.id, "title": c.title, "text": c.text}
    assert c.title in c._repr_html_()
