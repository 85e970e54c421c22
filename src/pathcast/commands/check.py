"""Validate a scenario file (and the files it extends and reads) without building or solving anything."""

from __future__ import annotations

import argparse
import json


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file")
    parser.add_argument("--json", action="store_true", help="print the outcome as JSON")


def execute(args: argparse.Namespace) -> int:
    from ..scenario.loader import load_scenario  # pydantic, pint, networkx: only when a file is checked

    loaded = load_scenario(args.file)
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
