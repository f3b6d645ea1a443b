"""``timespec explain``: the derivation a reviewer reads, checked by redoing its arithmetic.

Every printed formula is recomputed here from the printed numbers with plain
``math`` (no timespec physics), and must land on the solver's nominal and
worst-case values to 1e-9 relative.  The laws used for the recomputation come
from outside the project:

* first-order RC charge and discharge, ``v(t) = V∞ + (v0 − V∞)·exp(−t/RC)`` and
  its inverse ``t = RC·ln((V∞ − v0)/(V∞ − v))``, with a constant drain folded
  into the target by a Thevenin source transformation (any circuit-theory
  handbook);
* a voltage divider and its Thevenin equivalent (any circuit-theory handbook);
* the Pierce load ``CL = C1·C2/(C1 + C2) + Cs``, the pulling
  ``(Cm/2)·(1/(C0 + CL) − 1/(C0 + CL_ref))``, the critical transconductance and
  the drive level (published crystal-oscillator application notes).
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Callable, Mapping
from functools import cache
from pathlib import Path

import pytest

from timespec import api
from timespec.cli import main
from timespec.design.result import OutputResult, Result
from timespec.outputs.explain import (
    derive,
    explain_spec,
    format_value,
    render_derivation,
    substitute,
)
from timespec.parts import devices, diodes

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.tspec"))
BENCH = ROOT / "examples" / "bench_instrument.tspec"
RACK = ROOT / "examples" / "burn_in_rack.tspec"

REL = 1e-9


def run(*args: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(args), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


@cache
def solved(path: Path) -> Result:
    return api.solve(api.load(path), statistics=False, fixes=False)


@cache
def markdown(path: Path) -> str:
    return render_derivation(derive(solved(path)), "md")


# --------------------------------------------------------------------------
# reading the printed numbers back

_PREFIX = {"f": 1e-15, "p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9}
_UNITS = {"Ω", "F", "V", "A", "s", "Hz", "W", "A/V", "°C", "×", "ppm/K"}
_NUMBER = re.compile(r"^\(?(?P<num>[-+]?\d+(?:\.\d*)?(?:e[-+]?\d+)?)\s*(?P<unit>[^)]*)\)?$")


def parse_value(text: str) -> float:
    """SI value of a printed number such as ``"619.4 kΩ"``, ``"-1 %"``, ``"25.4 ppm"``."""
    m = _NUMBER.match(text.strip().replace("−", "-"))
    assert m is not None, text
    value = float(m.group("num"))
    unit = m.group("unit").strip()
    if unit in ("", *_UNITS):
        return value
    if unit == "%":
        return value * 1e-2
    if unit == "ppm":
        return value * 1e-6
    assert unit[0] in _PREFIX and unit[1:] in _UNITS, text
    return value * _PREFIX[unit[0]]


def _unescape(cell: str) -> str:
    return re.sub(r"\\(.)", r"\1", cell.strip())


def tables(md: str, block: str, output: str) -> dict[str, list[dict[str, float]]]:
    """The printed inputs and symbols of one output, per point, from the Markdown form."""
    start = md.index(f"## {block.replace('_', chr(92) + '_')} (")
    end = md.find("\n## ", start + 1)
    section = md[start : end if end > 0 else len(md)]
    o_start = section.index(f"### {output.replace('_', chr(92) + '_')}:")
    o_end = section.find("\n### ", o_start + 1)
    part = section[o_start : o_end if o_end > 0 else len(section)]
    out: dict[str, list[dict[str, float]]] = {}
    for title in ("Inputs", "Symbols"):
        lines = part[part.index(f"{title}") :].splitlines()
        first = next(k for k, r in enumerate(lines) if r.startswith("|"))
        rows = []
        for r in lines[first + 2 :]:
            if not r.startswith("|"):
                break
            rows.append(r)
        table: list[dict[str, float]] = [{}, {}, {}]
        for row in rows:
            cells = [_unescape(c) for c in re.split(r"(?<!\\)\|", row)[1:-1]]
            for j in range(3):
                table[j][cells[0]] = parse_value(cells[1 + j])
        out[title] = table
    return out


def points(out: OutputResult) -> tuple[float, float, float]:
    return (out.nominal, out.low, out.high)


def check_points(
    path: Path,
    block: str,
    output: str,
    law: Callable[[Mapping[str, float], Mapping[str, float]], float],
    *,
    scale: float | None = None,
) -> None:
    """The law, from the printed numbers, gives the solver's three values."""
    printed = tables(markdown(path), block, output)
    expected = points(solved(path).block(block).best.output(output))  # type: ignore[union-attr]
    for j in range(3):
        got = law(printed["Symbols"][j], printed["Inputs"][j])
        tol = REL * (scale if scale is not None else abs(expected[j]))
        assert abs(got - expected[j]) <= tol, (block, output, j, got, expected[j])


# --------------------------------------------------------------------------
# the laws, in plain math


def timer_scale(s: Mapping[str, float]) -> float:
    return (1 + s["a"] * 1e-6 * (s["T"] - 25.0)) * (1 + s["b"] * (s["V"] - s["V_nom"]))


def oneshot_width(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
    r, c, v, i = s["R"], s["C"] + s["Cs"], s["V"], s["i"]
    v_target = v - i * r  # the drain through R, as a Thevenin source
    v0 = v * s["r_on"] / (r + s["r_on"]) - i * r * s["r_on"] / (r + s["r_on"])  # divider
    vth = s["Vc"] if "Vc" in s else s["k"] * v
    t_charge = r * c * math.log((v_target - v0) / (v_target - vth))
    return timer_scale(s) * t_charge + s["t_pd"]


def classic_halves(s: Mapping[str, float]) -> tuple[float, float]:
    ra, rb, c, v, k, i, td = s["RA"], s["RB"], s["C"] + s["Cs"], s["V"], s["k"], s["i"], s["t_pd"]
    v_n = v * s["r_on"] / (ra + s["r_on"])  # Thevenin equivalent of the discharge pin
    r_n = ra * s["r_on"] / (ra + s["r_on"])
    tau_c, tau_d = (ra + rb) * c, (rb + r_n) * c
    vc, vd = v - i * (ra + rb), v_n - i * (rb + r_n)
    # the comparator switches t_pd late: the capacitor overshoots each threshold
    v_top = vc + (k * v - vc) * math.exp(-td / tau_c)
    v_bot = vd + (k * v / 2 - vd) * math.exp(-td / tau_d)
    t_h = td + tau_c * math.log((vc - v_bot) / (vc - k * v))
    t_l = td + tau_d * math.log((vd - v_top) / (vd - k * v / 2))
    return t_h, t_l


def relaxation_halves(s: Mapping[str, float]) -> tuple[float, float]:
    r, c, v, i, td = s["R"], s["C"] + s["Cs"], s["V"], s["i"], s["t_pd"]
    vt_p = (s["m"] + s["w"] / 2) * v
    vt_m = (s["m"] - s["w"] / 2) * v
    tau = r * c
    vh, vl = v - i * r, -i * r
    v_top = vh + (vt_p - vh) * math.exp(-td / tau)
    v_bot = vl + (vt_m - vl) * math.exp(-td / tau)
    t_h = td + tau * math.log((vh - v_bot) / (vh - vt_p))
    t_l = td + tau * math.log((v_top - vl) / (vt_m - vl))
    return t_h, t_l


def delay_time(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
    r, c, v, i = s["R"], s["C"] + s["Cs"], s["V"], s["i"]
    vth = s["k"] * v if "k" in s else s["Vth"]
    target = v - i * r
    t = r * c * math.log((target - s["V0"]) / (target - vth))
    return t + s.get("t_pd", 0.0)


def crystal_load(s: Mapping[str, float]) -> float:
    return s["C1"] * s["C2"] / (s["C1"] + s["C2"]) + s["Cs"]


def crystal_pulling(s: Mapping[str, float]) -> float:
    return (s["Cm"] / 2) * (1 / (s["C0"] + crystal_load(s)) - 1 / (s["C0"] + s["CL_spec"]))


def crystal_gm_crit(s: Mapping[str, float]) -> float:
    c1, c2 = s["C1"], s["C2"]
    w = 2 * math.pi * s["f"]
    return (
        s["ESR"]
        * w**2
        * (s["C0"] + s["Cs"] + c1 * c2 / (c1 + c2)) ** 2
        * (c1 + c2) ** 2
        / (c1 * c2)
    )


# --------------------------------------------------------------------------
# the command line, end to end


@pytest.mark.parametrize("form", ["text", "rst", "md"])
@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_cli_explains_every_block_of_every_example(path: Path, form: str) -> None:
    code, out, err = run("explain", str(path), "--form", form)
    assert code == 0, err
    assert err == ""
    result = solved(path)
    for b in result.blocks:
        assert b.block.name.replace("_", "\\_" if form == "md" else "_") in out
        assert b.best is not None
        for o in b.best.outputs:
            shown = o.name.replace("_", "\\_") if form == "md" else o.name
            assert f"{shown}:" in out
    assert "solver's numbers differ" not in out
    assert out.count("the model at these three points gives the solver") == sum(
        len(b.best.outputs) for b in result.blocks if b.best is not None
    )


def test_every_family_is_in_the_examples() -> None:
    kinds = {b.block.kind for p in EXAMPLES for b in solved(p).blocks}
    variants = {b.best.design.variant for b in solved(BENCH).blocks if b.block.kind == "astable"}  # type: ignore[union-attr]
    assert kinds == {"oneshot", "astable", "delay", "relaxation", "crystal"}
    assert {"classic", "diode"} <= variants


def test_named_block_and_output_file(tmp_path: Path) -> None:
    target = tmp_path / "hold.md"
    code, out, err = run("explain", str(RACK), "relay_hold", "--form", "md", "-o", str(target))
    assert code == 0 and out == "" and err == ""
    text = target.read_text(encoding="utf-8")
    assert "relay\\_hold" in text and "door\\_stretch" not in text


def test_unknown_block_is_a_usage_error_listing_the_blocks() -> None:
    code, out, err = run("explain", str(RACK), "relay_hld")
    assert code == 2 and out == ""
    assert err == (
        f"timespec: error: {RACK}: no block named 'relay_hld'; did you mean 'relay_hold'? "
        "its blocks are: relay_hold, door_stretch, led_flash\n"
    )


def test_unknown_form_is_a_usage_error() -> None:
    code, _, err = run("explain", str(RACK), "--form", "html")
    assert code == 2 and "invalid choice: 'html'" in err


def test_failing_pinned_block_exits_1(tmp_path: Path) -> None:
    spec = tmp_path / "board.tspec"
    spec.write_text(
        "oneshot hold:\n  width 150 ms ±8%\n  supply 12 V ±5%\n  timer cmos\n"
        "  resistors E96 1% 50 ppm/K\n  capacitors E12 2% PP, 10n to 1u\n  use R 560k, C 220n\n",
        encoding="utf-8",
    )
    code, out, _ = run("explain", str(spec))
    assert code == 1
    assert "hold (oneshot): fails" in out and "does not meet" in out


# --------------------------------------------------------------------------
# the printed arithmetic, redone


def test_oneshot_width_from_the_printed_numbers() -> None:
    for block in ("relay_hold", "door_stretch", "led_flash"):
        check_points(RACK, block, "width", oneshot_width)
    check_points(BENCH, "display_blank", "width", oneshot_width)


def test_part_values_at_the_corners_from_the_printed_inputs() -> None:
    # R = R.value·(1 + tol)·(1 + tc·1e-6·(T − 25 °C)), the printed "parts at a corner" line
    printed = tables(markdown(RACK), "relay_hold", "width")
    for j in range(3):
        x, s = printed["Inputs"][j], printed["Symbols"][j]
        for ref in ("R", "C"):
            value = x[f"{ref}.value"] * (1 + x[f"{ref}.tol"])
            value *= 1 + x[f"{ref}.tc"] * 1e-6 * (x["temp"] - 25.0)
            assert value == pytest.approx(s[ref], rel=REL)


def test_forced_control_voltage_from_the_printed_numbers(tmp_path: Path) -> None:
    spec = tmp_path / "control.tspec"
    spec.write_text(
        "oneshot gate_pulse:\n  width 20 ms ±10%\n  control 8 V ±2%\n  supply 12 V ±5%\n"
        "  ambient 0 degC to 50 degC\n  timer cmos\n  resistors E96 1% 50 ppm/K\n"
        "  capacitors E12 2% PP, 10n to 1u\n",
        encoding="utf-8",
    )
    assert "Vc" in tables(markdown(spec), "gate_pulse", "width")["Symbols"][0]
    check_points(spec, "gate_pulse", "width", oneshot_width)


def test_classic_astable_from_the_printed_numbers() -> None:
    def frequency(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        t_h, t_l = classic_halves(s)
        return 1.0 / (timer_scale(s) * (t_h + t_l))

    def duty(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        t_h, t_l = classic_halves(s)
        return t_h / (t_h + t_l)

    def high(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        return timer_scale(s) * classic_halves(s)[0]

    check_points(BENCH, "beeper", "frequency", frequency)
    check_points(BENCH, "beeper", "duty", duty)
    check_points(BENCH, "beeper", "high", high)


def test_diode_astable_from_the_printed_half_periods() -> None:
    # The diode law itself is the variant's (checked against solve_ivp in its own tests);
    # here the printed halves and drift factor must give the frequency and duty.
    check_points(
        BENCH,
        "sample_tick",
        "frequency",
        lambda s, _x: 1.0 / (timer_scale(s) * (s["tH"] + s["tL"])),
    )
    check_points(BENCH, "sample_tick", "duty", lambda s, _x: s["tH"] / (s["tH"] + s["tL"]))


def test_delay_from_the_printed_numbers() -> None:
    check_points(BENCH, "power_on_reset", "delay", delay_time)


def test_relaxation_from_the_printed_numbers() -> None:
    def frequency(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        return 1.0 / sum(relaxation_halves(s))

    def duty(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        t_h, t_l = relaxation_halves(s)
        return t_h / (t_h + t_l)

    check_points(BENCH, "keypad_scan", "frequency", frequency)
    check_points(BENCH, "keypad_scan", "duty", duty)


def test_crystal_from_the_printed_numbers() -> None:
    out = solved(BENCH).block("mcu_clock").best
    assert out is not None
    spread = max(abs(out.output("accuracy").low), abs(out.output("accuracy").high))
    pull = max(abs(out.output("pulling").low), abs(out.output("pulling").high))

    def accuracy(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        return s["cal"] + s["temp"] + s["age"] + crystal_pulling(s)

    # the nominal pulling and accuracy are zero: compare to the scale of the window
    check_points(BENCH, "mcu_clock", "accuracy", accuracy, scale=spread)
    check_points(BENCH, "mcu_clock", "pulling", lambda s, _x: crystal_pulling(s), scale=pull)
    check_points(BENCH, "mcu_clock", "load", lambda s, _x: crystal_load(s))
    check_points(BENCH, "mcu_clock", "gain_margin", lambda s, _x: s["gm"] / crystal_gm_crit(s))

    def drive(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        i_rms = 2 * math.pi * s["f"] * (s["C0"] + crystal_load(s)) * s["Vpp"]
        i_rms *= (1 + s["C2"] / s["C1"]) / (2 * math.sqrt(2))
        return s["ESR"] * i_rms**2

    check_points(BENCH, "mcu_clock", "drive", drive)


_VARIANTS = """defaults:
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  life 10 years
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n

astable fb:
  frequency 1 kHz ±10%
  duty 45% to 55%
  circuit feedback
  timer cmos

astable bip:
  frequency 500 Hz ±10%
  duty 60% to 75%
  timer bipolar
  supply 12 V ±5%

astable stated:
  frequency 100 Hz ±15%
  duty 20% to 40%
  circuit diode
  diode 0.55 V to 0.75 V
  timer cmos

delay gated:
  delay 1 ms to 3 ms
  threshold 2 V to 3 V
  start 0.2 V
  gate metalgate
"""


def test_other_variants_from_the_printed_numbers(tmp_path: Path) -> None:
    spec = tmp_path / "variants.tspec"
    spec.write_text(_VARIANTS, encoding="utf-8")
    for b in derive(solved(spec)).blocks:
        assert all(o.agrees for o in b.outputs), b.name
    assert derive(solved(spec), ["fb"]).blocks[0].variant == "feedback"

    def frequency(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        return 1.0 / (timer_scale(s) * (s["tH"] + s["tL"]))

    check_points(spec, "fb", "frequency", frequency)
    check_points(
        spec, "bip", "frequency", lambda s, x: 1 / (timer_scale(s) * sum(classic_halves(s)))
    )

    def stated(s: Mapping[str, float], _x: Mapping[str, float]) -> float:
        # the stated drop with its tempco, as the printed line says
        assert s["Vd"] == pytest.approx(s["V25"] + s["tc"] * 1e-3 * (s["T"] - 25.0), rel=REL)
        return frequency(s, _x)

    check_points(spec, "stated", "frequency", stated)
    printed = tables(markdown(spec), "gated", "delay")["Symbols"][0]
    assert printed["V0"] == 0.2 and "k" not in printed and printed["t_pd"] > 0
    check_points(spec, "gated", "delay", delay_time)


def test_worked_lines_substitute_the_printed_numbers() -> None:
    d = derive(solved(RACK), ["relay_hold"])
    width = d.blocks[0].output("width")
    text = render_derivation(d, "text")
    nominal = {s.symbol: format_value(s.values[0], s.kind) for s in width.symbols}
    line = substitute(width.head, nominal)
    assert line in text
    assert line.startswith("width = 1·") and nominal["t_pd"] in line


def test_substitute_keeps_tokens_whole() -> None:
    values = {"T": "60 °C", "C": "2 nF", "VT+": "3 V", "V": "5 V", "i": "-1 µA", "g": "1 mA/V"}
    assert substitute("x = (T − 25 °C)·C", values) == "x = (60 °C − 25 °C)·2 nF"
    assert substitute("y = VT+ − V + i", values) == "y = 3 V − 5 V + (-1 µA)"
    assert substitute("z = g/V", values) == "z = (1 mA/V)/5 V"
    assert substitute("C = C·2", values) == "C = 2 nF·2"


# --------------------------------------------------------------------------
# sources of the constants


def _constants(path: Path, block: str) -> dict[str, tuple[str, str, str]]:
    b = derive(solved(path), [block]).blocks[0]
    return {c.name: (c.value, c.source, c.holds) for c in b.constants}


_MARKED = re.compile(r"\[(DS|CP|Mem|AN|Txt)[/A-Za-z]*\]|stated in the spec|EIA-198|from memory")


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_constant_has_a_source(path: Path) -> None:
    code, out, _ = run("explain", str(path))
    assert code == 0
    for b in solved(path).blocks:
        consts = _constants(path, b.block.name)
        assert consts, b.block.name
        for name, (value, source, _holds) in consts.items():
            assert value, name
            if "tempco" in name and name.split()[0] in {p.ref for p in b.parts}:
                continue  # a part's tempco comes from the spec's policy
            assert _MARKED.search(source), (name, source)
            assert source in out


def _comment_beside(module: Path, entry: str, field: str) -> str:
    """The ``# ...`` comment on a field's line inside ``"entry": Class(`` of a source file."""
    text = module.read_text(encoding="utf-8")
    body = text[text.index(f'"{entry}": ') :]
    line = next(ln for ln in body.splitlines() if ln.strip().startswith(f"{field}="))
    return line.split("#", 1)[1].strip()


def test_timer_sources_are_the_comments_beside_the_class_values() -> None:
    consts = _constants(RACK, "relay_hold")
    source_file = ROOT / "timespec" / "parts" / "devices.py"
    for field in ("r_on_max", "drift_ppm", "supply_drift", "i_threshold_max", "c_node"):
        printed = consts[f"cmos timer {field}"][1]
        assert printed == _comment_beside(source_file, "cmos", field), field
        assert _MARKED.search(printed)
    value, _, holds = consts["cmos timer r_on_max"]
    timer = devices.TIMER_CLASSES["cmos"]
    assert value == f"{timer.r_on_max:.4g} Ω"
    assert holds.startswith("discharge current 0 A…")
    assert holds.endswith(f"({timer.r_on_held.source})")
    lo, hi = devices.BOARD_STRAY
    assert consts["board stray at a timing node"][0] == f"{lo * 1e12:g} pF…{hi * 1e12:g} pF"


def test_gate_and_diode_constants_carry_their_ranges() -> None:
    gate = _constants(BENCH, "keypad_scan")
    source_file = ROOT / "timespec" / "parts" / "devices.py"
    _, source, holds = gate["highspeed gate rising"]
    assert source == _comment_beside(source_file, "highspeed", "rising")
    held = devices.GATE_CLASSES["highspeed"].thresholds_held
    assert holds.startswith(f"{held.quantity} ") and holds.endswith(f"({held.source})")
    speed = devices.GATE_CLASSES["highspeed"].speed_held
    assert gate["highspeed gate t_pd"][2].endswith(f"…∞ ({speed.source})")
    diode = _constants(BENCH, "sample_tick")
    d = diodes.SMALL_SIGNAL
    value, source, holds = diode["small-signal silicon diode is_band"]
    assert value == f"{d.is_band[0] * 1e9:g} nA…{d.is_band[1] * 1e9:g} nA"
    assert _MARKED.search(source)
    assert holds == f"{d.held.quantity} 1 µA…10 mA ({d.held.source})"
    assert _MARKED.search(diode["small-signal silicon diode n_band"][1])  # the shared comment
    assert _MARKED.search(diode["small-signal silicon diode eg"][1])


def test_class2_ceramic_shows_its_bias_and_ageing_ranges(tmp_path: Path) -> None:
    spec = tmp_path / "x7r.tspec"
    spec.write_text(
        "oneshot blink:\n  width 40 ms ±40%\n  supply 5 V ±5%\n  ambient 0 degC to 50 degC\n"
        "  life 5 years\n  timer cmos\n  resistors E96 1% 100 ppm/K\n"
        "  capacitors E6 10% X7R rated 16 V, 100n to 1u\n",
        encoding="utf-8",
    )
    consts = _constants(spec, "blink")
    assert consts["X7R dielectric"][0] == "change over -55…125 °C -15…+15 %"
    value, source, holds = consts["X7R DC-bias loss"]
    assert source == "[AN/Mem] class 2 ceramic bias curves"
    assert holds.startswith("DC stress (applied / rated voltage) 0…1")
    value, source, holds = consts["X7R ageing rate"]
    assert value == "1…2.5 %/decade-hour after the last heat"
    assert (
        holds == "time after the last reflow 1 h…100000 h ([AN/Mem] class 2 ceramic ageing curves)"
    )
    width = derive(solved(spec), ["blink"]).blocks[0].output("width")
    assert any(".bias" in p and ".age" in p for p in width.parts)  # both losses in the C line
    assert width.agrees


# --------------------------------------------------------------------------
# the structured form and the other edges


def test_derivation_numbers_are_the_solvers() -> None:
    for path in EXAMPLES:
        result = solved(path)
        for b in derive(result).blocks:
            best = result.block(b.name).best
            assert best is not None
            for o in b.outputs:
                assert o.agrees, (b.name, o.name)
                assert o.solver == points(best.output(o.name))


def test_explain_spec_solves_only_the_named_blocks() -> None:
    d = explain_spec(api.load(RACK), ["led_flash", "relay_hold"])
    assert [b.name for b in d.blocks] == ["led_flash", "relay_hold"]
    assert d.ok and d.source == str(RACK)


def test_unknown_form_raises() -> None:
    with pytest.raises(ValueError, match="unknown form 'html'"):
        render_derivation(derive(solved(RACK), ["led_flash"]), "html")


def test_rst_form_parses_cleanly() -> None:
    import docutils.core
    import docutils.utils

    text = render_derivation(derive(solved(BENCH)), "rst")
    stream = io.StringIO()
    docutils.core.publish_doctree(
        text, settings_overrides={"warning_stream": stream, "report_level": 1, "halt_level": 5}
    )
    assert stream.getvalue() == ""


def test_directive_has_the_explain_option() -> None:
    from docutils.parsers.rst import directives

    from timespec.sphinxext import TableDirective

    assert TableDirective.option_spec["explain"] is directives.flag
