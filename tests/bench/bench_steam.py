"""Benchmark: property calls. Prints median times side by side, with ratios to each baseline.

1. Wrapper overhead: SteamState constructors against calling iapws directly (target ≤ 1.3×).
2. Sweeps: states_ph over arrays of (p, h) against an iapws loop (target ≥ 100× faster) and
   against CoolProp's IF97 backend called on the same arrays (target within 3×).

    python tests/bench/bench_steam.py
"""

import numpy as np
from CoolProp.CoolProp import PropsSI
from iapws import IAPWS97

from steamcalc.steam import SteamState
from steamcalc.steam_arrays import states_ph
from timing import median_seconds  # the script's own folder


def row(name, seconds, baseline):
    print(f"  {name:<56} {seconds * 1e3:>10.4f} ms  {seconds / baseline:>9.3f}x")


def wrapper_overhead():
    print("1. wrapper overhead: one state, ratio to iapws called directly")
    cases = [("p,T", lambda: IAPWS97(P=1.7, T=503.15), lambda: SteamState.from_pT(1.7e6, 503.15)),
             ("p,h superheated", lambda: IAPWS97(P=0.35, h=2865.0), lambda: SteamState.from_ph(0.35e6, 2865e3)),
             ("p,h wet", lambda: IAPWS97(P=0.35, h=2000.0), lambda: SteamState.from_ph(0.35e6, 2000e3)),
             ("p,dryness", lambda: IAPWS97(P=0.35, x=1.0), lambda: SteamState.from_p_dryness(0.35e6, 1.0))]
    for name, raw, wrapped in cases:
        base = median_seconds(raw, 200)
        row(f"baseline: iapws {name}", base, base)
        row(f"SteamState {name}", median_seconds(wrapped, 200), base)


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
                                 PropsSI("Q", "P", p, "H", h, "IF97::Water")), 7)
    ours = median_seconds(lambda: states_ph(p, h), 7)
    row(f"baseline: iapws loop (timed on {loop_points} points, scaled)", loop, loop)
    row("baseline: CoolProp IF97 backend, T and Q arrays", coolprop, loop)
    row("steamcalc states_ph (refined on the basic equations)", ours, loop)
    print(f"  states_ph: {loop / ours:.0f}x faster than the iapws loop; {ours / coolprop:.2f}x CoolProp's IF97 time")


if __name__ == "__main__":
    wrapper_overhead()
    sweeps()
