"""Condensate returns of a site balance: the flash lost at a vented receiver, stated, worked and checked.

Condensate drained from a user on a header at pressure :math:`p_h` leaves its trap as saturated water. In a
receiver open to the site atmosphere :math:`p_a` (a vented receiver) a fraction

.. math:: x = \\frac{h_f(p_h) - h_f(p_a)}{h_g(p_a) - h_f(p_a)}

flashes off and is lost; only :math:`(1 - x)` of the condensate returns. A user whose ``condensate_to`` is
"cooled" (its condensate cooled below its atmospheric boiling point before the receiver) loses none; one
returned under pressure straight into the deaerator ("deaerator") loses none either, the deaerator's
energy balance taking its flash.
"""

from __future__ import annotations

from ...properties.steam import SteamState
from ...units.amounts import Phrase

#: Source named beside the vented-flash check and step.
SOURCE = "flash fraction by the receiver's energy balance, IAPWS-IF97"


def add_return_notes(result, inputs, site):
    """State how the users' returned condensate is taken, when any user returns condensate."""
    returning = [u for u in inputs.users if u.return_fraction > 0.0]
    if not returning:
        return
    result.assumptions.append(
        "Condensate returned to a vented receiver (the default) loses the flash of saturated water at its user's "
        f"header pressure down to the site atmosphere ({site.atmospheric_pressure / 1e5:.5g} bar(a)), "
        "the fraction flashing being the enthalpy of saturated water at the header less that at the atmosphere, over "
        "the latent heat at the atmosphere, off the mass returned; the rest "
        "returns at the stated temperature. A return stated as cooled (cooled below boiling before the receiver) "
        "loses none; one stated as returned to the deaerator (under pressure) loses none, its flash heating the "
        "deaerator. A flash vessel's residual condensate returns to the deaerator under pressure, saturated at "
        "the vessel's pressure")
    routes = ", ".join(f"{u.name}: {u.condensate_to}" for u in sorted(returning, key=lambda u: u.name))
    result.assumptions.append(f"Condensate returned to: {routes}")


def return_flash_results(result, b, c, what):
    """Per user returning to a vented receiver: the flash fraction and the flash lost there."""
    for name in sorted(b.return_flash_vented):
        result.add(f"{c}.{name}.return_flash_vented", f"{what}: {name} condensate flashing off at its vented "
                   "receiver", b.return_flash_vented[name] * 3600, "kg/h")


def return_steps(result, inputs, site, b, c):
    """The worked step of each vented flash: m_fl = m_r · (h_f,h − h_f,a) / (h_g,a − h_f,a)."""
    p_a = site.atmospheric_pressure
    low, high = SteamState.from_p_dryness(p_a, 0.0), SteamState.from_p_dryness(p_a, 1.0)
    users = {u.name: u for u in inputs.users}
    for name in sorted(b.return_flash_vented):
        u = users[name]
        condensate = u.return_fraction * b.user_flows[name]
        h_h = SteamState.from_p_dryness(site.headers[u.header], 0.0)
        result.work(f"{c}: {name} condensate flashing off at its vented receiver",
                    "m_fl = m_c · (h_f,header − h_f,atm) / (h_g,atm − h_f,atm)", "m_c*(h_fh - h_fa)/(h_ga - h_fa)",
                    b.return_flash_vented[name] * 3600, "kg/h", m_c=(condensate * 3600, "kg/h"),
                    h_fh=(h_h.enthalpy / 1e3, "kJ/kg"), h_fa=(low.enthalpy / 1e3, "kJ/kg"),
                    h_ga=(high.enthalpy / 1e3, "kJ/kg"))


def return_flash_checks(result, inputs, balances, what=""):
    """Warn, per user, when its condensate's flash is vented at its receiver (the worst load case)."""
    users = sorted({name for b in balances.values() for name in b.return_flash_vented})
    for name in users:
        worst_case, worst = max(((case, b.return_flash_vented.get(name, 0.0)) for case, b in balances.items()),
                                key=lambda item: item[1])
        fraction = balances[worst_case].return_flash_fraction.get(name, 0.0)
        result.check_limit(
            f"{what}{name}: condensate flash kept", (worst * 3600, "kg/h"), [("<=", (0.0, "kg/h"), "warn")],
            lambda status, worst=worst, fraction=fraction, case=worst_case: Phrase.of(
                "no flash is lost at its receiver") if status == "pass" else Phrase.of(
                "up to {flash:.0f} (" + case + ", {share:.1f} of the condensate) flashes off at its vented receiver "
                "and is lost with its heat; recover it (a flash vessel into a lower-pressure header, or a return under "
                "pressure to the deaerator), or cool the condensate before the receiver",
                flash=(worst * 3600, "kg/h"), share=(fraction * 100, "%")),
            source=SOURCE)
