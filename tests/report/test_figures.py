"""Every figure function draws from solved tiny results and is written as PNG and SVG; axes carry units, legends
exist, technologies take their colour and hatch from the one colour table, and the budget reference paths spend the
remaining budget (checked against reduction_rates, the closed form sum_{t>=0} E0 (1-r)^t = E0 / r: common practice,
no source)."""

from __future__ import annotations

import struct

import numpy as np
import pytest
from matplotlib.colors import to_rgba

from pathcast.report.colours import technology_style
from pathcast.report.figures import (
    DPI,
    OVERLAY_FIGURES,
    SCENARIO_FIGURES,
    capacity_figure,
    emissions_figure,
    overlay_figures,
    save_figure,
    scenario_figures,
)
from pathcast.results.reduction_rates import required_rates_table


def png_size(path) -> tuple[int, int]:
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    return struct.unpack(">II", data[16:24])


def check_written(fig, folder, name):
    png, svg = save_figure(fig, folder, name)
    assert png == folder / f"{name}.png" and svg == folder / f"{name}.svg"
    width, height = png_size(png)
    assert width > 400 and height > 300
    text = svg.read_text()
    assert "<svg" in text and text.rstrip().endswith("</svg>")


def check_axes(fig):
    """Units in brackets on every y axis, a year axis below, and a legend (outside the axes)."""
    axes = [ax for ax in fig.axes if ax.get_visible()]
    assert axes
    for ax in axes:
        assert "[" in ax.get_ylabel() and "]" in ax.get_ylabel(), ax.get_ylabel()
    assert "Year" in axes[-1].get_xlabel()
    assert fig.legends, "every figure has a figure legend outside the axes"


@pytest.mark.parametrize("name", list(SCENARIO_FIGURES))
def test_scenario_figure_written(tiny_run, tmp_path, name):
    fig = SCENARIO_FIGURES[name](tiny_run.result)
    check_axes(fig)
    check_written(fig, tmp_path, name)


@pytest.mark.parametrize("name", list(OVERLAY_FIGURES))
def test_overlay_figure_one_scenario(tiny_run, tmp_path, name):
    fig = OVERLAY_FIGURES[name](tiny_run.result)
    check_axes(fig)
    check_written(fig, tmp_path, name)


@pytest.mark.parametrize("name", list(OVERLAY_FIGURES))
def test_overlay_figure_several_scenarios(reference_run, tiny_run, tmp_path, name):
    fig = OVERLAY_FIGURES[name]([reference_run.result, tiny_run.result])
    check_axes(fig)
    texts = [t.get_text() for t in fig.legends[0].get_texts()]
    assert any("tiny_reference" in t for t in texts) and any(
        t.startswith("tiny") and "reference" not in t for t in texts
    )
    check_written(fig, tmp_path, name)


def test_overlay_without_any_budget(reference_run, tmp_path):
    """A reference case alone: no budget lines, the rate figure says there is no budget instead of failing."""
    figures = overlay_figures([reference_run.result])
    rate_axes = figures["required_rate"].axes[0]
    assert any("no carbon budget" in t.get_text() for t in rate_axes.texts)
    for name, fig in figures.items():
        check_written(fig, tmp_path, name)


def test_sets_cover_every_figure(tiny_run):
    assert set(scenario_figures(tiny_run.result)) == set(SCENARIO_FIGURES)
    assert set(overlay_figures(tiny_run.result)) == set(OVERLAY_FIGURES)


def test_same_figure_same_bytes(tiny_run, tmp_path):
    """No dates in the files: drawing twice gives identical PNG and SVG."""
    first = save_figure(capacity_figure(tiny_run.result), tmp_path / "a", "capacity")
    second = save_figure(capacity_figure(tiny_run.result), tmp_path / "b", "capacity")
    for one, two in zip(first, second, strict=True):
        assert one.read_bytes() == two.read_bytes()


def test_dpi_of_png(tiny_run, tmp_path):
    png, _ = save_figure(capacity_figure(tiny_run.result), tmp_path, "capacity")
    width, _ = png_size(png)
    assert width >= 8 * DPI * 0.9  # 8 inch wide figure at DPI dots per inch (tight box trims a little)


def test_capacity_uses_colour_table(tiny_run):
    """Each stacked area has its technology's colour and hatch from report.colours."""
    fig = capacity_figure(tiny_run.result)
    legend = fig.legends[0]
    names = [t.get_text().replace(" ", "_") for t in legend.get_texts()]
    assert "solar_pv" in names and "wind_onshore" in names
    for patch, name in zip(legend.get_patches(), names, strict=True):
        colour, hatch = technology_style(name)
        assert np.allclose(patch.get_facecolor(), to_rgba(colour))
        assert (patch.get_hatch() or "") == hatch
    areas = fig.axes[0].collections
    wanted = {to_rgba(technology_style(n)[0]) for n in names}
    assert {tuple(np.round(a.get_facecolor()[0], 6)) for a in areas} <= {
        tuple(np.round(w, 6)) for w in wanted
    }


def test_capacity_axis_in_mw_for_small_systems(tiny_run):
    """tiny peaks near 6,000 MW, below the 10,000 MW switch to GW."""
    assert "[MW]" in capacity_figure(tiny_run.result).axes[0].get_ylabel()


def test_budget_paths_spend_remaining_budget(tiny_run):
    result = tiny_run.result
    fig = emissions_figure(result)
    ax = fig.axes[0]
    row = required_rates_table(result, start_years=[2025]).iloc[0]
    exponential = next(line for line in ax.lines if line.get_gid() == "exponential_path_0")
    years, values = exponential.get_xdata(), np.asarray(exponential.get_ydata(), dtype=float)
    assert years[0] == 2025
    assert values[0] == pytest.approx(row["emissions_at_start_mtco2"])
    assert values[1] / values[0] == pytest.approx(1 - row["exponential_rate_per_year"])
    assert values[0] / (1 - values[1] / values[0]) == pytest.approx(row["remaining_budget_mtco2"])
    linear = next(line for line in ax.lines if line.get_gid() == "linear_path_0")
    (x0, x1), (y0, y1) = linear.get_xdata(), linear.get_ydata()
    slope = (y1 - y0) / (x1 - x0)
    assert x0 + (0 - y0) / slope == pytest.approx(row["linear_end_year"])


def test_carbon_price_label_names_money(tiny_run):
    fig = OVERLAY_FIGURES["carbon_price"](tiny_run.result)
    label = fig.axes[0].get_ylabel()
    assert "USD/tCO2" in label and "2024" in label
