"""How much the standard-form compiler's ``column_order`` / ``row_order`` arguments cost (a script, not a test).

Compiles the same Pyomo model three ways, alternately, and prints the median seconds of each:
(1) column_order = every VarData and row_order = every ConstraintData (the hand-off before issue 4);
(2) column_order = the Var components only, no row_order (the current hand-off; order checked by identity);
(3) neither (Pyomo's own declaration order).

    python benchmarks/handoff_orders.py 12x96x20 --repeats 3
"""

from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import time
from pathlib import Path

from pyomo.common.gc_manager import PauseGC
from pyomo.repn.plugins.standard_form import LinearStandardFormCompiler

sys.path.insert(0, str(Path(__file__).resolve().parent))
from pathcast.model.build import build_linear_program  # noqa: E402
from pathcast.model.pyomo_model import to_pyomo  # noqa: E402
from pathcast.scenario.inputs import prepare_inputs  # noqa: E402
from pathcast.scenario.loader import load_scenario  # noqa: E402
from scenario_generator import write_scenario  # noqa: E402


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("size")
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    path = write_scenario(Path(tempfile.mkdtemp()), args.size)
    model = build_linear_program(prepare_inputs(load_scenario(path).scenario))
    handles = to_pyomo(model.lp)
    ways = {
        "VarData column_order + row_order": dict(
            column_order=handles.variables, row_order=handles.constraints
        ),
        "Var components as column_order": dict(column_order=handles.var_components),
        "no order arguments": {},
    }
    times: dict[str, list[float]] = {k: [] for k in ways}
    for _ in range(args.repeats):
        for name, kwargs in ways.items():
            started = time.perf_counter()
            with PauseGC():
                LinearStandardFormCompiler().write(handles.model, mixed_form=True, **kwargs)
            times[name].append(time.perf_counter() - started)
    rows = len(handles.constraints)
    for name, values in times.items():
        median = statistics.median(values)
        print(f"{args.size}: {name:<36} {median:7.3f} s  {median * 1e6 / rows:6.1f} us/row")


if __name__ == "__main__":
    main()
