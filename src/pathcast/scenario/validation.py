"""Checks across fields that the schema alone cannot make: names that refer to each other, profile lengths, day
weights, years inside the horizon, and whether every demanded commodity can be supplied through some chain of
technologies (reachability on the commodity graph)."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, NoReturn

import networkx as nx

from ..errors import did_you_mean, located_error
from .schema import ELECTRICITY, Scenario, Storage

if TYPE_CHECKING:
    from .loader import LoadedScenario

__all__ = ["check_scenario", "commodity_graph", "name_problem", "HOURS_PER_DAY", "DAYS_PER_YEAR", "NAME_MAX"]

HOURS_PER_DAY = 24
DAYS_PER_YEAR = 365.0
SOURCE = "(primary supply)"
NAME_MAX = 64
# A name may not start with a character that spreadsheet programs read as the start of a formula (OWASP, "CSV
# Injection"), so that no table cell pathcast writes can run as one; the writers escape free text as well.
_FORMULA_STARTS = ("=", "+", "-", "@")

FieldPath = tuple[str | int | float, ...]  # keys from the top of the scenario file down to one field


def name_problem(name: object) -> str | None:
    """None when ``name`` may name a technology, commodity, demand, day or profile, else what is expected."""
    text = str(name)
    if not text.strip():
        return "a non-empty name"
    if len(text) > NAME_MAX:
        return f"a name of at most {NAME_MAX} characters"
    if text.startswith(_FORMULA_STARTS) or text != text.strip():
        return "a name that starts with a letter, digit or '_' (not '=', '+', '-', '@' or a space)"
    if any(ord(c) < 32 or ord(c) == 127 for c in text):
        return "a name without control characters (tabs, line breaks)"
    return None


def check_scenario(loaded: LoadedScenario) -> None:
    """Raise ScenarioError for the first problem found, located to its file and field."""
    s = loaded.scenario

    def fail(path: FieldPath, value: Any, expected: str) -> NoReturn:
        raise located_error(loaded.file_of(path), path, value, expected)

    meta = s.metadata
    # --- names: they become table cells, figure labels and file names ------------------------------------------
    named: list[tuple[FieldPath, str]] = [
        (("time", "representative_days", i, "name"), d.name) for i, d in enumerate(s.time.representative_days)
    ]
    named += [(("commodities", n), n) for n in s.commodities]
    named += [(("demand", "fuels", n), n) for n in s.demand.fuels]
    for kind in ("generators", "storage", "converters", "supplies"):
        named += [(("technologies", kind, n), n) for n in getattr(s.technologies, kind)]
    if s.time.representative_days:
        named += [
            (("time", "representative_days", 0, "availability", p), p)
            for p in s.time.representative_days[0].availability
        ]
    for where, name in named:
        problem = name_problem(name)
        if problem:
            fail(where, name, problem)

    # --- time structure -------------------------------------------------------------------------------------
    days = s.time.representative_days
    names = [d.name for d in days]
    if len(set(names)) != len(names):
        duplicate = next(n for n in names if names.count(n) > 1)
        fail(("time", "representative_days"), duplicate, "each representative day named once")
    total_weight = sum(d.weight_days for d in days)
    if abs(total_weight - DAYS_PER_YEAR) > 1e-6:
        fail(
            ("time", "representative_days", "weight_days"),
            round(total_weight, 6),
            "day weights that sum to 365 days",
        )
    profiles = set(days[0].availability)
    for i, day in enumerate(days):
        where = ("time", "representative_days", i)
        if len(day.demand_shape) != HOURS_PER_DAY:
            fail(
                where + ("demand_shape",),
                f"{len(day.demand_shape)} values",
                f"{HOURS_PER_DAY} hourly values for day {day.name!r}",
            )
        if min(day.demand_shape) < 0 or max(day.demand_shape) <= 0:
            fail(where + ("demand_shape",), min(day.demand_shape), "non-negative demand values, not all zero")
        if set(day.availability) != profiles:
            fail(
                where + ("availability",),
                sorted(day.availability),
                f"the same profiles on every day: {sorted(profiles)}",
            )
        for profile, values in day.availability.items():
            if len(values) != HOURS_PER_DAY:
                fail(
                    where + ("availability", profile),
                    f"{len(values)} values",
                    f"{HOURS_PER_DAY} hourly values",
                )
            bad = [v for v in values if not 0 <= v <= 1]
            if bad:
                fail(where + ("availability", profile), bad[0], "availability factors between 0 and 1")

    commodities = set(s.commodities)
    if ELECTRICITY in commodities:
        fail(
            ("commodities", ELECTRICITY),
            ELECTRICITY,
            "fuels only: electricity is built in and balanced hourly",
        )
    all_commodities = sorted(commodities | {ELECTRICITY})

    def known_commodity(path: FieldPath, name: str | None, allow_electricity: bool) -> None:
        pool = all_commodities if allow_electricity else sorted(commodities)
        if name not in pool:
            fail(path, name, f"one of the commodities {pool}{did_you_mean(str(name), pool)}")

    # --- technologies -----------------------------------------------------------------------------------------
    tech = s.technologies
    seen: dict[str, str] = {}
    for kind, group in (
        ("generators", tech.generators),
        ("storage", tech.storage),
        ("converters", tech.converters),
        ("supplies", tech.supplies),
    ):
        for name in group:
            if name in seen:
                fail(
                    ("technologies", kind, name),
                    name,
                    f"a name not already used in technologies.{seen[name]}",
                )
            seen[name] = kind
    years = (meta.base_year, meta.final_year)
    for name, g in tech.generators.items():
        path = ("technologies", "generators", name)
        if g.fuel is not None:
            known_commodity(path + ("fuel",), g.fuel, allow_electricity=False)
        if isinstance(g.availability, str):
            try:
                value = float(g.availability)
            except ValueError:
                value = None
            if value is None and g.availability not in profiles:
                fail(
                    path + ("availability",),
                    g.availability,
                    f"a number between 0 and 1 or one of the profiles {sorted(profiles)}{did_you_mean(g.availability, profiles)}",
                )
            if value is not None and not 0 <= value <= 1:
                fail(path + ("availability",), value, "a number between 0 and 1")
    for name, c in tech.converters.items():
        path = ("technologies", "converters", name)
        known_commodity(path + ("input",), c.input, allow_electricity=True)
        known_commodity(path + ("output",), c.output, allow_electricity=False)
        if c.input == c.output:
            fail(path + ("output",), c.output, "an output other than the input")
    for name, sup in tech.supplies.items():
        known_commodity(("technologies", "supplies", name, "output"), sup.output, allow_electricity=False)
    for kind, group in (
        ("generators", tech.generators),
        ("storage", tech.storage),
        ("converters", tech.converters),
    ):
        for name, t in group.items():
            path = ("technologies", kind, name)
            if t.max_build_mw_per_year is not None and t.max_build_mw_per_year < t.min_build_mw_per_year:
                fail(
                    path + ("max_build_mw_per_year",),
                    t.max_build_mw_per_year,
                    f"at least min_build_mw_per_year ({t.min_build_mw_per_year!r})",
                )
            if t.phase_out_year is not None and t.min_build_mw_per_year > 0:
                fail(
                    path + ("min_build_mw_per_year",),
                    t.min_build_mw_per_year,
                    "0 for a technology with a phase-out year",
                )
            for i, e in enumerate(t.existing):
                if e.retirement_year <= meta.base_year - 100:
                    fail(
                        path + ("existing", i, "retirement_year"),
                        e.retirement_year,
                        "a plausible retirement year",
                    )
            deployment = t.capex.cumulative_deployment
            if isinstance(deployment, dict) and min(deployment.values()) <= 0:
                fail(
                    path + ("capex", "cumulative_deployment"),
                    min(deployment.values()),
                    "cumulative deployment above 0 GW",
                )
    for name, st in tech.storage.items():
        if st.max_duration_hours is not None and st.max_duration_hours < st.min_duration_hours:
            fail(
                ("technologies", "storage", name, "max_duration_hours"),
                st.max_duration_hours,
                "at least min_duration_hours",
            )

    # --- the starting year and the speed of change ----------------------------------------------------------------
    horizon = meta.final_year - meta.base_year
    for kind, group in (
        ("generators", tech.generators),
        ("storage", tech.storage),
        ("converters", tech.converters),
    ):
        for name, t in group.items():
            path = ("technologies", kind, name)
            if t.lead_time_years is not None and t.lead_time_years > horizon:
                fail(
                    path + ("lead_time_years",),
                    t.lead_time_years,
                    f"at most {horizon} years (metadata.final_year - metadata.base_year), so that the technology can "
                    "be built inside the horizon",
                )
            for i, project in enumerate(t.committed):
                where = path + ("committed", i)
                year = project.in_service_year
                if not meta.base_year <= year <= meta.final_year:
                    fail(
                        where + ("in_service_year",),
                        year,
                        f"a year from metadata.base_year {meta.base_year} to metadata.final_year {meta.final_year}",
                    )
                if t.first_build_year is not None and year < t.first_build_year:
                    fail(
                        where + ("in_service_year",),
                        year,
                        f"a year from first_build_year {t.first_build_year} on (or an earlier first_build_year)",
                    )
                if t.phase_out_year is not None and year >= t.phase_out_year:
                    fail(
                        where + ("in_service_year",),
                        year,
                        f"a year before phase_out_year {t.phase_out_year}",
                    )
                if kind != "storage" and project.energy_mwh > 0:
                    fail(
                        where + ("energy_mwh",), project.energy_mwh, "0 (energy capacity is for storage only)"
                    )
                if isinstance(t, Storage) and project.capacity_mw > 0:
                    hours = project.energy_mwh / project.capacity_mw
                    longest = t.max_duration_hours
                    if hours < t.min_duration_hours or (longest is not None and hours > longest):
                        fail(
                            where + ("energy_mwh",),
                            project.energy_mwh,
                            f"energy of {t.min_duration_hours:g} to "
                            f"{'any number of' if longest is None else format(longest, 'g')} hours of the "
                            f"project's capacity_mw ({project.capacity_mw:g} MW; min_duration_hours, "
                            "max_duration_hours)",
                        )
    statistics = s.base_year_statistics
    if statistics is not None:
        generators = sorted(tech.generators)
        for name in statistics.generation_twh:
            if name not in tech.generators:
                fail(
                    ("base_year_statistics", "generation_twh", name),
                    name,
                    f"one of the generators {generators}{did_you_mean(str(name), generators)}",
                )
        for name in statistics.fuel_use_pj:
            known_commodity(("base_year_statistics", "fuel_use_pj", name), name, allow_electricity=False)

    # --- demand ----------------------------------------------------------------------------------------------------
    for name, fd in s.demand.fuels.items():
        for i, commodity in enumerate(fd.served_by):
            known_commodity(("demand", "fuels", name, "served_by", i), commodity, allow_electricity=False)

    # --- policy ----------------------------------------------------------------------------------------------------
    pol = s.policy
    if pol.carbon_budget is not None:
        first = meta.base_year if pol.carbon_budget.first_year is None else pol.carbon_budget.first_year
        last = meta.final_year if pol.carbon_budget.last_year is None else pol.carbon_budget.last_year
        for field_name, year in (("first_year", first), ("last_year", last)):
            if not years[0] <= year <= years[1]:
                fail(("policy", "carbon_budget", field_name), year, f"a year from {years[0]} to {years[1]}")
        if last < first:
            fail(("policy", "carbon_budget", "last_year"), last, f"a year not before first_year {first}")
    for year in pol.emission_caps_mt:
        if not years[0] <= year <= years[1]:
            fail(("policy", "emission_caps_mt", year), year, f"a year from {years[0]} to {years[1]}")
    if isinstance(pol.clean_electricity_share, dict):
        for year, share in pol.clean_electricity_share.items():
            if not 0 <= share <= 1:
                fail(("policy", "clean_electricity_share", year), share, "a share between 0 and 1")
    elif pol.clean_electricity_share is not None and not 0 <= pol.clean_electricity_share <= 1:
        fail(("policy", "clean_electricity_share"), pol.clean_electricity_share, "a share between 0 and 1")

    # --- capacity credits: tranches and credit by duration ----------------------------------------------------------
    for name, g in tech.generators.items():
        path = ("technologies", "generators", name)
        if g.capacity_credit_tranches is None:
            continue
        tranches = g.capacity_credit_tranches
        where = path + ("capacity_credit_tranches",)
        if g.capacity_credit is not None:
            fail(
                path + ("capacity_credit",),
                g.capacity_credit,
                "no fixed capacity_credit beside capacity_credit_tranches",
            )
        if not tranches:
            fail(where, [], "at least one tranche")
        if tranches[-1].up_to_share_of_peak is not None:
            fail(
                where + (len(tranches) - 1, "up_to_share_of_peak"),
                tranches[-1].up_to_share_of_peak,
                "none in the last tranche, so that the tranches cover all capacity that can be built",
            )
        previous_share: float | None = None
        for i, tranche in enumerate(tranches[:-1]):
            tranche_share = tranche.up_to_share_of_peak
            if tranche_share is None:
                fail(
                    where + (i, "up_to_share_of_peak"),
                    None,
                    "a share of peak demand in every tranche but the last",
                )
            if previous_share is not None and tranche_share <= previous_share:
                fail(
                    where + (i, "up_to_share_of_peak"),
                    tranche_share,
                    f"a share above the previous tranche's {previous_share!r}",
                )
            previous_share = tranche_share
        for i in range(1, len(tranches)):
            if tranches[i].credit > tranches[i - 1].credit:
                fail(
                    where + (i, "credit"),
                    tranches[i].credit,
                    f"a credit of at most the previous tranche's {tranches[i - 1].credit!r} (credits fall as more "
                    "is built; rising credits would fill the later tranches first)",
                )
    for name, st in tech.storage.items():
        path = ("technologies", "storage", name)
        table = st.credit_by_duration
        if table is None:
            continue
        if st.capacity_credit is not None:
            fail(
                path + ("capacity_credit",),
                st.capacity_credit,
                "no fixed capacity_credit beside credit_by_duration",
            )
        if not table:
            fail(path + ("credit_by_duration",), {}, "at least one {hours: credit} point")
        points = [(0.0, 0.0), *sorted(table.items())]
        slopes = [(c1 - c0) / (d1 - d0) for (d0, c0), (d1, c1) in zip(points, points[1:], strict=False)]
        for i in range(1, len(slopes)):
            if slopes[i] > slopes[i - 1] + 1e-12 or slopes[i] < 0:
                hours = points[i + 1][0]
                fail(
                    path + ("credit_by_duration", hours),
                    table[hours],
                    "credits that rise with duration ever more slowly, never falling (a concave curve through 0 at "
                    "0 h), so that the firm contribution stays linear",
                )

    if pol.reserve_margin is not None:
        credited = [  # names of the technologies that count toward the reserve margin
            name
            for name, g in tech.generators.items()
            if (g.capacity_credit_tranches is None and (g.capacity_credit is None or g.capacity_credit > 0))
            or any(t.credit > 0 for t in g.capacity_credit_tranches or ())
        ]
        credited += [
            name for name, st in tech.storage.items() if st.capacity_credit is None or st.capacity_credit > 0
        ]
        if not credited:
            fail(
                ("policy", "reserve_margin"),
                pol.reserve_margin,
                "null (no reserve-margin row), or some generator or storage with a capacity credit above 0 to "
                "meet it (a margin of 0 still asks for firm capacity of at least the peak)",
            )

    # --- extensions: the file must exist beside the scenario that names it ---------------------------------------
    for i, extension in enumerate(s.extensions):
        where = ("extensions", i, "file")
        owner = loaded.file_of(where)
        if not (owner.parent / extension.file).is_file():
            fail(where, extension.file, f"an existing Python file (relative to {owner.name})")

    # --- reachability ----------------------------------------------------------------------------------------------
    graph = commodity_graph(s)
    reachable = nx.descendants(graph, SOURCE)
    if ELECTRICITY not in reachable:
        fail(
            ("demand", "electricity"),
            ELECTRICITY,
            "a chain of technologies that can supply electricity (no generator has a fuel that some supply or converter provides)",
        )
    for name, fd in s.demand.fuels.items():
        if not any(c in reachable for c in fd.served_by):
            fail(
                ("demand", "fuels", name, "served_by"),
                fd.served_by,
                "at least one commodity that some chain of supplies and converters can provide",
            )


def commodity_graph(s: Scenario) -> nx.DiGraph:
    """Directed graph: primary supply -> commodity -> ... -> electricity, one edge per technology."""
    graph: nx.DiGraph[str] = nx.DiGraph()
    graph.add_node(SOURCE)
    for name, sup in s.technologies.supplies.items():
        graph.add_edge(SOURCE, sup.output, technology=name)
    for name, g in s.technologies.generators.items():
        graph.add_edge(g.fuel if g.fuel else SOURCE, ELECTRICITY, technology=name)
    for name, c in s.technologies.converters.items():
        graph.add_edge(c.input, c.output, technology=name)
    return graph
