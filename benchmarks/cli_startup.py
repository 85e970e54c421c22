"""Start-up time of the command line (a measurement script, not a test).

Times ``pathcast --help``, ``pathcast --version`` and ``pathcast check scenarios/demo/budget.yaml`` as fresh
subprocesses (``python -m pathcast ...``, which runs the same ``pathcast.cli.main`` as the ``pathcast`` script) and
reports the median wall time of ``--runs`` runs of each. The goal is under 1 s each on a 2-core machine.

With ``--before DIR`` (another checkout of pathcast, e.g. ``git worktree add --detach /tmp/before <commit>``) the
same commands are timed on that checkout's ``src`` too, alternating run by run with this checkout, so that both
columns see the same machine load. Each checkout checks its own demo file. Bytecode caches go to a temporary folder
(PYTHONPYCACHEPREFIX, so nothing is written to the checkouts) and one unrecorded warm-up run per command and checkout
fills them, as an installed package has its .pyc files; ``--no-bytecode-cache`` compiles every module from source on
every run instead (as under PYTHONDONTWRITEBYTECODE=1 with an editable install).

Usage:  python benchmarks/cli_startup.py [--runs 7] [--before DIR] [--no-bytecode-cache] [--results FILE] [--no-write]
Appends a dated section to benchmarks/CLI_RESULTS.md (or --results). RESULTS.md is not touched: it is rewritten
from JSON files by report_results.py.
"""

from __future__ import annotations

import argparse
import datetime
import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path
from typing import NamedTuple

ROOT = Path(__file__).resolve().parents[1]
DEMO = Path("scenarios") / "demo" / "budget.yaml"  # relative to each checkout
GOAL_S = 1.0

# label -> arguments after 'pathcast'; {demo} is the checkout's own demo file
COMMANDS: dict[str, tuple[str, ...]] = {
    "pathcast --help": ("--help",),
    "pathcast --version": ("--version",),
    "pathcast check scenarios/demo/budget.yaml": ("check", "{demo}"),
}


class Timing(NamedTuple):
    """One run: wall time [s] and the CPU time (user + system) of the child process [s]."""

    wall_s: float
    cpu_s: float


@dataclass(frozen=True)
class Checkout:
    """A pathcast source tree to time: its label (for the table), its root folder and its commit."""

    label: str
    root: Path
    commit: str


def _commit(root: Path) -> str:
    done = subprocess.run(
        ["git", "-C", str(root), "log", "-1", "--format=%h %s"], capture_output=True, text=True, check=False
    )
    text = done.stdout.strip()
    if done.returncode != 0 or not text:
        return "(not a git checkout)"
    changed = subprocess.run(
        ["git", "-C", str(root), "status", "--porcelain", "--", "src"],
        capture_output=True,
        text=True,
        check=False,
    ).stdout.strip()
    return f"`{text[:72]}`" + (" with uncommitted changes in src/" if changed else "")


def _environment(checkout: Checkout, cache: Path | None) -> dict[str, str]:
    """The child's environment: the checkout's src/ first on sys.path; bytecode cached under ``cache`` (or none)."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(checkout.root / "src")
    env.pop("PYTHONSTARTUP", None)
    if cache is None:
        env["PYTHONDONTWRITEBYTECODE"] = "1"
        env.pop("PYTHONPYCACHEPREFIX", None)
    else:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = str(cache / checkout.label)
    return env


def _arguments(checkout: Checkout, command: tuple[str, ...]) -> list[str]:
    demo = str(checkout.root / DEMO)
    return [sys.executable, "-m", "pathcast", *(part.format(demo=demo) for part in command)]


def _check_source(checkout: Checkout, env: dict[str, str], workdir: Path) -> None:
    """Refuse to time a checkout whose ``pathcast`` is not the one imported (e.g. shadowed by another path)."""
    done = subprocess.run(
        [sys.executable, "-c", "import pathcast; print(pathcast.__file__)"],
        capture_output=True,
        text=True,
        env=env,
        cwd=workdir,
        check=False,
    )
    found = Path(done.stdout.strip()).resolve() if done.returncode == 0 else None
    expected = (checkout.root / "src" / "pathcast" / "__init__.py").resolve()
    if found != expected:
        raise SystemExit(
            f"cli_startup: {checkout.label} checkout {checkout.root}: imports pathcast from {found}, expected {expected}."
        )


def _children_cpu_s() -> float:
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def time_once(checkout: Checkout, command: tuple[str, ...], env: dict[str, str], workdir: Path) -> Timing:
    """Wall and CPU time of one run of ``command`` in a fresh interpreter; a failing command stops the benchmark."""
    arguments = _arguments(checkout, command)
    cpu_before = _children_cpu_s()
    started = time.perf_counter()
    done = subprocess.run(arguments, capture_output=True, text=True, env=env, cwd=workdir, check=False)
    elapsed = Timing(time.perf_counter() - started, _children_cpu_s() - cpu_before)
    if done.returncode != 0:
        raise SystemExit(
            f"cli_startup: {' '.join(arguments)} ({checkout.label}) exited with {done.returncode}: "
            f"{done.stderr.strip()[-400:]}"
        )
    return elapsed


def measure(
    checkouts: list[Checkout], runs: int, bytecode_cache: bool = True
) -> dict[str, dict[str, list[Timing]]]:
    """{command label: {checkout label: [Timing] x runs}}, checkouts alternating within each run."""
    times: dict[str, dict[str, list[Timing]]] = {
        label: {c.label: [] for c in checkouts} for label in COMMANDS
    }
    with tempfile.TemporaryDirectory(prefix="pathcast_cli_startup_") as folder:
        workdir = (
            Path(folder) / "cwd"
        )  # no 'pathcast' folder on sys.path[0]; nothing written to the checkouts
        workdir.mkdir()
        cache = Path(folder) / "pycache" if bytecode_cache else None
        envs = {c.label: _environment(c, cache) for c in checkouts}
        for checkout in checkouts:
            _check_source(checkout, envs[checkout.label], workdir)
            for command in COMMANDS.values():  # warm-up: bytecode cache, file cache
                time_once(checkout, command, envs[checkout.label], workdir)
        for run in range(runs):
            order = checkouts if run % 2 == 0 else checkouts[::-1]
            for label, command in COMMANDS.items():
                for checkout in order:
                    elapsed = time_once(checkout, command, envs[checkout.label], workdir)
                    times[label][checkout.label].append(elapsed)
    return times


def table(
    times: dict[str, dict[str, list[Timing]]],
    checkouts: list[Checkout],
    runs: int,
    bytecode_cache: bool = True,
) -> list[str]:
    """Markdown table per checkout: median wall time [s] (min-max) and median CPU time [s]; the goal (wall time);
    the speed-up of the median wall time against the first checkout."""
    head = ["command"]
    for c in checkouts:
        head += [f"{c.label}: wall [s], median (min-max)", f"{c.label}: CPU [s], median"]
    head.append(f"{checkouts[-1].label} under {GOAL_S:g} s")
    if len(checkouts) > 1:
        head.append(f"speed-up {checkouts[0].label} / {checkouts[-1].label}")
    lines = ["| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
    for label, by_checkout in times.items():
        cells = [f"`{label}`"]
        medians = []
        for checkout in checkouts:
            walls = [t.wall_s for t in by_checkout[checkout.label]]
            medians.append(statistics.median(walls))
            cells.append(f"{medians[-1]:.3f} ({min(walls):.3f}-{max(walls):.3f})")
            cells.append(f"{statistics.median(t.cpu_s for t in by_checkout[checkout.label]):.3f}")
        cells.append("yes" if medians[-1] < GOAL_S else "NO")
        if len(checkouts) > 1:
            cells.append(f"{medians[0] / medians[-1]:.1f}x")
        lines.append("| " + " | ".join(cells) + " |")
    lines.append("")
    how = "bytecode cached (after a warm-up run)" if bytecode_cache else "every module compiled from source"
    lines.append(
        f"Medians of {runs} runs per command and checkout, each a fresh `python -m pathcast` subprocess, {how}. "
        "CPU = user + system time of the process: what the wall time would be on an idle core."
    )
    return lines


def section(
    lines: list[str], checkouts: list[Checkout], load_start: tuple[float, ...], argv: list[str]
) -> list[str]:
    stamp = datetime.datetime.now().astimezone().strftime("%Y-%m-%d %H:%M %Z")
    load_end = os.getloadavg()
    out = [f"## {stamp}", ""]
    out.append(
        f"Machine: {platform.machine()} with {os.cpu_count()} cores, Python {platform.python_version()}; load average "
        f"{' / '.join(f'{v:.1f}' for v in load_start)} at the start, "
        f"{' / '.join(f'{v:.1f}' for v in load_end)} at the end (1 / 5 / 15 min)."
    )
    out.append("")
    for checkout in checkouts:
        out.append(f"* {checkout.label}: `{checkout.root}` at {checkout.commit}")
    out.append("")
    out.extend(lines)
    out.append("")
    out.append("```")
    out.append("python benchmarks/cli_startup.py " + " ".join(argv))
    out.append("```")
    out.append("")
    return out


HEADER = """# Command-line start-up

Written by `benchmarks/cli_startup.py`, one section per run (newest last). Wall time of `pathcast --help`,
`pathcast --version` and `pathcast check scenarios/demo/budget.yaml` as fresh processes; the goal is under 1 s each on
a 2-core machine. *before* is another checkout timed in the same run, alternating with this one.

"""


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=7, help="timed runs per command and checkout (default 7)")
    parser.add_argument(
        "--before",
        type=Path,
        default=None,
        metavar="DIR",
        help="another pathcast checkout to time alongside this one (its src/ is put on PYTHONPATH)",
    )
    parser.add_argument(
        "--no-bytecode-cache",
        action="store_true",
        help="compile every module from source on every run (PYTHONDONTWRITEBYTECODE=1)",
    )
    parser.add_argument("--results", type=Path, default=ROOT / "benchmarks" / "CLI_RESULTS.md")
    parser.add_argument("--no-write", action="store_true", help="print the table only")
    args = parser.parse_args(argv)
    if args.runs < 1:
        parser.error(f"--runs: got {args.runs!r}; expected a whole number >= 1")

    checkouts = []
    if args.before is not None:
        before = args.before.resolve()
        checkouts.append(Checkout("before", before, _commit(before)))
    checkouts.append(Checkout("after" if args.before is not None else "this checkout", ROOT, _commit(ROOT)))

    load_start = os.getloadavg()
    times = measure(checkouts, args.runs, bytecode_cache=not args.no_bytecode_cache)
    lines = table(times, checkouts, args.runs, bytecode_cache=not args.no_bytecode_cache)
    print("\n".join(lines))
    if not args.no_write:
        text = args.results.read_text() if args.results.exists() else HEADER
        args.results.write_text(
            text.rstrip("\n") + "\n\n" + "\n".join(section(lines, checkouts, load_start, argv))
        )
        print(f"appended to {args.results}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
