"""A flash vessel under vacuum relieving liquid below its boiling point at the atmosphere through a discharge pipe.

Found by an independent checker: condensate at 95 °C into a vessel at 0.5 bar(a), fed failed-open with the level not
held, with a DN50 × 5 m discharge pipe, was not issued at all: "field 'discharge line omega': the mixture must expand
as its pressure falls along the discharge pipe", an input the user does not have (0.3.1 did the same). The liquid does
not flash in the pipe: its line is a liquid line, as the heater's relief valves' are. Expected: the record is issued,
with the liquid line's back pressure worked by Darcy-Weisbach.

Sources: Darcy-Weisbach with Colebrook's friction factor (fluids), the liquid's density and viscosity at the
atmosphere and its temperature from IAPWS-IF97 and IAPWS 2008 (iapws), worked here without steamcalc's functions.
"""

import json

import pytest
from fluids.friction import Colebrook
from iapws import IAPWS97

from steamcalc.cli import main

CASE = """[case]
kind = "flash"
id = "FL-VAC"
title = "Flash vessel under vacuum, liquid relief"
revision = "A"
prepared_by = "t"

[inputs]
condensate_pressure = "12 bar(g)"
condensate_flow = "3.2 t/h"
condensate_temperature = "95 degC"
flash_pressure = "0.5 bar(a)"

[inputs.overpressure]
design_pressure = "7 bar(g)"
inlet_capacity = "9 t/h"
level_held = false
discharge_size = "DN50"
discharge_length = "5 m"
discharge_fittings_k = 1.0
"""


def test_the_liquid_relief_of_a_vessel_under_vacuum_is_issued_with_a_liquid_line(tmp_path, capsys):
    case = tmp_path / "FL-VAC.toml"
    case.write_text(CASE)
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1), capsys.readouterr().err
    path = tmp_path / "out" / "FL-VAC_revA.json"
    record = json.loads(path.read_text("utf-8"))
    step = next(s for s in record["steps"] if s["label"] == "Vessel relief: built-up back pressure (liquid)")
    operands = {name: entry["value"] for name, entry in step["operands"].items()}
    # By hand: p1 = p_atm + (f·L/D + K)·G²/(2ρ), the liquid at the atmosphere and its relieving temperature.
    temperature = 273.15 + 95.0
    liquid = IAPWS97(P=0.101325, T=temperature)
    bore = operands["D"] / 1e3
    flux = operands["G"]
    friction = Colebrook(flux * bore / liquid.mu, 4.5e-5 / bore)
    by_hand = 101325.0 + (friction * 5.0 / bore + 1.0) * flux ** 2 / (2 * liquid.rho)
    assert operands["rho"] == pytest.approx(liquid.rho, rel=2e-3)    # the relieving temperature is near 95 °C
    assert record["results"]["vessel_relief_built_up_back_pressure"]["value"] == pytest.approx(by_hand / 1e5,
                                                                                              rel=5e-3)
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
