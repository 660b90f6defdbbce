"""Benchmark: property calls. Prints median times side by side, with ratios to each baseline.

1. Wrapper overhead: SteamState constructors against calling each engine's library directly.
2. Sweeps: steam_arrays.states_ph (fast engine, seuif97, refined on the basic equations) over
   arrays of (p, h) against CoolProp's IF97 backend on the same arrays (goal: at least 5x faster)
   and against an iapws loop.

    python tests/bench/bench_steam.py
"""

import numpy as np
import seuif97
from CoolProp.CoolProp import PropsSI
from iapws import IAPWS97

from steamcalc.properties.steam import SteamState
from steamcalc.properties.steam_arrays import states_ph
from timing import median_seconds  # the script's own folder


def row(name, seconds, baseline):
    print(f"  {name:<60} {seconds * 1e3:>10.4f} ms  {seconds / baseline:>9.3f}x")


def wrapper_overhead():
    print("1. one state: ratio to the engine's library called directly")
    cases = [("p,T", lambda: IAPWS97(P=1.7, T=503.15), lambda: seuif97.pt(1.7, 230.0, 4),
              lambda e: SteamState.from_pT(1.7e6, 503.15, engine=e)),
             ("p,h superheated", lambda: IAPWS97(P=0.35, h=2865.0), lambda: seuif97.ph(0.35, 2865.0, 1),
              lambda e: SteamState.from_ph(0.35e6, 2865e3, engine=e)),
             ("p,h wet", lambda: IAPWS97(P=0.35, h=2000.0), lambda: seuif97.ph(0.35, 2000.0, 15),
              lambda e: SteamState.from_ph(0.35e6, 2000e3, engine=e)),
             ("p,dryness", lambda: IAPWS97(P=0.35, x=1.0), lambda: seuif97.px(0.35, 1.0, 4),
              lambda e: SteamState.from_p_dryness(0.35e6, 1.0, engine=e))]
    for name, raw_iapws, raw_fast, wrapped in cases:
        base = median_seconds(raw_iapws, 200)
        row(f"baseline: iapws {name}", base, base)
        row(f"SteamState {name}, engine iapws", median_seconds(lambda: wrapped("iapws"), 200), base)
        fast_raw = median_seconds(raw_fast, 2000)
        row(f"seuif97 {name}, one property", fast_raw, base)
        row(f"SteamState {name}, engine fast (full state, refined)", median_seconds(lambda: wrapped("fast"), 500),
            base)


def sweeps(n=10_000, loop_points=300):
    print(f"2. sweep of {n} (p, h) states -> T, dryness, phase; ratio to the iapws loop")
    rng = np.random.default_rng(1)
    p = rng.uniform(0.5e5, 40e5, n)
    h = rng.uniform(400e3, 3300e3, n)

    def iapws_loop():
        for pi, hi in zip(p[:loop_points], h[:loop_points]):
            IAPWS97(P=pi / 1e6, h=hi / 1e3)

    loop = median_seconds(iapws_loop, 3) * n / loop_points
    coolprop = median_seconds(lambda: (PropsSI("T", "P", p, "H", h, "IF97::Water"),
                                       PropsSI("Q", "P", p, "H", h, "IF97::Water")), 5)
    ours = median_seconds(lambda: states_ph(p, h), 7)
    row(f"baseline: iapws loop (timed on {loop_points} points, scaled)", loop, loop)
    row("CoolProp IF97 backend, T and Q arrays", coolprop, loop)
    row("steamcalc states_ph (seuif97, refined on the basic equations)", ours, loop)
    print(f"  states_ph: {loop / ours:.0f}x faster than the iapws loop; {coolprop / ours:.1f}x faster than "
          f"CoolProp's IF97 backend on the same arrays ({ours / n * 1e6:.2f} us a state)")


if __name__ == "__main__":
    wrapper_overhead()
    sweeps()
