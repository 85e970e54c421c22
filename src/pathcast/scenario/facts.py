"""What ``pathcast check`` computes: a scenario file (and the files it extends and reads) or an ensemble file
validated without building or solving anything, and its facts. Loads no solver, table or plotting library (the
HiGHS option list only for a scenario that sets HiGHS options)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

__all__ = ["check_file"]


def check_file(path: str | Path) -> dict[str, Any]:
    """Validate ``path`` and return its facts; ScenarioError (one located sentence) when it is not valid.

    An ensemble file (one with 'inputs' and 'design') gives the facts of
    :func:`pathcast.ensemble.spec.ensemble_facts_if_ensemble` (kind 'ensemble', the command that runs it and a
    one-sentence outcome under 'sentence'). A scenario file is loaded, its solver settings checked against HiGHS's
    option list and its inputs checked finite and plausible; its facts are file, valid, scenario, years (base and
    final), representative_days, technologies (generators, storage and converters), supplies, files and
    input_hash."""
    from ..ensemble.spec import ensemble_facts_if_ensemble

    ensemble = ensemble_facts_if_ensemble(path)
    if ensemble is not None:
        return ensemble
    from .inputs import prepare_inputs
    from .loader import load_scenario
    from .plausibility import check_inputs
    from .solver_options import check_solver_settings

    loaded = load_scenario(path)
    check_solver_settings(loaded.scenario.solver.model_dump(), loaded.file_of)
    check_inputs(prepare_inputs(loaded.scenario), loaded)
    s = loaded.scenario
    t = s.technologies
    return {
        "file": str(loaded.path),
        "valid": True,
        "scenario": s.metadata.name,
        "years": [s.metadata.base_year, s.metadata.final_year],
        "representative_days": len(s.time.representative_days),
        "technologies": len(t.generators) + len(t.storage) + len(t.converters),
        "supplies": len(t.supplies),
        "files": [str(p) for p in loaded.files],
        "input_hash": loaded.input_hash,
    }
