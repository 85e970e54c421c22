"""Validate a scenario file (and the files it extends and reads) without building or solving anything. An ensemble
file (one with 'inputs' and 'design') is validated as one, with its base scenario and the range of every input, and
the outcome names the command that reads it, 'pathcast ensemble'."""

from __future__ import annotations

import argparse
import json


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file (or ensemble file)")
    parser.add_argument("--json", action="store_true", help="print the outcome as JSON")


def execute(args: argparse.Namespace) -> int:
    from ..ensemble.spec import ensemble_facts_if_ensemble
    from ..scenario.loader import load_scenario  # pydantic, pint, networkx: only when a file is checked

    ensemble = ensemble_facts_if_ensemble(args.file)
    if ensemble is not None:
        print(json.dumps(ensemble, indent=2) if args.json else ensemble["sentence"])
        return 0
    loaded = load_scenario(args.file)
    from ..scenario.inputs import prepare_inputs
    from ..scenario.plausibility import check_inputs
    from ..scenario.solver_options import check_solver_settings  # imports HiGHS only for HiGHS settings

    check_solver_settings(loaded.scenario.solver.model_dump(), loaded.file_of)
    check_inputs(prepare_inputs(loaded.scenario), loaded)
    s = loaded.scenario
    t = s.technologies
    facts = {
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
    if args.json:
        print(json.dumps(facts, indent=2))
    else:
        print(
            f"{loaded.path}: valid scenario {s.metadata.name!r}, {facts['years'][0]}-{facts['years'][1]}, "
            f"{facts['representative_days']} representative days, {facts['technologies']} technologies, "
            f"{facts['supplies']} fuel supplies."
        )
    return 0
