"""The worked steps of one load case of a balance: what a checker re-works with a calculator.

Each step keeps its operands as amounts (:meth:`~steamcalc.calcs.base.Result.work`): user flows from
duties, desuperheater spray, blowdown, the deaerator's steam and make-up, and the boiler's fuel.
"""

from __future__ import annotations

from ...properties.steam import SteamState


def _kj(state):
    return (state.enthalpy / 1e3, "kJ/kg")


def _kg_h(flow):
    return (flow * 3600, "kg/h")


def case_steps(result, inputs, site, b, efficiency, case):
    """Add the worked steps of the solved load case ``b``."""
    c = case.name
    states = b.states
    for u in sorted(inputs.users, key=lambda u: u.name):
        kind, duty = u.load(c)
        if kind == "duty" and duty > 0.0 and u.name in b.user_flows:
            h_f = SteamState.from_p_dryness(site.headers[u.header], 0.0).enthalpy
            result.work(f"{c}: {u.name} steam from its duty", "m = Q / (h_header − h_f)", "Q/(h_header - h_f)",
                        b.user_flows[u.name] * 3600, "kg/h", Q=(duty / 1e3, "kW"),
                        h_header=(b.header_enthalpy[u.header] / 1e3, "kJ/kg"), h_f=(h_f / 1e3, "kJ/kg"))
    for ld in sorted(inputs.letdowns, key=lambda ld: ld.name):
        steam = b.letdown_steam.get(ld.name, 0.0)
        spray = b.letdown_spray.get(ld.name, 0.0)
        if steam > 0.0 and spray > 0.0:
            outlet = b.letdown_outlet[ld.name]
            result.work(f"{c}: let-down {ld.name} steam for the {ld.target} header's make-up",
                        "m_s = m_out · (h_out − h_w) / (h_in − h_w)", "m_out*(h_out - h_w)/(h_in - h_w)",
                        steam * 3600, "kg/h", m_out=_kg_h(steam + spray), h_out=_kj(outlet),
                        h_w=_kj(states[f"spray:{ld.name}"]), h_in=(b.header_enthalpy[ld.source] / 1e3, "kJ/kg"))
    if inputs.boiler.blowdown_fraction is None:
        fw, bw = inputs.boiler.feedwater_tds, inputs.boiler.boiler_water_tds
        result.work(f"{c}: boiler blowdown (dissolved-solids balance)", "m_bd = m_steam · c_fw / (c_bw − c_fw)",
                    "m_steam*c_fw/(c_bw - c_fw)", b.blowdown * 3600, "kg/h", m_steam=_kg_h(b.boiler_steam),
                    c_fw=(fw, ""), c_bw=(bw, ""))
    else:
        f = inputs.boiler.blowdown_fraction
        result.work(f"{c}: boiler blowdown (a fraction of the feedwater)", "m_bd = m_steam · f / (1 − f)",
                    "m_steam*f/(1 - f)", b.blowdown * 3600, "kg/h", m_steam=_kg_h(b.boiler_steam), f=(f, ""))
    boiler = inputs.boiler
    if boiler.blowdown_flash_header is not None:
        p_f = site.headers[boiler.blowdown_flash_header]
        h_f, h_g = SteamState.from_p_dryness(p_f, 0.0), states["blowdown_flash_steam"]
        result.work(f"{c}: blowdown flash steam to the {boiler.blowdown_flash_header} header",
                    "m_fl = m_bd · (h_bd − h_f) / (h_g − h_f)", "m_bd*(h_bd - h_f)/(h_g - h_f)",
                    b.blowdown_flash_steam * 3600, "kg/h", m_bd=_kg_h(b.blowdown), h_bd=_kj(states["blowdown"]),
                    h_f=_kj(h_f), h_g=_kj(h_g))
    if boiler.blowdown_cooled and b.blowdown_heat_recovered > 0.0:
        result.work(f"{c}: make-up water heated by the blowdown cooler", "h_mu,out = h_mu + Q_bd / m_mu",
                    "h_mu + Q_bd/m_mu", b.makeup_state.enthalpy / 1e3, "kJ/kg", h_mu=_kj(states["makeup"]),
                    Q_bd=(b.blowdown_heat_recovered / 1e3, "kW"), m_mu=_kg_h(b.makeup))
    returned = sum(m for m, _ in b.returns.values())
    h_mu = states["makeup"].enthalpy
    heat_returned = sum(m * (s.enthalpy - h_mu) for m, s in b.returns.values())
    h_r = h_mu + heat_returned / returned if returned > 0.0 else h_mu
    steam_state = b.header_states[inputs.deaerator.steam_header]
    da = inputs.deaerator
    operands = dict(m_fw=_kg_h(b.feedwater), h_fw=_kj(states["feedwater"]), h_mu=_kj(states["makeup"]),
                    m_r=_kg_h(returned), h_r=(h_r / 1e3, "kJ/kg"), h_s=_kj(steam_state),
                    h_v=_kj(states["deaerator_vent"]))
    cooler = " − Q_bd" if b.blowdown_heat_recovered > 0.0 else ""
    if cooler:
        operands["Q_bd"] = (b.blowdown_heat_recovered / 1e3, "kW")
    if b.deaerator_steam > 0.0 and da.vent_of_feedwater is not None:
        result.work(f"{c}: deaerator heating steam", f"m_s = (m_fw·(h_fw − h_mu) + w·m_fw·(h_v − h_mu) − "
                    f"m_r·(h_r − h_mu){cooler}) / (h_s − h_mu)",
                    f"(m_fw*(h_fw - h_mu) + w*m_fw*(h_v - h_mu) - m_r*(h_r - h_mu){cooler.replace(' − ', ' - ')})"
                    "/(h_s - h_mu)", b.deaerator_steam * 3600, "kg/h", w=(da.vent_of_feedwater, ""), **operands)
    elif b.deaerator_steam > 0.0:
        result.work(f"{c}: deaerator heating steam", f"m_s = (m_fw·(h_fw − h_mu) − m_r·(h_r − h_mu){cooler}) / "
                    "(h_s − h_mu − v·(h_v − h_mu))",
                    f"(m_fw*(h_fw - h_mu) - m_r*(h_r - h_mu){cooler.replace(' − ', ' - ')})"
                    "/(h_s - h_mu - v*(h_v - h_mu))", b.deaerator_steam * 3600, "kg/h", v=(da.vent_fraction, ""),
                    **operands)
    if b.returns_not_taken > 0.0:
        # A short site: no make-up, the returns taken are what the feedwater and vent leave room for.
        result.work(f"{c}: condensate returns the deaerator can take (no make-up)", "m_r = m_fw + m_v − m_s",
                    "m_fw + m_v - m_s", returned * 3600, "kg/h", m_fw=_kg_h(b.feedwater),
                    m_v=_kg_h(b.deaerator_vent), m_s=_kg_h(b.deaerator_steam))
    else:
        result.work(f"{c}: make-up water", "m_mu = m_fw + m_v − m_r − m_s", "m_fw + m_v - m_r - m_s",
                    b.makeup * 3600, "kg/h", m_fw=_kg_h(b.feedwater), m_v=_kg_h(b.deaerator_vent),
                    m_s=_kg_h(b.deaerator_steam), m_r=_kg_h(returned))
    heat = (b.boiler_steam * (states["boiler_steam"].enthalpy - states["feedwater"].enthalpy)
            + b.blowdown * (states["blowdown"].enthalpy - states["feedwater"].enthalpy))
    result.work(f"{c}: boiler fuel input", "P = (m_steam·(h_steam − h_fw) + m_bd·(h_bd − h_fw)) / η",
                "(m_steam*(h_steam - h_fw) + m_bd*(h_bd - h_fw))/eta", heat / efficiency / 1e3, "kW",
                m_steam=_kg_h(b.boiler_steam), h_steam=_kj(states["boiler_steam"]), h_fw=_kj(states["feedwater"]),
                m_bd=_kg_h(b.blowdown), h_bd=_kj(states["blowdown"]), eta=(efficiency, ""))
