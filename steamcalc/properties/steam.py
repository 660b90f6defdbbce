"""Water and steam properties over IAPWS-IF97, the industrial formulation: the one interface.

A :class:`SteamState` is made by one of its explicit constructors (:meth:`SteamState.from_pT`,
:meth:`~SteamState.from_ph`, :meth:`~SteamState.from_ps`, :meth:`~SteamState.from_p_dryness`,
:meth:`~SteamState.from_T_dryness`); every value is SI: pressure Pa (absolute), temperature K,
specific enthalpy J/kg, specific entropy J/(kg K), density kg/m3. Input outside the range this
module accepts raises :class:`~steamcalc.errors.OutOfRangeError` naming the variable, the limit
and the IF97 region it belongs to; a pressure and temperature on the saturation line raise
:class:`~steamcalc.errors.AmbiguousStateError`. Nothing is clamped.

Two engines evaluate IF97 behind this interface (:mod:`steamcalc.properties.engines`): ``"iapws"``, the
engine of issued records and the default, and ``"fast"`` (seuif97) for sweeps, charts and
samples. Every constructor and function takes ``engine=`` ("iapws", "fast", or None for the
current context's choice, see :func:`using_engine`); a state remembers the engine that made it.
The range checks here are the same whichever engine evaluates.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

from .engines import (  # noqa: F401  (the engine choice is part of this interface)
    ENGINES, FAST_ENGINE, REFERENCE_ENGINE, current_engine, engine_module, other_engine, using_engine,
)
from .engines.common import (  # noqa: F401  (constants of the interface)
    CRITICAL_PRESSURE, CRITICAL_TEMPERATURE, MAX_PRESSURE, MAX_TEMPERATURE, MIN_PRESSURE, MIN_TEMPERATURE, PHASES,
    REFERENCE, two_phase_word,
)
from ..errors import AmbiguousStateError, OutOfRangeError

#: Tolerance within which a temperature counts as on the saturation line, K.
SATURATION_TOLERANCE = 1e-6

#: What each limit is and which IF97 region it bounds, as the range messages say it.
_LIMITS = {
    "pressure": ("below the triple-point pressure 0.00611213 bar(a), the lowest pressure taken here for "
                 "IF97 regions 1-3",
                 "above 1000 bar(a) (100 MPa), the upper pressure limit of IF97 regions 1-3"),
    "temperature": ("below 0 degC (273.15 K), the lower temperature limit of IF97 regions 1 and 2",
                    "above 800 degC (1073.15 K), the upper temperature limit of IF97 region 2 (region 5, "
                    "above it, is not used here)"),
    "saturation pressure": ("below the triple-point pressure 0.00611213 bar(a), where IF97 region 4 (the "
                            "saturation line) begins",
                            "above the critical pressure 220.64 bar(a), where IF97 region 4 (the saturation "
                            "line) ends: there is no saturation, boiling or wet steam above it"),
    "saturation temperature": ("below 0 degC (273.15 K), where IF97 region 4 (the saturation line) begins",
                               "above the critical temperature 373.946 degC (647.096 K), where IF97 region 4 "
                               "(the saturation line) ends: there is no saturation, boiling or wet steam "
                               "above it"),
    "dryness": ("below 0 (saturated liquid), the lower limit of a dryness fraction in IF97 region 4",
                "above 1 (saturated vapour), the upper limit of a dryness fraction in IF97 region 4"),
}


def _check(variable, value, low, high, unit, scale=1.0, limit="pressure"):
    """Refuse a value outside [low, high], naming the variable, the limit it crossed and the IF97 region."""
    if low <= value <= high:
        return
    shown = f"{value / scale:.6g} {unit}".rstrip()
    if unit == "K":
        shown += f" ({value - 273.15:.6g} degC)"
    low_text, high_text = _LIMITS[limit]
    where = "is not a number" if math.isnan(value) else f"is {low_text}" if value < low else f"is {high_text}"
    raise OutOfRangeError(f"{variable} of {shown} {where}", field=variable, value=value / scale,
                          limits=(low / scale, high / scale, unit))


_SAT_P = dict(limit="saturation pressure")
_SAT_T = dict(limit="saturation temperature")
_DRYNESS = dict(limit="dryness")


def saturation_temperature(pressure, *, engine=None):
    """Saturation temperature at a pressure.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa; from 611.213 Pa to the critical pressure 22.064 MPa.
    engine : str, optional
        "iapws" or "fast"; default the current context's engine.

    Returns
    -------
    float
        Saturation temperature, K.

    Notes
    -----
    Backward saturation-temperature equation of IF97 region 4,
    :math:`T_s = (n_{10} + D - \\sqrt{(n_{10}+D)^2 - 4(n_9 + n_{10} D)})/2`.

    References
    ----------
    IAPWS R7-97(2012), equation (31); check values in Table 36.

    Examples
    --------
    >>> round(saturation_temperature(0.1e6), 6)
    372.755919
    >>> round(saturation_temperature(0.1e6, engine="fast"), 6)
    372.755919
    """
    _check("pressure", pressure, MIN_PRESSURE, CRITICAL_PRESSURE, "bar(a)", 1e5, **_SAT_P)
    return engine_module(engine).saturation_temperature(pressure)


def saturation_pressure(temperature, *, engine=None):
    """Saturation pressure at a temperature.

    Parameters
    ----------
    temperature : float
        Temperature, K; from 273.15 K to the critical temperature 647.096 K.
    engine : str, optional
        "iapws" or "fast"; default the current context's engine.

    Returns
    -------
    float
        Saturation pressure, Pa (absolute).

    Notes
    -----
    Saturation-pressure equation of IF97 region 4,
    :math:`p_s = [2C/(-B + \\sqrt{B^2 - 4AC})]^4`.

    References
    ----------
    IAPWS R7-97(2012), equation (30); check values in Table 35.

    Examples
    --------
    >>> round(saturation_pressure(500.0) / 1e6, 8)
    2.63889776
    """
    _check("temperature", temperature, MIN_TEMPERATURE, CRITICAL_TEMPERATURE, "K", **_SAT_T)
    return engine_module(engine).saturation_pressure(temperature)


def dynamic_viscosity(temperature, density):
    """Dynamic viscosity of water or steam, Pa·s, from temperature (K) and density (kg/m³).

    References
    ----------
    IAPWS R12-08, Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
    Substance, equation (10) without the critical enhancement (industrial use, through iapws).

    Examples
    --------
    >>> round(dynamic_viscosity(473.15, 5.0) * 1e6, 3)
    15.866
    """
    from iapws._iapws import _Viscosity

    _check("temperature", temperature, 273.15, 1173.15, "K")
    return float(_Viscosity(density, temperature))


def thermal_conductivity(temperature, density):
    """Thermal conductivity of water or steam, W/(m·K), from temperature (K) and density (kg/m³).

    References
    ----------
    IAPWS R15-11, Release on the IAPWS Formulation 2011 for the Thermal Conductivity of
    Ordinary Water Substance (through iapws).

    Examples
    --------
    >>> round(thermal_conductivity(418.15, 1.7), 4)
    0.0293
    """
    from iapws._iapws import _ThCond

    _check("temperature", temperature, 273.15, 1173.15, "K")
    return float(_ThCond(density, temperature))


def backward_temperature_region1(pressure, enthalpy):
    """IF97 backward equation T(p, h) of region 1 (compressed liquid), reference engine.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa.
    enthalpy : float
        Specific enthalpy, J/kg.

    Returns
    -------
    float
        Temperature, K, from the backward equation alone (no iteration).

    References
    ----------
    IAPWS R7-97(2012), equation (11); check values in Table 7.

    Examples
    --------
    >>> round(backward_temperature_region1(3e6, 500e3), 6)
    391.798509
    """
    return engine_module(REFERENCE_ENGINE).backward_temperature_ph(pressure, enthalpy, 1)


def backward_temperature_region2(pressure, enthalpy):
    """IF97 backward equations T(p, h) of region 2 (sub-regions 2a, 2b, 2c), reference engine.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa.
    enthalpy : float
        Specific enthalpy, J/kg.

    Returns
    -------
    float
        Temperature, K, from the backward equation alone (no iteration).

    References
    ----------
    IAPWS R7-97(2012), equations (22)-(24) with the boundaries (20)-(21); check
    values in Table 24.

    Examples
    --------
    >>> round(backward_temperature_region2(3e6, 3000e3), 6)
    575.37337
    """
    return engine_module(REFERENCE_ENGINE).backward_temperature_ph(pressure, enthalpy, 2)


@dataclass(frozen=True)
class SteamState:
    """One equilibrium state of water or steam, IAPWS-IF97.

    Attributes
    ----------
    pressure : float
        Absolute pressure, Pa.
    temperature : float
        Temperature, K.
    enthalpy : float
        Specific enthalpy, J/kg.
    entropy : float
        Specific entropy, J/(kg K).
    density : float
        Density, kg/m3.
    dryness : float or None
        Dryness fraction (vapour mass fraction), 0 to 1, for saturated and wet
        states; None for single-phase states.
    phase : str
        One of :data:`PHASES`.
    region : int
        IF97 region that gave the state (1, 2, 3 or 4).
    cp : float or None
        Isobaric specific heat, J/(kg K); None in the two-phase region.
    cv : float or None
        Isochoric specific heat, J/(kg K); None in the two-phase region.
    speed_of_sound : float or None
        m/s; None in the two-phase region.
    engine : str
        The engine that evaluated it: "iapws" or "fast".
    """

    pressure: float
    temperature: float
    enthalpy: float
    entropy: float
    density: float
    dryness: float | None
    phase: str
    region: int
    cp: float | None
    speed_of_sound: float | None
    cv: float | None = None
    engine: str = REFERENCE_ENGINE

    # -- constructors -------------------------------------------------------------------
    @classmethod
    def from_pT(cls, pressure, temperature, *, engine=None):
        """State from absolute pressure (Pa) and temperature (K).

        A temperature within 1e-6 K of saturation at a subcritical pressure does
        not fix a state; give the dryness instead (:meth:`from_p_dryness`).

        References
        ----------
        IAPWS R7-97(2012), basic equations of regions 1, 2 and 3, equations (7), (15), (28).

        Examples
        --------
        >>> s = SteamState.from_pT(1.0e6, 473.15)
        >>> s.phase, round(s.enthalpy / 1e3, 2)
        ('superheated vapour', 2828.27)
        >>> SteamState.from_pT(250e5, 873.15).phase
        'supercritical'
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        _check("temperature", temperature, MIN_TEMPERATURE, MAX_TEMPERATURE, "K", limit="temperature")
        module = engine_module(engine)
        if pressure <= CRITICAL_PRESSURE:
            t_sat = module.saturation_temperature(pressure)
            if abs(temperature - t_sat) < SATURATION_TOLERANCE:
                raise AmbiguousStateError(
                    f"{temperature - 273.15:.6g} degC is the saturation temperature at "
                    f"{pressure / 1e5:.6g} bar(a): pressure and temperature do not fix the state",
                    field="temperature", value=temperature,
                    fix="give the dryness fraction (or a superheat above zero) instead",
                )
        return cls._made(module.state_pT(pressure, temperature), module)

    @classmethod
    def from_ph(cls, pressure, enthalpy, *, engine=None):
        """State from absolute pressure (Pa) and specific enthalpy (J/kg).

        References
        ----------
        IAPWS R7-97(2012), backward equations T(p, h) (11), (22)-(24), refined on the
        basic equations; region 4 by the lever rule.

        Examples
        --------
        >>> s = SteamState.from_ph(1.0e5, 2000e3)
        >>> s.phase, round(s.dryness, 4)
        ('wet', 0.701)
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        module = engine_module(engine)
        cls._check_property_range(module, pressure, enthalpy, "h")
        return cls._made(module.state_ph(pressure, enthalpy), module)

    @classmethod
    def from_ps(cls, pressure, entropy, *, engine=None):
        """State from absolute pressure (Pa) and specific entropy (J/(kg K)).

        References
        ----------
        IAPWS R7-97(2012), backward equations T(p, s) (13), (25)-(27), refined on the
        basic equations; region 4 by the lever rule.

        Examples
        --------
        >>> s = SteamState.from_ps(1.0e5, 7.0e3)
        >>> s.phase, round(s.dryness, 3)
        ('wet', 0.941)
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        module = engine_module(engine)
        cls._check_property_range(module, pressure, entropy, "s")
        return cls._made(module.state_ps(pressure, entropy), module)

    @classmethod
    def from_p_dryness(cls, pressure, dryness, *, engine=None):
        """Saturated or wet state from absolute pressure (Pa) and dryness fraction (0 to 1).

        References
        ----------
        IAPWS R7-97(2012), equation (31) for the saturation temperature; saturated
        liquid and vapour from regions 1 and 2 (region 3 above 623.15 K);
        :math:`h = h' + x (h'' - h')`.

        Examples
        --------
        >>> s = SteamState.from_p_dryness(1.0e5, 1.0)
        >>> s.phase, round(s.enthalpy / 1e3, 1)
        ('saturated vapour', 2674.9)
        """
        _check("pressure", pressure, MIN_PRESSURE, CRITICAL_PRESSURE, "bar(a)", 1e5, **_SAT_P)
        _check("dryness", dryness, 0.0, 1.0, "", **_DRYNESS)
        module = engine_module(engine)
        return cls._made(module.state_p_dryness(pressure, dryness), module)

    @classmethod
    def from_T_dryness(cls, temperature, dryness, *, engine=None):
        """Saturated or wet state from temperature (K) and dryness fraction (0 to 1).

        References
        ----------
        IAPWS R7-97(2012), equation (30) for the saturation pressure; saturated
        liquid and vapour from regions 1 and 2 (region 3 above 623.15 K).

        Examples
        --------
        >>> s = SteamState.from_T_dryness(373.15, 0.0)
        >>> s.phase, round(s.enthalpy / 1e3, 2)
        ('saturated liquid', 419.1)
        """
        _check("temperature", temperature, MIN_TEMPERATURE, CRITICAL_TEMPERATURE, "K", **_SAT_T)
        _check("dryness", dryness, 0.0, 1.0, "", **_DRYNESS)
        module = engine_module(engine)
        return cls._made(module.state_T_dryness(temperature, dryness), module)

    # -- derived -----------------------------------------------------------------------
    @cached_property
    def saturation_temperature(self):
        """Saturation temperature at this pressure, K (by this state's engine); None above the
        critical pressure. Worked out once per state (superheat and subcooling use it)."""
        if self.pressure > CRITICAL_PRESSURE:
            return None
        return saturation_temperature(self.pressure, engine=self.engine)

    @property
    def superheat(self):
        """Degrees of superheat, K: T - T_sat(p) for superheated vapour, 0 for saturated and
        wet states, None for liquid and above the critical pressure."""
        if self.phase == "superheated vapour":
            return self.temperature - self.saturation_temperature
        if self.phase in ("wet", "saturated vapour", "saturated liquid"):
            return 0.0
        return None

    @property
    def subcooling(self):
        """Degrees of subcooling, K: T_sat(p) - T for compressed liquid below the critical
        pressure, 0 for saturated and wet states, None otherwise."""
        if self.phase == "compressed liquid" and self.pressure <= CRITICAL_PRESSURE:
            return self.saturation_temperature - self.temperature
        if self.phase in ("wet", "saturated vapour", "saturated liquid"):
            return 0.0
        return None

    @property
    def isentropic_exponent(self):
        """Isentropic exponent κ = w²ρ/p (dimensionless); None in the two-phase region.

        References
        ----------
        Definition κ = −(v/p)(∂p/∂v)_s = w² ρ / p, e.g. IEC 60534-2-1 note on κ for real gases.
        """
        if self.speed_of_sound is None:
            return None
        return self.speed_of_sound ** 2 * self.density / self.pressure

    @property
    def specific_volume(self):
        """Specific volume, m3/kg."""
        return 1.0 / self.density

    # -- internals ---------------------------------------------------------------------
    @staticmethod
    def _check_property_range(module, pressure, value, key):
        # Region 1 at 273.15 K and region 2 at 1073.15 K bound every accepted state at a pressure.
        low, high = module.bounds(pressure, key)
        if low <= value <= high:
            return
        name, unit, scale = ("enthalpy", "kJ/kg", 1e3) if key == "h" else ("entropy", "kJ/(kg K)", 1e3)
        where = "is not a number" if math.isnan(value) else (
            f"is below that of water at 0 degC ({low / scale:.6g} {unit}), the lower limit of IF97 region 1"
            if value < low else
            f"is above that of steam at 800 degC ({high / scale:.6g} {unit}), the upper limit of IF97 region 2")
        raise OutOfRangeError(f"{name} of {value / scale:.6g} {unit} at {pressure / 1e5:.6g} bar(a) {where}",
                              field=name, value=value / scale, limits=(low / scale, high / scale, unit))

    @classmethod
    def _made(cls, props, module):
        return cls(pressure=props.pressure, temperature=props.temperature, enthalpy=props.enthalpy,
                   entropy=props.entropy, density=props.density, dryness=props.dryness, phase=props.phase,
                   region=props.region, cp=props.cp, speed_of_sound=props.speed_of_sound, cv=props.cv,
                   engine=module.NAME)
