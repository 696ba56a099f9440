"""The granular-material catalogue: materials."""

from __future__ import annotations

import typer

from compromise.cli.common import JsonOpt, _Command, _guard, _print_json, app


@app.command(cls=_Command)
def materials(json_out: JsonOpt = False) -> None:
    """List the granular materials (movable-bed sediments and armour stones) with their
    typical densities, density ranges and sources, and the cohesion limit of model grains."""

    def body() -> None:
        from compromise.physics.materials import COHESION_LIMIT, COHESION_NOTE, MATERIALS
        from compromise.presentation.material_tables import format_materials

        data = {name: m.to_dict() for name, m in MATERIALS.items()}
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_materials(data, COHESION_NOTE, COHESION_LIMIT))

    _guard(body)
