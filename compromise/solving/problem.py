"""The case as an optimisation problem in log-ratios.

Decision variables are ``y = (x, z, v) = (ln X, ln Y, ln V)``: the logarithms of the horizontal,
vertical and velocity ratios (model over prototype). For one model fluid at one temperature (and
pressure) every fluid-property ratio is a constant, collected in the vector
``p = ln(property_model / property_prototype)`` over ``rho, mu, nu, sigma, c, g``. Then

* the log-mismatch ``ln(Pi_model / Pi_prototype)`` of every power-product group is
  ``A_g . y + B_g . p``;
* every bound on a model value (laboratory limit, group floor or ceiling, bound on a ratio) is a
  row ``G_i . y <= h0_i + P_i . p``;
* exact groups are rows ``E_j . y = e0_j + Q_j . p``.

The rows' normals do not depend on the fluid or temperature; only the right-hand sides do, and
linearly in ``p``. The solver exploits this.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.errors import CaseError
from compromise.physics.scaling import BASIS, INDEX, N_DECISION, PROPERTY_BASIS

#: Names of the fluid-property log-ratio vector ``p``.
PROPERTY_NAMES: tuple[str, ...] = PROPERTY_BASIS
#: Names of the fluid state (pressure, vapour pressure): a group that names one is solved by the
#: nonlinear fallback, with the pressure of a liquid searched when ``[model] pressure`` is a range.
STATE_NAMES: tuple[str, ...] = ("p_ambient", "p_vapour")


@dataclass(frozen=True)
class Row:
    """One inequality row ``G . y <= h0 + P . p`` and what it stands for.

    Attributes
    ----------
    kind : str
        ``"limit"`` (laboratory limit on a quantity), ``"group"`` (floor or ceiling on a
        group's model value) or ``"bound"`` (bound on a ratio, from ``[model]``).
    name : str
        The quantity, group or bound name (``horizontal_ratio``, ``distortion``,
        ``velocity_ratio``).
    side : str
        ``"min"`` or ``"max"``.
    bound : float
        The user's bound [SI, or the ratio itself].
    condition : str or None
        The condition whose prototype value makes this row the tightest of its kind.
    key : str
        The case-file key of the bound, for messages.
    """

    kind: str
    name: str
    side: str
    bound: float
    condition: str | None
    key: str
    #: for every other condition, how much looser the row is there: (condition, rhs shift >= 0)
    others: tuple[tuple[str, float], ...] = ()


@dataclass(frozen=True)
class Problem:
    """Linear structure of a case (see the module docstring)."""

    case: Case
    A: np.ndarray = field(repr=False)  # (k, 3) objective rows
    B: np.ndarray = field(repr=False)  # (k, 6)
    W: np.ndarray = field(repr=False)  # (k,) weights (times the summed condition weights)
    objective_groups: tuple[str, ...]
    G: np.ndarray = field(repr=False)  # (m, 3)
    h0: np.ndarray = field(repr=False)  # (m,)
    P: np.ndarray = field(repr=False)  # (m, 6)
    rows: tuple[Row, ...]
    E: np.ndarray = field(repr=False)  # (q, 3)
    e0: np.ndarray = field(repr=False)
    Q: np.ndarray = field(repr=False)  # (q, 6)
    exact_groups: tuple[str, ...]
    nonlinear_groups: tuple[str, ...]
    used_properties: frozenset[str]

    def rhs(self, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Right-hand sides ``(h, e)`` for property log-ratios ``p`` (shape (6,) or (n, 6))."""
        return self.h0 + p @ self.P.T, self.e0 + p @ self.Q.T


def group_exponents(case: Case, group: Group) -> np.ndarray:
    """Exponents of a power-product group's log-ratio over
    :data:`~compromise.physics.scaling.BASIS`.

    The log-mismatch of the group is ``exponents . (x, z, v, ln rho_r, ..., ln g_r)``.
    """
    if group.power is None:
        raise ValueError(f"group {group.name!r} is not a power product")
    out = np.zeros(len(BASIS))
    for name, e in group.power[1].items():
        if name in case.quantities:
            out += e * case.quantities[name].scaling
        elif name in INDEX and name not in ("horizontal", "vertical", "velocity"):
            out[INDEX[name]] += e
        else:  # pragma: no cover - the case loader rejects unknown names
            raise ValueError(f"unknown name {name!r} in group {group.name!r}")
    return out


def bound_key(group: Group, side: str) -> str:
    """The key a user knows a group's floor or ceiling by: ``groups.<name>.min``, or for a
    scale-effect threshold enforced as a bound, ``phenomena.<phenomenon>.<threshold>``."""
    return f"phenomena.{group.name}" if group.threshold else f"groups.{group.name}.{side}"


def prototype_environment(case: Case, condition: int = 0) -> dict[str, float]:
    """Prototype quantities and fluid properties, for evaluating group expressions [SI]."""
    from compromise.physics.fluids import get_fluid

    props = get_fluid(case.fluid).properties(case.temperature, case.pressure)
    env = case.values(condition)
    env.update(property_environment(props))
    return env


def property_environment(props: object) -> dict[str, float]:
    """``rho, mu, nu, sigma, c, g`` from a :class:`~compromise.physics.fluids.FluidProperties`."""
    nan = float("nan")

    def get(attr: str) -> float:
        v = getattr(props, attr)
        return nan if v is None else float(v)

    return {
        "rho": get("density"),
        "mu": get("dynamic_viscosity"),
        "nu": get("kinematic_viscosity"),
        "sigma": get("surface_tension"),
        "c": get("speed_of_sound"),
        "g": 9.80665,
        # the state's pressure and the vapour pressure at its temperature (cavitation index)
        "p_ambient": get("pressure"),
        "p_vapour": get("vapour_pressure"),
    }


def prototype_group_values(case: Case) -> dict[str, np.ndarray]:
    """Prototype value of every group in every condition (array over conditions)."""
    envs = [prototype_environment(case, i) for i in range(len(case.conditions))]
    return {
        name: np.array([float(ex.evaluate(g.expression, env)) for env in envs])
        for name, g in case.groups.items()
    }


def build_problem(case: Case) -> Problem:
    """Assemble the linear structure of a case.

    Laboratory limits and group bounds are evaluated in every condition; since the rows of one
    limit differ between conditions only by their right-hand side, only the tightest condition
    is kept (and remembered, so the report can say which condition makes a limit bind).
    """
    if case.sediment is not None:
        # the grain size and material are decisions only the granular solve knows
        # (compromise.solving.granular); a three-ratio problem would ignore them
        raise CaseError(
            "this command does not yet treat the model material and grain size as decisions; "
            "'compromise solve' does",
            file=case.path,
            key="sediment",
        )
    m = case.model
    nd = N_DECISION
    gv = prototype_group_values(case)
    cond_names = [c.name for c in case.conditions]
    total_weight = sum(c.weight for c in case.conditions)

    A_rows, B_rows, W, obj_names = [], [], [], []
    E_rows, e0, Q_rows, exact = [], [], [], []
    G_rows: list[np.ndarray] = []
    h0: list[float] = []
    P_rows: list[np.ndarray] = []
    rows: list[Row] = []
    nonlinear: list[str] = []
    used: set[str] = set()

    def which(values: np.ndarray, i: int) -> str | None:
        """The condition that sets a row, or None when every condition has the same value."""
        return None if np.all(values == values[0]) else cond_names[i]

    def looser(values: np.ndarray, i: int, side: str) -> tuple[tuple[str, float], ...]:
        """Right-hand-side shift of the same row in every other condition (>= 0)."""
        if np.all(values == values[0]):
            return ()
        sign = 1.0 if side == "max" else -1.0
        return tuple(
            (cond_names[c], sign * math.log(values[i] / values[c]))
            for c in range(len(values))
            if c != i
        )

    def add(normal: np.ndarray, rhs: float, prop: np.ndarray, row: Row) -> None:
        G_rows.append(normal)
        h0.append(rhs)
        P_rows.append(prop)
        rows.append(row)

    for name, g in case.groups.items():
        if g.power is None or ex.names(g.expression) & set(STATE_NAMES):
            nonlinear.append(name)
            for n in ex.names(g.expression):
                if n in PROPERTY_NAMES or n in STATE_NAMES:
                    used.add(n)
                elif n in case.quantities:
                    sq = case.quantities[n].scaling[nd:]
                    used.update(PROPERTY_NAMES[i] for i in np.flatnonzero(sq))
            continue
        s = group_exponents(case, g)
        a, b = s[:nd], s[nd:]
        used.update(PROPERTY_NAMES[i] for i in np.flatnonzero(b))
        if g.exact:
            E_rows.append(a)
            e0.append(0.0)
            Q_rows.append(-b)
            exact.append(name)
        elif g.weight > 0:
            A_rows.append(a)
            B_rows.append(b)
            W.append(g.weight * total_weight)
            obj_names.append(name)
        proto = gv[name]
        if np.any(~np.isfinite(proto)) or np.any(proto <= 0):
            raise CaseError(
                f"the prototype value is {proto.tolist()}; a power-product group must be positive",
                file=case.path,
                key=f"groups.{name}",
            )
        # model value = proto * exp(a.y + b.p):  floor  a.y >= ln(min/proto) - b.p
        if g.min is not None:
            i = int(np.argmin(proto))
            add(
                -a,
                -math.log(g.min / proto[i]),
                b,
                Row(
                    "group",
                    name,
                    "min",
                    g.min,
                    which(proto, i),
                    bound_key(g, "min"),
                    looser(proto, i, "min"),
                ),
            )
        if g.max is not None:
            i = int(np.argmax(proto))
            add(
                a,
                math.log(g.max / proto[i]),
                -b,
                Row(
                    "group",
                    name,
                    "max",
                    g.max,
                    which(proto, i),
                    bound_key(g, "max"),
                    looser(proto, i, "max"),
                ),
            )

    condition_values = [case.values(i) for i in range(len(case.conditions))]
    for lim in case.limits:
        q = case.quantities[lim.quantity]
        vals = np.array([v[lim.quantity] for v in condition_values])
        s = q.scaling
        used.update(PROPERTY_NAMES[i] for i in np.flatnonzero(s[nd:]))
        key = f"limits.{lim.quantity}.{lim.kind}"
        if lim.kind == "max":
            i = int(np.argmax(vals))
            add(
                s[:nd],
                math.log(lim.bound / vals[i]),
                -s[nd:],
                Row(
                    "limit",
                    lim.quantity,
                    "max",
                    lim.bound,
                    which(vals, i),
                    key,
                    looser(vals, i, "max"),
                ),
            )
        else:
            i = int(np.argmin(vals))
            add(
                -s[:nd],
                -math.log(lim.bound / vals[i]),
                s[nd:],
                Row(
                    "limit",
                    lim.quantity,
                    "min",
                    lim.bound,
                    which(vals, i),
                    key,
                    looser(vals, i, "min"),
                ),
            )

    zero = np.zeros(len(PROPERTY_NAMES))
    x = np.array([1.0, 0.0, 0.0])
    d = np.array([-1.0, 1.0, 0.0])
    v = np.array([0.0, 0.0, 1.0])
    bounds = [("horizontal_ratio", x, m.horizontal_ratio)]
    bounds.append(("distortion", d, m.distortion))
    if m.velocity_ratio is not None:
        bounds.append(("velocity_ratio", v, m.velocity_ratio))
    for name, normal, (lo, hi) in bounds:
        if lo == hi:
            E_rows.append(normal)
            e0.append(math.log(lo))
            Q_rows.append(zero)
            exact.append(name)
            continue
        add(-normal, -math.log(lo), zero, Row("bound", name, "min", lo, None, f"model.{name}.min"))
        add(normal, math.log(hi), zero, Row("bound", name, "max", hi, None, f"model.{name}.max"))

    def arr(rows_: list, width: int) -> np.ndarray:
        return np.array(rows_, dtype=float).reshape(len(rows_), width)

    return Problem(
        case=case,
        A=arr(A_rows, nd),
        B=arr(B_rows, len(PROPERTY_NAMES)),
        W=np.array(W, dtype=float),
        objective_groups=tuple(obj_names),
        G=arr(G_rows, nd),
        h0=np.array(h0, dtype=float),
        P=arr(P_rows, len(PROPERTY_NAMES)),
        rows=tuple(rows),
        E=arr(E_rows, nd),
        e0=np.array(e0, dtype=float),
        Q=arr(Q_rows, len(PROPERTY_NAMES)),
        exact_groups=tuple(exact),
        nonlinear_groups=tuple(nonlinear),
        used_properties=frozenset(used),
    )
