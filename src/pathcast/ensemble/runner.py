"""Run an ensemble: make the members, skip those already stored, solve the rest serially or on a dask.distributed
cluster (a LocalCluster of single-threaded worker processes, or an existing scheduler), store each member as it
finishes, then write the summary tables and figures.

Resuming: members are stored under the SHA-256 of their fully resolved scenario, so a re-run (after an interruption,
or with more members) solves only the scenarios not stored yet. The base scenario's optimal basis is kept in
DIR/basis/<base hash>.npz so a resumed run does not solve the base again.

Order: everything that can fail without a solve happens before anything is written to DIR -- the ensemble file and
its ranges (:func:`pathcast.ensemble.spec.load_ensemble`), the ``scheduler`` address and the output folder
(:func:`pathcast.ensemble.outputs.check_ensemble_folder`) are checked, then the executor starts: a local cluster, or a connection to the scheduler, which must answer as a dask
scheduler within ``connect_timeout`` seconds (:mod:`pathcast.ensemble.scheduler`). Only then are DIR/ensemble.json
and the members written, so a wrong or unreachable address leaves DIR as it was (not even created).
"""

from __future__ import annotations

import logging
import math
import os
import sys
import time
import uuid
import warnings
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import PathcastError
from ..pipeline import package_versions
from .members import member_mapping, overrides_for, scenario_hash
from .outputs import check_ensemble_folder, mark_ensemble_folder
from .sampling import Member, design_members
from .scheduler import (
    DEFAULT_CONNECT_TIMEOUT_S,
    SchedulerUnreachableError,
    check_scheduler,
    parse_connect_timeout,
    parse_scheduler_address,
)
from .spec import EnsembleSpec, load_ensemble
from .store import MemberStore, remove_leftovers, write_json_atomic
from .worker import MemberTask, SharedContext, solve_base, solve_member

if TYPE_CHECKING:  # dask is imported only when a cluster is started
    from distributed import LocalCluster

__all__ = ["run_ensemble", "EnsembleRun", "ProgressBar", "plan_members", "write_design"]


@dataclass
class EnsembleRun:
    """What a run did. ``solved_now``/``failed_now`` count the members attempted in this run; ``skipped`` those found
    stored already; ``reference_solves`` the base solves made only to get its basis for warm starts."""

    spec: EnsembleSpec
    out: Path
    members: list[Member]
    hashes: list[str]
    unique: int
    solved_now: int = 0
    failed_now: int = 0
    skipped: int = 0
    reference_solves: int = 0
    wall_s: float = 0.0
    workers: int = 1
    mode: str = "serial"
    outputs: list[Path] = field(default_factory=list)
    records: list[dict] = field(default_factory=list, repr=False)  # the records made in this run

    @property
    def attempted(self) -> int:
        return self.solved_now + self.failed_now


class ProgressBar:
    """Plain text on stderr: members done of all, failures, rate and ETA (one line rewritten on a terminal)."""

    def __init__(self, name: str, total: int, done: int, failed: int, stream=None, enabled: bool = True):
        self.name, self.total, self.done, self.failed = name, total, done, failed
        self.skipped = done
        self.stream = stream or sys.stderr
        self.enabled = enabled
        self.started = time.perf_counter()
        self.tty = hasattr(self.stream, "isatty") and self.stream.isatty()
        self.step = max(1, total // 20)
        self.show(force=True)

    def update(self, failed: bool) -> None:
        self.done += 1
        self.failed += int(failed)
        self.show()

    def line(self) -> str:
        elapsed = time.perf_counter() - self.started
        fresh = self.done - self.skipped
        rate = fresh / elapsed * 60.0 if elapsed > 0 and fresh else 0.0
        left = self.total - self.done
        eta = _duration(left / rate * 60.0) if rate > 0 and left else ("done" if not left else "?")
        earlier = f", {self.skipped} from earlier runs" if self.skipped else ""
        return (
            f"ensemble {self.name}: {self.done}/{self.total} members{earlier}, {self.failed} failed | "
            f"{rate:.1f} members/min | ETA {eta}"
        )

    def show(self, force: bool = False) -> None:
        if not self.enabled:
            return
        if self.tty:
            self.stream.write("\r" + self.line().ljust(100))
            if self.done >= self.total:
                self.stream.write("\n")
        elif force or self.done >= self.total or (self.done - self.skipped) % self.step == 0:
            self.stream.write(self.line() + "\n")
        self.stream.flush()


def _duration(seconds: float) -> str:
    seconds = int(round(seconds))
    hours, rest = divmod(seconds, 3600)
    return f"{hours}:{rest // 60:02d}:{rest % 60:02d}"


def plan_members(spec: EnsembleSpec) -> tuple[list[Member], list[str], dict[str, MemberTask]]:
    """The design's members, each one's scenario hash, and one task per distinct scenario (in member order)."""
    members = design_members(spec)
    hashes, tasks = [], {}
    for member in members:
        digest = scenario_hash(member_mapping(spec, member.samples)) if member.samples else spec.base_hash
        hashes.append(digest)
        if digest not in tasks:
            tasks[digest] = MemberTask(digest, dict(member.samples), overrides_for(spec, member.samples))
    return members, hashes, tasks


def _shown(value):
    return {str(k): v for k, v in value.items()} if isinstance(value, dict) else value


def write_design(spec: EnsembleSpec, members: list[Member], hashes: list[str], out: Path) -> Path:
    f = spec.file
    meta = spec.base.scenario.metadata
    inputs = {}
    for label, item in f.inputs.items():
        inputs[label] = {
            "path": item.path,
            "as": item.apply,
            "distribution": getattr(item, "distribution", "values"),
            "spec": item.model_dump(by_alias=True, exclude={"path", "apply", "distribution"}),
            "base_value": spec.base_values[label],
        }
    data = {
        "name": f.name,
        "description": f.description,
        "file": str(spec.path),
        "base": str(spec.base_path),
        "base_hash": spec.base_hash,
        "design": f.design,
        "seed": f.seed,
        "members_count": len(members),
        "grid_levels": f.grid_levels,
        "tornado_quantiles": list(f.tornado_quantiles),
        "warm_start": f.warm_start,
        "reference_budget_mt": f.reference_budget_mt,
        "currency": meta.currency,
        "price_year": meta.price_year,
        "scenario": meta.name,
        "inputs": inputs,
        "versions": package_versions(),
        "members": [
            {"index": m.index, "role": m.role, "hash": h, "samples": m.samples}
            for m, h in zip(members, hashes, strict=True)
        ],
    }
    return write_json_atomic(out / "ensemble.json", data)


class _Serial:
    mode = "serial"
    workers = 1

    def __enter__(self):
        return self

    def __exit__(self, *_):
        return False

    def base(self, context: SharedContext):
        return solve_base(context)

    def run(self, tasks: list[MemberTask], context: SharedContext) -> Iterator[tuple[MemberTask, dict]]:
        for task in tasks:
            yield task, solve_member(task, context)


class _Dask:
    def __init__(
        self,
        workers: int,
        scheduler: str | None,
        client=None,
        connect_timeout: float = DEFAULT_CONNECT_TIMEOUT_S,
    ):
        self.requested, self.scheduler, self.client, self.own = workers, scheduler, client, client is None
        self.connect_timeout = connect_timeout
        self.cluster: LocalCluster | None = None  # started here (and closed on exit) when no client is given

    def __enter__(self):
        try:
            from distributed import Client, LocalCluster
        except ImportError:  # pragma: no cover - the ensemble extra is missing
            raise PathcastError(
                "dask.distributed is not installed: install pathcast with the 'ensemble' extra "
                "(pip install 'pathcast[ensemble]') or run with --serial."
            ) from None
        if self.client is None:
            if self.scheduler:
                check_scheduler(
                    self.scheduler, self.connect_timeout
                )  # answers as a scheduler, within the timeout
                try:
                    self.client = Client(self.scheduler, timeout=f"{self.connect_timeout}s")
                except (OSError, TimeoutError) as error:  # it answered the check a moment ago, then went away
                    raise SchedulerUnreachableError(
                        f"--scheduler: got {type(error).__name__} while connecting to {self.scheduler}; expected "
                        f"a dask scheduler address such as tcp://host:8786 that answers within "
                        f"{self.connect_timeout:g} s (start the scheduler, check the address, or raise "
                        "--connect-timeout)."
                    ) from None
            else:
                with (
                    warnings.catch_warnings()
                ):  # another cluster holds the default HTTP port: a free one is taken
                    warnings.filterwarnings("ignore", message="Port .* is already in use")
                    self.cluster = LocalCluster(
                        n_workers=self.requested,
                        threads_per_worker=1,
                        processes=True,
                        dashboard_address=None,
                        silence_logs=logging.ERROR,
                    )
                self.client = Client(self.cluster)
        self.workers = len(self.client.scheduler_info().get("workers", {})) or self.requested
        self.mode = f"scheduler {self.scheduler}" if self.scheduler else "local cluster"
        return self

    def __exit__(self, *_):
        if self.own:
            self.client.close()
            if self.cluster is not None:
                self.cluster.close()
        return False

    def base(self, context: SharedContext):
        return self.client.submit(solve_base, context, pure=False).result()

    def run(self, tasks: list[MemberTask], context: SharedContext) -> Iterator[tuple[MemberTask, dict]]:
        from distributed import as_completed

        shared = self.client.scatter(context, broadcast=True, hash=False)
        tag = uuid.uuid4().hex[:8]
        futures = {
            self.client.submit(
                solve_member, task, shared, key=f"pathcast-member-{task.hash[:16]}-{tag}", pure=False
            ): task
            for task in tasks
        }
        try:
            for future in as_completed(futures):
                task = futures.pop(future)
                try:
                    record = future.result()
                except (
                    Exception
                ) as error:  # the worker died or the task could not run: not the member's fault
                    record = {
                        "hash": task.hash,
                        "samples": task.samples,
                        "status": "failed",
                        "error": {
                            "type": type(error).__name__,
                            "message": str(error),
                            "deterministic": False,
                        },
                    }
                future.release()
                yield task, record
        finally:
            for future in futures:
                future.cancel()


def run_ensemble(
    source: str | Path | EnsembleSpec,
    out: str | Path | None = None,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    connect_timeout: float = DEFAULT_CONNECT_TIMEOUT_S,
    serial: bool = False,
    limit: int | None = None,
    retry_failed: bool = False,
    progress: bool = True,
    stream=None,
    outputs: bool = True,
    figures: bool = True,
    client=None,
    on_record: Callable[[dict], None] | None = None,
) -> EnsembleRun:
    """Run (or resume) an ensemble and write DIR/ensemble.json, DIR/members/*.json, DIR/tables, DIR/figures,
    DIR/summary.json and DIR/outputs.json. ``limit`` solves at most that many of the members still to do; ``client``
    reuses a dask client; ``scheduler`` (tcp://host:port) must answer within ``connect_timeout`` seconds. Nothing is
    written before the executor is ready (see the module's description)."""
    started = time.perf_counter()
    if scheduler is not None:
        scheduler = parse_scheduler_address(scheduler).address
    connect_timeout = parse_connect_timeout(connect_timeout)
    spec = source if isinstance(source, EnsembleSpec) else load_ensemble(source)
    out = Path(out) if out is not None else Path("results") / spec.name
    check_ensemble_folder(out)
    members, hashes, tasks = plan_members(spec)
    store = MemberStore(out)  # reading only, until the executor is ready
    run = EnsembleRun(spec=spec, out=out, members=members, hashes=hashes, unique=len(tasks))

    def pending() -> list[MemberTask]:
        return [t for h, t in tasks.items() if not store.done(h, retry_failed=retry_failed)]

    todo = pending()
    run.skipped = len(tasks) - len(todo)
    warm = spec.file.warm_start
    base_loaded = spec.base
    context = SharedContext(
        base_raw=spec.base_raw,
        base_path=str(spec.base_path),
        base_hash=spec.base_hash,
        provenance=dict(base_loaded.provenance),
        files=tuple(base_loaded.files),
        warm_start=warm,
        ensemble_file=str(spec.path),
        input_paths={label: item.path for label, item in spec.file.inputs.items()},
    )
    executor: _Serial | _Dask
    if serial or not todo:
        executor = _Serial()
    else:
        count = workers or min(os.cpu_count() or 1, len(todo))
        executor = _Dask(max(1, count), scheduler, client, connect_timeout)
    with executor:  # the cluster is up, or the scheduler answered: now DIR may be written
        run.mode, run.workers = executor.mode, executor.workers
        write_design(spec, members, hashes, out)
        mark_ensemble_folder(out)
        remove_leftovers(out)
        store.remove_leftovers()
        basis = None
        if warm and todo:
            basis = store.load_basis(spec.base_hash)
            if basis is None:
                record, basis = executor.base(context)
                run.reference_solves += 1
                in_design = spec.base_hash in tasks and not store.done(
                    spec.base_hash, retry_failed=retry_failed
                )
                store.put(record)
                if basis is not None:
                    store.save_basis(spec.base_hash, basis)
                if in_design:
                    run.records.append(record)
                    run.solved_now += record["status"] == "solved"
                    run.failed_now += record["status"] != "solved"
                todo = pending()
        if limit is not None:
            todo = todo[: max(0, limit - run.attempted)]
        bar = ProgressBar(
            spec.name,
            len(tasks),
            len(tasks) - len(pending()),
            sum(1 for h in tasks if (store.get(h) or {}).get("status") == "failed"),
            stream=stream,
            enabled=progress,
        )
        context = replace(context, basis=basis)
        for _task, record in executor.run(todo, context):
            store.put(record)
            run.records.append(record)
            failed = record["status"] != "solved"
            run.solved_now += not failed
            run.failed_now += failed
            if on_record is not None:
                on_record(record)
            bar.update(failed)
    run.wall_s = time.perf_counter() - started
    if outputs:
        from .outputs import write_ensemble_outputs
        from .summary import summarise_ensemble

        run.outputs = write_ensemble_outputs(summarise_ensemble(out), out, figures=figures)
    return run


def members_per_minute(run: EnsembleRun) -> float:
    return run.attempted / run.wall_s * 60.0 if run.wall_s > 0 and run.attempted else math.nan
