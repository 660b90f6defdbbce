"""Water and steam properties over IAPWS-IF97, the industrial formulation.

This is the only module that calls the ``iapws`` package. A :class:`SteamState`
is made by one of its explicit constructors (:meth:`SteamState.from_pT`,
:meth:`~SteamState.from_ph`, :meth:`~SteamState.from_ps`,
:meth:`~SteamState.from_p_dryness`, :meth:`~SteamState.from_T_dryness`); every
value is SI: pressure Pa (absolute), temperature K, specific enthalpy J/kg,
specific entropy J/(kg K), density kg/m3. Input outside the range this module
accepts raises :class:`~steamcalc.errors.OutOfRangeError`; a pressure and
temperature on the saturation line raise
:class:`~steamcalc.errors.AmbiguousStateError`. Nothing is clamped.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from iapws import iapws97 as _if97
from iapws.iapws97 import IAPWS97 as _IAPWS97

from .errors import AmbiguousStateError, OutOfRangeError

#: Critical point, IAPWS R7-97(2012) equations (1)-(3).
CRITICAL_PRESSURE = 22.064e6
CRITICAL_TEMPERATURE = 647.096
#: Range accepted here: IF97 regions 1 to 4 and the region-3 states between them.
MIN_TEMPERATURE = 273.15
MAX_TEMPERATURE = 1073.15
MAX_PRESSURE = 100e6
#: Saturation pressure at 273.15 K, Pa (IAPWS R7-97(2012) equation (30)); below it no liquid exists.
MIN_PRESSURE = 611.213

#: Tolerance within which a temperature counts as on the saturation line, K.
SATURATION_TOLERANCE = 1e-6

PHASES = (
    "compressed liquid", "saturated liquid", "wet", "saturated vapour",
    "superheated vapour", "supercritical",
)

REFERENCE = "IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 (IAPWS-IF97)"


def _fast():
    from .steam_arrays import fast_enabled
    return fast_enabled()


def two_phase_word(dryness):
    """Phase word of a saturated or wet state from its dryness fraction."""
    return "saturated liquid" if dryness == 0.0 else "saturated vapour" if dryness == 1.0 else "wet"


def _if97_phase_region(pressure, temperature):
    """Phase word and IF97 region (1, 2 or 3) of a single-phase state."""
    if pressure > CRITICAL_PRESSURE:
        phase = "supercritical" if temperature > CRITICAL_TEMPERATURE else "compressed liquid"
    elif temperature > CRITICAL_TEMPERATURE:
        phase = "superheated vapour"
    else:
        phase = "superheated vapour" if temperature > _if97._TSat_P(pressure / 1e6) else "compressed liquid"
    if temperature <= 623.15:
        region = 1 if phase == "compressed liquid" else 2
    elif temperature > 863.15:
        region = 2
    else:
        # Boundary between regions 2 and 3, IAPWS R7-97(2012) equation (5).
        theta = temperature
        p_b23 = (0.34805185628969e3 - 0.11671859879975e1 * theta + 0.10192970039326e-2 * theta ** 2) * 1e6
        region = 2 if pressure <= p_b23 else 3
    return phase, region


def _check(variable, value, low, high, unit, scale=1.0):
    if not (low <= value <= high) or math.isnan(value):
        shown = f"{value / scale:.6g} {unit}".rstrip()
        if unit == "K":
            shown += f" ({value - 273.15:.6g} degC)"
        raise OutOfRangeError(
            f"{variable} of {shown} is outside the range of IAPWS-IF97 used here",
            field=variable, value=value / scale, limits=(low / scale, high / scale, unit),
        )


def saturation_temperature(pressure):
    """Saturation temperature at a pressure.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa; from 611.213 Pa to the critical pressure 22.064 MPa.

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
    """
    _check("pressure", pressure, MIN_PRESSURE, CRITICAL_PRESSURE, "bar(a)", 1e5)
    return float(_if97._TSat_P(pressure / 1e6))


def saturation_pressure(temperature):
    """Saturation pressure at a temperature.

    Parameters
    ----------
    temperature : float
        Temperature, K; from 273.15 K to the critical temperature 647.096 K.

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
    _check("temperature", temperature, MIN_TEMPERATURE, CRITICAL_TEMPERATURE, "K")
    return float(_if97._PSat_T(temperature)) * 1e6


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


def backward_temperature_region1(pressure, enthalpy):
    """IF97 backward equation T(p, h) of region 1 (compressed liquid).

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
    return float(_if97._Backward1_T_Ph(pressure / 1e6, enthalpy / 1e3))


def backward_temperature_region2(pressure, enthalpy):
    """IF97 backward equations T(p, h) of region 2 (sub-regions 2a, 2b, 2c).

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
    return float(_if97._Backward2_T_Ph(pressure / 1e6, enthalpy / 1e3))


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

    # -- constructors -------------------------------------------------------------------
    @classmethod
    def from_pT(cls, pressure, temperature):
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
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        _check("temperature", temperature, MIN_TEMPERATURE, MAX_TEMPERATURE, "K")
        if pressure <= CRITICAL_PRESSURE:
            t_sat = saturation_temperature(pressure)
            if abs(temperature - t_sat) < SATURATION_TOLERANCE:
                raise AmbiguousStateError(
                    f"{temperature - 273.15:.6g} degC is the saturation temperature at "
                    f"{pressure / 1e5:.6g} bar(a): pressure and temperature do not fix the state",
                    field="temperature", value=temperature,
                    fix="give the dryness fraction (or a superheat above zero) instead",
                )
        if _fast():
            from .steam_arrays import fast_from_pT
            return fast_from_pT(cls, pressure, temperature)
        return cls._from_iapws(_IAPWS97(P=pressure / 1e6, T=temperature))

    @classmethod
    def from_ph(cls, pressure, enthalpy):
        """State from absolute pressure (Pa) and specific enthalpy (J/kg).

        References
        ----------
        IAPWS R7-97(2012), backward equations T(p, h) (11), (22)-(24), refined on the
        basic equations by the iapws package; region 4 by the lever rule.

        Examples
        --------
        >>> s = SteamState.from_ph(1.0e5, 2000e3)
        >>> s.phase, round(s.dryness, 4)
        ('wet', 0.701)
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        cls._check_enthalpy_range(pressure, enthalpy)
        if _fast():
            from .steam_arrays import fast_from_ph
            return fast_from_ph(cls, pressure, enthalpy)
        return cls._from_iapws(_IAPWS97(P=pressure / 1e6, h=enthalpy / 1e3))

    @classmethod
    def from_ps(cls, pressure, entropy):
        """State from absolute pressure (Pa) and specific entropy (J/(kg K)).

        References
        ----------
        IAPWS R7-97(2012), backward equations T(p, s) (13), (25)-(27), refined by the
        iapws package; region 4 by the lever rule.

        Examples
        --------
        >>> s = SteamState.from_ps(1.0e5, 7.0e3)
        >>> s.phase, round(s.dryness, 3)
        ('wet', 0.941)
        """
        _check("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, "bar(a)", 1e5)
        low, high = cls._bounds(pressure, "s")
        if not (low <= entropy <= high) or math.isnan(entropy):
            raise OutOfRangeError(
                f"entropy {entropy / 1e3:.6g} kJ/(kg K) at {pressure / 1e5:.6g} bar(a) is outside "
                "IAPWS-IF97 (273.15 K to 1073.15 K)",
                field="entropy", value=entropy / 1e3, limits=(low / 1e3, high / 1e3, "kJ/(kg K)"),
            )
        if _fast():
            from .steam_arrays import fast_from_ps
            return fast_from_ps(cls, pressure, entropy)
        return cls._from_iapws(_IAPWS97(P=pressure / 1e6, s=entropy / 1e3))

    @classmethod
    def from_p_dryness(cls, pressure, dryness):
        """Saturated or wet state from absolute pressure (Pa) and dryness fraction (0 to 1).

        References
        ----------
        IAPWS R7-97(2012), equation (31) for the saturation temperature; saturated
        liquid and vapour from regions 1 and 2; :math:`h = h' + x (h'' - h')`.

        Examples
        --------
        >>> s = SteamState.from_p_dryness(1.0e5, 1.0)
        >>> s.phase, round(s.enthalpy / 1e3, 1)
        ('saturated vapour', 2674.9)
        """
        _check("pressure", pressure, MIN_PRESSURE, CRITICAL_PRESSURE, "bar(a)", 1e5)
        _check("dryness", dryness, 0.0, 1.0, "")
        if _fast():
            from .steam_arrays import fast_from_p_dryness
            return fast_from_p_dryness(cls, pressure, dryness)
        return cls._from_iapws(_IAPWS97(P=pressure / 1e6, x=dryness), dryness=dryness)

    @classmethod
    def from_T_dryness(cls, temperature, dryness):
        """Saturated or wet state from temperature (K) and dryness fraction (0 to 1).

        References
        ----------
        IAPWS R7-97(2012), equation (30) for the saturation pressure; saturated
        liquid and vapour from regions 1 and 2.

        Examples
        --------
        >>> s = SteamState.from_T_dryness(373.15, 0.0)
        >>> s.phase, round(s.enthalpy / 1e3, 2)
        ('saturated liquid', 419.1)
        """
        _check("temperature", temperature, MIN_TEMPERATURE, CRITICAL_TEMPERATURE, "K")
        _check("dryness", dryness, 0.0, 1.0, "")
        if _fast():
            from .steam_arrays import fast_from_T_dryness
            return fast_from_T_dryness(cls, temperature, dryness)
        return cls._from_iapws(_IAPWS97(T=temperature, x=dryness), dryness=dryness)

    # -- derived -----------------------------------------------------------------------
    @property
    def saturation_temperature(self):
        """Saturation temperature at this pressure, K; None above the critical pressure."""
        if self.pressure > CRITICAL_PRESSURE:
            return None
        return saturation_temperature(self.pressure)

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
    def _bounds(pressure, key):
        # The basic equations alone (not a full state) give the range cheaply:
        # region 1 at 273.15 K and region 2 at 1073.15 K bound every accepted state.
        if _fast():
            from .steam_arrays import fast_bounds
            return fast_bounds(pressure, key, MIN_TEMPERATURE, MAX_TEMPERATURE)
        return (_if97._Region1(MIN_TEMPERATURE, pressure / 1e6)[key] * 1e3,
                _if97._Region2(MAX_TEMPERATURE, pressure / 1e6)[key] * 1e3)

    @classmethod
    def _check_enthalpy_range(cls, pressure, enthalpy):
        low, high = cls._bounds(pressure, "h")
        if not (low <= enthalpy <= high) or math.isnan(enthalpy):
            raise OutOfRangeError(
                f"enthalpy {enthalpy / 1e3:.6g} kJ/kg at {pressure / 1e5:.6g} bar(a) is outside "
                "IAPWS-IF97 (273.15 K to 1073.15 K)",
                field="enthalpy", value=enthalpy / 1e3, limits=(low / 1e3, high / 1e3, "kJ/kg"),
            )

    @classmethod
    def _from_iapws(cls, st, dryness=None):
        # iapws returns the saturated ends (x = 0 and 1) through regions 1 and 2, so the
        # dryness a constructor was given decides the phase there, not the region.
        if not st.status:
            raise OutOfRangeError(f"IAPWS-IF97 gave no state: {st.msg}")
        pressure = float(st.P) * 1e6
        temperature = float(st.T)
        if st.region == 4 or dryness is not None:
            dryness = float(st.x) if dryness is None else float(dryness)
            phase = two_phase_word(dryness)
            cp = cv = None
            speed_of_sound = None
        else:
            dryness = None
            cp = float(st.cp) * 1e3
            cv = float(st.cv) * 1e3
            speed_of_sound = float(st.w)
            phase, _ = _if97_phase_region(pressure, temperature)
        return cls(
            pressure=pressure, temperature=temperature, enthalpy=float(st.h) * 1e3,
            entropy=float(st.s) * 1e3, density=float(st.rho), dryness=dryness, phase=phase,
            region=4 if dryness is not None else int(st.region), cp=cp,
            speed_of_sound=speed_of_sound, cv=cv,
        )
