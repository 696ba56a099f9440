"""CSV files of a solution: design, groups, limits, quantities, alternatives (or conflict)."""

from __future__ import annotations

from typing import Any


def _limit_unit(key: str, sol: dict[str, Any]) -> str:
    """A limit's unit: its quantity's, or ``-`` for a group's floor or ceiling."""
    return sol.get("quantities", {}).get(key.rsplit(".", 1)[0], {}).get("unit", "-")


def write_csv(sol: dict[str, Any], folder: Any) -> list[str]:
    """Write the tables of a solution (``to_dict()`` form) as CSV files into ``folder``.

    Files: ``design.csv``, ``groups.csv``, ``limits.csv``, ``quantities.csv``,
    ``alternatives.csv`` (and ``conflict.csv`` when infeasible). Values are in the units of
    ``sol`` (SI as computed, or as :func:`compromise.presentation.display.to_display` made
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
            ["condition", "group", "prototype", "model", "mismatch", "factor", "weight"],
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
