"""The built-in catalogue of dimensionless groups, and Buckingham pi analysis.

Each built-in group is written in the safe expression language of :mod:`compromise.expressions` over
conventional names: ``velocity``, ``L`` (the group's characteristic length, which a case file
maps to ``depth``, ``diameter``, ``length`` ...), the fluid properties ``rho``, ``mu``, ``nu``,
``sigma``, ``c``, ``g``, and a few more (``pressure_drop``, ``grain_size``, ...; see
:data:`CONVENTIONAL_DIMENSIONS`). The report, the command line and the case loader read the
catalogue from :data:`BUILTIN_GROUPS`, never from copies.

:func:`derive_groups` finds a complete, independent set of dimensionless groups for any list of
variables (Buckingham's pi theorem), with exact rational arithmetic.

References
----------
.. [1] Buckingham, E. (1914). On physically similar systems; illustrations of the use of
   dimensional equations. Physical Review 4(4), 345-376 (from memory).
.. [2] White, F. M. (2011). Fluid Mechanics, 7th ed., McGraw-Hill, ch. 5 (dimensional analysis
   and similarity) (from memory).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from compromise.errors import CompromiseError
from compromise.expressions import PROPERTY_DIMENSIONS, Expr, Name, parse, substitute

CONVENTIONAL_DIMENSIONS: dict[str, tuple[int, int, int, int]] = {
    "velocity": (0, 1, -1, 0),  # mean or reference flow velocity [m/s]
    "L": (0, 1, 0, 0),  # characteristic length of the group [m]
    "pressure_drop": (1, -1, -2, 0),  # pressure difference [Pa]
    "frequency": (0, 0, -1, 0),  # frequency of shedding, waves or oscillation [Hz]
    "bulk_modulus": (1, -1, -2, 0),  # bulk modulus of elasticity of the fluid [Pa]
    "density_difference": (1, -3, 0, 0),  # density excess of the heavier layer [kg/m^3]
    "shear_velocity": (0, 1, -1, 0),  # bed shear velocity sqrt(tau_b / rho) [m/s]
    "grain_density": (1, -3, 0, 0),  # density of sediment grains [kg/m^3]
    "grain_size": (0, 1, 0, 0),  # representative grain diameter [m]
    "settling_velocity": (0, 1, -1, 0),  # terminal fall velocity of a grain [m/s]
    "roughness": (0, 1, 0, 0),  # equivalent sand roughness height k_s [m]
    **PROPERTY_DIMENSIONS,
}
"""Dimension vectors (M, L, T, Theta) of the names the built-in groups use."""

STATE_DIMENSIONS: dict[str, tuple[int, int, int, int]] = {
    "p_ambient": (1, -1, -2, 0),  # ambient (facility) pressure of the fluid state [Pa]
    "p_vapour": (1, -1, -2, 0),  # vapour pressure of the fluid at its temperature [Pa]
}
"""Names of the fluid *state* (not of a quantity): defined in every evaluation environment,
from the state's pressure and the catalogue's vapour pressure at its temperature. In the model
``p_ambient`` is the facility's pressure, a decision when ``[model] pressure`` is a range."""
CONVENTIONAL_DIMENSIONS.update(STATE_DIMENSIONS)

_WHITE = (
    "White, F. M. (2011). Fluid Mechanics, 7th ed., McGraw-Hill, ch. 5, dimensional analysis "
    "and similarity (from memory)."
)
_GARCIA = (
    "Garcia, M. H., ed. (2008). Sedimentation Engineering: Processes, Measurements, Modeling "
    "and Practice. ASCE Manuals and Reports on Engineering Practice 110, ch. 2 (from memory)."
)
_SHIELDS = (
    "Shields, A. (1936). Anwendung der Aehnlichkeitsmechanik und der Turbulenzforschung auf die "
    "Geschiebebewegung. Mitteilungen der Preussischen Versuchsanstalt fuer Wasserbau und "
    "Schiffbau 26, Berlin (from memory)."
)


class UnknownGroupError(CompromiseError, KeyError):
    """A group name that is not in the built-in catalogue."""

    def __str__(self) -> str:  # KeyError quotes its argument; keep the plain message
        return str(self.args[0]) if self.args else ""


@dataclass(frozen=True)
class GroupDefinition:
    """A built-in dimensionless group.

    Attributes
    ----------
    name : str
        Registry key, snake_case, e.g. ``"froude"``.
    symbol : str
        Usual symbol in plain text, e.g. ``"Fr"``.
    expression : str
        Default expression over conventional names; ``L`` is the characteristic length [-].
    forces : str
        The ratio of forces or effects the group stands for, e.g. ``"inertia / gravity"``.
    meaning : str
        One sentence for a modeller.
    references : tuple of str
        Where the group comes from.
    """

    name: str
    symbol: str
    expression: str
    forces: str
    meaning: str
    references: tuple[str, ...]

    def parsed(self, length: str | None = None) -> Expr:
        """The expression as a tree, with ``L`` renamed to ``length`` when given.

        Examples
        --------
        >>> str(get_group("froude").parsed("depth"))
        'velocity / sqrt(g * depth)'
        """
        tree = parse(self.expression)
        if length is not None:
            tree = substitute(tree, {"L": Name(length)})
        return tree


BUILTIN_GROUPS: dict[str, GroupDefinition] = {
    g.name: g
    for g in (
        GroupDefinition(
            name="froude",
            symbol="Fr",
            expression="velocity / sqrt(g * L)",
            forces="inertia / gravity (square root)",
            meaning="Governs free-surface flows, waves and hydraulic jumps; kept equal in nearly "
            "every open-channel and coastal model.",
            references=(
                "Froude, W. (1868). Observations and suggestions on the subject of determining "
                "by experiment the resistance of ships. Memorandum to the Admiralty "
                "(from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="reynolds",
            symbol="Re",
            expression="velocity * L / nu",
            forces="inertia / viscosity",
            meaning="Decides laminar or turbulent flow and the size of friction and boundary-"
            "layer effects; too low a model value is the commonest scale effect.",
            references=(
                "Reynolds, O. (1883). An experimental investigation of the circumstances which "
                "determine whether the motion of water shall be direct or sinuous, and of the "
                "law of resistance in parallel channels. Philosophical Transactions of the "
                "Royal Society of London 174, 935-982 (from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="weber",
            symbol="We",
            expression="rho * velocity**2 * L / sigma",
            forces="inertia / surface tension",
            meaning="Measures surface tension against inertia; small model values distort air "
            "entrainment, vortices, drops and thin overflows.",
            references=(
                "Weber, M. (1919). Die Grundlagen der Aehnlichkeitsmechanik und ihre "
                "Verwertung bei Modellversuchen. Jahrbuch der Schiffbautechnischen "
                "Gesellschaft 20, 355-477 (from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="mach",
            symbol="Ma",
            expression="velocity / c",
            forces="inertia / compressibility (square root)",
            meaning="Compares the flow speed with the speed of sound; below about 0.3 the flow "
            "behaves as incompressible.",
            references=(
                "Mach, E. and Salcher, P. (1887). Photographische Fixirung der durch "
                "Projectile in der Luft eingeleiteten Vorgaenge. Sitzungsberichte der "
                "Akademie der Wissenschaften Wien 95 (from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="euler",
            symbol="Eu",
            expression="pressure_drop / (rho * velocity**2)",
            forces="pressure / inertia",
            meaning="A pressure difference made dimensionless by the dynamic pressure; the "
            "form in which losses and pressure coefficients are measured.",
            references=(_WHITE,),
        ),
        GroupDefinition(
            name="strouhal",
            symbol="St",
            expression="frequency * L / velocity",
            forces="local (unsteady) inertia / convective inertia",
            meaning="Relates a frequency of the flow, such as vortex shedding, to the time a "
            "particle takes to pass the characteristic length.",
            references=(
                "Strouhal, V. (1878). Ueber eine besondere Art der Tonerregung. Annalen der "
                "Physik und Chemie 241(10), 216-251 (from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="cauchy",
            symbol="Ca",
            expression="rho * velocity**2 / bulk_modulus",
            forces="inertia / elasticity",
            meaning="Matters where the compressibility of the fluid matters, as in water "
            "hammer; equals the Mach number squared.",
            references=(
                "Hughes, S. A. (1993). Physical Models and Laboratory Techniques in Coastal "
                "Engineering. World Scientific, ch. 2 (from memory).",
                _WHITE,
            ),
        ),
        GroupDefinition(
            name="densimetric_froude",
            symbol="Fr_d",
            expression="velocity / sqrt(g * density_difference / rho * L)",
            forces="inertia / buoyancy (square root)",
            meaning="The Froude number with gravity reduced by the relative density difference; "
            "governs stratified flows, density currents, plumes and saline wedges.",
            references=(
                "Turner, J. S. (1973). Buoyancy Effects in Fluids. Cambridge University Press "
                "(from memory).",
            ),
        ),
        GroupDefinition(
            name="shields",
            symbol="theta",
            expression="shear_velocity**2 / (g * (grain_density / rho - 1) * grain_size)",
            forces="bed shear stress / submerged weight of a grain layer",
            meaning="Decides whether bed grains move; a movable-bed model keeps it equal to "
            "reproduce the onset and intensity of sediment transport.",
            references=(_SHIELDS, _GARCIA),
        ),
        GroupDefinition(
            name="particle_reynolds",
            symbol="Re_p",
            expression="shear_velocity * grain_size / nu",
            forces="inertia / viscosity at the grain scale",
            meaning="Places grains on the Shields curve; the critical Shields value depends on "
            "it, so a movable-bed model must keep it or stay where the curve is flat.",
            references=(_SHIELDS, _GARCIA),
        ),
        GroupDefinition(
            name="rouse",
            symbol="P",
            expression="settling_velocity / (0.4 * shear_velocity)",
            forces="settling / turbulent suspension",
            meaning="Says whether sediment travels as bed load or in suspension and how it is "
            "spread over the depth (von Karman constant 0.4, common practice).",
            references=(
                "Rouse, H. (1937). Modern conceptions of the mechanics of fluid turbulence. "
                "Transactions of the American Society of Civil Engineers 102, 463-543 "
                "(from memory).",
                _GARCIA,
            ),
        ),
        GroupDefinition(
            name="stability_number",
            symbol="Ns",
            expression="L / ((grain_density / rho - 1) * grain_size)",
            forces="wave load / submerged weight of an armour unit",
            meaning="Hs / (Delta Dn50) with L the design wave height and grain_size the nominal "
            "diameter Dn50; a rubble-mound model keeps it, so a fresh-water basin of a seawater "
            "prototype corrects the stone size or density for the relative density.",
            references=(
                "Van der Meer, J. W. (1988). Rock slopes and gravel beaches under wave attack. "
                "PhD thesis, Delft University of Technology (from memory).",
                "Hudson, R. Y. (1959). Laboratory investigation of rubble-mound breakwaters. "
                "Journal of the Waterways and Harbors Division, ASCE 85(WW3), 93-121 "
                "(from memory).",
            ),
        ),
        GroupDefinition(
            name="cavitation",
            symbol="sigma_c",
            expression="(p_ambient + rho * g * L - p_vapour) / (0.5 * rho * velocity**2)",
            forces="pressure above vapour pressure / dynamic pressure",
            meaning="The cavitation index at a point L below the free surface (or of head "
            "above it): a Froude model at atmospheric pressure has too high a value and does "
            "not cavitate where the prototype does; a depressurised facility lowers p_ambient.",
            references=(
                "Falvey, H. T. (1990). Cavitation in Chutes and Spillways. US Bureau of "
                "Reclamation, Engineering Monograph 42, ch. 1, cavitation index (from memory).",
                "Knapp, R. T., Daily, J. W., Hammitt, F. G. (1970). Cavitation. McGraw-Hill "
                "(from memory).",
            ),
        ),
        GroupDefinition(
            name="roughness_reynolds",
            symbol="ks+",
            expression="shear_velocity * roughness / nu",
            forces="roughness height / viscous sublayer thickness",
            meaning="Smooth below about 5, fully rough above about 70; a model whose walls are "
            "not fully rough when the prototype's are has too high a friction factor.",
            references=(
                "Nikuradse, J. (1933). Stroemungsgesetze in rauhen Rohren. VDI-Forschungsheft "
                "361 (from memory): the sand-grain data; the bands 5 and 70 are the textbook "
                "values (Schlichting, H., Boundary-Layer Theory; White, F. M., Fluid Mechanics, "
                "ch. 6; from memory).",
            ),
        ),
    )
}
"""The built-in groups, in the order they are listed to users."""


def get_group(name: str) -> GroupDefinition:
    """Look a built-in group up by name or symbol.

    Parameters
    ----------
    name : str
        Registry key (``"froude"``; case, spaces and dashes are forgiven) or symbol (``"Fr"``).

    Raises
    ------
    UnknownGroupError
        A :class:`KeyError` naming the closest built-in group.

    Examples
    --------
    >>> get_group("Densimetric-Froude").symbol
    'Fr_d'
    >>> get_group("Re").name
    'reynolds'
    """
    key = str(name).strip().lower().replace("-", "_").replace(" ", "_")
    if key in BUILTIN_GROUPS:
        return BUILTIN_GROUPS[key]
    for group in BUILTIN_GROUPS.values():
        if group.symbol == str(name).strip():
            return group
    close = difflib.get_close_matches(key, list(BUILTIN_GROUPS), n=1)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    raise UnknownGroupError(
        f"unknown group {name!r}{hint} Built-in groups: {', '.join(BUILTIN_GROUPS)}"
    )


# --------------------------------------------------------------------------- Buckingham pi


@dataclass(frozen=True)
class DerivedGroup:
    """A dimensionless product of powers of variables found by :func:`derive_groups`.

    Attributes
    ----------
    exponents : dict[str, int]
        Integer exponent of each variable, zero entries dropped [-].
    """

    exponents: dict[str, int] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if any(int(v) != v for v in self.exponents.values()):
            raise ValueError(f"exponents must be integers; got {self.exponents}")
        clean = {str(k): int(v) for k, v in self.exponents.items() if int(v) != 0}
        object.__setattr__(self, "exponents", clean)

    def __hash__(self) -> int:
        return hash(tuple(sorted(self.exponents.items())))

    def to_text(self) -> str:
        """Text in the expression language, numerator over denominator.

        Examples
        --------
        >>> DerivedGroup({"pressure_drop": 1, "rho": -1, "velocity": -2}).to_text()
        'pressure_drop / (rho * velocity**2)'
        """

        def product(items: list[tuple[str, int]]) -> str:
            return " * ".join(k if v == 1 else f"{k}**{v}" for k, v in items)

        num = [(k, v) for k, v in self.exponents.items() if v > 0]
        den = [(k, -v) for k, v in self.exponents.items() if v < 0]
        top = product(num) if num else "1"
        if not den:
            return top
        bottom = product(den)
        return f"{top} / ({bottom})" if len(den) > 1 else f"{top} / {bottom}"

    def to_expr(self) -> Expr:
        """The group as an expression tree."""
        return parse(self.to_text())

    def to_dict(self) -> dict[str, object]:
        """``{"expression": text, "exponents": {name: exponent}}`` for JSON output."""
        return {"expression": self.to_text(), "exponents": dict(self.exponents)}


def _fraction(x: float) -> Fraction:
    value = float(x)
    if not math.isfinite(value):
        raise ValueError(f"dimension exponents must be finite; got {x!r}")
    return Fraction(value).limit_denominator(1000)


def _solve_exact(columns: list[list[Fraction]], rhs: list[Fraction]) -> list[Fraction]:
    """Solve ``A x = b`` exactly for a full-column-rank, consistent system (A given by columns)."""
    n_rows, n_cols = len(rhs), len(columns)
    rows = [[columns[j][i] for j in range(n_cols)] + [rhs[i]] for i in range(n_rows)]
    pivots: list[int] = []
    r = 0
    for col in range(n_cols):
        pivot = next((i for i in range(r, n_rows) if rows[i][col] != 0), None)
        if pivot is None:
            raise ValueError("repeating variables are dimensionally dependent")
        rows[r], rows[pivot] = rows[pivot], rows[r]
        lead = rows[r][col]
        rows[r] = [v / lead for v in rows[r]]
        for i in range(n_rows):
            if i != r and rows[i][col] != 0:
                factor = rows[i][col]
                rows[i] = [a - factor * b for a, b in zip(rows[i], rows[r], strict=True)]
        pivots.append(col)
        r += 1
    if any(rows[i][-1] != 0 for i in range(r, n_rows)):
        raise ValueError("a variable's dimension is not spanned by the repeating variables")
    return [rows[i][-1] for i in range(n_cols)]


def _rank(vectors: list[np.ndarray]) -> int:
    if not vectors:
        return 0
    return int(np.linalg.matrix_rank(np.column_stack(vectors)))


def _repeating_preference(order: list[str], dims: Mapping[str, np.ndarray]) -> list[str]:
    """Candidates for the repeating set, in the order textbooks recommend (common practice).

    A geometric variable (a length) first, then a kinematic one (length and time only), then a
    dynamic one (with mass), a density before other dynamic variables; dimensionless variables
    never. The first variable given is usually the dependent one (a pressure drop, a force, a
    discharge) and is tried last. Ties keep the given order.
    """

    def rank(item: tuple[int, str]) -> tuple[int, int, int]:
        i, key = item
        m, length, t, theta = (float(x) for x in dims[key])
        if m == 0 and t == 0 and theta == 0 and length != 0:
            kind = 0  # geometric
        elif m == 0 and theta == 0:
            kind = 1  # kinematic
        elif (m, length, t) == (1.0, -3.0, 0.0):
            kind = 2  # density
        else:
            kind = 3  # other dynamic
        return (1 if i == 0 else 0, kind, i)

    return [k for _, k in sorted(enumerate(order), key=rank)]


def derive_groups(
    variables: Mapping[str, Sequence[float]], repeating: Sequence[str] | None = None
) -> list[DerivedGroup]:
    """A complete, independent set of dimensionless groups (Buckingham's pi theorem).

    With n variables whose dimensional matrix has rank r, there are n - r independent groups.
    r dimensionally independent repeating variables are taken (given, or chosen greedily: a
    length, a kinematic variable, then a density or other dynamic variable, with the first
    variable tried last as it is usually the dependent one; skipping variables that are
    dimensionless or dependent on those already
    chosen); each other variable, times powers of the repeating ones, makes one group. The
    exponents are solved exactly in rational arithmetic and scaled to the smallest integers,
    with the non-repeating variable's exponent positive.

    Parameters
    ----------
    variables : Mapping[str, Sequence[float]]
        Name to dimension vector (M, L, T, Theta), in the order to use.
    repeating : Sequence[str], optional
        The repeating variables; chosen automatically when omitted.

    Returns
    -------
    list of DerivedGroup
        One group per non-repeating variable, in the order of ``variables``.

    Raises
    ------
    ValueError
        On a bad dimension vector, or repeating variables that are unknown, repeated, not r in
        number, or dimensionally dependent.

    References
    ----------
    .. [1] Buckingham, E. (1914). On physically similar systems; illustrations of the use of
       dimensional equations. Physical Review 4(4), 345-376 (from memory).

    Examples
    --------
    >>> dims = {"F": (1, 1, -2, 0), "rho": (1, -3, 0, 0), "mu": (1, -1, -1, 0),
    ...         "V": (0, 1, -1, 0), "D": (0, 1, 0, 0)}
    >>> [g.to_text() for g in derive_groups(dims, ["rho", "V", "D"])]
    ['F / (rho * V**2 * D**2)', 'mu / (rho * V * D)']
    """
    order = list(variables)
    if not order:
        raise ValueError("no variables given")
    exact: dict[str, list[Fraction]] = {}
    for key in order:
        Name(key)  # a name the expression language accepts (raises ExpressionError otherwise)
        if key == "pi":
            raise ValueError("'pi' is the constant 3.14159...; give the variable another name")
        vec = list(variables[key])
        if len(vec) != 4:
            raise ValueError(f"dimension of {key!r} must have 4 entries (M, L, T, Theta)")
        exact[key] = [_fraction(x) for x in vec]
    floats = {k: np.array([float(x) for x in v]) for k, v in exact.items()}
    rank = _rank(list(floats.values()))

    if repeating is None:
        chosen: list[str] = []
        for key in _repeating_preference(order, floats):
            if len(chosen) == rank:
                break
            if _rank([floats[k] for k in [*chosen, key]]) > len(chosen):
                chosen.append(key)
    else:
        chosen = [str(k) for k in repeating]
        unknown = [k for k in chosen if k not in exact]
        if unknown:
            close = difflib.get_close_matches(unknown[0], order, n=1)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            raise ValueError(f"unknown repeating variable {unknown[0]!r}{hint}")
        if len(set(chosen)) != len(chosen):
            raise ValueError(f"repeating variables are listed twice: {chosen}")
        if len(chosen) != rank:
            raise ValueError(
                f"need exactly {rank} repeating variables (the rank of the dimensional matrix); "
                f"got {len(chosen)}: {', '.join(chosen) or 'none'}"
            )
        if _rank([floats[k] for k in chosen]) < rank:
            raise ValueError(
                f"repeating variables {', '.join(chosen)} are dimensionally dependent; choose "
                f"{rank} variables none of which is a product of powers of the others"
            )

    groups: list[DerivedGroup] = []
    for key in order:
        if key in chosen:
            continue
        rhs = [-x for x in exact[key]]
        powers = _solve_exact([exact[k] for k in chosen], rhs) if chosen else []
        raw = {key: Fraction(1), **dict(zip(chosen, powers, strict=True))}
        scale = math.lcm(*(f.denominator for f in raw.values()))
        ints = {k: int(f * scale) for k, f in raw.items()}
        common = math.gcd(*ints.values())
        groups.append(DerivedGroup({k: ints[k] // common for k in order if ints.get(k, 0)}))
    return groups
