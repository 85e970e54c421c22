"""An ensemble's tables, figures and summary.json are one set: outputs.json (written last) lists every file with its
size and SHA-256 and the state of the members they summarise; readers (the memo's robustness section) refuse a
folder whose set is mixed, incomplete, tampered with or older than its members; leftovers of interrupted writes are
removed by the next write; and tables/ or figures/ holding files pathcast did not write are never replaced.

The checked values are the files' own sizes and hashes; no outside source.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys

import pytest

from pathcast.cli import main
from pathcast.ensemble import ensemble_robustness_section, run_ensemble, summarise_ensemble
from pathcast.ensemble import outputs as outputs_module
from pathcast.ensemble.outputs import (
    MANIFEST,
    read_outputs_manifest,
    verify_outputs,
    write_ensemble_outputs,
)
from pathcast.ensemble.store import MemberStore
from pathcast.errors import ScenarioError


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    """tests/data/ensemble_oat.yaml (5 members around tests/data/tiny.yaml) solved serially, with figures."""
    from pathlib import Path

    out = tmp_path_factory.mktemp("outputs") / "oat"
    run_ensemble(
        Path(__file__).resolve().parents[1] / "data" / "ensemble_oat.yaml", out, serial=True, progress=False
    )
    return out


@pytest.fixture
def folder(written, tmp_path):
    copy = tmp_path / "oat"
    shutil.copytree(written, copy)
    return copy


def dead_pid() -> int:
    """The id of a process that has finished (a child started and waited for)."""
    child = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True
    )
    return int(child.stdout)


def test_manifest_lists_every_file_of_the_set(folder):
    manifest = read_outputs_manifest(folder)
    summary = json.loads((folder / "summary.json").read_text())
    assert manifest["run_id"] == summary["run_id"]
    listed = set(manifest["files"])
    on_disk = {f"{d}/{p.name}" for d in ("tables", "figures") for p in (folder / d).iterdir()} | {
        "summary.json",
        "robustness.json",
    }
    assert listed == on_disk
    assert {"tables/members.csv", "tables/tornado.parquet", "figures/tornado.png"} <= listed
    for relative, facts in manifest["files"].items():
        assert (folder / relative).stat().st_size == facts["bytes"]
    assert manifest["members"]["solved"] == 5 and manifest["members"]["failed"] == 0
    assert verify_outputs(folder, summarise_ensemble(folder))["run_id"] == manifest["run_id"]


def test_a_write_cut_between_the_swaps_is_refused_by_readers(folder, monkeypatch, capsys):
    """Kill after the new tables are in place and before the figures and summary.json: the old figures and the new
    tables are never read as one set."""
    summary = summarise_ensemble(folder)
    real_replace = os.replace

    def cut(source, target):
        real_replace(source, target)
        if str(target) == str(folder / "tables"):  # the new tables are in place: stop here
            raise KeyboardInterrupt

    monkeypatch.setattr(outputs_module.os, "replace", cut)
    with pytest.raises(KeyboardInterrupt):
        write_ensemble_outputs(summary, folder)
    monkeypatch.undo()
    assert not (folder / MANIFEST).exists()
    assert (folder / "tables").is_dir() and (folder / "summary.json").is_file()
    with pytest.raises(
        ScenarioError,
        match=rf"{MANIFEST}: got no readable manifest beside tables, figures, summary\.json, robustness\.json; ",
    ):
        ensemble_robustness_section(folder)
    out = folder.parent / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "run 'pathcast ensemble " in err and "again" in err
    # the re-run the sentence asks for solves nothing and writes a whole set again
    again = run_ensemble(summary.design["file"], folder, serial=True, progress=False)
    assert again.attempted == 0
    assert verify_outputs(folder, summarise_ensemble(folder)) is not None


def test_a_changed_file_is_refused(folder):
    with open(folder / "tables" / "members.csv", "a", encoding="utf-8") as handle:
        handle.write("\n")
    with pytest.raises(
        ScenarioError, match=r"members\.csv: got \d+ bytes with SHA-256 [0-9a-f]{12}\.\.\.; expected "
    ):
        verify_outputs(folder)


def test_a_file_from_another_run_is_refused(folder):
    (folder / "figures" / "emissions_fan_old.png").write_bytes(b"not from this run")
    with pytest.raises(
        ScenarioError, match=r"got 'figures/emissions_fan_old\.png', which outputs\.json does not list"
    ):
        verify_outputs(folder)


def test_outputs_older_than_the_members_are_refused(folder):
    summary = summarise_ensemble(folder)
    store = MemberStore(folder)
    record = store.get(summary.members["hash"].iloc[1])
    store.put(
        {
            **record,
            "status": "failed",
            "error": {"type": "KilledWorker", "message": "x", "deterministic": False},
        }
    )
    with pytest.raises(
        ScenarioError,
        match=r"written when 5 members were solved, 0 failed and 0 pending; expected outputs of the members stored "
        r"now \(4 solved, 1 failed, 0 pending\)",
    ):
        ensemble_robustness_section(folder)


def test_a_copy_without_figures_and_a_folder_without_outputs_are_read(folder):
    shutil.rmtree(folder / "figures")
    assert verify_outputs(folder) is not None
    for name in ("tables", "summary.json", "robustness.json", MANIFEST):
        path = folder / name
        shutil.rmtree(path) if path.is_dir() else path.unlink()
    assert verify_outputs(folder) is None  # members only, as run_ensemble(..., outputs=False) leaves it
    assert ensemble_robustness_section(folder).startswith("## Robustness across an ensemble")


def test_next_write_removes_leftovers_of_killed_writes(folder):
    gone = dead_pid()
    stage = folder / f".outputs.tmp-{gone}-abcd1234"
    (stage / "tables").mkdir(parents=True)
    (stage / "tables" / "members.csv").write_text("half", encoding="utf-8")
    legacy = folder / ".figures.k2j4h5"  # the temporary folder of an earlier pathcast version
    legacy.mkdir()
    member_tmp = folder / "members" / f".{'0' * 64}.json.tmp-{gone}-abcd1234"
    member_tmp.write_text("{", encoding="utf-8")
    alive = folder / f".outputs.tmp-{os.getppid()}-abcd1234"  # a process that still runs: left alone
    alive.mkdir()
    run_ensemble(
        summarise_ensemble(folder).design["file"], folder, serial=True, progress=False, figures=False
    )
    assert not stage.exists() and not legacy.exists() and not member_tmp.exists()
    assert alive.is_dir()
    # figures of the earlier run no longer belong to the tables of this one (--no-figures): removed
    assert not (folder / "figures").exists()
    assert read_outputs_manifest(folder)["figures"] is False


def test_tables_folder_with_other_files_is_never_replaced(folder, capsys):
    (folder / "tables" / "my_notes.txt").write_text("mine", encoding="utf-8")
    design = summarise_ensemble(folder).design
    code = main(["ensemble", design["file"], "--serial", "--out", str(folder), "--quiet"])
    assert code == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1
    assert err.startswith(
        f"pathcast: {folder / 'tables'}: got something pathcast did not write there; expected a "
    )
    assert (folder / "tables" / "my_notes.txt").read_text(encoding="utf-8") == "mine"


def test_a_folder_pathcast_did_not_write_is_refused_before_anything(data_dir, tmp_path, capsys):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "thesis.tex").write_text("mine", encoding="utf-8")
    assert (
        main(["ensemble", str(data_dir / "ensemble_oat.yaml"), "--serial", "--out", str(out), "--quiet"]) == 2
    )
    err = capsys.readouterr().err.strip()
    assert err == (
        f"pathcast: {out}: ensemble folder: got a folder that pathcast did not write (it holds 'thesis.tex'); "
        "expected a new or empty folder, or one written by 'pathcast ensemble': choose another --out."
    )
    assert sorted(p.name for p in out.iterdir()) == ["thesis.tex"]


def test_the_current_folder_is_refused(data_dir, tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    assert main(["ensemble", str(data_dir / "ensemble_oat.yaml"), "--serial", "--out", ".", "--quiet"]) == 2
    assert "ensemble folder: got the current folder, one of its parents" in capsys.readouterr().err
    assert list(tmp_path.iterdir()) == []


def test_a_folder_holding_only_ensemble_entries_is_taken(data_dir, tmp_path, written):
    # a copied basis/ (as benchmarks/ensemble_benchmark.py prepares) and a write of ensemble.json cut short
    out = tmp_path / "prepared"
    shutil.copytree(written / "basis", out / "basis")
    (out / f".ensemble.json.tmp-{dead_pid()}-abcd1234").write_text("{", encoding="utf-8")
    run = run_ensemble(data_dir / "ensemble_oat.yaml", out, serial=True, progress=False, outputs=False)
    assert run.reference_solves == 0  # the copied basis was used
    assert not any(p.name.startswith(".ensemble.json.tmp-") for p in out.iterdir())
