"""The one colour table for every figure: a colour and a hatch per technology, chosen by what the technology is
(keywords in its name), so that the same technology looks the same in every chart and stays distinguishable when
printed in black and white (hatches and distinct lightness)."""

from __future__ import annotations

import hashlib

__all__ = [
    "technology_style",
    "technology_colour",
    "technology_hatch",
    "SCENARIO_LINESTYLES",
    "scenario_style",
]

# keyword -> (colour, hatch); first match wins, so more specific keywords come first. Colours are our own choice.
_FAMILIES: tuple[tuple[str, str, str], ...] = (
    ("offshore", "#1f5f8b", "\\\\"),
    ("wind", "#4f9fd1", "\\\\"),
    ("solar", "#f2b705", ".."),
    ("pv", "#f2b705", ".."),
    ("hydrogen_turbine", "#5fd3d6", "oo"),
    ("hydrogen", "#00a5a8", "++"),
    ("hydro", "#2a7f62", "||"),
    ("river", "#2a7f62", "||"),
    ("nuclear", "#8e5ea2", "xx"),
    ("geothermal", "#b5651d", "--"),
    ("battery", "#6c6c6c", "oo"),
    ("pumped", "#3b3b6d", "OO"),
    ("storage", "#6c6c6c", "oo"),
    ("electrolys", "#00a5a8", "++"),
    ("synthe", "#7fcdbb", "//"),
    ("fuel_cell", "#00a5a8", "++"),
    ("reform", "#a4343a", "++"),
    ("bio", "#6a994e", "//"),
    ("wood", "#8fb339", "//"),
    ("residue", "#8fb339", "//"),
    ("forest", "#8fb339", "//"),
    ("refin", "#9c6644", "--"),
    ("coal", "#3d3d3d", "xx"),
    ("lignite", "#5c4033", "xx"),
    ("oil", "#7f4f24", "--"),
    ("diesel", "#7f4f24", "--"),
    ("peak", "#e07a5f", ""),
    ("open_cycle", "#e07a5f", ""),
    ("gas", "#d1495b", ""),
    ("unserved", "#000000", "**"),
)
_FALLBACK = ("#a05195", "#665191", "#2f4b7c", "#ff7c43", "#ffa600", "#003f5c", "#d45087", "#bc5090")
_FALLBACK_HATCH = ("", "//", "\\\\", "..", "xx", "++", "--", "||")


def technology_style(name: str) -> tuple[str, str]:
    """(colour, hatch) for a technology or commodity name."""
    key = name.lower()
    for keyword, colour, hatch in _FAMILIES:
        if keyword in key:
            return colour, hatch
    digest = int(hashlib.sha256(key.encode()).hexdigest(), 16)
    return _FALLBACK[digest % len(_FALLBACK)], _FALLBACK_HATCH[(digest // 7) % len(_FALLBACK_HATCH)]


def technology_colour(name: str) -> str:
    return technology_style(name)[0]


def technology_hatch(name: str) -> str:
    return technology_style(name)[1]


# scenarios in overlay charts: line styles and markers that survive black-and-white printing
SCENARIO_LINESTYLES = (
    ("-", "o"),
    ("--", "s"),
    (":", "^"),
    ("-.", "D"),
    ((0, (5, 1, 1, 1)), "v"),
    ((0, (1, 1)), "P"),
)
_SCENARIO_COLOURS = ("#1b1b1b", "#d1495b", "#1f5f8b", "#6a994e", "#8e5ea2", "#b5651d")


def scenario_style(index: int) -> dict:
    """Matplotlib line keywords for the index-th scenario of an overlay chart."""
    linestyle, marker = SCENARIO_LINESTYLES[index % len(SCENARIO_LINESTYLES)]
    return {
        "color": _SCENARIO_COLOURS[index % len(_SCENARIO_COLOURS)],
        "linestyle": linestyle,
        "marker": marker,
        "markevery": 5,
        "markersize": 4,
    }
