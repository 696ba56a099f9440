"""Fluid properties for prototype and model: a small catalogue of liquids and gases.

Everything is SI, temperatures in kelvin. ``get_fluid(name)`` parses a catalogue name,
``Fluid.properties`` evaluates the published models directly, and ``Fluid.table`` returns a
:class:`FluidTable`, cubic splines of the log of each property against temperature that an
optimiser can call thousands of times. CoolProp and scipy are imported only when first needed.

Names accepted (case and spacing do not matter):

- ``water`` (also ``fresh water``)
- ``seawater`` (absolute salinity 35.16504 g/kg), ``seawater 30 g/kg``, ``seawater 3.5%``,
  ``seawater 35 ppt`` (= g/kg), ``seawater 35 psu`` (practical salinity); ``sea water`` too
- ``glycerol-water 20%`` for any mass percentage 0-100 (``glycerol water 60 %``, ``20 wt%``);
  ``glycerol`` (also ``glycerin``, ``glycerine``) is ``glycerol-water 100%``
- ``n-decane`` (also ``decane``) and ``n-dodecane`` (``dodecane``), the light oils. There is
  deliberately no ``light oil`` alias: a real light mineral oil is several times more viscous
  than n-decane, and a silent substitution would mislead a model design.
- ``air``, ``nitrogen`` (``n2``), ``sf6`` (``sulphur hexafluoride``, ``sulfur hexafluoride``)
"""

from __future__ import annotations

import bisect
import difflib
import math
import re
from abc import ABC, abstractmethod
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from compromise.errors import FluidRangeError, UnknownFluidError
from compromise.physics.correlations import (
    _SP_PER_SA,
    ATMOSPHERE,
    GLYCEROL_WATER_SIGMA_NOTE,
    STANDARD_SALINITY,
    glycerol_water_density_volk_kahler,
    glycerol_water_surface_tension,
    glycerol_water_viscosity_cheng,
    seawater_density_eos80,
    seawater_freezing_temperature,
    seawater_sound_speed_coppens,
    seawater_surface_tension_nayar,
    seawater_viscosity_sharqawy,
    water_surface_tension_iapws,
    water_vapour_pressure_wagner_pruss,
)
from compromise.units import ZERO_CELSIUS

TABLE_KEYS = ("rho", "mu", "nu", "sigma", "c")
#: FluidProperties field -> the symbol expressions use for it.
PROPERTY_SYMBOLS = {
    "density": "rho",
    "dynamic_viscosity": "mu",
    "kinematic_viscosity": "nu",
    "surface_tension": "sigma",
    "speed_of_sound": "c",
}
PROPERTIES_CACHE = 4096  # states kept per fluid by Fluid.properties
_TABLE_TOLERANCE = 1e-5  # [-] log-space error allowed at every interval midpoint when building
GAS_T_MAX = 400.0  # [K] upper end of the catalogue for gases: laboratory temperatures

_Bounds = tuple[list[tuple[float, str]], list[tuple[float, str]]]

CATALOGUE = (
    "water",
    "seawater",
    "glycerol-water 20%",
    "glycerol-water 40%",
    "glycerol-water 60%",
    "glycerol-water 80%",
    "n-decane",
    "n-dodecane",
    "air",
    "nitrogen",
    "sf6",
)


@dataclass(frozen=True)
class FluidProperties:
    """Properties of one fluid at one state, SI units."""

    fluid: str
    """Canonical catalogue name."""
    temperature: float
    """[K]"""
    pressure: float
    """[Pa]"""
    density: float
    """[kg/m^3]"""
    dynamic_viscosity: float
    """[Pa s]"""
    kinematic_viscosity: float
    """[m^2/s]"""
    surface_tension: float | None
    """[N/m] against air or the fluid's own vapour; None for gases."""
    speed_of_sound: float | None
    """[m/s]; None where the catalogue has no model."""
    vapour_pressure: float | None
    """[Pa]; None where it does not apply (gases) or no model is given."""
    estimated: tuple[tuple[str, str], ...] = ()
    """(property, why) for each property that is an estimate rather than a published model,
    e.g. ``("surface_tension", ...)`` for glycerol-water; empty for every other fluid."""

    def to_dict(self) -> dict[str, Any]:
        """Plain dict for JSON: properties in SI, ``temperature`` in degC, ``pressure`` in Pa,
        and ``estimated`` (property -> why) for the properties that are estimates."""
        return {
            "temperature": self.temperature - ZERO_CELSIUS,
            "pressure": self.pressure,
            "density": self.density,
            "dynamic_viscosity": self.dynamic_viscosity,
            "kinematic_viscosity": self.kinematic_viscosity,
            "surface_tension": self.surface_tension,
            "speed_of_sound": self.speed_of_sound,
            "vapour_pressure": self.vapour_pressure,
            "estimated": dict(self.estimated),
        }


class FluidTable:
    """Fast vectorised properties of one fluid at one pressure, from cubic splines.

    Call with temperatures [K] (float or array); returns a dict with keys ``rho`` [kg/m^3],
    ``mu`` [Pa s], ``nu`` [m^2/s], ``sigma`` [N/m] and ``c`` [m/s], arrays of the input's shape
    (numpy scalars for a float, through a pure-Python path of a few microseconds). Values are
    nan where a property does not apply (``sigma`` of a gas) and outside ``[t_min, t_max]``
    (no extrapolation).

    The splines interpolate the log of each property on a grid refined until the error at the
    midpoint of every interval is below 1e-5, so the relative error against
    :meth:`Fluid.properties` stays below 1e-4 everywhere in the range.
    """

    def __init__(
        self,
        fluid: str,
        pressure: float,
        nodes: np.ndarray,
        log_values: np.ndarray,
        spline_c: np.ndarray | None = None,
    ):
        if spline_c is None:  # a table read from the cache brings its coefficients
            from scipy.interpolate import CubicSpline

            spline = CubicSpline(nodes, np.nan_to_num(log_values), axis=0, bc_type="not-a-knot")
            spline_c = spline.c
        #: scipy's PPoly coefficients (4, intervals, properties), kept for the disk cache
        self.spline_c = spline_c
        self.log_values = log_values
        self.fluid = fluid
        self.pressure = float(pressure)
        self.nodes = nodes
        self.t_min = float(nodes[0])
        self.t_max = float(nodes[-1])
        # Rows are intervals, columns (power, property), highest power first as in scipy's
        # PPoly. Rows 0 and -1 are all-nan sentinels for temperatures outside the range, and a
        # property that does not apply has nan coefficients, so no masking is needed per call.
        n, k = len(nodes) - 1, log_values.shape[1]
        coef = np.full((n + 2, 4, k), np.nan)
        coef[1:-1] = np.moveaxis(spline_c, 0, 1)
        coef[1:-1, :, np.isnan(log_values).any(axis=0)] = np.nan
        self._c = coef.reshape(n + 2, 4 * k)
        self._k = k
        self._left = np.concatenate([nodes[:1], nodes[:-1], nodes[-1:]])
        # searchsorted(side="right") on these breaks gives 0 below t_min, 1..n inside (t_max
        # included, hence nextafter), n + 1 above t_max or for nan
        self._breaks = np.append(nodes[:-1], np.nextafter(nodes[-1], np.inf))
        self._breaks_list = self._breaks.tolist()
        self._left_list = self._left.tolist()
        self._c_list = self._c.tolist()

    def __call__(self, temperature: float | np.ndarray) -> dict[str, np.ndarray]:
        """Properties at ``temperature`` [K]; see the class docstring."""
        if isinstance(temperature, float | int):
            return self._scalar(float(temperature))
        t = np.asarray(temperature, dtype=float)
        v = np.exp(self._log_spline(t.reshape(-1)).T).reshape((self._k, *t.shape))
        return {"rho": v[0], "mu": v[1], "nu": v[2], "sigma": v[3], "c": v[4]}

    def _log_spline(self, flat: np.ndarray) -> np.ndarray:
        """The splines' values (N, properties) at temperatures ``flat`` (N,)."""
        i = np.searchsorted(self._breaks, flat, side="right")
        d = (flat - self._left[i])[:, None]
        c = self._c[i]
        k = self._k
        return ((c[:, :k] * d + c[:, k : 2 * k]) * d + c[:, 2 * k : 3 * k]) * d + c[:, 3 * k :]

    def logs(self, temperatures: np.ndarray) -> np.ndarray:
        """``ln`` of each property (N, 5: rho, mu, nu, sigma, c) at temperatures (N,) [K].

        Exactly ``np.log`` of what a call returns (the same exponential, then its logarithm,
        element by element), in one array for the solver's property log-ratios.
        """
        return np.log(np.exp(self._log_spline(np.asarray(temperatures, dtype=float))))

    def _scalar(self, t: float) -> dict[str, np.ndarray]:
        i = bisect.bisect_right(self._breaks_list, t) if t == t else len(self._breaks_list)
        c, k = self._c_list[i], self._k
        d = t - self._left_list[i]
        v = [
            math.exp(((c[j] * d + c[k + j]) * d + c[2 * k + j]) * d + c[3 * k + j])
            for j in range(k)
        ]
        return dict(zip(TABLE_KEYS, np.array(v), strict=True))

    def __repr__(self) -> str:
        return (
            f"FluidTable({self.fluid!r}, pressure={self.pressure:g} Pa, "
            f"{self.t_min:.2f}-{self.t_max:.2f} K, {len(self.nodes)} nodes)"
        )


def _celsius(temperature: float) -> str:
    return f"{temperature - ZERO_CELSIUS:.1f} degC"


def _positive(value: Any) -> float | None:
    """``value`` as a float if it is a finite positive number, else None."""
    try:
        number = float(value)
    except (TypeError, ValueError):
        return None
    return number if math.isfinite(number) and number > 0 and not isinstance(value, bool) else None


def _model_range(lo: float, hi: float, source: str) -> str:
    a, b = lo - ZERO_CELSIUS, hi - ZERO_CELSIUS
    span = f"{a:g}-{b:g}" if a >= 0 else f"{a:g} to {b:g}"
    return f"outside {span} degC, the range of {source}"


class Fluid(ABC):
    """One fluid of the catalogue: its property models, their sources and their range."""

    name: str
    phase: str
    description: str
    references: tuple[str, ...]
    #: Properties that are estimates rather than published models: property -> why. Every
    #: output that shows such a property says so (fluid tables and JSON, scale effects).
    estimated: dict[str, str] = {}  # noqa: RUF012 - read-only class default

    def __init__(self) -> None:
        self._bounds_cache: dict[float, _Bounds] = {}
        self._tables: dict[float, FluidTable] = {}

    @abstractmethod
    def _bounds(self, pressure: float) -> _Bounds:
        """Lower and upper limits at ``pressure``, each a list of (temperature [K], reason)."""

    @abstractmethod
    def _evaluate(self, temperature: float, pressure: float) -> tuple[float, ...]:
        """(density, dynamic viscosity, surface tension or nan, speed of sound or nan)."""

    def _vapour_pressure(self, temperature: float, pressure: float) -> float | None:
        return None

    def _check_pressure(self, pressure: float) -> float:
        p = _positive(pressure)
        if p is None:
            raise FluidRangeError(
                f"{self.name}: pressure must be finite and positive, got {pressure!r} Pa"
            )
        return p

    def _limits(self, pressure: float) -> _Bounds:
        p = self._check_pressure(pressure)
        if p not in self._bounds_cache:
            lows, highs = self._bounds(p)
            low = max(lows)
            if low[0] >= min(highs)[0]:
                raise FluidRangeError(
                    f"{self.name} has no valid temperature at {p:.0f} Pa: {low[1]}"
                )
            self._bounds_cache[p] = (lows, highs)
        return self._bounds_cache[p]

    def valid_range(self, pressure: float = ATMOSPHERE) -> tuple[float, float]:
        """Temperatures [K] where the models hold and the fluid neither freezes nor boils.

        Raises
        ------
        FluidRangeError
            When the pressure is not finite and positive, or no temperature is valid at it.
        """
        lows, highs = self._limits(pressure)
        return max(lows)[0], min(highs)[0]

    def check(self, temperature: float, pressure: float = ATMOSPHERE) -> None:
        """Raise :class:`FluidRangeError` with a one-line reason if the state is out of range."""
        lows, highs = self._limits(pressure)
        t = _positive(temperature)
        if t is None:
            raise FluidRangeError(
                f"{self.name}: temperature must be finite and positive, got {temperature!r} K"
            )
        broken = [why for bound, why in sorted(lows, reverse=True) if t < bound]
        broken += [why for bound, why in sorted(highs) if t > bound]
        if broken:
            raise FluidRangeError(f"{'; '.join(broken)} (asked {_celsius(t)})")

    def properties(self, temperature: float, pressure: float = ATMOSPHERE) -> FluidProperties:
        """Evaluate the source models directly at ``temperature`` [K] and ``pressure`` [Pa].

        Results are kept (a few thousand states at most), so the same state asked for again by
        the solver, the evaluation and the scale-effect checks costs nothing.
        """
        key = (float(temperature), float(pressure))
        cache = self.__dict__.setdefault("_properties_cache", {})
        if key not in cache:
            if len(cache) >= PROPERTIES_CACHE:
                cache.clear()
            cache[key] = self._properties(*key)
        return cache[key]

    def _properties(self, temperature: float, pressure: float) -> FluidProperties:
        self.check(temperature, pressure)
        t, p = float(temperature), float(pressure)
        rho, mu, sigma, c, vp = self._source_values(t, p)
        return FluidProperties(
            fluid=self.name,
            temperature=t,
            pressure=p,
            density=rho,
            dynamic_viscosity=mu,
            kinematic_viscosity=mu / rho,
            surface_tension=None if math.isnan(sigma) else sigma,
            speed_of_sound=None if math.isnan(c) else c,
            vapour_pressure=vp,
            estimated=tuple(self.estimated.items()),
        )

    def _source_values(self, t: float, p: float) -> tuple[float, float, float, float, Any]:
        """The source models at (t, p): density, viscosity, surface tension, sound speed and
        vapour pressure (a CoolProp fluid of the catalogue remembers them on disk, see
        :mod:`compromise.physics.tablecache`)."""
        disk = isinstance(self, CoolPropFluid) and type(self).__module__ == __name__
        if disk:
            from compromise.physics import tablecache

            hit = tablecache.load_state(self.name, t, p)
            if hit is not None:
                return hit
        values = (*self._evaluate(t, p), self._vapour_pressure(t, p))
        if disk:
            tablecache.save_state(self.name, t, p, values)  # type: ignore[arg-type]
        return values  # type: ignore[return-value]

    def table(self, pressure: float = ATMOSPHERE) -> FluidTable:
        """The spline table at ``pressure`` [Pa], built on first use and cached.

        A catalogue fluid's table is also kept on disk (:mod:`compromise.physics.tablecache`),
        so a later run reads it back instead of evaluating the source models a few hundred
        times and importing scipy's splines; the numbers are the same to the last bit.
        """
        p = self._check_pressure(pressure)
        if p not in self._tables:
            from compromise.physics import tablecache

            own = type(self).__module__ == __name__  # a subclass elsewhere may change a model
            cached = tablecache.load(self.name, p) if own else None
            if cached is None:
                table = self._build_table(p)
                if own:
                    tablecache.save(self.name, p, (table.nodes, table.log_values, table.spline_c))
            else:
                table = FluidTable(self.name, p, *cached)
            self._tables[p] = table
        return self._tables[p]

    def _log_rows(self, temperatures: np.ndarray, pressure: float) -> np.ndarray:
        rows = []
        for t in temperatures:
            rho, mu, sigma, c = self._evaluate(float(t), pressure)
            rows.append((rho, mu, mu / rho, sigma, c))
        return np.log(np.array(rows))

    def _build_table(self, pressure: float) -> FluidTable:
        from scipy.interpolate import CubicSpline

        lo, hi = self.valid_range(pressure)
        x = np.linspace(lo, hi, max(9, math.ceil((hi - lo) / 2.0) + 1))
        y = self._log_rows(x, pressure)
        for _ in range(40):
            spline = CubicSpline(x, np.nan_to_num(y), axis=0)
            mid = 0.5 * (x[:-1] + x[1:])
            y_mid = self._log_rows(mid, pressure)
            err = np.nanmax(np.abs(spline(mid) - y_mid), axis=1)
            bad = err > _TABLE_TOLERANCE
            if not bad.any():
                return FluidTable(self.name, pressure, x, y)
            order = np.argsort(np.concatenate([x, mid[bad]]), kind="stable")
            x = np.concatenate([x, mid[bad]])[order]
            y = np.concatenate([y, y_mid[bad]])[order]
        raise RuntimeError(f"spline table for {self.name} at {pressure:g} Pa did not converge")

    def __repr__(self) -> str:
        return f"<Fluid {self.name!r} ({self.phase})>"


# ----------------------------------------------------------------------------- CoolProp fluids
class CoolPropFluid(Fluid):
    """A pure fluid (or pseudo-pure dry air) from CoolProp's Helmholtz-energy backend (HEOS).

    Liquids range from freezing (the triple point, unless a subclass knows the melting line) to
    boiling at the pressure. Gases range from condensation at the pressure (the triple point
    below the triple-point pressure) or ``t_min`` to ``GAS_T_MAX`` = 400 K. Air starts at
    200 K: laboratory air flows run near ambient, cryogenic testing uses nitrogen, and the
    pseudo-pure air model cannot represent the oxygen-rich condensation near the dew line.
    400 K covers heated laboratory flows; the models hold much further (common practice).
    """

    def __init__(
        self, name: str, coolprop_name: str, phase: str, references: tuple[str, ...], *,
        t_min: float = 0.0, description: str = "",
    ) -> None:  # fmt: skip
        super().__init__()
        self.name, self.coolprop_name, self.phase = name, coolprop_name, phase
        self.references, self._t_min = references, t_min
        self.description = description or f"{name} ({phase}, Helmholtz EOS via CoolProp)"
        self._states: dict[str, Any] = {}

    def _state(self, kind: str) -> Any:
        """CoolProp AbstractState: ``"pt"`` with the phase imposed, ``"sat"`` without."""
        if kind not in self._states:
            import CoolProp.CoolProp as CP

            state = CP.AbstractState("HEOS", self.coolprop_name)
            if kind == "pt":
                state.specify_phase(CP.iphase_liquid if self.phase == "liquid" else CP.iphase_gas)
            self._states[kind] = state
        return self._states[kind]

    def _update(self, kind: str, inputs: str, a: float, b: float) -> Any:
        import CoolProp.CoolProp as CP

        state = self._state(kind)
        try:
            state.update(getattr(CP, inputs), a, b)
        except ValueError as exc:  # CoolProp refuses a state (a pressure far outside its range)
            raise FluidRangeError(
                f"{self.name}: no state at {a:.4g} and {b:.4g} ({inputs}): {exc}"
            ) from None
        return state

    def _evaluate(self, temperature: float, pressure: float) -> tuple[float, ...]:
        s = self._update("pt", "PT_INPUTS", pressure, temperature)
        rho, mu, c = s.rhomass(), s.viscosity(), s.speed_sound()
        return rho, mu, self._surface_tension(temperature), c

    def _surface_tension(self, temperature: float) -> float:
        if self.phase == "gas":
            return math.nan
        return float(self._update("sat", "QT_INPUTS", 0.0, temperature).surface_tension())

    def _vapour_pressure(self, temperature: float, pressure: float) -> float | None:
        if self.phase == "gas":
            return None
        return float(self._update("sat", "QT_INPUTS", 0.0, temperature).p())

    def _freezing(self, pressure: float) -> float:
        return float(self._state("sat").Ttriple())  # melting line's pressure shift ignored

    def _bounds(self, pressure: float) -> _Bounds:
        """The limits from CoolProp, remembered on disk (:mod:`compromise.physics.tablecache`)
        for the catalogue's own fluids."""
        from compromise.physics import tablecache

        own = type(self).__module__ == __name__
        found = tablecache.load_bounds(self.name, pressure) if own else None
        if found is None:
            found = self._coolprop_bounds(pressure)
            if own:
                tablecache.save_bounds(self.name, pressure, found)
        return found

    def _coolprop_bounds(self, pressure: float) -> _Bounds:
        import CoolProp.CoolProp as CP

        s = self._state("sat")
        t_triple, p_triple = s.Ttriple(), s.trivial_keyed_output(CP.iP_triple)
        t_crit, p_crit, name = s.T_critical(), s.p_critical(), self.name
        if self.phase == "liquid":
            if pressure < p_triple or pressure >= p_crit:
                why = f"{name} is not a liquid outside {p_triple:.4g}-{p_crit:.4g} Pa"
                return [(math.inf, why)], [(0.0, why)]
            lo, hi = self._freezing(pressure), self._saturation_temperature(pressure, 0.0)
            return [(lo, f"{name} freezes below {_celsius(lo)}")], [
                (hi, f"{name} boils above {_celsius(hi)} at {pressure:.0f} Pa")
            ]
        catalogue = _model_range(self._t_min, GAS_T_MAX, f"the catalogue for {name}")
        if pressure < p_triple:
            low = (t_triple, f"{name} turns solid below its triple point {_celsius(t_triple)}")
        elif pressure < p_crit:
            t_dew = self._saturation_temperature(pressure, 1.0)
            low = (t_dew, f"{name} condenses below {_celsius(t_dew)} at {pressure:.0f} Pa")
        else:
            low = (t_crit, f"{name} is a dense fluid below its critical {_celsius(t_crit)}")
        lows = [low, (self._t_min, catalogue)] if self._t_min > 0 else [low]
        return lows, [(GAS_T_MAX, catalogue)]

    def _saturation_temperature(self, pressure: float, quality: float) -> float:
        return float(self._update("sat", "PQ_INPUTS", pressure, quality).T())


class Water(CoolPropFluid):
    """Fresh (pure) water: IAPWS-95, IAPWS 2008 viscosity, IAPWS R1-76 surface tension."""

    def __init__(self) -> None:
        refs = (
            "density, speed of sound, vapour pressure, boiling: Wagner & Pruss (2002), IAPWS-95, "
            "J. Phys. Chem. Ref. Data 31, 387 (via CoolProp)",
            "viscosity: Huber et al. (2009), IAPWS 2008, J. Phys. Chem. Ref. Data 38, 101 "
            "(via CoolProp)",
            "surface tension: IAPWS R1-76(2014), Vargaftik et al. (1983), J. Phys. Chem. Ref. "
            "Data 12, 817",
            "freezing: IAPWS R14-08(2011) melting line (Wagner et al. 2011) less 2.5 mK, so that "
            "air-saturated water freezes at 273.15 K at 101325 Pa (ice point; common practice)",
        )
        super().__init__("water", "Water", "liquid", refs, description="fresh water")

    def _freezing(self, pressure: float) -> float:
        import CoolProp.CoolProp as CP

        s = self._state("sat")
        shift = s.melting_line(CP.iT, CP.iP, ATMOSPHERE) - ZERO_CELSIUS
        return float(s.melting_line(CP.iT, CP.iP, pressure)) - shift

    def _surface_tension(self, temperature: float) -> float:
        return float(water_surface_tension_iapws(temperature))


def _aqueous_bounds(
    fluid: Fluid, pressure: float, lows: list[tuple[float, str]], highs: list[tuple[float, str]]
) -> _Bounds:
    """Add pure water's boiling point at ``pressure`` as an upper limit (conservative: a solute
    raises the boiling point); no liquid at all where pure water has none."""
    w_lows, w_highs = _make_fluid("water")._bounds(pressure)
    if not math.isfinite(w_lows[0][0]):
        return w_lows, w_highs
    hi = w_highs[0][0]
    why = f"{fluid.name} boils above {_celsius(hi)} at {pressure:.0f} Pa (as pure water)"
    return lows, [*highs, (hi, why)]


# ------------------------------------------------------------------------------------ seawater


class Seawater(Fluid):
    """Seawater of a given absolute salinity [g/kg], reference composition."""

    phase = "liquid"
    references = (
        "density: Millero & Poisson (1981), UNESCO one-atmosphere EOS-80, Deep-Sea Res. 28A, "
        "625 (within 1e-5 of TEOS-10; the pressure effect, 4.5e-5 per bar, is ignored)",
        "viscosity: Sharqawy, Lienhard & Zubair (2010), Desalin. Water Treat. 16, 354, eqs. 22-23",
        "surface tension: Nayar et al. (2014), J. Phys. Chem. Ref. Data 43, 043103",
        "speed of sound: Coppens (1981), J. Acoust. Soc. Am. 69, 862 (from memory)",
        "vapour pressure: IAPWS-95 water (CoolProp) / (1 + 0.57357 S/(1000 - S)), Sharqawy et "
        "al. (2010) (from memory; within 0.25 % of TEOS-10)",
        "range: freezing, Millero (1978) in UNESCO (1983) (from memory), or -2 degC, to 40 degC "
        "(EOS-80) or pure water's boiling point; viscosity and surface tension are extrapolated "
        "below 0 degC",
    )

    def __init__(self, salinity: float = STANDARD_SALINITY) -> None:
        super().__init__()
        self.salinity = float(salinity)
        standard = math.isclose(self.salinity, STANDARD_SALINITY, rel_tol=0.0, abs_tol=1e-9)
        self.name = "seawater" if standard else f"seawater {self.salinity:g} g/kg"
        self.description = f"seawater, absolute salinity {self.salinity:g} g/kg"

    def _bounds(self, pressure: float) -> _Bounds:
        model = _model_range(271.15, 313.15, "the UNESCO (1981) equation of state")
        t_f = seawater_freezing_temperature(self.salinity, pressure)
        lows = [(271.15, model), (t_f, f"{self.name} freezes below {_celsius(t_f)}")]
        return _aqueous_bounds(self, pressure, lows, [(313.15, model)])

    def _evaluate(self, temperature: float, pressure: float) -> tuple[float, ...]:
        t, s = temperature, self.salinity
        return (
            float(seawater_density_eos80(t, s)),
            float(seawater_viscosity_sharqawy(t, s)),
            float(seawater_surface_tension_nayar(t, s)),
            float(seawater_sound_speed_coppens(t, s)),
        )

    def _vapour_pressure(self, temperature: float, pressure: float) -> float | None:
        p_w = water_vapour_pressure_wagner_pruss(temperature)
        s = self.salinity
        return p_w / (1.0 + 0.57357 * s / (1000.0 - s))


# ------------------------------------------------------------------------------ glycerol-water


class GlycerolWater(Fluid):
    """Aqueous glycerol of a given glycerol mass fraction (0 to 1)."""

    phase = "liquid"
    references = (
        "viscosity: Cheng (2008), Ind. Eng. Chem. Res. 47, 3285, eqs. 21-22",
        "density: Volk & Kähler (2018), Exp. Fluids 59, 75 (fitted 15-30 degC)",
        "surface tension: an estimate, linear in mass fraction between IAPWS R1-76(2014) water "
        "and glycerol at 63.4 mN/m at 20 degC (CRC Handbook, from memory); no published "
        "mixture data checked",
        "speed of sound, vapour pressure: no cited model, None",
        "range: 0-100 degC of Cheng (2008), capped at pure water's boiling point (conservative); "
        "mixtures freeze below 0 degC, and glycerol (melting at 18 degC) stays supercooled in "
        "practice (common practice)",
    )

    def __init__(self, mass_fraction: float) -> None:
        super().__init__()
        self.mass_fraction = float(mass_fraction)
        if self.mass_fraction > 0.0:
            self.estimated = {"surface_tension": GLYCEROL_WATER_SIGMA_NOTE}
        self.name = f"glycerol-water {100.0 * self.mass_fraction:g}%"
        self.description = f"aqueous glycerol, {100.0 * self.mass_fraction:g} % glycerol by mass"

    def _bounds(self, pressure: float) -> _Bounds:
        model = _model_range(ZERO_CELSIUS, ZERO_CELSIUS + 100.0, "Cheng (2008)")
        lows, highs = [(ZERO_CELSIUS, model)], [(ZERO_CELSIUS + 100.0, model)]
        if self.mass_fraction == 1.0:
            return lows, highs
        return _aqueous_bounds(self, pressure, lows, highs)

    def _evaluate(self, temperature: float, pressure: float) -> tuple[float, ...]:
        t, cm = temperature, self.mass_fraction
        return (
            float(glycerol_water_density_volk_kahler(t, cm)),
            float(glycerol_water_viscosity_cheng(t, cm)),
            float(glycerol_water_surface_tension(t, cm)),
            math.nan,
        )


# ---------------------------------------------------------------------------------- the names
_ALIASES = {
    alias: canonical
    for canonical, aliases in {
        "water": ("water", "fresh water", "freshwater"),
        "seawater": ("seawater", "sea water"),
        "glycerol-water 100%": ("glycerol", "glycerin", "glycerine"),
        "n-decane": ("n-decane", "decane"),
        "n-dodecane": ("n-dodecane", "dodecane"),
        "air": ("air",),
        "nitrogen": ("nitrogen", "n2"),
        "sf6": ("sf6", "sulphur hexafluoride", "sulfur hexafluoride"),
    }.items()
    for alias in aliases
}
_NUMBER = r"(\d+(?:\.\d*)?|\.\d+)"
_SEAWATER = re.compile(rf"^sea ?water\s*{_NUMBER}\s*(g/kg|%|ppt|psu)$")
_GLYCEROL = re.compile(
    rf"^glycer(?:ol|ine?)(?:\s*[-/ ]\s*water)?\s*{_NUMBER}\s*(?:%|wt\s*%|%\s*wt)$"
)
_KNOWN = (
    "water, seawater, seawater <S> g/kg, glycerol-water <X>%, glycerol, n-decane, "
    "n-dodecane, air, nitrogen, sf6"
)


def _canonical(name: str) -> str:
    text = re.sub(r"[\u2010-\u2014\u2212]", "-", name.strip().lower())
    text = re.sub(r"\s+", " ", text)
    if text in _ALIASES:
        return _ALIASES[text]
    if m := _SEAWATER.match(text):
        value, unit = float(m.group(1)), m.group(2)
        sa = {"g/kg": value, "ppt": value, "%": 10.0 * value, "psu": value / _SP_PER_SA}[unit]
        if sa > 42.0 / _SP_PER_SA:
            raise FluidRangeError(
                f"{name!r}: salinity {sa:g} g/kg outside 0-42.2 g/kg, the range of the UNESCO "
                "(1981) equation of state"
            )
        return "seawater" if math.isclose(sa, STANDARD_SALINITY) else f"seawater {sa:g} g/kg"
    if m := _GLYCEROL.match(text):
        pct = float(m.group(1))
        if pct > 100.0:
            raise FluidRangeError(f"{name!r}: glycerol mass percentage {pct:g} % above 100 %")
        return f"glycerol-water {pct:g}%"
    close = difflib.get_close_matches(text, sorted(set(_ALIASES) | set(CATALOGUE)), n=1)
    message = f"unknown fluid {name!r}"
    if close:
        message += f"; did you mean {_ALIASES.get(close[0], close[0])!r}?"
    if "oil" in text:
        message += "; there is no generic oil: the light oils are n-decane and n-dodecane"
    message += ("" if message.endswith("?") else ";") + f" known: {_KNOWN}"
    raise UnknownFluidError(message)


_LEMMON_JACOBSEN = "viscosity: Lemmon & Jacobsen (2004), Int. J. Thermophys. 25, 21 (via CoolProp)"
_MULERO = "surface tension: Mulero, Cachadina & Parra (2012), J. Phys. Chem. Ref. Data 41, 043105"
_REFERENCES = {
    "n-decane": (
        "density, speed of sound, vapour pressure: Lemmon & Span (2006), J. Chem. Eng. Data 51, "
        "785 (via CoolProp)",
        "viscosity: Huber, Laesecke & Xiang (2004), Fluid Phase Equilib. 224, 263 (via CoolProp)",
        _MULERO,
        "range: triple point (freezing) to boiling at the pressure",
    ),
    "n-dodecane": (
        "density, speed of sound, vapour pressure: Lemmon & Huber (2004), Energy Fuels 18, 960 "
        "(via CoolProp)",
        "viscosity: Huber, Laesecke & Perkins (2004), Energy Fuels 18, 968 (via CoolProp)",
        _MULERO,
        "range: triple point (freezing) to boiling at the pressure",
    ),
    "air": (
        "density, speed of sound: Lemmon, Jacobsen, Penoncello & Friend (2000), J. Phys. Chem. "
        "Ref. Data 29, 331 (pseudo-pure dry air, via CoolProp)",
        _LEMMON_JACOBSEN,
        "range: 200-400 K, laboratory air flows (common practice)",
    ),
    "nitrogen": (
        "density, speed of sound: Span, Lemmon, Jacobsen, Wagner & Yokozeki (2000), J. Phys. "
        "Chem. Ref. Data 29, 1361 (via CoolProp)",
        _LEMMON_JACOBSEN,
        "range: condensation at the pressure (cryogenic tunnels) to 400 K",
    ),
    "sf6": (
        "density, speed of sound: Guder & Wagner (2009), J. Phys. Chem. Ref. Data 38, 33 "
        "(via CoolProp)",
        "viscosity: Quinones-Cisneros, Huber & Deiters (2012), J. Phys. Chem. Ref. Data 41, "
        "023102 (via CoolProp)",
        "range: triple point 223.555 K (below 2.3 bar SF6 deposits as a solid) or condensation "
        "at the pressure, to 400 K",
    ),
}


@lru_cache(maxsize=256)
def _make_fluid(canonical: str) -> Fluid:
    refs = _REFERENCES.get(canonical, ())
    simple: dict[str, Any] = {
        "water": Water,
        "seawater": Seawater,
        "n-decane": lambda: CoolPropFluid("n-decane", "n-Decane", "liquid", refs),
        "n-dodecane": lambda: CoolPropFluid("n-dodecane", "n-Dodecane", "liquid", refs),
        "air": lambda: CoolPropFluid("air", "Air", "gas", refs, t_min=200.0),
        "nitrogen": lambda: CoolPropFluid("nitrogen", "Nitrogen", "gas", refs),
        "sf6": lambda: CoolPropFluid("sf6", "SulfurHexafluoride", "gas", refs),
    }
    if canonical in simple:
        return simple[canonical]()
    kind, _, value = canonical.partition(" ")
    if kind == "seawater":
        return Seawater(float(value.split()[0]))
    return GlycerolWater(float(value.rstrip("%")) / 100.0)


def get_fluid(name: str) -> Fluid:
    """The catalogue fluid called ``name`` (case and spacing free; see the module docstring).

    Raises
    ------
    UnknownFluidError
        For a name not in the catalogue, with the closest known name.
    FluidRangeError
        For a salinity or glycerol fraction outside its model's range.

    Examples
    --------
    >>> get_fluid("Glycerol-Water 60 %").name
    'glycerol-water 60%'
    """
    if not isinstance(name, str):
        raise UnknownFluidError(f"unknown fluid {name!r}; known: {_KNOWN}")
    return _make_fluid(_canonical(name))


def fluid_names() -> list[str]:
    """Catalogue names for listing: liquids (water first) then gases, a fixed order."""
    return list(CATALOGUE)


def catalogue(
    temperature: float, pressure: float = ATMOSPHERE
) -> dict[str, FluidProperties | None]:
    """Every catalogue fluid at ``temperature`` [K] and ``pressure`` [Pa], None if out of range."""
    out: dict[str, FluidProperties | None] = {}
    for name in CATALOGUE:
        try:
            out[name] = get_fluid(name).properties(temperature, pressure)
        except FluidRangeError:
            out[name] = None
    return out
