"""`pathcast memo` with an ensemble folder among its inputs: the "Robustness across an ensemble" section, the sentence in
the finding, the ensemble's figures copied and embedded, an ensemble-only memo, and the error for a folder that is
neither a result folder nor an ensemble folder. The section is data: robustness.json, listed in outputs.json, read by
the memo as paragraphs, tables and figure references (a folder of an earlier pathcast without it gets the same section
computed from its member records; a changed, unlisted or unreadable one is refused).

The checked values are the ensemble's own summary.json (written by `pathcast ensemble` from the same member records);
no outside source. Formatting tolerance: the robustness table shows three significant digits below 1,000 and whole
numbers from 1,000 (|shown - value| <= half a unit of the third significant digit, or 0.5), the probability whole
percent (|shown - 100 p| <= 0.5); the finding follows the memo's rounding (|shown - value| <= half a unit of the last
digit shown).
"""

from __future__ import annotations

import base64
import hashlib
import json
import math
import re
import shutil

import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.report.console import CAUTION
from pathcast.report.memo_inputs import split_inputs
from tests.conftest import DATA

SECTION = "## Robustness across an ensemble"
ROWS = {  # robustness table row -> (summary.json headline_percentiles key, display scale)
    "total discounted system cost": ("total_discounted_cost_million", 1.0),
    "CO2 emitted in the budget period": ("cumulative_in_budget_period_mtco2", 1.0),
    "CO2 in the final year": ("final_year_emissions_mtco2", 1.0),
    "required reduction rate": ("required_reduction_rate_per_yr", 100.0),
    "carbon price in the final year": ("carbon_price_final_year_per_tco2", 1.0),
}


def number(text: str) -> float:
    return float(text.replace(",", ""))


def three_digits_equal(text: str, value: float) -> bool:
    if abs(value) >= 1000:
        tolerance = 0.5
    elif value == 0:
        tolerance = 0.0
    else:
        tolerance = 0.5 * 10 ** (math.floor(math.log10(abs(value))) - 2)
    return abs(number(text) - value) <= tolerance + 1e-9 * max(1.0, abs(value))


def last_digit_equal(text: str, value: float) -> bool:
    decimals = len(text.split(".")[1]) if "." in text else 0
    return abs(number(text) - value) <= 0.5 * 10**-decimals + 1e-9


def section_of(markdown: str, heading: str) -> str:
    return markdown.split(heading, 1)[1].split("\n## ", 1)[0]


def table_rows(markdown: str) -> dict[str, list[str]]:
    rows = {}
    for line in markdown.splitlines():
        if line.startswith("| ") and not line.startswith("|---"):
            cells = [c.strip() for c in line.strip().split("|")[1:-1]]
            rows.setdefault(cells[0], cells[1:])
    return rows


@pytest.fixture(scope="module")
def ensemble_dir(tmp_path_factory):
    """tests/data/ensemble_lhs.yaml (6 members around tests/data/tiny.yaml), solved serially in this process, after
    other solves of this session (a serial ensemble must not depend on HiGHS's thread pool being fresh)."""
    from pathcast.pipeline import run_scenario

    run_scenario(DATA / "tiny.yaml")  # start HiGHS's thread pool in this process first
    folder = tmp_path_factory.mktemp("ensemble") / "tiny_lhs"
    code = main(["ensemble", str(DATA / "ensemble_lhs.yaml"), "--serial", "--out", str(folder), "--quiet"])
    assert code == 0
    return folder


@pytest.fixture(scope="module")
def summary(ensemble_dir):
    return json.loads((ensemble_dir / "summary.json").read_text())


@pytest.fixture(scope="module")
def memo_dir(tiny_folder, ensemble_dir, tmp_path_factory):
    out = tmp_path_factory.mktemp("memo") / "memo"
    assert main(["memo", str(tiny_folder), str(ensemble_dir), "--out", str(out), "--quiet"]) == 0
    return out


@pytest.fixture(scope="module")
def ensemble_only(ensemble_dir, tmp_path_factory):
    out = tmp_path_factory.mktemp("memo") / "ensemble_only"
    assert main(["memo", str(ensemble_dir), "--out", str(out), "--quiet"]) == 0
    return out


def test_robustness_section_holds_the_percentiles_and_probability(memo_dir, summary):
    section = section_of((memo_dir / "memo.md").read_text(), SECTION)
    assert f"Ensemble **{summary['name']}**" in section
    rows = table_rows(section)
    for label, (key, scale) in ROWS.items():
        p5, p50, p95 = rows[label][1:4]
        values = summary["headline_percentiles"][key]
        for shown, percentile in ((p5, "p5"), (p50, "p50"), (p95, "p95")):
            assert three_digits_equal(shown, values[percentile] * scale), (label, percentile, shown)
    shown = re.search(r"Probability of staying within .*?\*\*(\d+)%\*\*", section)
    assert shown and abs(int(shown[1]) - 100 * summary["probability_within_budget"]) <= 0.5


def test_finding_gives_probability_and_cost_range(memo_dir, summary):
    text = (memo_dir / "memo.md").read_text()
    finding = section_of(text, "## Finding\n")  # one scenario: the ensemble's sentence joins its finding
    assert "## Findings" not in text
    assert f"Across the ensemble {summary['name']} ({summary['members']} members" in finding
    assert "around this scenario" in finding  # tiny.yaml is the ensemble's base scenario
    probability = re.search(r"probability of staying within the carbon budget is (\d+) %", finding)
    assert probability and abs(int(probability[1]) - 100 * summary["probability_within_budget"]) <= 0.5
    cost = re.search(
        r"total discounted system cost ranges from ([\d,.]+) to ([\d,.]+) million USD of 2024 "
        r"\(5-95 %, median ([\d,.]+)\)",
        finding,
    )
    assert cost
    values = summary["headline_percentiles"]["total_discounted_cost_million"]
    for shown, percentile in zip(cost.groups(), ("p5", "p95", "p50"), strict=True):
        assert last_digit_equal(shown, values[percentile]), (percentile, shown)


def test_figures_copied_and_embedded(memo_dir, ensemble_dir):
    markdown = (memo_dir / "memo.md").read_text()
    page = (memo_dir / "memo.html").read_text()
    for png in sorted((ensemble_dir / "figures").glob("*.png")):
        copied = memo_dir / "figures" / f"ensemble_tiny_lhs_{png.name}"
        assert copied.read_bytes() == png.read_bytes()
        assert f"(figures/{copied.name})" in markdown
        assert base64.b64encode(png.read_bytes()).decode("ascii") in page
    links = re.findall(r"!\[[^\]]*\]\(([^)]+)\)", markdown)
    assert all((memo_dir / link).is_file() for link in links)
    sources = re.findall(r'src="([^"]*)"', page)
    assert len(sources) == len(links)
    assert all(src.startswith("data:image/png;base64,") for src in sources)
    assert str(ensemble_dir) not in re.sub(
        r"<table>.*?</table>", "", page, flags=re.S
    )  # only the provenance names it


def test_cautions_and_provenance_kept(memo_dir, ensemble_dir, summary):
    markdown = (memo_dir / "memo.md").read_text()
    assert CAUTION in markdown and CAUTION in (memo_dir / "memo.html").read_text()
    provenance = table_rows(section_of(markdown, "## Provenance"))
    assert provenance["tiny"][0].endswith("tiny.yaml")
    row = provenance[summary["name"]]
    assert (
        row[0] == str(ensemble_dir)
        and row[1].endswith("ensemble_lhs.yaml")
        and row[3] == summary["base_hash"][:12]
    )
    assert row[4] == f"{summary['solved']} of {summary['members']}"


def test_ensemble_only_memo(ensemble_only, summary):
    markdown = (ensemble_only / "memo.md").read_text()
    for heading in ("## Finding", SECTION, "## Cautions", "## Provenance"):
        assert heading in markdown
    for heading in ("## Headline figures", "## Figures", "## Assumptions"):
        assert heading not in markdown
    assert CAUTION in markdown
    assert "around the base scenario tiny.yaml" in section_of(markdown, "## Finding")
    assert "Illustrative numbers" in markdown  # tests/data/tiny.yaml is marked illustrative
    figures = sorted(p.name for p in (ensemble_only / "figures").iterdir())
    assert figures and all(name.startswith("ensemble_tiny_lhs_") for name in figures)
    sources = re.findall(r'src="([^"]*)"', (ensemble_only / "memo.html").read_text())
    assert len(sources) == len(figures) and all(s.startswith("data:image/png;base64,") for s in sources)


def test_ensemble_only_default_folder(ensemble_dir, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["memo", str(ensemble_dir), "--quiet"]) == 0
    assert (tmp_path / "results" / "tiny_lhs_memo" / "memo.html").is_file()


def test_ensemble_without_figures(ensemble_dir, tmp_path):
    bare = tmp_path / "bare"
    shutil.copytree(ensemble_dir, bare, ignore=shutil.ignore_patterns("figures"))
    out = tmp_path / "memo"
    assert main(["memo", str(bare), "--out", str(out), "--quiet"]) == 0
    markdown = (out / "memo.md").read_text()
    assert "the ensemble was run without figures" in markdown
    assert not re.findall(r"!\[[^\]]*\]\(([^)]+)\)", markdown)
    assert 'src="' not in (out / "memo.html").read_text()


def test_folder_neither_result_nor_ensemble(tiny_folder, tmp_path, capsys):
    stray = tmp_path / "stray"
    stray.mkdir()
    (stray / "notes.txt").write_text("not a result")
    message = (
        r"stray: got a folder with neither summary\.json nor ensemble\.json; expected a result folder written by "
        r"'pathcast run' or an ensemble folder written by 'pathcast ensemble'\."
    )
    with pytest.raises(ScenarioError, match=message):
        split_inputs([tiny_folder, stray])
    out = tmp_path / "memo"
    assert main(["memo", str(tiny_folder), str(stray), "--out", str(out), "--quiet"]) == 2
    assert re.search(message, capsys.readouterr().err)
    assert not out.exists()


def test_missing_input_names_every_kind(tmp_path):
    with pytest.raises(
        ScenarioError,
        match=r"missing: got no such file or folder; expected a scenario YAML file, a "
        r"result folder written by 'pathcast run' or an ensemble folder",
    ):
        split_inputs([tmp_path / "missing"])


# --- the robustness section is data: robustness.json, listed in outputs.json, read by the memo as blocks -----------


def listed_facts(path) -> dict:
    """A file's size and SHA-256 as outputs.json lists them."""
    body = path.read_bytes()
    return {"bytes": len(body), "sha256": hashlib.sha256(body).hexdigest()}


def rewrite_listed(folder, relative: str, data) -> None:
    """Write ``data`` as ``folder/relative`` and record its size and SHA-256 in outputs.json, as a run would."""
    path = folder / relative
    path.write_text(json.dumps(data, indent=1), encoding="utf-8")
    manifest = json.loads((folder / "outputs.json").read_text())
    manifest["files"][relative] = listed_facts(path)
    (folder / "outputs.json").write_text(json.dumps(manifest, indent=1), encoding="utf-8")


@pytest.fixture
def ensemble_copy(ensemble_dir, tmp_path):
    copy = tmp_path / "tiny_lhs"
    shutil.copytree(ensemble_dir, copy)
    return copy


def test_robustness_json_is_listed_and_holds_blocks(ensemble_dir, summary):
    from pathcast.ensemble.robustness import FORMAT

    path = ensemble_dir / "robustness.json"
    assert json.loads((ensemble_dir / "outputs.json").read_text())["files"][
        "robustness.json"
    ] == listed_facts(path)
    data = json.loads(path.read_text())
    assert data["format"] == FORMAT and data["ensemble"] == summary["name"]
    kinds = [block["kind"] for block in data["blocks"]]
    assert kinds.count("table") == 1 and kinds.count("figure") == 1 and kinds[0] == "paragraph"
    table = next(block for block in data["blocks"] if block["kind"] == "table")
    assert [c["name"] for c in table["columns"]] == ["quantity", "unit", "5 %", "median", "95 %"]
    assert [c["numeric"] for c in table["columns"]] == [False, False, True, True, True]
    rows = {row[0]: row for row in table["rows"]}
    for label, (key, scale) in ROWS.items():
        values = summary["headline_percentiles"][key]
        for shown, percentile in zip(rows[label][2:], ("p5", "p50", "p95"), strict=True):
            assert three_digits_equal(shown, values[percentile] * scale), (label, percentile, shown)
    figure = next(block for block in data["blocks"] if block["kind"] == "figure")
    assert (ensemble_dir / figure["file"]).is_file() and figure["file"] == "figures/emissions_fan.png"
    first = data["blocks"][0]["spans"]
    assert {"text": summary["name"], "style": "strong"} in first
    assert {"text": "tiny.yaml", "style": "code"} in first


def test_memo_reads_the_section_from_robustness_json(ensemble_copy, tiny_folder, tmp_path, monkeypatch):
    from pathcast.ensemble import outputs

    data = json.loads((ensemble_copy / "robustness.json").read_text())
    marker = "Marker paragraph written into robustness.json by this test."
    data["blocks"][-1] = {"kind": "paragraph", "spans": [{"text": marker, "style": "plain"}]}
    table = next(block for block in data["blocks"] if block["kind"] == "table")
    table["rows"][0][2] = "12,345"
    rewrite_listed(ensemble_copy, "robustness.json", data)

    def refuse(_summary):
        raise AssertionError("the memo computed the robustness section instead of reading robustness.json")

    monkeypatch.setattr(outputs, "robustness_section", refuse)
    out = tmp_path / "memo"
    assert main(["memo", str(tiny_folder), str(ensemble_copy), "--out", str(out), "--quiet"]) == 0
    markdown = (out / "memo.md").read_text()
    section = section_of(markdown, SECTION)
    assert marker in section and "Members differ only in the inputs listed" not in section
    assert table_rows(section)["total discounted system cost"][1] == "12,345"
    page = (out / "memo.html").read_text()
    assert marker in page and '<td class="number">12,345</td>' in page
    assert f"<strong>{data['ensemble']}</strong>" in page and "<code>tiny.yaml</code>" in page


def test_an_ensemble_folder_without_robustness_json_gets_the_same_section(
    ensemble_copy, tiny_folder, memo_dir, tmp_path
):
    """A folder written by an earlier pathcast: no robustness.json, and outputs.json does not list one."""
    (ensemble_copy / "robustness.json").unlink()
    manifest = json.loads((ensemble_copy / "outputs.json").read_text())
    del manifest["files"]["robustness.json"]
    (ensemble_copy / "outputs.json").write_text(json.dumps(manifest, indent=1), encoding="utf-8")
    out = tmp_path / "memo"
    assert main(["memo", str(tiny_folder), str(ensemble_copy), "--out", str(out), "--quiet"]) == 0
    computed = section_of((out / "memo.md").read_text(), SECTION)
    assert computed == section_of((memo_dir / "memo.md").read_text(), SECTION)


def test_a_changed_robustness_json_is_refused(ensemble_copy, tmp_path, capsys):
    with open(ensemble_copy / "robustness.json", "a", encoding="utf-8") as handle:
        handle.write("\n")
    out = tmp_path / "memo"
    assert main(["memo", str(ensemble_copy), "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1
    assert re.search(r"robustness\.json: got \d+ bytes with SHA-256 [0-9a-f]{12}\.\.\.; expected the", err)
    assert not out.exists()


def test_an_unlisted_robustness_json_is_refused(ensemble_copy):
    from pathcast.ensemble.outputs import read_robustness

    manifest = json.loads((ensemble_copy / "outputs.json").read_text())
    del manifest["files"]["robustness.json"]
    (ensemble_copy / "outputs.json").write_text(json.dumps(manifest, indent=1), encoding="utf-8")
    with pytest.raises(
        ScenarioError, match=r"robustness\.json: got a file which outputs\.json does not list; "
    ):
        read_robustness(ensemble_copy)


def test_robustness_json_of_another_format_is_refused(ensemble_copy, tmp_path, capsys):
    from pathcast.ensemble.outputs import read_robustness

    data = json.loads((ensemble_copy / "robustness.json").read_text())
    rewrite_listed(ensemble_copy, "robustness.json", {**data, "format": "robustness 0"})
    message = (
        r"robustness\.json: format: got 'robustness 0'; expected 'pathcast robustness section 1', the robustness "
        r"section this pathcast writes: run 'pathcast ensemble' on the ensemble file again"
    )
    with pytest.raises(ScenarioError, match=message):
        read_robustness(ensemble_copy)
    assert main(["memo", str(ensemble_copy), "--out", str(tmp_path / "memo"), "--quiet"]) == 2
    err = capsys.readouterr().err
    assert re.search(message, err) and len(err.strip().splitlines()) == 1


@pytest.mark.parametrize(
    ("block", "expected"),
    [
        ({"kind": "chart"}, r"block kind 'chart' is none of paragraph, table, figure"),
        (
            {"kind": "paragraph", "spans": [{"text": "x", "style": "italic"}]},
            r"span style 'italic' is none of",
        ),
        (
            {"kind": "table", "columns": [{"name": "a", "numeric": False}], "rows": [["1", "2"]]},
            r"a row has not the 1 cells of the table's columns",
        ),
        ({"kind": "figure"}, r"KeyError: 'name'"),
    ],
)
def test_a_block_that_cannot_be_read_is_refused(ensemble_copy, block, expected):
    from pathcast.ensemble.outputs import read_robustness

    data = json.loads((ensemble_copy / "robustness.json").read_text())
    rewrite_listed(ensemble_copy, "robustness.json", {**data, "blocks": [*data["blocks"], block]})
    with pytest.raises(
        ScenarioError, match=rf"robustness\.json: blocks: got a block that cannot be read \(.*{expected}"
    ):
        read_robustness(ensemble_copy)


def test_robustness_json_that_is_no_json_is_refused(ensemble_copy):
    from pathcast.ensemble.outputs import read_robustness

    (ensemble_copy / "robustness.json").write_text("{not json", encoding="utf-8")
    manifest = json.loads((ensemble_copy / "outputs.json").read_text())
    manifest["files"]["robustness.json"] = listed_facts(ensemble_copy / "robustness.json")
    (ensemble_copy / "outputs.json").write_text(json.dumps(manifest), encoding="utf-8")
    with pytest.raises(ScenarioError, match=r"robustness\.json: got a file that cannot be read as JSON \("):
        read_robustness(ensemble_copy)


def test_markdown_rendering_of_the_data(ensemble_dir):
    """The Markdown renderer is kept for readers that want text: the same section, figure links into figures/."""
    from pathcast.ensemble import ensemble_robustness_section
    from pathcast.ensemble.outputs import read_robustness
    from pathcast.ensemble.robustness import RobustnessSection, render_markdown

    section = read_robustness(ensemble_dir)
    assert RobustnessSection.from_dict(section.as_dict(), "x") == section
    text = ensemble_robustness_section(ensemble_dir)
    assert text == render_markdown(section, figure_folder=ensemble_dir / "figures")
    assert (
        text.startswith(SECTION)
        and f"]({(ensemble_dir / 'figures' / 'emissions_fan.png').as_posix()})" in text
    )
    assert "|---|---|---:|---:|---:|" in text
    assert "](" not in render_markdown(section)  # no figure folder, no figure lines
