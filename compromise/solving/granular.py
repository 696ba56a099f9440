"""The granular material as a decision: model material (categorical) and grain size (continuous).

In a case with ``[sediment]`` the decision vector gains ``w = ln(d_model / d_prototype)``, the
log-ratio of the grain size: ``u = (x, z, v, w)``. For one model fluid state and one material
the relative submerged density of the model grains ``R = rho_s / rho - 1`` is a constant, so
every group that is a power product of the quantities, the grain size and ``R`` (Shields
``u*^2 / (R g d)``, particle Reynolds ``u* d / nu``, the armour stability number
``H / (R Dn50)``) has a log-mismatch ``a . u + c`` that is linear in ``u``, with a normal ``a``
that depends on nothing but the case and a constant ``c`` that depends on the fluid state and
the material. The problem for one (fluid state, material) is therefore a strictly convex QP in
four variables with fixed normals; :class:`~compromise.solving.qp.SmallQP` solves it exactly,
batched over temperatures, as it solves the three-variable problem of a case without sediment
(whose machinery this module leaves alone). The normals are found by evaluating the groups'
own expressions at unit steps of ``u`` and verified on a further point, so a group that is not
linear in ``u`` (a settling velocity, say) is refused rather than approximated.

The floor "the model bed must move" (model Shields at or above the critical value of Soulsby &
Whitehouse 1997 at the model grain's ``D*``) is a row whose bound depends on the answer's grain
size, fluid and material. It is solved as a fixed point: solve with the floor at a trial
critical value, evaluate the critical value at the answer, re-solve, until the value repeats
(the answer's ``path`` says how many rounds). The materials are enumerated like the fluids.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Generator
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise import expressions as ex
from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.expressions.syntax import compiled
from compromise.physics.scaling import N_DECISION
from compromise.solving.grid import (
    N_TEMPERATURES,
    N_ZOOM,
    REGULARISATION,
    ZOOM_ROUNDS,
    FluidStates,
    grid_points,
    linspace,
    small_qp,
)
from compromise.solving.problem import PROPERTY_NAMES, Row, bound_key, prototype_environment

N_U = N_DECISION + 1  # (x, z, v, w)
SETTLING = "settling_velocity"  # the quantity whose model value the grain decides
LINEAR_TOL = 1e-9  # [-] a group's log-mismatch must be linear in u to this
FLOOR_ROUNDS = 30  # rounds of the fixed point on the critical Shields value
FLOOR_TOL = 1e-12  # [-] relative change of the critical value that ends the rounds


@dataclass(frozen=True)
class GrainState:
    """One (fluid state, material) and its optimal decision log-ratios ``u``."""

    fluid: str
    material: str
    temperature: float
    pressure: float
    u: np.ndarray = field(repr=False)
    objective: float
    critical_shields: float | None = None
    rounds: int = 0


def settling_velocity(d: Any, rho_s: Any, rho: Any, nu: Any) -> Any:
    """Ferguson & Church (2004) settling velocity (C1 = 18, C2 = 1, natural grains) [m/s]."""
    from compromise.physics.sediment import settling_velocity_ferguson_church

    return settling_velocity_ferguson_church(d, rho_s / rho - 1.0, nu)


class GranularProblem:
    """The linear structure of a case with ``[sediment]`` over ``u = (x, z, v, w)``.

    Row right-hand sides are ``h0 + Hc . c + P . p``: ``c`` holds every linear group's
    constant ``ln(model / prototype)`` at ``u = 0`` for a fluid state and material, ``p`` the
    fluid-property log-ratios.
    """

    def __init__(self, case: Case) -> None:
        sed = case.sediment
        if sed is None:  # pragma: no cover - callers check
            raise ValueError("the case has no [sediment]")
        self.case, self.sed = case, sed
        self.proto_env = prototype_environment(case, 0)
        self.d0 = self.proto_env[sed.grain]
        #: the prototype grain's settling velocity by the formula, when the case has one: the
        #: model's is the case's prototype value times the formula's ratio
        self.ws_p: float | None = None
        if SETTLING in case.quantities:
            pe = self.proto_env
            self.ws_p = float(settling_velocity(self.d0, pe[sed.density], pe["rho"], pe["nu"]))
        self.groups = [n for n, g in case.groups.items()]
        self.exprs = {n: case.groups[n].expression for n in self.groups}
        self.proto_values = {
            n: np.array(
                [
                    float(ex.evaluate(self.exprs[n], prototype_environment(case, i)))
                    for i in range(len(case.conditions))
                ]
            )
            for n in self.groups
        }
        used: set[str] = set()
        for q in case.quantities.values():
            used.update(PROPERTY_NAMES[i] for i in np.flatnonzero(q.scaling[N_DECISION:]))
        for n in self.groups:
            used.update(k for k in ex.names(self.exprs[n]) if k in PROPERTY_NAMES)
        self.used = frozenset(used)
        self.normals = {n: self._normal(n) for n in self.groups}
        self._rows(case)

    def states(self, fluid: str) -> FluidStates:
        """The :class:`FluidStates` of a model fluid, one per problem: every search (the
        optimum, each relaxed limit, each fixed ratio) shares its memoised property grids."""
        kept = self.__dict__.setdefault("_states", {})
        if fluid not in kept:
            kept[fluid] = FluidStates(self.case, fluid, self.used)
        return kept[fluid]

    # ---------------------------------------------------------------- the groups' structure
    def model_env(
        self,
        u: np.ndarray,
        p: np.ndarray,
        rho_s: float | np.ndarray,
        names: frozenset[str] | None = None,
        *,
        at_zero: bool = False,
    ) -> dict:
        """Model values of the quantities and properties at log-ratios ``u`` and ``p`` (any
        leading shape broadcast); only those in ``names`` (and what they need) when given.
        ``at_zero`` says that ``u`` is zero: the ratios' product, a signed zero that the sum
        and the exponential absorb, is skipped (the values are the same to the last bit)."""
        sed = self.sed
        env: dict[str, Any] = {}
        y = u[..., :N_DECISION]
        settling = names is None or SETTLING in names
        for i, n in enumerate(PROPERTY_NAMES):
            if names is None or n in names or (settling and n in ("rho", "nu")):
                env[n] = self.proto_env[n] * np.exp(p[..., i])
        for name, q in self.case.quantities.items():
            if names is not None and name not in names:
                continue
            if name == sed.grain:
                env[name] = self.d0 * np.exp(u[..., N_DECISION])
            elif name == sed.density:
                env[name] = rho_s
            elif name == SETTLING and self.ws_p is not None:
                env[name] = self.proto_env[name] * (
                    settling_velocity(
                        self.d0 * np.exp(u[..., N_DECISION]), rho_s, env["rho"], env["nu"]
                    )
                    / self.ws_p
                )
            else:
                s = q.scaling
                if at_zero:
                    env[name] = self.proto_env[name] * np.exp(p @ s[N_DECISION:])
                else:
                    env[name] = self.proto_env[name] * np.exp(
                        y @ s[:N_DECISION] + p @ s[N_DECISION:]
                    )
        return env

    def log_mismatch(self, name: str, u: np.ndarray, p: np.ndarray, rho_s: Any) -> np.ndarray:
        """``ln(model / prototype)`` of a group (condition 0)."""
        env = self.model_env(u, p, rho_s)
        with np.errstate(all="ignore"):
            return self._log_mismatch_in(name, env)

    def _log_mismatch_in(self, name: str, env: dict) -> np.ndarray:
        """:meth:`log_mismatch` from the model values ``env`` of :meth:`model_env` (inside
        the caller's ``np.errstate``)."""
        mv = compiled(self.exprs[name])(env)
        return np.log(np.asarray(mv, dtype=float) / self.proto_values[name][0])

    def _normal(self, name: str) -> np.ndarray | None:
        """The group's normal over ``u`` (None when it is not linear in ``u``)."""
        zero_p = np.zeros(len(PROPERTY_NAMES))
        rho_p = self.proto_env[self.sed.density]
        base = float(self.log_mismatch(name, np.zeros(N_U), zero_p, rho_p))
        a = np.array([float(self.log_mismatch(name, e, zero_p, rho_p)) - base for e in np.eye(N_U)])
        a[np.abs(a) < 1e-13] = 0.0
        test = np.array([0.31, -0.73, 0.27, 0.55])
        got = float(self.log_mismatch(name, test, zero_p, rho_p)) - base
        if not (np.all(np.isfinite(a)) and abs(got - a @ test) <= LINEAR_TOL * (1 + abs(got))):
            return None
        return a

    def tie_break(self) -> np.ndarray:
        """The point ``u0`` the tie-break leans toward: the largest, least distorted model,
        Froude velocity, grains scaled as the depth."""
        m = self.case.model
        x0 = math.log(m.horizontal_ratio[1])
        z0 = x0 + math.log(m.distortion[0])
        return np.array([x0, z0, 0.5 * z0, z0])

    def grain_ties(self) -> tuple[str, ...]:
        """The rows kept exactly that involve the grain size (a group such as the stability
        number, or a fixed grain-size range): with them the grain follows from the ratios."""
        return tuple(n for n, row in zip(self.exact, self.E, strict=True) if row[-1] != 0.0)

    def rhs(
        self, p: np.ndarray, c: np.ndarray, floor: float | None
    ) -> tuple[np.ndarray, np.ndarray]:
        """Right-hand sides ``h`` (N, rows) of the inequality rows and ``e`` (N, exact rows) of
        the equality rows for states ``p``, constants ``c`` and the critical Shields value
        ``floor`` of the moving-bed row."""
        h = self.h0 + c @ self.Hc.T + p @ self.P.T
        if self.floor_row is not None:
            h[:, self.floor_row] -= math.log(floor if floor is not None else 1e-300)
        return h, self.e0 + c @ self.Ec.T + p @ self.Q.T

    def constants(self, p: np.ndarray, rho_s: float) -> np.ndarray:
        """Every group's ``ln(model / prototype)`` at ``u = 0`` for states ``p`` (N, 6) [N, g].

        The model values are computed once for all the groups, and the result is kept per
        (states, density) (read-only): the searches of the optimum, of each relaxed limit and
        of each fixed ratio, and each round of the moving-bed floor, ask for the same grids.
        A hit is the array the same computation returned, so every answer is unchanged.
        """
        p = np.atleast_2d(p)
        memo = self.__dict__.setdefault("_constants", {})
        key = None
        if isinstance(rho_s, float | int) and p.dtype == np.float64:
            key = (p.shape, p.tobytes(), float(rho_s))
            hit = memo.get(key)
            if hit is not None:
                return hit
        u = np.zeros((p.shape[0], N_U))
        cols = []
        linear = [n for n in self.groups if self.normals[n] is not None]
        names = self.__dict__.get("_linear_names")
        if names is None:
            names = self._linear_names = frozenset().union(
                *(ex.names(self.exprs[n]) for n in linear)
            )
        env = self.model_env(u, p, rho_s, names, at_zero=True) if linear else {}
        with np.errstate(all="ignore"):
            for n in self.groups:
                if self.normals[n] is None:
                    cols.append(np.zeros(p.shape[0]))
                    continue
                lm = self._log_mismatch_in(n, env)
                cols.append(lm if lm.shape == (p.shape[0],) else np.broadcast_to(lm, (p.shape[0],)))
        out = np.column_stack(cols) if cols else np.zeros((p.shape[0], 0))
        if key is not None:
            if len(memo) >= 4096:
                memo.clear()
            out.flags.writeable = False
            memo[key] = out
        return out

    # ---------------------------------------------------------------- rows
    def _rows(self, case: Case) -> None:
        sed = self.sed
        nonlinear = [n for n in self.groups if self.normals[n] is None]
        #: groups not linear in u (a settling velocity): the nonlinear polish handles them
        self.nonlinear = tuple(nonlinear)
        for n in nonlinear:
            if case.groups[n].exact or n == "shields":
                raise CaseError(
                    "the group is not a power product of the ratios, the grain size and the "
                    "relative density, so it cannot be kept exactly (give it a weight)",
                    file=case.path,
                    key=f"groups.{n}",
                )
        ng = len(self.groups)
        gi = {n: i for i, n in enumerate(self.groups)}
        total = sum(c.weight for c in case.conditions)
        A, W, sel, obj_names = [], [], [], []
        E, e0, Ec, Q, exact = [], [], [], [], []
        G, h0, Hc, P, rows = [], [], [], [], []
        zp, zc = np.zeros(len(PROPERTY_NAMES)), np.zeros(ng)

        def onehot(i: int, sign: float) -> np.ndarray:
            out = np.zeros(ng)
            out[i] = sign
            return out

        def add(normal: np.ndarray, rhs: float, hc: np.ndarray, prop: np.ndarray, row: Row):
            G.append(normal)
            h0.append(rhs)
            Hc.append(hc)
            P.append(prop)
            rows.append(row)

        for n in self.groups:
            g, a = case.groups[n], self.normals[n]
            if a is None:
                continue
            if g.exact:
                E.append(a), e0.append(0.0), Ec.append(onehot(gi[n], -1.0)), Q.append(zp)
                exact.append(n)
            elif g.weight > 0 and not g.threshold:
                A.append(a), W.append(g.weight * total), sel.append(gi[n]), obj_names.append(n)
            proto = self.proto_values[n]
            if np.any(~np.isfinite(proto)) or np.any(proto <= 0):
                raise CaseError(
                    f"the prototype value is {proto.tolist()}; a group must be positive",
                    file=case.path,
                    key=f"groups.{n}",
                )
            if g.min is not None:
                i = int(np.argmin(proto))
                add(
                    -a,
                    -math.log(g.min / proto[i]),
                    onehot(gi[n], 1.0),
                    zp,
                    Row("group", n, "min", g.min, None, bound_key(g, "min")),
                )
            if g.max is not None:
                i = int(np.argmax(proto))
                add(
                    a,
                    math.log(g.max / proto[i]),
                    onehot(gi[n], -1.0),
                    zp,
                    Row("group", n, "max", g.max, None, bound_key(g, "max")),
                )
        condition_values = [case.values(i) for i in range(len(case.conditions))]
        for lim in case.limits:
            if lim.quantity == sed.density:
                raise CaseError(
                    "the model grain density is the chosen material's; list the allowed "
                    "materials in sediment.materials instead",
                    file=case.path,
                    key=f"limits.{lim.quantity}",
                )
            vals = np.array([v[lim.quantity] for v in condition_values])
            key = f"limits.{lim.quantity}.{lim.kind}"
            if lim.quantity == sed.grain:
                normal, prop = np.array([0.0, 0.0, 0.0, 1.0]), zp
                vals = vals[:1]  # one model grain for every condition
            else:
                s = case.quantities[lim.quantity].scaling
                normal, prop = np.append(s[:N_DECISION], 0.0), -s[N_DECISION:]
            if lim.kind == "max":
                i = int(np.argmax(vals))
                add(
                    normal,
                    math.log(lim.bound / vals[i]),
                    zc,
                    prop,
                    Row("limit", lim.quantity, "max", lim.bound, None, key),
                )
            else:
                i = int(np.argmin(vals))
                add(
                    -normal,
                    -math.log(lim.bound / vals[i]),
                    zc,
                    -prop,
                    Row("limit", lim.quantity, "min", lim.bound, None, key),
                )
        m = case.model
        bounds = [("horizontal_ratio", [1.0, 0, 0, 0], m.horizontal_ratio)]
        bounds.append(("distortion", [-1.0, 1.0, 0, 0], m.distortion))
        if m.velocity_ratio is not None:
            bounds.append(("velocity_ratio", [0, 0, 1.0, 0], m.velocity_ratio))
        lo_d, hi_d = sed.grain_size
        grain = ("grain_size", [0, 0, 0, 1.0], (lo_d / self.d0, hi_d / self.d0))
        for name, nrm, (lo, hi) in [*bounds, grain]:
            normal = np.array(nrm, dtype=float)
            prefix = "sediment" if name == "grain_size" else "model"
            # the user's bound: a ratio, or for the grain its size [m]
            scale = self.d0 if name == "grain_size" else 1.0
            if lo == hi:
                E.append(normal), e0.append(math.log(lo)), Ec.append(zc), Q.append(zp)
                exact.append(name)
                continue
            add(
                -normal,
                -math.log(lo),
                zc,
                zp,
                Row("bound", name, "min", lo * scale, None, f"{prefix}.{name}.min"),
            )
            if math.isfinite(hi):
                add(
                    normal,
                    math.log(hi),
                    zc,
                    zp,
                    Row("bound", name, "max", hi * scale, None, f"{prefix}.{name}.max"),
                )
        self.floor_row: int | None = None
        if sed.moving_bed:
            n = "shields"
            a = self.normals[n]
            assert a is not None
            self.floor_row = len(rows)
            proto = self.proto_values[n]
            # the bound (the critical value) is set per solve; h0 holds -ln(1 / min proto)
            add(
                -a,
                math.log(float(np.min(proto))),
                onehot(gi[n], 1.0),
                zp,
                Row("group", n, "min", math.nan, None, "sediment.moving_bed"),
            )

        def arr(x: list, w: int) -> np.ndarray:
            return np.array(x, dtype=float).reshape(len(x), w)

        self.A, self.W, self.sel = arr(A, N_U), np.array(W, dtype=float), np.array(sel, int)
        self.objective_groups = tuple(obj_names)
        self.G, self.h0, self.Hc, self.P = arr(G, N_U), np.array(h0), arr(Hc, ng), arr(P, 6)
        self.rows = tuple(rows)
        self.E, self.e0, self.Ec = arr(E, N_U), np.array(e0), arr(Ec, ng)
        self.Q = arr(Q, 6)
        self.exact = tuple(exact)


class GrainEngine:
    """Solves the four-variable QPs of a :class:`GranularProblem` for batches of states."""

    def __init__(self, gp: GranularProblem, extra_E: np.ndarray | None = None) -> None:
        self.gp = gp
        H = 2.0 * (gp.A.T * gp.W) @ gp.A
        self.eps = REGULARISATION * max(1.0, float(np.trace(H)) / N_U)
        self.u0 = gp.tie_break()
        self.extra = np.zeros((0, N_U)) if extra_E is None else np.atleast_2d(extra_E)
        E = np.vstack([gp.E, self.extra])
        self.qp = small_qp(H + 2.0 * self.eps * np.eye(N_U), gp.G, E)

    def prepare(
        self,
        p: np.ndarray,
        c: np.ndarray,
        floor: float | None,
        h_shift: np.ndarray | None = None,
        extra_e: np.ndarray | None = None,
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """The QP's linear terms ``(f, h, e)`` for states ``p``, constants ``c`` and the
        critical Shields value ``floor``, and the objective groups' constants ``cA``."""
        gp = self.gp
        cA = c[:, gp.sel] if gp.sel.size else np.zeros((c.shape[0], 0))
        f = 2.0 * (cA * gp.W) @ gp.A - 2.0 * self.eps * self.u0
        h, e = gp.rhs(p, c, floor)
        if h_shift is not None:
            h = h + h_shift
        if self.extra.shape[0]:
            shape = (p.shape[0], self.extra.shape[0])
            ee = np.zeros(shape) if extra_e is None else extra_e
            e = np.hstack([e, ee if np.shape(ee) == shape else np.broadcast_to(ee, shape)])
        return f, h, e, cA

    def finish(self, u: np.ndarray, feasible: np.ndarray, cA: np.ndarray) -> np.ndarray:
        """The weighted mismatch (N,) of the QP's answers ``u`` (inf where infeasible)."""
        gp = self.gp
        r = u @ gp.A.T + cA
        obj = np.sum(gp.W * r**2, axis=1)
        return np.where(feasible, obj, np.inf)

    def solve(
        self,
        p: np.ndarray,
        c: np.ndarray,
        floor: float | None,
        h_shift: np.ndarray | None = None,
        extra_e: np.ndarray | None = None,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Optimal ``u`` (N, 4) and the weighted mismatch (N,) for states ``p``, constants
        ``c`` and the critical Shields value ``floor``."""
        f, h, e, cA = self.prepare(p, c, floor, h_shift, extra_e)
        batch = self.qp.solve(f, h, e)
        return batch.y, self.finish(batch.y, batch.feasible, cA)


#: a request of a search to the engine: ``(p, c, floor, h_shift, extra_e)`` (see
#: :meth:`GrainEngine.solve`); the search receives ``(u, objective)`` back
Request = tuple[Any, ...]
#: the most subproblems stacked in one QP call by :func:`lockstep`. The batched products
#: compute every column alike for any batch of 2 to 192 columns on the reference machine's
#: OpenBLAS (Haswell kernels); one column goes through another routine (gemv). So requests of
#: one row run alone, and stacks stay within this width: every answer is the one a search run
#: alone gives, to the last bit (``tests/test_granular_lockstep.py``).
LOCKSTEP_COLUMNS = 192


def lockstep(engine: GrainEngine, jobs: list[Generator[Request, Any, Any]]) -> list[Any]:
    """Run searches written as generators (each yields :data:`Request` and receives
    ``(u, objective)``) side by side: each round, the requests of all of them share batched
    QP calls. Returns each generator's return value, in order."""
    results: list[Any] = [None] * len(jobs)
    pending: dict[int, Request] = {}
    for i, job in enumerate(jobs):
        try:
            pending[i] = next(job)
        except StopIteration as stop:
            results[i] = stop.value
    while pending:
        order = sorted(pending)
        stacks: list[list[int]] = []
        current: list[int] = []
        width = 0
        for i in order:
            n = int(np.shape(pending[i][0])[0])
            if n < 2 or n > LOCKSTEP_COLUMNS:
                stacks.append([i])
                continue
            if current and width + n > LOCKSTEP_COLUMNS:
                stacks.append(current)
                current, width = [], 0
            current.append(i)
            width += n
        if current:
            stacks.append(current)
        answers: dict[int, tuple[np.ndarray, np.ndarray]] = {}
        for stack in stacks:
            if len(stack) == 1:
                answers[stack[0]] = engine.solve(*pending[stack[0]])
                continue
            parts = [engine.prepare(*pending[i]) for i in stack]
            batch = engine.qp.solve(
                np.vstack([q[0] for q in parts]),
                np.vstack([q[1] for q in parts]),
                np.vstack([q[2] for q in parts]),
            )
            a = 0
            for i, (_, _, _, cA) in zip(stack, parts, strict=True):
                b = a + cA.shape[0]
                u = batch.y[a:b].copy()
                answers[i] = (u, engine.finish(u, batch.feasible[a:b], cA))
                a = b
        for i in order:
            try:
                pending[i] = jobs[i].send(answers[i])
            except StopIteration as stop:
                results[i] = stop.value
                del pending[i]
    return results


def critical_shields(gp: GranularProblem, u: np.ndarray, p: np.ndarray, rho_s: float) -> float:
    """Soulsby & Whitehouse (1997) critical Shields value of the model grain at ``u``."""
    from compromise.physics.sediment import (
        critical_shields_soulsby_whitehouse,
        dimensionless_grain_size,
        relative_density,
    )

    env = gp.model_env(u, p, rho_s)
    R = relative_density(rho_s, env["rho"])
    d = env[gp.sed.grain]
    return float(critical_shields_soulsby_whitehouse(dimensionless_grain_size(d, R, env["nu"])))


def _search_steps(
    engine: GrainEngine,
    fs: FluidStates,
    rho_s: float,
    floor: float | None,
    n_temperatures: int,
    h_shift: np.ndarray | None,
    extra_e: np.ndarray | None,
) -> Generator[Request, Any, tuple[float, float, np.ndarray] | None]:
    """One (fluid, material): temperature grid, zoom, re-solve at the source models, as
    a generator of engine requests (see :func:`lockstep`). Returns ``(objective,
    temperature, u)``."""
    gp = engine.gp
    P = float(fs.pressures()[0])

    def ask(p: np.ndarray) -> Request:
        return (p, gp.constants(p, rho_s), floor, h_shift, extra_e)

    grid = grid_points(*fs.t_range, n_temperatures)
    _, o = yield ask(fs.p(grid, P))
    k = int(np.argmin(o))
    if not np.isfinite(o[k]):
        return None
    best = [float(o[k]), float(grid[k])]
    half = float(grid[1] - grid[0]) if grid.size > 1 else 0.0
    lo, hi = fs.t_range
    for _ in range(ZOOM_ROUNDS if half > 0 else 0):
        Tz = linspace(max(lo, best[1] - half), min(hi, best[1] + half), N_ZOOM)
        _, o = yield ask(fs.p(Tz, P))
        k = int(np.argmin(o))
        if o[k] < best[0]:
            best = [float(o[k]), float(Tz[k])]
        half = 2.0 * float(Tz[1] - Tz[0])
    step = half / 2.0
    t = best[1]
    for k in range(0, 12):
        cands = (
            [t] if k == 0 else [c for c in (t - step * 4.0**k, t + step * 4.0**k) if lo <= c <= hi]
        )
        if not cands:
            break
        u, o = yield ask(np.array([fs.exact_p(c, P) for c in cands]))
        if np.isfinite(o).any():
            j = int(np.argmin(o))
            return float(o[j]), cands[j], u[j]
    return None


def best_grain_state(
    engine: GrainEngine,
    fs: FluidStates,
    material: str,
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
    floor: float | None = None,
) -> GrainState | None:
    """The best state of one fluid and one material; with a moving bed, the fixed point of
    the critical Shields floor (or the given ``floor``, held)."""
    job = _best_steps(engine, fs, material, n_temperatures, h_shift, extra_e, floor)
    return lockstep(engine, [job])[0]


def _best_steps(
    engine: GrainEngine,
    fs: FluidStates,
    material: str,
    n_temperatures: int,
    h_shift: np.ndarray | None,
    extra_e: np.ndarray | None,
    floor: float | None,
) -> Generator[Request, Any, GrainState | None]:
    """:func:`best_grain_state` as a generator of engine requests (see :func:`lockstep`)."""
    from compromise.physics.materials import COHESION_LIMIT, get_material

    gp = engine.gp
    rho_s = get_material(material).density
    P = float(fs.pressures()[0])
    if gp.floor_row is None:
        found = yield from _search_steps(engine, fs, rho_s, None, n_temperatures, h_shift, extra_e)
        if found is None:
            return None
        return GrainState(fs.name, material, found[1], P, found[2], found[0])
    held = floor is not None
    if floor is None:  # first trial: the critical value at the cohesion limit, mid-range
        t_mid = 0.5 * sum(fs.t_range)
        p_mid = fs.exact_p(t_mid, P)
        w = math.log(max(gp.sed.grain_size[0], COHESION_LIMIT) / gp.d0)
        floor = critical_shields(gp, np.array([0.0, 0.0, 0.0, w]), p_mid, rho_s)
    # the scalar equation floor = critical(answer(floor)), by secant steps (a plain step
    # first): where the floor does not bind the answer does not depend on it and one secant
    # step ends it; where it binds the plain iteration converges only linearly
    prev: tuple[float, float] | None = None  # (floor, residual)
    top = floor
    for k in range(1, FLOOR_ROUNDS + 1):
        found = yield from _search_steps(engine, fs, rho_s, floor, n_temperatures, h_shift, extra_e)
        if found is None:
            return None
        obj, t, u = found
        if held:
            return GrainState(fs.name, material, t, P, u, obj, floor, 0)
        new = critical_shields(gp, u, fs.exact_p(t, P), rho_s)
        resid = new - floor
        if abs(resid) <= FLOOR_TOL * floor:
            return GrainState(fs.name, material, t, P, u, obj, floor, k)
        step = new
        if prev is not None and resid != prev[1]:
            cand = floor - resid * (floor - prev[0]) / (resid - prev[1])
            if math.isfinite(cand) and cand > 0:
                step = cand
        prev = (floor, resid)
        floor = step
        top = max(top, new, floor)
    # no fixed point: hold the largest critical value met (conservative) and say so
    found = yield from _search_steps(engine, fs, rho_s, top, n_temperatures, h_shift, extra_e)
    if found is None:
        return None
    return GrainState(fs.name, material, found[1], P, found[2], found[0], top, -FLOOR_ROUNDS)


def all_grain_states(
    engine: GrainEngine,
    case: Case,
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
    floors: dict[tuple[str, str], float] | None = None,
) -> dict[tuple[str, str], GrainState | None]:
    """Every (fluid, material)'s best state, in the case's order (their searches run side
    by side, see :func:`lockstep`)."""
    keys, jobs = grain_jobs(engine, case, n_temperatures, h_shift, extra_e, floors)
    return dict(zip(keys, lockstep(engine, jobs), strict=True))


def grain_jobs(
    engine: GrainEngine,
    case: Case,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
    floors: dict[tuple[str, str], float] | None = None,
) -> tuple[list[tuple[str, str]], list[Generator[Request, Any, GrainState | None]]]:
    """The (fluid, material) keys of :func:`all_grain_states` and their searches, not yet
    run (several sets of them can share one :func:`lockstep`)."""
    gp = engine.gp
    keys: list[tuple[str, str]] = []
    jobs: list[Generator[Request, Any, GrainState | None]] = []
    for f in case.model.fluids:
        fs = gp.states(f) if case is gp.case else FluidStates(case, f, gp.used)
        for mat in gp.sed.materials:
            floor = None if floors is None else floors.get((f, mat))
            keys.append((f, mat))
            jobs.append(_best_steps(engine, fs, mat, n_temperatures, h_shift, extra_e, floor))
    return keys, jobs


def grain_for_ratios(
    case: Case, fluid: str, temperature: float, pressure: float, y: np.ndarray
) -> tuple[str, float, float]:
    """The material and grain size of least weighted mismatch for given ratios and fluid
    state (a proposed design that names neither): ``(material, grain size [m], objective)``.

    With the ratios fixed the objective is a quadratic in ``w`` alone; its minimiser is
    clipped to the case's grain-size range. A group kept exactly that involves the grain
    (the stability number, say) fixes ``w`` instead. Limits are not enforced here: a review
    reports them.
    """
    from compromise.physics.materials import get_material

    gp = GranularProblem(case)
    fs = FluidStates(case, fluid, gp.used)
    p = fs.exact_p(temperature, pressure)[None]
    lo = math.log(gp.sed.grain_size[0] / gp.d0)
    hi = math.log(gp.sed.grain_size[1] / gp.d0)
    best: tuple[str, float, float] | None = None
    for mat in gp.sed.materials:
        c = gp.constants(p, get_material(mat).density)[0]
        rest = gp.A[:, :N_DECISION] @ y + (c[gp.sel] if gp.sel.size else 0.0)
        aw = gp.A[:, N_DECISION]
        tied = [
            j
            for j in range(gp.E.shape[0])
            if gp.E[j, N_DECISION] != 0 and gp.exact[j] != "grain_size"
        ]
        if tied:
            j = tied[0]
            e = gp.e0[j] + gp.Ec[j] @ c + gp.Q[j] @ p[0]
            w = (e - gp.E[j, :N_DECISION] @ y) / gp.E[j, N_DECISION]
        elif float(gp.W @ aw**2) > 0:
            w = -float((gp.W * aw) @ rest) / float(gp.W @ aw**2)
        else:
            w = float(y[1])  # nothing depends on it: the grain scaled as the depth
        w = min(max(w, lo), hi)
        obj = float(gp.W @ (rest + aw * w) ** 2)
        if best is None or obj < best[2] - 1e-15:
            best = (mat, gp.d0 * math.exp(w), obj)
    assert best is not None
    return best


def polish_nonlinear(
    gp: GranularProblem,
    fs: FluidStates,
    state: GrainState,
    extra: tuple[np.ndarray, np.ndarray] | None = None,
) -> GrainState:
    """The nonlinear fallback: groups that are not linear in ``u`` (a settling velocity)
    join the objective and the floors, and a local SLSQP solve starts from the exact QP
    optimum without them, at the QP's fluid state and moving-bed floor. Its objective is
    always the full one (the QP's point when the local solve does not improve it)."""
    from scipy.optimize import minimize

    from compromise.physics.materials import get_material

    case = gp.case
    rho_s = get_material(state.material).density
    p = fs.exact_p(state.temperature, state.pressure)[None]
    c = gp.constants(p, rho_s)
    h = (gp.h0 + c @ gp.Hc.T + p @ gp.P.T)[0]
    if gp.floor_row is not None and state.critical_shields:
        h[gp.floor_row] -= math.log(state.critical_shields)
    e = (gp.e0 + c @ gp.Ec.T + p @ gp.Q.T)[0]
    E = gp.E
    if extra is not None:
        E, e = np.vstack([E, extra[0]]), np.concatenate([e, extra[1]])
    cA = c[0, gp.sel] if gp.sel.size else np.zeros(0)
    total = sum(cd.weight for cd in case.conditions)
    nl = [(n, case.groups[n]) for n in gp.nonlinear]

    def lm(n: str, u: np.ndarray) -> float:
        return float(gp.log_mismatch(n, u, p[0], rho_s))

    def f(u: np.ndarray) -> float:
        r = gp.A @ u + cA
        val = float(gp.W @ r**2)
        for n, g in nl:
            if g.weight > 0 and not g.threshold:
                val += g.weight * total * lm(n, u) ** 2
        return val

    def ineq(u: np.ndarray) -> np.ndarray:
        out = [h - gp.G @ u]
        for n, g in nl:
            proto = gp.proto_values[n]
            if g.min is not None:
                out.append(np.array([lm(n, u) - math.log(g.min / float(np.min(proto)))]))
            if g.max is not None:
                out.append(np.array([math.log(g.max / float(np.max(proto))) - lm(n, u)]))
        return np.concatenate(out)

    cons = [{"type": "ineq", "fun": ineq}]
    if E.shape[0]:
        cons.append({"type": "eq", "fun": lambda u: E @ u - e})
    start = f(state.u)
    try:
        res = minimize(
            f, state.u, method="SLSQP", constraints=cons, options={"ftol": 1e-15, "maxiter": 400}
        )
        u = np.asarray(res.x, dtype=float)
        ok = (
            np.all(np.isfinite(u))
            and np.all(ineq(u) >= -1e-9)
            and (not E.shape[0] or np.all(np.abs(E @ u - e) <= 1e-9))
            and f(u) <= start
        )
    except (ValueError, FloatingPointError):  # pragma: no cover - a failed local solve
        ok = False
    if not ok or not np.all(ineq(state.u) >= -1e-9):
        feasible = bool(np.all(ineq(state.u) >= -1e-9))
        return dataclasses.replace(state, objective=start if feasible else math.inf)
    return dataclasses.replace(state, u=u, objective=f(u))
