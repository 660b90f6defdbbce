"""Benchmark: what one let-down recalculation costs, against raw IF97 calls.

Prints, side by side, the median time of (a) the bare iapws calls a let-down needs
(inlet p,T and outlet p,h), (b) SteamState doing the same through steamcalc, (c) one
full calculate() with the desuperheater, and (d) calculate() plus building the record,
as a widget change does; with ratios to (a). Not a test: timings are never asserted.

    python tests/bench/bench_letdown.py
"""

import statistics
import time

from iapws import IAPWS97

from steamcalc.calcs.base import to_record_inputs
from steamcalc.calcs.letdown import Inputs, calculate
from steamcalc.record import build_record
from steamcalc.site import Site
from steamcalc.steam import SteamState

INPUTS = Inputs(inlet_pressure=16.99e5, outlet_pressure=3.49e5, mass_flow=1.25, inlet_temperature=503.15,
                target_superheat=10.0, water_temperature=378.15, water_pressure=20.99e5)
SITE = Site()


def median_ms(fn, repeat=30):
    fn()
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times) * 1e3


def raw_iapws():
    inlet = IAPWS97(P=1.699, T=503.15)
    IAPWS97(P=0.349, h=inlet.h)


def wrapped():
    inlet = SteamState.from_pT(16.99e5, 503.15)
    SteamState.from_ph(3.49e5, inlet.enthalpy)


def full_calculation():
    calculate(INPUTS, SITE)


def widget_change():
    result = calculate(INPUTS, SITE)
    build_record(kind="letdown", case_id="B", revision="A", title="bench", prepared_by="", site=SITE,
                 inputs_table=to_record_inputs(INPUTS, {}), result=result)


if __name__ == "__main__":
    baseline = median_ms(raw_iapws)
    print(f"{'what':<44} {'median ms':>10} {'ratio':>8}")
    for name, fn in [("baseline: iapws p,T then p,h", raw_iapws), ("SteamState p,T then p,h", wrapped),
                     ("let-down calculate() with desuperheater", full_calculation),
                     ("calculate() + record (a widget change)", widget_change)]:
        ms = median_ms(fn)
        print(f"{name:<44} {ms:>10.3f} {ms / baseline:>8.2f}")
