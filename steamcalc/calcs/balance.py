"""Energy balances re-worked with the second IF97 implementation: a check that can fail.

A balance summed from the enthalpies the calculation itself used closes by construction. Here
each stream's enthalpy is evaluated afresh, from its recorded pressure and temperature (or
dryness), with the other IF97 engine than the one in use, and the balance is summed
again. A wrong flow, a wrong state or a bug in either property engine shows as a residual.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..properties.engines import other_engine
from ..units.amounts import Phrase
from .base import full_record_wanted

#: Residual, as a fraction of the heat transferred in the balance, above which the check
#: fails. Two IF97 implementations agree to about 1e-8 in h; the iapws backward T(p, h)
#: equations are consistent to 10-25 mK (IAPWS R7-97, tables 6, 21), which is ~1e-4 of a
#: typical heat transfer; 1e-3 leaves room for that and catches a flow wrong by more than 0.1 %.
RELATIVE_TOLERANCE = 1e-3

@dataclass(frozen=True)
class Stream:
    """A stream in an energy balance: mass flow (kg/s) and a state fixed by pressure (Pa,
    absolute) with temperature (K) for single-phase states or dryness (0 to 1) for saturated
    and wet ones."""

    name: str
    mass_flow: float
    pressure: float
    temperature: float | None = None
    dryness: float | None = None

    @classmethod
    def of(cls, name, mass_flow, state):
        """The stream of a SteamState: its pressure with its temperature or, when two-phase, dryness."""
        if state.dryness is not None:
            return cls(name, mass_flow, state.pressure, dryness=state.dryness)
        return cls(name, mass_flow, state.pressure, temperature=state.temperature)


def second_engine_enthalpy(stream, engine=None):
    """Specific enthalpy (J/kg) of a stream's state from the other IF97 engine than the one in use
    (the fast engine for an issued record; iapws under ``verify --engine fast``)."""
    from ..properties.steam import SteamState

    engine = other_engine() if engine is None else engine
    if stream.dryness is not None:
        return SteamState.from_p_dryness(stream.pressure, stream.dryness, engine=engine).enthalpy
    return SteamState.from_pT(stream.pressure, stream.temperature, engine=engine).enthalpy


def energy_balance_residual(inflows, outflows, heat_transferred, heat_in=0.0):
    """Residual of Σ ṁh in + Q = Σ ṁh out, over the heat transferred, with second-engine enthalpies.

    Parameters
    ----------
    inflows, outflows : sequence of Stream
    heat_transferred : float
        The heat moved within the balance (the duty, the spray's uptake, the flash's latent
        heat), W: the scale an error is judged against.
    heat_in : float
        Heat added across the boundary, W (0 for adiabatic equipment).

    Returns
    -------
    float
        |Σ ṁh_in + Q − Σ ṁh_out| / heat_transferred.

    Examples
    --------
    Adiabatic mixing of 1 kg/s of steam at 3.5 bar(a), 200 °C with 0.05 kg/s of water at
    20 bar(a), 100 °C, checked against an outlet found with the same engine:

    >>> from steamcalc.properties.steam import SteamState
    >>> steam, water = SteamState.from_pT(3.5e5, 473.15), SteamState.from_pT(20e5, 373.15)
    >>> h_mix = (1.0 * steam.enthalpy + 0.05 * water.enthalpy) / 1.05
    >>> outlet = SteamState.from_ph(3.5e5, h_mix)
    >>> r = energy_balance_residual([Stream.of("steam", 1.0, steam), Stream.of("water", 0.05, water)],
    ...                             [Stream.of("outlet", 1.05, outlet)], 0.05 * (h_mix - water.enthalpy))
    >>> r < 1e-4
    True
    """
    total_in = sum(s.mass_flow * second_engine_enthalpy(s) for s in inflows) + heat_in
    total_out = sum(s.mass_flow * second_engine_enthalpy(s) for s in outflows)
    return abs(total_in - total_out) / abs(heat_transferred)


def check_energy_balance(result, name, inflows, outflows, heat_transferred, heat_in=0.0):
    """Add the check ``name``: the balance re-summed with the second engine's enthalpies."""
    if not full_record_wanted():   # a Monte Carlo sample keeps only numbers
        return None
    residual = energy_balance_residual(inflows, outflows, heat_transferred, heat_in)
    # Stream names are the calculation's own words; braces are doubled so that a name is never a slot.
    streams = ", ".join(s.name for s in (*inflows, *outflows)).replace("{", "{{").replace("}", "}}")
    detail = Phrase.of(
        f"re-summed from the recorded states ({streams}) with the second IF97 implementation: residual "
        "{residual:.1e} of the heat transferred (tolerance {tolerance:.0e}); it closes by construction, so it "
        "catches a fault in the program, not a wrong basis", residual=(residual, ""), tolerance=(RELATIVE_TOLERANCE, ""))
    if residual <= RELATIVE_TOLERANCE:
        result.notice(name, detail)
    else:   # a balance that does not close is a fault in the program: the record says so and fails
        result.check_limit(name, (residual, ""), [("<=", (RELATIVE_TOLERANCE, ""), "fail")], detail)
    return residual
