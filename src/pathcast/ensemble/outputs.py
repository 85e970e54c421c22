"""Write an ensemble's summary set -- DIR/tables/ (CSV and Parquet), DIR/figures/ (PNG), DIR/summary.json and
DIR/robustness.json (the memo's robustness section as data, :mod:`pathcast.ensemble.robustness`) -- and, last,
DIR/outputs.json, the manifest saying which files belong together; check that manifest when reading.

Chosen design: a manifest written last (the folder layout readers know stays as it is). One write goes:

1. what interrupted writes left in DIR is removed (staging folders ``.outputs.tmp-<pid>-<random>`` of processes that
   no longer run; the ``.tables.*`` and ``.figures.*`` temporary folders of earlier pathcast versions);
2. the whole set is written into one staging folder, DIR/.outputs.tmp-<pid>-<random>/ (tables/, figures/,
   summary.json, robustness.json), and its manifest is computed there: a run id, the state of the members it
   summarises (how many solved, failed, pending, and a SHA-256 over every member's hash and status) and every file
   with its size in bytes and SHA-256;
3. DIR/outputs.json is removed, so from here until step 5 the folder says its set is incomplete;
4. tables/, figures/, summary.json and robustness.json are moved from the staging folder into place (renames within
   DIR; the previous ones go into the staging folder, which is then deleted). A run without figures
   (``--no-figures``) removes the figures/ of an earlier run, which would no longer belong to the tables;
5. DIR/outputs.json is written (temporary file, then ``os.replace``).

A kill before step 3 leaves the previous set with its manifest; during steps 3-4 no manifest (readers refuse and say
to run the ensemble again, which solves nothing already stored and rewrites the set); after step 5 the new set.
Readers -- :func:`verify_outputs`, called by :func:`read_robustness` (and so by ``pathcast memo`` on an ensemble
folder) and :func:`ensemble_robustness_section` -- refuse, in one sentence, a folder whose tables, figures,
summary.json or robustness.json are there without outputs.json, whose listed files are missing or differ in size or
SHA-256, which holds files the manifest does not list, or whose members changed since the set was written. A whole tables/ or
figures/ folder left out (a copy without figures) mixes nothing and is accepted; so is a folder with none of the four
(written with ``outputs=False``), which reads as members only. A set written by an earlier pathcast has no
robustness.json (its manifest does not list one); readers compute the section from the member records then.

tables/ and figures/ are replaced only when every file in them is one this module writes; anything else there is
refused before a member is solved (:func:`check_output_targets`). DIR itself must be new, empty, or an ensemble folder
(it holds ensemble.json, pathcast's marker file, or only what an ensemble folder holds), and not the current folder, one of its parents, the home folder or
the filesystem root (:func:`check_ensemble_folder`, the rules of :mod:`pathcast.results.folders`); the runner writes
the marker file into DIR once the executor is ready.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import shutil
import tempfile
import time
import uuid
from pathlib import Path
from typing import Any

import pandas as pd

from ..errors import ScenarioError
from .robustness import (
    ROBUSTNESS_FILE,
    RobustnessSection,
    read_section_file,
    render_markdown,
    robustness_section,
)
from .store import is_temporary, remove_leftovers, temporary_prefix, write_json_atomic
from .summary import EnsembleSummary, summarise_ensemble

__all__ = [
    "write_ensemble_outputs",
    "verify_outputs",
    "read_robustness",
    "ensemble_robustness_section",
    "read_outputs_manifest",
    "check_output_targets",
    "check_ensemble_folder",
    "mark_ensemble_folder",
    "members_state",
    "TABLE_FILES",
    "FIGURE_FILES",
    "MANIFEST",
    "SET_ENTRIES",
]

TABLE_FILES = (
    "members",
    "yearly",
    "capacity",
    "yearly_percentiles",
    "headline_percentiles",
    "tornado",
    "correlations",
)
FIGURE_FILES = ("emissions_fan", "capacity_fan", "distributions", "budget_probability", "tornado")
MANIFEST = "outputs.json"
SET_ENTRIES = ("tables", "figures", "summary.json", ROBUSTNESS_FILE)
# what an ensemble folder holds; a folder holding only these (a copied basis/, say) is taken as one
ENSEMBLE_ENTRIES = ("ensemble.json", "members", "basis", *SET_ENTRIES, MANIFEST)
_LEGACY_PREFIXES = (".tables.", ".figures.")  # atomic_folder's temporary and .old folders of earlier versions


def _parquet_ready(frame: pd.DataFrame) -> pd.DataFrame:
    """Object columns that mix numbers and text (an absolute input given as paths and numbers) become text."""
    frame = frame.copy()
    for column in frame.columns:
        if frame[column].dtype == object:
            kinds = {
                type(v)
                for v in frame[column]
                if v is not None and not (isinstance(v, float) and math.isnan(v))
            }
            if len(kinds) > 1 and not kinds <= {int, float, bool}:
                frame[column] = frame[column].map(lambda v: None if v is None else str(v))
    return frame


def _clean(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    return value


def members_state(summary: EnsembleSummary) -> dict:
    """How many members are solved, failed and pending, and a SHA-256 over every member's index, hash and status:
    the state of the member records a set of outputs summarises."""
    members = summary.members
    rows = [
        [int(index), str(digest), str(status)]
        for index, digest, status in zip(members["member"], members["hash"], members["status"], strict=True)
    ]
    status = members["status"]
    return {
        "solved": int((status == "solved").sum()),
        "failed": int((status == "failed").sum()),
        "pending": int((status == "pending").sum()),
        "sha256": hashlib.sha256(json.dumps(rows).encode()).hexdigest(),
    }


def _file_facts(path: Path) -> dict:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return {"bytes": path.stat().st_size, "sha256": digest.hexdigest()}


def _ours(entry: Path) -> bool:
    """Is every file in tables/ or figures/ one this module writes (or a temporary file of its writer)?"""
    if entry.name == "tables":
        names = {f"{n}.{suffix}" for n in TABLE_FILES for suffix in ("csv", "parquet")}
    else:
        names = {f"{n}.png" for n in FIGURE_FILES}
    return all(
        child.is_file() and (child.name in names or child.name.startswith(tuple(f".{n}.tmp-" for n in names)))
        for child in entry.iterdir()
    )


def check_output_targets(folder: Path | str) -> None:
    """Refuse (ScenarioError) a DIR whose tables/, figures/, summary.json or robustness.json is something this module
    did not write, before anything is solved or written."""
    folder = Path(folder)
    for name in SET_ENTRIES:
        entry = folder / name
        if not (entry.exists() or entry.is_symlink()):
            continue
        wanted_dir = name in ("tables", "figures")
        if entry.is_symlink() or entry.is_dir() != wanted_dir or (wanted_dir and not _ours(entry)):
            what = "a folder" if wanted_dir else "a file"
            raise ScenarioError(
                f"{entry}: got {'a link' if entry.is_symlink() else 'something'} pathcast did not write there; "
                f"expected {what} of an ensemble's outputs (pathcast replaces only its own): move it away or "
                "choose another --out.",
                file=str(entry),
            )


def check_ensemble_folder(folder: Path | str) -> None:
    """Refuse (ScenarioError) an ensemble folder that pathcast must not write into (see the module's description),
    before anything is solved or written; reads only."""
    from ..results.folders import OWNER_MARKER, refuse_unsafe_target

    known = {*ENSEMBLE_ENTRIES, OWNER_MARKER}
    refuse_unsafe_target(
        folder,
        what="ensemble folder",
        purpose="the ensemble",
        example="results/my_ensemble",
        written_by="'pathcast ensemble'",
        advice="choose another --out",
        recognised=lambda path: (path / "ensemble.json").is_file() or (path / OWNER_MARKER).is_file(),
        ignored=lambda name: name in known or is_temporary(name),
    )
    check_output_targets(folder)


def mark_ensemble_folder(folder: Path | str) -> None:
    """Write pathcast's marker file into the ensemble folder (once), so other commands know pathcast wrote it."""
    from ..results.folders import OWNER_MARKER

    marker = Path(folder) / OWNER_MARKER
    if not marker.is_file():
        data = {
            "written_by": "pathcast",
            "kind": "ensemble",
            "written_at": time.strftime("%Y-%m-%dT%H:%M:%S%z"),
        }
        write_json_atomic(marker, data)


def _remove_interrupted(folder: Path) -> None:
    remove_leftovers(folder)
    for entry in folder.iterdir():
        if entry.is_dir() and not entry.is_symlink() and entry.name.startswith(_LEGACY_PREFIXES):
            shutil.rmtree(entry, ignore_errors=True)


def _write_set(summary: EnsembleSummary, stage: Path, figures: bool, run_id: str) -> None:
    from .figures import ensemble_figures, save_png

    frames = {
        "members": summary.members,
        "yearly": summary.yearly,
        "capacity": summary.capacity,
        "yearly_percentiles": summary.yearly_percentiles,
        "headline_percentiles": summary.headline_percentiles,
        "tornado": summary.tornado,
        "correlations": summary.correlations,
    }
    tables = stage / "tables"
    tables.mkdir()
    for name, frame in frames.items():
        if frame is None:
            continue
        frame = _parquet_ready(frame)
        frame.to_csv(tables / f"{name}.csv", index=False)
        frame.to_parquet(tables / f"{name}.parquet", index=False)
    if figures:
        (stage / "figures").mkdir()
        for name, fig in ensemble_figures(summary).items():
            save_png(fig, stage / "figures" / f"{name}.png")
    design = summary.design
    data = {
        "run_id": run_id,
        "name": design["name"],
        "design": design["design"],
        "base": design["base"],
        "base_hash": design["base_hash"],
        "currency": design.get("currency"),
        "price_year": design.get("price_year"),
        "inputs": {
            label: {k: info[k] for k in ("path", "as", "distribution")}
            for label, info in design["inputs"].items()
        },
        **_clean(summary.stats),
        "headline_percentiles": {
            row["quantity"]: _clean({k: row[k] for k in ("p5", "p25", "p50", "p75", "p95", "mean")})
            for row in summary.headline_percentiles.to_dict("records")
        },
    }
    write_json_atomic(stage / "summary.json", data)
    write_json_atomic(stage / ROBUSTNESS_FILE, robustness_section(summary).as_dict())


def _listed(stage: Path) -> dict[str, dict]:
    files = {}
    for name in SET_ENTRIES:
        entry = stage / name
        if entry.is_dir():
            for child in sorted(entry.iterdir()):
                files[f"{name}/{child.name}"] = _file_facts(child)
        elif entry.is_file():
            files[name] = _file_facts(entry)
    return files


def write_ensemble_outputs(
    summary: EnsembleSummary, folder: Path | str | None = None, *, figures: bool = True
) -> list[Path]:
    """Write DIR/tables, DIR/figures (unless ``figures`` is False), DIR/summary.json, DIR/robustness.json and
    DIR/outputs.json as one set
    (see the module's description); return the files written. DIR/members/ is never touched here."""
    folder = Path(folder or summary.folder)
    folder.mkdir(parents=True, exist_ok=True)
    check_output_targets(folder)
    _remove_interrupted(folder)
    run_id = uuid.uuid4().hex
    stage = Path(tempfile.mkdtemp(prefix=temporary_prefix("outputs"), dir=folder))
    try:
        _write_set(summary, stage, figures, run_id)
        manifest: dict[str, Any] = {
            "written_by": "pathcast ensemble",
            "run_id": run_id,
            "written_at": time.strftime("%Y-%m-%dT%H:%M:%S%z"),
            "ensemble": summary.design.get("name"),
            "members": members_state(summary),
            "figures": bool(figures),
            "files": _listed(stage),
        }
        (folder / MANIFEST).unlink(missing_ok=True)
        previous = stage / "previous"
        previous.mkdir()
        for name in SET_ENTRIES:
            target, new = folder / name, stage / name
            if target.exists():
                os.replace(target, previous / name)
            if new.exists():
                os.replace(new, target)
        write_json_atomic(folder / MANIFEST, manifest)
    finally:
        shutil.rmtree(stage, ignore_errors=True)
    return [folder / relative for relative in manifest["files"]] + [folder / MANIFEST]


def read_outputs_manifest(folder: Path | str) -> dict | None:
    """DIR/outputs.json, or None when there is none (or it cannot be read as JSON)."""
    path = Path(folder) / MANIFEST
    if not path.is_file():
        return None
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    return data if isinstance(data, dict) and isinstance(data.get("files"), dict) else None


def _again(summary: EnsembleSummary | None) -> str:
    file = (summary.design.get("file") if summary is not None else None) or "ENSEMBLE_FILE"
    return (
        f"run 'pathcast ensemble {file} --out {summary.folder if summary is not None else 'DIR'}' again "
        "(it solves nothing already stored and rewrites the tables, figures, summary.json and robustness.json "
        "together)"
    )


def verify_outputs(folder: Path | str, summary: EnsembleSummary | None = None) -> dict | None:
    """Check that DIR's tables, figures, summary.json and robustness.json are the one set its outputs.json lists
    (sizes and SHA-256, nothing unlisted) and, given the folder's ``summary``, that they summarise the members stored
    now. Return the manifest, or None when the folder holds no outputs at all; ScenarioError otherwise."""
    folder = Path(folder)
    present = [name for name in SET_ENTRIES if (folder / name).exists()]
    manifest = read_outputs_manifest(folder)
    if manifest is None:
        if not present:
            return None
        raise ScenarioError(
            f"{folder / MANIFEST}: got no readable manifest beside {', '.join(present)}; expected the outputs.json "
            "that 'pathcast ensemble' writes last, naming the files of one run (an earlier write was interrupted, "
            f"or an older pathcast wrote this folder): {_again(summary)}.",
            file=str(folder / MANIFEST),
        )
    run = manifest.get("run_id", "?")
    listed = manifest["files"]
    for relative, facts in listed.items():
        path = folder / relative
        if "/" in relative and not path.parent.exists():
            continue  # a whole folder left out (copied without its figures, say) mixes nothing
        if not path.is_file():
            raise ScenarioError(
                f"{folder / MANIFEST}: got no file {relative}; expected every file of run {run} that outputs.json "
                f"lists: {_again(summary)}.",
                file=str(folder / MANIFEST),
            )
        found = _file_facts(path)
        if found != facts:
            raise ScenarioError(
                f"{path}: got {found['bytes']} bytes with SHA-256 {found['sha256'][:12]}...; expected the "
                f"{facts.get('bytes')} bytes with SHA-256 {str(facts.get('sha256'))[:12]}... that run {run} wrote "
                f"(outputs.json): {_again(summary)}.",
                file=str(path),
            )
    for name in SET_ENTRIES:
        if (folder / name).is_file() and name not in listed:
            raise ScenarioError(
                f"{folder / name}: got a file which outputs.json does not list; expected only the files of run {run}: "
                f"{_again(summary)}.",
                file=str(folder / name),
            )
    for name in ("tables", "figures"):
        if (folder / name).is_dir():
            extra = sorted(
                f"{name}/{p.name}" for p in (folder / name).iterdir() if f"{name}/{p.name}" not in listed
            )
            if extra:
                raise ScenarioError(
                    f"{folder / name}: got {extra[0]!r}, which outputs.json does not list; expected only the files of "
                    f"run {run}: {_again(summary)}.",
                    file=str(folder / name),
                )
    if summary is not None:
        then, now = manifest.get("members") or {}, members_state(summary)
        if then.get("sha256") != now["sha256"]:
            raise ScenarioError(
                f"{folder / MANIFEST}: got outputs of run {run} written when {then.get('solved', '?')} members were "
                f"solved, {then.get('failed', '?')} failed and {then.get('pending', '?')} pending; expected outputs "
                f"of the members stored now ({now['solved']} solved, {now['failed']} failed, {now['pending']} "
                f"pending): {_again(summary)}.",
                file=str(folder / MANIFEST),
            )
    return manifest


def read_robustness(ensemble_dir: str | Path, summary: EnsembleSummary | None = None) -> RobustnessSection:
    """The robustness section of an ensemble folder (``summary``: its :func:`summarise_ensemble`, made here when not
    given). ScenarioError when the folder's tables, figures, summary.json and robustness.json are not the one set its
    outputs.json lists for the members stored now (an interrupted write, or members solved since), or when
    robustness.json is not of this pathcast's format. A folder without robustness.json (members only, or outputs of
    an earlier pathcast) gets the section computed from its member records."""
    folder = Path(ensemble_dir)
    summary = summary if summary is not None else summarise_ensemble(folder)
    verify_outputs(folder, summary)
    path = folder / ROBUSTNESS_FILE
    return read_section_file(path) if path.is_file() else robustness_section(summary)


def ensemble_robustness_section(
    ensemble_dir: str | Path, *, heading_level: int = 2, figure_folder: str | Path | None = None
) -> str:
    """Markdown of an ensemble folder's robustness section (:func:`read_robustness`, rendered by
    :func:`pathcast.ensemble.robustness.render_markdown`): members solved, percentiles of the headline figures, the
    probability of staying within the carbon budget, the most influential inputs and the fan chart. Figure links point
    into ``figure_folder`` (default: the ensemble's own figures/ folder, as given). ScenarioError as
    :func:`read_robustness`."""
    return render_markdown(
        read_robustness(ensemble_dir),
        heading_level=heading_level,
        figure_folder=Path(figure_folder) if figure_folder else Path(ensemble_dir) / "figures",
    )
