"""Every case a calculation accepts is issued: run writes JSON, HTML and Markdown, verify says VERIFIED,
and the workbook opens on it — over each kind's whole input space (hypothesis, fixed seed).

A few dozen examples a kind here (``STEAMCALC_EXAMPLES`` sets how many); ``tests/bench/bench_every_case.py``
runs thousands and prints the counts.
"""

import os
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings

from tests.issue_every_case import STRATEGIES, accepted, issue_and_verify, workbook_opens, write_case

EXAMPLES = int(os.environ.get("STEAMCALC_EXAMPLES", "60"))


@pytest.mark.parametrize("kind", sorted(STRATEGIES))
def test_every_accepted_case_is_issued_and_verifies(kind):
    seen = {"accepted": 0, "refused": 0}
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)

        @settings(max_examples=EXAMPLES, derandomize=True, deadline=None, database=None,
                  suppress_health_check=list(HealthCheck))
        @given(inputs_text=STRATEGIES[kind]())
        def check(inputs_text):
            seen["drawn"] = seen.get("drawn", 0) + 1   # each example its own case id, so none meets another's record
            path = write_case(folder, kind, inputs_text, seen["drawn"])
            if not accepted(path):
                seen["refused"] += 1
                return
            seen["accepted"] += 1
            problems = issue_and_verify(path, folder / "records")
            if seen["accepted"] % 5 == 1:   # a workbook is slower to build: every fifth accepted case
                problems += workbook_opens(path, folder / "records")
            assert not problems, f"{inputs_text}\n" + "\n".join(problems)

        check()
    assert seen["accepted"] >= EXAMPLES // 3, seen   # the strategy must reach mostly accepted cases


FOUND = {   # cases the property test found, kept as plain examples
    "exchanger, no fouling (clean and fouled U a last bit apart)": ("exchanger", (
        '[inputs]\nsteam_pressure = "17.1278 bar(g)"\nprocess_inlet_temperature = "118.1886 degC"\n'
        'process_outlet_temperature = "121.7503 degC"\nprocess_flow = "99.9412 t/h"\noverall_u = "3.5617 kW/(m^2*K)"'),
        None),
    "let-down, a DN80 valve in a DN50 line (Fp undefined: it was NaN, then a complex number)": ("letdown", (
        '[inputs]\ninlet_pressure = "2.0 bar(a)"\noutlet_pressure = "1.5 bar(a)"\nmass_flow = "1.0 t/h"\n'
        'inlet_dryness = 1.0\n[inputs.valve]\nrated_kv = "128.0 m^3/h"\nxt = 0.7\nmax_inlet_pressure = "2.1 bar(a)"\n'
        'relief_set_pressure = "1.98 bar(a)"\nvalve_size = "DN80"\nvalve_outlet_size = "DN100"\n[inputs.lines]\n'
        'inlet_size = "DN50"\noutlet_size = "DN100"'), "valve.valve_size"),
    "let-down, a flow the DN80 valve cannot pass (Kv ran away past 1e15)": ("letdown", (
        '[inputs]\ninlet_pressure = "1.9 bar(a)"\noutlet_pressure = "1.05 bar(a)"\nmass_flow = "16.7305 t/h"\n'
        'inlet_temperature = "236.6041 degC"\n[inputs.valve]\nrated_kv = "1.1 m^3/h"\nxt = 0.7\n'
        'max_inlet_pressure = "1.995 bar(a)"\nrelief_set_pressure = "1.865 bar(a)"\nvalve_size = "DN80"\n'
        'valve_outlet_size = "DN100"\n[inputs.lines]\ninlet_size = "DN100"\noutlet_size = "DN100"'), "valve.valve_size"),
}


@pytest.mark.parametrize("name", sorted(FOUND))
def test_cases_the_property_test_found(name, tmp_path, capsys):
    kind, inputs_text, refused_field = FOUND[name]
    path = write_case(tmp_path, kind, inputs_text, 1)
    if refused_field is not None:   # refused by its field, with the fix: never a NaN or an internal error
        assert not accepted(path)
        problems = issue_and_verify(path, tmp_path / "records")
        assert problems and f"field '{refused_field}'" in problems[0] and "internal" not in problems[0]
        return
    assert accepted(path)
    assert issue_and_verify(path, tmp_path / "records") == []
