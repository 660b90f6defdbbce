"""Monte Carlo samples worked one by one leave a long-lived state memory as they found it (each sample's states
are its own; remembered, they would push the shared ones out), and give the same bands as before."""

from steamcalc.calcs import get_calculation
from steamcalc.calcs.letdown.calculation import Inputs
from steamcalc.cases.site import Site
from steamcalc.properties.engines import remembering_states
from steamcalc.runs.uncertainty import Tolerance, run_uncertainty

CALC = get_calculation("letdown")
INPUTS = Inputs(inlet_pressure=16e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15)
TOLERANCES = [Tolerance("inlet_pressure", 0.2e5, False, "0.2 bar"), Tolerance("mass_flow", 0.05, True, "5 %")]


def _remembered_after(samples):
    memory = {}
    with remembering_states(memory):
        section = run_uncertainty(CALC, INPUTS, Site(), TOLERANCES, samples=samples, vectorised=False)
    return len(memory), section


def test_the_samples_add_nothing_to_the_memory():
    few, _ = _remembered_after(4)
    many, section = _remembered_after(40)
    assert many == few > 0   # the nominal case and the one-at-a-time moves only
    assert section["bands"] == run_uncertainty(CALC, INPUTS, Site(), TOLERANCES, samples=40,
                                               vectorised=False)["bands"]
