"""The Pyomo build and hand-off before issue 4 (from git) against the current ones, alternately in one process
(a script, not a test). Prints seconds per stage and checks that both hand HiGHS the same LP.

    python benchmarks/compare_build.py 36x288x20 --repeats 2 [--before 7036b5e]
"""

from __future__ import annotations

import argparse
import gc
import importlib.util
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import pathcast.model.pyomo_model as current_pyomo  # noqa: E402
import pathcast.solve as current_solve  # noqa: E402
from pathcast.model.build import build_linear_program  # noqa: E402
from pathcast.scenario.inputs import prepare_inputs  # noqa: E402
from pathcast.scenario.loader import load_scenario  # noqa: E402
from scenario_generator import write_scenario  # noqa: E402


def _old_module(commit: str, path: str, name: str, folder: Path):
    text = subprocess.run(
        ["git", "-C", str(HERE.parent), "show", f"{commit}:{path}"],
        capture_output=True,
        text=True,
        check=True,
    ).stdout
    text = (
        text.replace("from .linear_program", "from pathcast.model.linear_program")
        .replace("from .errors", "from pathcast.errors")
        .replace("from .model.pyomo_model", "from pathcast.model.pyomo_model")
    )
    file = folder / f"{name}.py"
    file.write_text(text)
    spec = importlib.util.spec_from_file_location(name, file)
    module = importlib.util.module_from_spec(spec)
    sys.modules[name] = module  # dataclasses look their module up
    spec.loader.exec_module(module)
    return module


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("size")
    parser.add_argument("--repeats", type=int, default=2)
    parser.add_argument("--before", default="7036b5e", help="commit with the code before issue 4")
    args = parser.parse_args()
    folder = Path(tempfile.mkdtemp())
    old_pyomo = _old_module(args.before, "src/pathcast/model/pyomo_model.py", "pyomo_model_before", folder)
    old_solve = _old_module(args.before, "src/pathcast/solve.py", "solve_before", folder)
    model = build_linear_program(prepare_inputs(load_scenario(write_scenario(folder, args.size)).scenario))
    matrix, _, _ = model.lp.matrix()
    ways = {"before": (old_pyomo, old_solve), "current": (current_pyomo, current_solve)}
    times = {k: {"build_pyomo_s": [], "handoff_s": []} for k in ways}
    summary = {}
    for _ in range(args.repeats):
        for name, (pyomo_module, solve_module) in ways.items():
            gc.collect()
            started = time.perf_counter()
            handles = pyomo_module.to_pyomo(model.lp)
            built = time.perf_counter()
            lp, _, _ = solve_module.handoff(handles, *matrix.shape)
            done = time.perf_counter()
            times[name]["build_pyomo_s"].append(built - started)
            times[name]["handoff_s"].append(done - built)
            summary[name] = (
                lp.num_row_,
                lp.num_col_,
                len(lp.a_matrix_.value_),
                float(np.sum(lp.col_cost_)),
                float(np.sum(lp.a_matrix_.value_)),
            )
            del handles, lp
    assert summary["before"] == summary["current"], summary
    rows = matrix.shape[0]
    for name, stage in times.items():
        b, h = statistics.median(stage["build_pyomo_s"]), statistics.median(stage["handoff_s"])
        print(
            f"{args.size} {name:<8} build Pyomo {b:6.2f} s  hand-off (compile + HighsLp) {h:6.2f} s  "
            f"together {(b + h) * 1e6 / rows:5.1f} us/row  ({rows:,} rows, {args.repeats} runs)"
        )


if __name__ == "__main__":
    main()
