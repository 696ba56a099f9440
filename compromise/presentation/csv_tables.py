"""CSV files of a solution: design, groups, limits, quantities, alternatives (or conflict), and
the scale effects' regimes, thresholds and consequences."""

from __future__ import annotations

from typing import Any


def _limit_unit(key: str, sol: dict[str, Any]) -> str:
    """A limit's unit: its quantity's, or ``-`` for a group's floor or ceiling."""
    return sol.get("quantities", {}).get(key.rsplit(".", 1)[0], {}).get("unit", "-")


def write_csv(sol: dict[str, Any], folder: Any) -> list[str]:
    """Write the tables of a solution (``to_dict()`` form) as CSV files into ``folder``.

    Files: ``design.csv``, ``groups.csv``, ``limits.csv``, ``quantities.csv``,
    ``alternatives.csv`` (and ``conflict.csv`` when infeasible); with the scale effects,
    ``regimes.csv``, ``thresholds.csv`` and ``consequences.csv``, as in the text report. The
    groups' mismatch is the log-ratio ``ln(model/prototype)``, and its header says so. Values
    are in the units of ``sol`` (SI as computed, or as
    :func:`compromise.presentation.display.to_display` made
    them); the ``unit`` columns and the design's headers say which. Each file goes through
    :mod:`compromise.outfiles` (temporary name, then rename).
    """
    import csv
    import io
    from pathlib import Path

    from compromise.outfiles import check_output_folder, write_text

    folder = check_output_folder(Path(folder), key="--csv")
    tables: dict[str, tuple[list[str], list[list[Any]]]] = {}
    if sol["status"] == "optimal":
        d = {k: v for k, v in sol["design"].items() if not k.endswith(("_unit", "_si"))}
        units = {
            "temperature": sol["design"].get("temperature_unit", "degC"),
            "pressure": sol["design"].get("pressure_unit", "Pa"),
        }
        tables["design"] = (
            [f"{k} [{units[k]}]" if k in units else k for k in d],
            [list(d.values())],
        )
        conds = sol.get("conditions") or {
            "design": {"groups": sol["groups"], "quantities": sol["quantities"]}
        }
        rows = []
        for cname, c in conds.items():
            for n, g in c["groups"].items():
                rows.append(
                    [cname, n, g["prototype"], g["model"], g["mismatch"], g["factor"], g["weight"]]
                )
        tables["groups"] = (
            [
                "condition",
                "group",
                "prototype",
                "model",
                "mismatch [ln(model/prototype)]",
                "factor [model/prototype]",
                "weight",
            ],
            rows,
        )
        rows = [
            [
                n,
                lim["kind"],
                lim["bound"],
                lim["model"],
                lim["margin"],
                lim["binding"],
                lim.get("condition"),
                lim.get("unit") or _limit_unit(n, sol),
            ]
            for n, lim in sol["limits"].items()
        ]
        tables["limits"] = (
            ["limit", "kind", "bound", "model", "margin", "binding", "condition", "unit"],
            rows,
        )
        rows = []
        for cname, c in conds.items():
            for n, q in c["quantities"].items():
                rows.append([cname, n, q["prototype"], q["model"], q["ratio"], q["unit"]])
        tables["quantities"] = (
            ["condition", "quantity", "prototype", "model", "ratio", "unit"],
            rows,
        )
    else:
        rows = [
            [k, sol["relaxation"].get(k), sol.get("conditions", {}).get(k)]
            for k in sol.get("conflict", [])
        ]
        tables["conflict"] = (["key", "relaxed_bound", "condition"], rows)
    rows = []
    for a in sol.get("alternatives", []):
        d = a["design"] or {}
        rows.append(
            [
                a["kind"],
                a["label"],
                a["feasible"],
                a["objective"],
                a.get("tied", False),
                d.get("fluid"),
                d.get("temperature"),
                d.get("horizontal_ratio"),
                d.get("vertical_ratio"),
                d.get("velocity_ratio"),
                a["separator"],
            ]
        )
    tables["alternatives"] = (
        [
            "kind",
            "label",
            "feasible",
            "objective",
            "tied",
            "fluid",
            "temperature",
            "horizontal_ratio",
            "vertical_ratio",
            "velocity_ratio",
            "separator",
        ],
        rows,
    )
    tables.update(_effect_tables(sol.get("effects") or {}))
    written = []
    for name, (head, rows) in tables.items():
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(head)
        for r in rows:
            w.writerow(["" if v is None else (repr(v) if isinstance(v, float) else v) for v in r])
        target = folder / f"{name}.csv"
        write_text(target, buf.getvalue())
        written.append(str(target))
    return written


REGIME_HEAD = ["group", "kind", "condition", "prototype", "model", "changed"]
THRESHOLD_HEAD = [
    "phenomenon",
    "name",
    "label",
    "condition",
    "kind",
    "prototype",
    "model",
    "failing",
    "passing",
    "unit",
    "verdict",
    "margin",
    "source",
    "status",
]


def _effect_tables(eff: dict[str, Any]) -> dict[str, tuple[list[str], list[list[Any]]]]:
    """The scale effects' regimes, thresholds and consequences as tables (only those present).

    A regime row adds the roughness Reynolds numbers when the regime has them; a consequence
    row has its kind, condition, flag and message, then every number the kind carries (the
    columns are the union over the rows, in the order first met, so the file is stable).
    """
    out: dict[str, tuple[list[str], list[list[Any]]]] = {}
    regimes = eff.get("regimes") or []
    if regimes:
        head = [*REGIME_HEAD, "roughness_reynolds_prototype", "roughness_reynolds_model"]
        rows = []
        for r in regimes:
            rr = r.get("roughness_reynolds") or {}
            rows.append([r.get(k) for k in REGIME_HEAD] + [rr.get("prototype"), rr.get("model")])
        out["regimes"] = (head, rows)
    thresholds = eff.get("thresholds") or []
    if thresholds:
        out["thresholds"] = (
            THRESHOLD_HEAD,
            [[t.get(k) for k in THRESHOLD_HEAD] for t in thresholds],
        )
    consequences = eff.get("consequences") or []
    if consequences:
        first = ["kind", "condition", "flag", "message"]
        extra = list(
            dict.fromkeys(k for c in consequences for k in c if k not in first and _scalar(c[k]))
        )
        out["consequences"] = (
            first + extra,
            [[c.get(k) for k in first + extra] for c in consequences],
        )
    return out


def _scalar(v: Any) -> bool:
    return v is None or isinstance(v, (str, int, float, bool))
