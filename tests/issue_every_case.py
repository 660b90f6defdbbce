"""Case texts drawn over each kind's whole input space, and the check that an accepted case is issued.

Shared by ``tests/test_every_case_issues.py`` (a few dozen examples a kind, fixed seed) and
``tests/bench/bench_every_case.py`` (thousands, printing the counts). A case is *accepted* when its file
parses and ``calculate()`` returns; an accepted case must then be issued by ``steamcalc run`` (JSON, HTML
and Markdown), verify as VERIFIED, and open in its workbook.
"""

from __future__ import annotations

import contextlib
import io
import json
from pathlib import Path

from hypothesis import strategies as st

from steamcalc.calcs import get_calculation
from steamcalc.cases.site import case_inputs, case_site, load_case
from steamcalc.cli import main
from steamcalc.errors import SteamcalcError
from tests.worked_step_arithmetic import written_step_problems


def _number(low, high):
    return st.floats(min_value=low, max_value=high, allow_nan=False, allow_infinity=False).map(lambda v: round(v, 4))


@st.composite
def letdown_case(draw):
    """Let-down from 1.2 to 160 bar(a), dry saturated to 560 °C, outlet from 1.05 bar(a) to just below the inlet."""
    p1 = draw(_number(1.2, 160.0))
    p2 = draw(_number(1.05, max(1.05, p1 * 0.98)))
    lines = ['[inputs]', f'inlet_pressure = "{p1} bar(a)"', f'outlet_pressure = "{p2} bar(a)"',
             f'mass_flow = "{draw(_number(0.05, 60.0))} t/h"']
    state = draw(st.sampled_from(("superheat", "temperature", "saturated")))
    if state == "superheat":
        lines.append(f'inlet_superheat = "{draw(_number(0.5, 250.0))} K"')
    elif state == "temperature":
        lines.append(f'inlet_temperature = "{draw(_number(100.0, 560.0))} degC"')
    else:
        lines.append("inlet_dryness = 1.0")
    if draw(st.booleans()):
        lines += ["[inputs.desuperheater]", f'target_superheat = "{draw(_number(3.0, 60.0))} K"',
                  f'water_temperature = "{draw(_number(20.0, 150.0))} degC"',
                  f'water_pressure = "{round(p2 + draw(_number(2.0, 40.0)), 4)} bar(a)"']
        if draw(st.booleans()):
            lines += [f'spray_supply_pressure = "{round(p2 + draw(_number(5.0, 60.0)), 4)} bar(a)"',
                      'nozzle_differential = "2 bar"', "spray_valve_fl = 0.9",
                      f'spray_valve_rated_kv = "{draw(_number(0.05, 5.0))} m^3/h"', 'sensor_distance = "6 m"']
    if draw(st.booleans()):
        lines += ["[inputs.valve]", f'rated_kv = "{draw(_number(1.0, 400.0))} m^3/h"', "xt = 0.7",
                  f'max_inlet_pressure = "{round(p1 * 1.05, 4)} bar(a)"',
                  f'relief_set_pressure = "{round(min(p2 * 1.3 + 0.5, p1 * 0.99), 4)} bar(a)"',
                  'valve_size = "DN80"', 'valve_outlet_size = "DN100"']
        lines += ["[inputs.lines]", f'inlet_size = "{draw(st.sampled_from(("DN50", "DN80", "DN100", "DN150")))}"',
                  f'outlet_size = "{draw(st.sampled_from(("DN100", "DN150", "DN200", "DN300")))}"']
    if draw(st.booleans()):
        lines += ["[inputs.turbine]", f"isentropic_efficiency = {draw(_number(0.3, 0.85))}"]
    return "\n".join(lines)


@st.composite
def flash_case(draw):
    """Flash from 1.2 to 100 bar(a), saturated or subcooled condensate, one to four stages."""
    p1 = draw(_number(1.2, 100.0))
    lines = ['[inputs]', f'condensate_pressure = "{p1} bar(a)"', f'condensate_flow = "{draw(_number(0.05, 50.0))} t/h"']
    stages = draw(st.integers(min_value=1, max_value=4))
    pressures = sorted({draw(_number(1.01, max(1.01, p1 * 0.95))) for _ in range(stages)}, reverse=True)
    if len(pressures) == 1:
        lines.append(f'flash_pressure = "{pressures[0]} bar(a)"')
    else:
        lines.append("stages = [" + ", ".join(f'"{p} bar(a)"' for p in pressures) + "]")
    if draw(st.booleans()):
        lines.append(f'lp_demand = "{draw(_number(0.01, 20.0))} t/h"')
    return "\n".join(lines)


@st.composite
def exchanger_case(draw):
    """Steam heater from 0.5 to 40 bar(g), water heated over a range of loads and areas."""
    t_in = draw(_number(5.0, 150.0))
    lines = ['[inputs]', f'steam_pressure = "{draw(_number(0.5, 40.0))} bar(g)"',
             f'process_inlet_temperature = "{t_in} degC"',
             f'process_outlet_temperature = "{round(t_in + draw(_number(2.0, 120.0)), 4)} degC"',
             f'process_flow = "{draw(_number(0.1, 200.0))} t/h"']
    if draw(st.booleans()):
        lines.append(f'overall_u = "{draw(_number(0.3, 5.0))} kW/(m^2*K)"')
        if draw(st.booleans()):
            lines.append(f'installed_area = "{draw(_number(0.2, 300.0))} m^2"')
        if draw(st.booleans()):
            lines.append(f'condensate_back_pressure = "{draw(_number(0.0, 3.0))} bar(g)"')
    return "\n".join(lines)


STRATEGIES = {"letdown": letdown_case, "flash": flash_case, "exchanger": exchanger_case}


def write_case(folder, kind, inputs_text, number):
    """A case file of this kind with the drawn [inputs], in ``folder``."""
    path = Path(folder) / f"{kind}-{number}.toml"
    path.write_text(f'[case]\nkind = "{kind}"\nid = "P-{number}"\ntitle = "drawn case"\nrevision = "A"\n'
                    f'prepared_by = "property test"\n\n{inputs_text}\n', encoding="utf-8")
    return path


def accepted(path):
    """True when the case file parses and its calculation returns a result."""
    try:
        case = load_case(path)
        site = case_site(case, None)
        inputs, _ = case_inputs(case, site)
        get_calculation(case.kind).calculate(inputs, site)
    except SteamcalcError:
        return False
    return True


def issue_and_verify(path, out):
    """Run the case as a user does and verify its record; a list of what went wrong (empty when all held)."""
    problems = []
    said = io.StringIO()
    with contextlib.redirect_stdout(said), contextlib.redirect_stderr(said):
        code = main(["run", str(path), "--out", str(out)])
    if code not in (0, 1):
        return [f"run exited {code}: {said.getvalue().strip()[-400:]}"]
    stem = Path(out) / f"P-{Path(path).stem.rsplit('-', 1)[1]}_revA"
    problems += [f"{stem.name}{suffix} not written" for suffix in (".json", ".html", ".md")
                 if not stem.with_suffix(suffix).is_file()]
    said = io.StringIO()
    with contextlib.redirect_stdout(said), contextlib.redirect_stderr(said):
        code = main(["verify", str(stem.with_suffix(".json"))])
    if code != 0 or "verdict: VERIFIED" not in said.getvalue():
        problems.append(f"verify exited {code}: {said.getvalue().strip()[-600:]}")
    if stem.with_suffix(".json").is_file():
        # Its steps, printed in SI and US, must give their values on a calculator.
        problems += written_step_problems(json.loads(stem.with_suffix(".json").read_text(encoding="utf-8")))
    return problems


def workbook_opens(path, out):
    """The kind's workbook opens on the case and shows its record (no refusal)."""
    from steamcalc.ui.workbook import Workbook

    workbook = Workbook(path, out)
    return [] if workbook.error is None and workbook.record is not None else [f"workbook refused: {workbook.error}"]
