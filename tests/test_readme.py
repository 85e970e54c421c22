"""The README stays true: its field reference equals the schema, and it says what the tool is for and its cautions."""

from pathlib import Path

from pathcast.scenario.readme_sync import synced_readme

README = Path(__file__).parents[1] / "README.md"


def test_field_reference_matches_the_schema():
    text = README.read_text()
    assert synced_readme(text) == text, "run: python -m pathcast.scenario.readme_sync README.md"


def test_readme_states_job_quick_start_and_cautions():
    text = README.read_text()
    assert "screening-level planning model" in text and "licensed engineering studies" in text
    quick = text.split("## Quick start", 1)[1].split("##", 1)[0]
    commands = [line for line in quick.splitlines() if line.startswith("python3 -m venv")]
    assert (
        len(commands) == 2
        and "pathcast run scenarios/demo/budget.yaml" in commands[0]
        and "pytest" in commands[1]
    )
