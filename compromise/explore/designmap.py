"""The design-space map: the feasible window over two decision variables and the mismatch in it.

Over a grid of two decision variables (from horizontal ratio, vertical ratio, distortion,
velocity ratio and temperature), with the model fluid fixed, every other decision variable
(and the temperature and pressure, when they are not axes) takes its optimum: each cell is the
convex subproblem of :mod:`compromise.solving.problem` with two extra equality rows, solved exactly
(:class:`compromise.solving.qp.SmallQP`) on the temperature grid with a zoom. Cells where no
design satisfies every limit are outside the feasible window.

Each limit's boundary is the zero level of its *log-violation* ``G_i y - h_i``, minimised over the
free variables subject only to the exact groups and the ``[model]`` bounds: the line where that
limit alone stops being satisfiable. The feasible window is the intersection of the regions these
lines bound (and equals it wherever the free variables are fixed by the exact groups, as in a
Froude model with the ratios on the axes).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.envelope import StateSpace, lower_envelope
from compromise.explore.map_parts import Boundary, row_label, row_parts
from compromise.explore.map_parts import zoom_ranges as _zoom
from compromise.solving.design import Design
from compromise.solving.grid import REGULARISATION, Engine, FluidStates, best_state
from compromise.solving.problem import Problem, build_problem
from compromise.solving.qp import SmallQP
from compromise.solving.threads import one_blas_thread

MAP_AXES: dict[str, tuple[str, str]] = {
    "horizontal_ratio": ("horizontal ratio X (model / prototype)", "-"),
    "vertical_ratio": ("vertical ratio Y (model / prototype)", "-"),
    "distortion": ("distortion Y / X", "-"),
    "velocity_ratio": ("velocity ratio V (model / prototype)", "-"),
    "temperature": ("model fluid temperature", "degC"),
    "grain_size": ("model grain size d", "mm"),
    "pressure": ("model fluid pressure", "bar"),
}
#: Axes that are the fluid's state, not a ratio (searched, not fixed by extra equality rows).
STATE_AXES = ("temperature", "pressure")
_NORMALS = {
    "horizontal_ratio": np.array([1.0, 0.0, 0.0]),
    "vertical_ratio": np.array([0.0, 1.0, 0.0]),
    "distortion": np.array([-1.0, 1.0, 0.0]),
    "velocity_ratio": np.array([0.0, 0.0, 1.0]),
}
MAP_ZOOM_ROUNDS = 3
SCOUT_RESOLUTION = 41


@dataclass(frozen=True)
class DesignMap:
    """The design-space map (see the module docstring).

    Attributes
    ----------
    fluid : str
    axes : (str, str)
        The horizontal and vertical axis of the map.
    x, y : numpy.ndarray
        Grid values of the two axes (ratios [-], temperatures [K]).
    objective : numpy.ndarray
        (len(y), len(x)) weighted mismatch of the best design in each cell [-], nan outside
        the feasible window.
    temperature : numpy.ndarray
        (len(y), len(x)) model fluid temperature of that design [K].
    boundaries : tuple of Boundary
    optimum : Design or None
        The best design of the map's fluid (the solver's answer for that fluid).
    optimum_objective : float
    preferred : tuple of (str, Design or None, float)
        The best design of the fluid at each preferred ratio, and its objective.
    """

    case: Case = field(repr=False)
    fluid: str
    axes: tuple[str, str]
    x: np.ndarray = field(repr=False)
    y: np.ndarray = field(repr=False)
    objective: np.ndarray = field(repr=False)
    temperature: np.ndarray = field(repr=False)
    boundaries: tuple[Boundary, ...]
    optimum: Design | None
    optimum_objective: float
    preferred: tuple[tuple[str, Design | None, float], ...]
    full_ranges: tuple[tuple[float, float], ...] = ()
    zoomed: tuple[bool, bool] = (False, False)

    @property
    def labels(self) -> tuple[str, str]:
        """Axis labels."""
        return MAP_AXES[self.axes[0]][0], MAP_AXES[self.axes[1]][0]

    @property
    def units(self) -> tuple[str, str]:
        """Axis units (ratios ``-``, temperature ``degC``)."""
        return MAP_AXES[self.axes[0]][1], MAP_AXES[self.axes[1]][1]

    def coordinates(self, design: Design) -> tuple[float, float]:
        """Where a design sits on the map (in the map's units: ratios, degC)."""
        return tuple(_coordinate(design, a) for a in self.axes)  # type: ignore[return-value]

    @property
    def feasible_share(self) -> float:
        """Fraction of the map inside the feasible window [-]."""
        return float(np.mean(np.isfinite(self.objective)))

    def grid(self, which: int) -> np.ndarray:
        """Grid values of an axis in the map's units (temperatures in degC)."""
        g = self.x if which == 0 else self.y
        if self.axes[which] == "grain_size":
            return g * 1e3
        if self.axes[which] == "temperature":
            return g - 273.15
        return g / 1e5 if self.axes[which] == "pressure" else g

    def to_dict(self) -> dict[str, Any]:
        """Plain data (SI, degC, ratios model/prototype); the grid as nested lists."""

        from compromise.solving.result import denoise

        def opt(v: float) -> float | None:  # a mismatch below the solver's noise is 0
            return denoise(float(v)) if math.isfinite(v) else None

        return {
            "title": self.case.title,
            "fluid": self.fluid,
            "axes": list(self.axes),
            "units": list(self.units),
            "x": self.grid(0).tolist(),
            "y": self.grid(1).tolist(),
            "objective": [[opt(v) for v in row] for row in self.objective],
            "feasible_share": self.feasible_share,
            "zoomed": list(self.zoomed),
            "limits": {
                b.key: {"label": b.label, "binding": b.binding, "excluded": b.excluded}
                for b in self.boundaries
            },
            "optimum": None
            if self.optimum is None
            else {
                "values": list(self.coordinates(self.optimum)),
                "design": self.optimum.to_dict(),
                "objective": opt(self.optimum_objective),
            },
            "preferred": [
                {
                    "ratio": r,
                    "values": list(self.coordinates(d)) if d else None,
                    "design": d.to_dict() if d else None,
                    "objective": opt(o),
                }
                for r, d, o in self.preferred
            ],
        }


def _coordinate(design: Design, axis: str) -> float:
    if axis == "temperature":
        return design.temperature - 273.15
    if axis == "pressure":
        return design.pressure / 1e5
    if axis == "distortion":
        return design.distortion
    if axis == "grain_size":
        return float(design.grain_size or math.nan) * 1e3
    return float(getattr(design, axis))


def default_axes(case: Case) -> tuple[str, str]:
    """``horizontal_ratio`` and ``distortion`` when the case allows distortion, else
    ``horizontal_ratio`` and ``pressure`` when a gas's pressure may vary (a pressurised
    tunnel's key decision), else ``horizontal_ratio`` and ``temperature``
    (``velocity_ratio`` when the temperature is fixed too); ``horizontal_ratio`` and
    ``grain_size`` in a case with ``[sediment]`` (``temperature`` instead where a group kept
    exactly ties the grain size to the ratios, so that the grain-size map would be a line)."""
    if case.sediment is not None:
        from compromise.solving.granular import GranularProblem

        if (
            GranularProblem(case).grain_ties()
            and case.model.temperature[1] > case.model.temperature[0]
        ):
            return "horizontal_ratio", "temperature"
        return "horizontal_ratio", "grain_size"
    if case.model.distortion[1] > case.model.distortion[0]:
        return "horizontal_ratio", "distortion"
    if case.model.pressure[1] > case.model.pressure[0] and _pressure_matters(case):
        return "horizontal_ratio", "pressure"
    if case.model.temperature[1] > case.model.temperature[0]:
        return "horizontal_ratio", "temperature"
    return "horizontal_ratio", "velocity_ratio"


def _pressure_matters(case: Case) -> bool:
    """Whether some fluid of the case has properties that depend on its pressure (a gas)."""
    from compromise.solving.problem import build_problem

    used = build_problem(case).used_properties
    return any(FluidStates(case, f, used).pressures().size > 1 for f in case.model.fluids)


def _range(
    case: Case, problem: Problem, axis: str, fs: FluidStates, y_opt: np.ndarray | None
) -> tuple[float, float]:
    m = case.model
    lo, hi = {
        "horizontal_ratio": m.horizontal_ratio,
        "distortion": m.distortion,
        "temperature": m.temperature,
        "pressure": m.pressure,
        "vertical_ratio": (
            m.horizontal_ratio[0] * m.distortion[0],
            m.horizontal_ratio[1] * m.distortion[1],
        ),
        "velocity_ratio": m.velocity_ratio or (math.nan, math.nan),
    }[axis]
    if axis == "velocity_ratio" and m.velocity_ratio is None:
        from scipy.optimize import linprog

        T = 0.5 * (m.temperature[0] + m.temperature[1])
        h, e = problem.rhs(fs.p(np.array([T]), fs.pressures()[0])[0])
        ends = []
        for sign in (1.0, -1.0):
            r = linprog(
                np.array([0.0, 0.0, sign]),
                A_ub=problem.G,
                b_ub=h,
                A_eq=problem.E if problem.E.size else None,
                b_eq=e if problem.E.size else None,
                bounds=[(None, None)] * 3,
                method="highs",
            )
            ends.append(sign * r.fun if r.status == 0 else math.nan)
        c = float(y_opt[2]) if y_opt is not None else 0.0
        lo_v = ends[0] - math.log(2) if math.isfinite(ends[0]) else c - math.log(10)
        hi_v = ends[1] + math.log(2) if math.isfinite(ends[1]) else c + math.log(10)
        lo, hi = math.exp(lo_v), math.exp(hi_v)
    if not hi > lo:
        what = {"temperature": "model.temperature", "distortion": "model.distortion"}.get(
            axis, f"model.{axis}"
        )
        raise CaseError(
            f"the case fixes {axis.replace('_', ' ')}, so it cannot be a map axis",
            file=case.path,
            key=what,
        )
    return float(lo), float(hi)


@one_blas_thread
def design_map(
    case: Case,
    axes: tuple[str, str] | list[str] | None = None,
    *,
    fluid: str | None = None,
    resolution: int = 81,
    n_temperatures: int = 24,
    full_range: bool = False,
) -> DesignMap:
    """The design-space map of a case (see the module docstring).

    Parameters
    ----------
    case : Case
    axes : (str, str), optional
        Two of ``horizontal_ratio``, ``vertical_ratio``, ``distortion``, ``velocity_ratio``,
        ``temperature``, ``pressure``; default :func:`default_axes`.
    fluid : str, optional
        The model fluid (default: the solver's choice).
    resolution : int
        Grid points per axis.
    n_temperatures : int
        Temperature grid before the zoom (when temperature is not an axis).
    full_range : bool
        Draw each axis over its whole range. By default an axis on which the feasible window
        is a sliver (narrower than :data:`compromise.explore.map_parts.SLIVER` of the range,
        found on a coarse scouting grid) is zoomed onto the window, with half its width as
        margin on either side.

    Returns
    -------
    DesignMap
    """
    from compromise.physics.fluids import get_fluid
    from compromise.solving.optimum import find_optimum

    axes = tuple(axes) if axes else default_axes(case)
    if len(axes) != 2 or axes[0] == axes[1] or any(a not in MAP_AXES for a in axes):
        raise CaseError(
            f"expected two different axes among {', '.join(MAP_AXES)}, got "
            f"{', '.join(axes) or 'none'}",
            key="--axes",
        )
    if case.sediment is not None:
        from compromise.explore.granular_map import granular_map

        return DesignMap(
            **granular_map(
                case,
                axes,
                fluid=fluid,
                resolution=resolution,
                n_temperatures=n_temperatures,
                full_range=full_range,
            )
        )
    if "grain_size" in axes:
        raise CaseError(
            "the grain-size axis needs a case with [sediment]",
            file=case.path,
            key="--axes",
        )
    problem = build_problem(case)
    if problem.nonlinear_groups:
        raise CaseError(
            f"group '{problem.nonlinear_groups[0]}' is not a power product; the "
            "map needs every group to be one",
            file=case.path,
            key=f"groups.{problem.nonlinear_groups[0]}",
        )
    m = case.model
    fixed = {
        "horizontal_ratio": m.horizontal_ratio,
        "distortion": m.distortion,
        "temperature": m.temperature,
        "pressure": m.pressure,
        "velocity_ratio": m.velocity_ratio or (0.0, 1.0),
    }
    for a in axes:
        lo, hi = fixed.get(a, (0.0, 1.0))
        if not hi > lo:
            raise CaseError(
                f"the case fixes {a.replace('_', ' ')}, so it cannot be a map axis",
                file=case.path,
                key=f"model.{a}",
            )
    if all(a in STATE_AXES for a in axes):
        raise CaseError(
            "one axis of the map must be a ratio (horizontal_ratio, vertical_ratio, "
            "distortion or velocity_ratio)",
            key="--axes",
        )
    normals = [_NORMALS[a] for a in axes if a not in STATE_AXES]
    extra = np.array(normals).reshape(len(normals), 3)
    rank_e = np.linalg.matrix_rank(problem.E) if problem.E.size else 0
    if np.linalg.matrix_rank(np.vstack([problem.E, extra])) < rank_e + len(normals):
        raise CaseError(
            f"{' and '.join(axes)} are not independent here: the exact groups or "
            "fixed ratios of the case tie them together",
            file=case.path,
            key="--axes",
        )
    sol = find_optimum(case, alternatives=False)
    if fluid is None:
        fluid = sol.design.fluid if sol.design else case.model.fluids[0]
    else:
        fluid = get_fluid(fluid).name
        if fluid not in case.model.fluids:
            raise CaseError(
                f"'{fluid}' is not among the case's fluids ({', '.join(case.model.fluids)})",
                key="--fluid",
            )
    fs = FluidStates(case, fluid, problem.used_properties)
    space = StateSpace(fs)
    if "pressure" in axes and not space.variable_pressure:
        raise CaseError(
            f"the properties of {fluid} do not depend on its pressure here, so the pressure "
            "cannot be a map axis",
            key="--axes",
        )
    engine = Engine(problem)
    opt = best_state(engine, fs)
    optimum = (
        None
        if opt is None
        else Design(fluid, opt.temperature, opt.pressure, *(math.exp(float(v)) for v in opt.y))
    )
    full = [_range(case, problem, a, fs, opt.y if opt else None) for a in axes]
    map_engine = Engine(problem, extra_E=extra)
    qp = SmallQP(map_engine.H, problem.G, np.vstack([problem.E, extra]))
    ratio_cols = [i for i, a in enumerate(axes) if a not in STATE_AXES]

    def window(ranges: list[tuple[float, float]], n: int) -> tuple[Any, ...]:
        grids = [
            np.linspace(lo, hi, n) if a == "temperature" else np.geomspace(lo, hi, n)
            for a, (lo, hi) in zip(axes, ranges, strict=True)
        ]
        gx, gy = np.meshgrid(grids[0], grids[1])  # (ny, nx)
        cells = np.column_stack([gx.ravel(), gy.ravel()])
        t_fixed = cells[:, axes.index("temperature")] if "temperature" in axes else None
        lp_fixed = np.log(cells[:, axes.index("pressure")]) if "pressure" in axes else None
        extra_e = np.log(cells[:, ratio_cols])

        def objective(items: np.ndarray, p: np.ndarray) -> np.ndarray:
            f, h, e, _ = map_engine.linear_terms(p, extra_e=extra_e[items])
            y = qp.solve(f, h, e).y
            return map_engine.true_objective(y, p)

        T, _, obj = lower_envelope(
            [space],
            np.zeros(len(cells), dtype=int),
            objective,
            n_temperatures=n_temperatures,
            temperature=t_fixed,
            zoom_rounds=MAP_ZOOM_ROUNDS,
            log_pressure=lp_fixed,
        )
        return grids, gx, (t_fixed, lp_fixed), extra_e, T, obj

    ranges = list(full)
    zoomed = [False, False]
    if not full_range:
        scout = window(full, min(resolution, SCOUT_RESOLUTION))
        ranges, zoomed = _zoom(axes, full, scout[0], np.isfinite(scout[5]).reshape(scout[1].shape))
    if zoomed == [False, False] and resolution <= SCOUT_RESOLUTION and not full_range:
        grids, gx, state_fixed, extra_e, T, obj = scout
    else:
        grids, gx, state_fixed, extra_e, T, obj = window(ranges, resolution)
    shape = gx.shape
    h_opt = None if opt is None else problem.rhs(fs.exact_p(opt.temperature, opt.pressure))[0]
    boundaries = _boundaries(
        case,
        problem,
        axes,
        space,
        extra,
        extra_e,
        state_fixed,
        n_temperatures,
        shape,
        None if opt is None else (opt.y, h_opt),
    )
    preferred = _preferred(case, problem, fs, fluid)
    return DesignMap(
        case,
        fluid,
        axes,
        grids[0],
        grids[1],
        np.where(np.isfinite(obj), obj, np.nan).reshape(shape),
        T.reshape(shape),
        boundaries,
        optimum,
        opt.objective if opt else math.inf,
        preferred,
        tuple(full),
        (zoomed[0], zoomed[1]),
    )


def _boundaries(
    case: Case,
    problem: Problem,
    axes: tuple[str, ...],
    space: StateSpace,
    extra: np.ndarray,
    extra_e: np.ndarray,
    state_fixed: tuple[np.ndarray | None, np.ndarray | None],
    n_temperatures: int,
    shape: tuple[int, ...],
    at_optimum: tuple[np.ndarray, np.ndarray] | None,
) -> tuple[Boundary, ...]:
    bounds = [i for i, r in enumerate(problem.rows) if r.kind == "bound"]
    E = np.vstack([problem.E, extra])
    reg = REGULARISATION
    out = []
    for i, row in enumerate(problem.rows):
        if row.kind == "bound" and row.name in axes:
            continue  # the frame of the map
        others = [j for j in bounds if j != i]
        G = problem.G[others]
        qp = SmallQP(2.0 * reg * np.eye(3), G, E)

        def violation(
            items: np.ndarray,
            p: np.ndarray,
            i: int = i,
            others: list[int] = others,
            qp: SmallQP = qp,
        ) -> np.ndarray:
            h, e = problem.rhs(p)
            e = np.hstack([e, extra_e[items]])
            f = np.broadcast_to(problem.G[i], (p.shape[0], 3))
            y = qp.solve(f, h[:, others], e).y
            g = y @ problem.G[i] - h[:, i]
            return np.where(np.isfinite(g), g, np.inf)

        _, _, g = lower_envelope(
            [space],
            np.zeros(extra_e.shape[0], dtype=int),
            violation,
            n_temperatures=n_temperatures,
            temperature=state_fixed[0],
            zoom_rounds=0,
            log_pressure=state_fixed[1],
        )
        binding = False
        if at_optimum is not None:
            y_opt, h_opt = at_optimum
            binding = bool(abs(problem.G[i] @ y_opt - h_opt[i]) <= 1e-6 * (1 + abs(h_opt[i])))
        label = row_label(case, row)
        if row.condition is not None:
            label += f" ({row.condition})"
        parts = row_parts(case, row, row.condition)
        out.append(Boundary(row.key, label, g.reshape(shape), binding, **parts))
        # the same limit in the other conditions: the contour of this field at their shift
        for cond, shift in row.others:
            other = f"{row_label(case, row)} ({cond})"
            out.append(
                Boundary(
                    f"{row.key}@{cond}",
                    other,
                    (g - shift).reshape(shape),
                    False,
                    **row_parts(case, row, cond),
                )
            )
    return tuple(out)


def _preferred(
    case: Case, problem: Problem, fs: FluidStates, fluid: str
) -> tuple[tuple[str, Design | None, float], ...]:
    from compromise.units import format_ratio

    if not case.model.preferred_ratios:
        return ()
    engine = Engine(problem, extra_E=np.array([[1.0, 0.0, 0.0]]))
    out = []
    for r in case.model.preferred_ratios:
        s = best_state(engine, fs, extra_e=np.array([math.log(r)]))
        d = (
            None
            if s is None
            else Design(fluid, s.temperature, s.pressure, *(math.exp(float(v)) for v in s.y))
        )
        out.append((format_ratio(r), d, s.objective if s else math.inf))
    return tuple(out)
