"""Where a result comes from: a scenario file (solved now) or a result folder written by ``pathcast run`` (read
back). :func:`load_run` is the one place that tells them apart, so every command that takes ``FILE|RESULTDIR``
(``rates``, ``compare``, ``memo``) refuses a missing path, a folder that is not a result folder and a result folder
that lacks a table in the same words:

* a missing path: ``<path>: (path): got no such file or folder; expected a scenario YAML file or a result folder
  written by 'pathcast run'.``
* an ensemble folder: ``<path>: (folder): got an ensemble folder written by 'pathcast ensemble'; expected ...``
  (``pathcast memo`` reads those)
* any other folder without summary.json, or a result folder without one of its tables: the words of
  :func:`pathcast.results.writers.read_result`, the one reader of result folders.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    from ..results.run_result import RunResult
    from ..scenario.loader import LoadedScenario

__all__ = [
    "RunSource",
    "load_run",
    "load_runs",
    "EXPECTED_SOURCE",
    "SCENARIO_FILE",
    "RESULT_FOLDER",
    "ENSEMBLE_FOLDER",
]

SCENARIO_FILE = "a scenario YAML file"
RESULT_FOLDER = "a result folder written by 'pathcast run'"
ENSEMBLE_FOLDER = "an ensemble folder written by 'pathcast ensemble'"
EXPECTED_SOURCE = f"{SCENARIO_FILE} or {RESULT_FOLDER}"

Progress = Callable[[str], None]


@dataclass(frozen=True)
class RunSource:
    """One run given to a command: its result, the path it came from, and the loaded scenario when that path was a
    scenario file (None for a result folder)."""

    result: RunResult
    path: Path
    loaded: LoadedScenario | None = None

    @property
    def from_folder(self) -> bool:
        """True when the result was read back from a result folder, False when its scenario was solved now."""
        return self.loaded is None


def _missing(path: str | Path) -> ScenarioError:
    return ScenarioError(
        f"{path}: (path): got no such file or folder; expected {EXPECTED_SOURCE}.", file=str(path)
    )


def load_run(
    path: str | Path,
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
) -> RunSource:
    """The run of ``path``: a result folder is read back (:func:`pathcast.results.writers.read_result`), a scenario
    file is solved (:func:`pathcast.pipeline.run_scenario`, ``solver`` overriding its solver settings). ScenarioError
    in the words of the module docstring otherwise."""
    say = progress or (lambda _message: None)
    path = Path(path)
    if path.is_dir():
        if (path / "ensemble.json").is_file():
            raise ScenarioError(
                f"{path}: (folder): got an ensemble folder written by 'pathcast ensemble'; expected "
                f"{EXPECTED_SOURCE} (an ensemble folder is read by 'pathcast memo').",
                file=str(path),
            )
        from .writers import read_result

        say(f"reading results from {path}")
        return RunSource(read_result(path), path)
    if not path.is_file():
        raise _missing(path)
    from ..pipeline import run_scenario
    from ..scenario.loader import load_scenario

    say(f"reading {path}")
    loaded = load_scenario(path)
    return RunSource(run_scenario(loaded, solver=solver, progress=progress).result, path, loaded)


def load_runs(
    paths: Sequence[str | Path],
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
) -> list[RunSource]:
    """:func:`load_run` of each path, in the order given; every path is checked to exist before any is solved."""
    for path in paths:
        if not Path(path).exists():
            raise _missing(path)
    return [load_run(path, solver=solver, progress=progress) for path in paths]
