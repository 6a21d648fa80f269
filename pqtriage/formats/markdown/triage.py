"""The Markdown report for the compliance file (GitHub-flavoured Markdown)."""

from __future__ import annotations

import math
from collections.abc import Sequence

from pqtriage import __version__
from pqtriage.formats.bands import (
    BAND_NOTE,
    probability_range,
    start_range,
    system_band,
    year_range,
)
from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.labels import VERDICT_LABEL, flags_text, short_replacement, system_replacement
from pqtriage.formats.notes import (
    CAUTIONS,
    SOURCES,
    assumptions,
    classical_text,
    fact_text,
    fmt_year,
)
from pqtriage.formats.text import markdown_code, markdown_text
from pqtriage.model.verdict import (
    VERDICT_MEANING,
    SystemAssessment,
    TriageResult,
    UseAssessment,
    Verdict,
)

md = markdown_text


def _pct(value: float | None) -> str:
    return "n/a" if value is None else f"{value:.0%}"


def _pct_band(value: float | None, band: object) -> str:
    """'62% (35-62%)': the central value and its 10-90 % band."""
    text = _pct(value)
    extra = probability_range(band)  # type: ignore[arg-type]
    return f"{text} ({extra})" if extra else text


def _start_band(value: object, band: object, as_of: object) -> str:
    text = _start_by(value, as_of)
    extra = start_range(band, as_of)  # type: ignore[arg-type]
    return f"{text} (band {extra})" if extra else text


def _z_band(value: float | None, band: object) -> str:
    text = fmt_year(value)
    extra = year_range(band)  # type: ignore[arg-type]
    return f"{text} ({extra})" if extra else text


def _margin(value: float | None) -> str:
    return "n/a" if value is None else f"{value:+.1f}"


def _date(value: object) -> str:
    return value.isoformat() if value is not None else "n/a"  # type: ignore[attr-defined]


def _start_by(value: object, as_of: object) -> str:
    """A start-by date, marked overdue when it has passed."""
    if value is None:
        return "n/a"
    text = value.isoformat()  # type: ignore[attr-defined]
    if as_of is not None and value <= as_of:  # type: ignore[operator]
        return f"{text} (overdue)"
    return text


def _points(item: SystemAssessment) -> str:
    return "n/a" if item.priority is None else f"{item.priority.points:g}"


def _table(header: Sequence[str], rows: Sequence[Sequence[str]]) -> list[str]:
    lines = ["| " + " | ".join(header) + " |", "|" + "|".join("---" for _ in header) + "|"]
    lines += ["| " + " | ".join(row) + " |" for row in rows]
    return lines


def _algorithm(use: UseAssessment) -> str:
    spec = use.deciding or use.spec
    if spec is None:
        return md(use.use.algorithm)
    if use.deciding is not None and use.spec is not None:
        return f"{md(use.spec.name)} ({md(spec.name)})"
    return md(spec.name)


def _weights(result: TriageResult) -> str:
    weights = result.profile.priority
    criticality = ", ".join(f"{name} {points:g}" for name, points in weights.criticality)
    interception = ", ".join(f"{name} {points:g}" for name, points in weights.interception)
    return (f"{weights.per_percent:g} per percent of exposure probability shown; {weights.per_year_overdue:g} per "
            f"whole year overdue, minus as much per year of margin, capped at {weights.time_cap_years:g} years; "
            f"criticality {criticality}; interception {interception}")


def executive_summary(result: TriageResult) -> list[str]:
    """Counts, what is overdue and what to do first."""
    s = result.summary
    lines = ["## Executive summary", ""]
    lines.append(
        f"The inventory lists {s.systems} systems with {s.uses} cryptographic uses. Systems per verdict: "
        f"{s.counts[Verdict.CLASSICALLY_BROKEN]} classically-broken (broken or not acceptable against classical "
        f"attacks today), {s.counts[Verdict.EXPOSED]} exposed (Mosca's inequality fails at the profile's risk "
        f"tolerance), {s.counts[Verdict.UNASSESSED]} unassessed, {s.counts[Verdict.WITHIN_MARGIN]} within-margin "
        f"(quantum-vulnerable, migration can still finish in time) and {s.counts[Verdict.QUANTUM_RESISTANT]} "
        "quantum-resistant."
    )
    lines.append("")
    if s.overdue:
        lines.append(
            f"{len(s.overdue)} systems are overdue (their latest start date has passed or they are classically-broken): "
            + ", ".join(md(i) for i in s.overdue) + "."
        )
        lines.append("")
    upcoming = sorted(i.start_by for i in result.items if i.start_by and i.start_by > result.as_of)
    if upcoming:
        lines.append(f"Next start-by date still ahead: {upcoming[0].isoformat()}.")
        lines.append("")
    flagged = [i for i in result.items if i.flags]
    if flagged:
        lines.append(f"{len(flagged)} systems carry flags (legacy or deprecated algorithms, weaker methods offered): "
                     + "; ".join(f"{md(i.system.id)}: {md(flags_text(i.flags))}" for i in flagged) + ".")
        lines.append("")
    top = [i for i in result.items if i.verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED)][:5]
    if top:
        lines.append("Migrate first:")
        lines.append("")
        for item in top:
            why = item.weakest.reason if item.weakest else item.reason
            lines.append(f"{item.rank}. {md(item.system.name)} ({md(item.system.id)}): {md(why)}")
        lines.append("")
    return lines


def ranked_table(result: TriageResult) -> list[str]:
    """The ranked table, one row per system (one table per group with --group-by)."""
    selection = result.selection
    if selection is None or selection.group_by is None:
        return _ranked_rows(result, result.items, "## Ranked systems")
    from pqtriage.model.view import groups

    lines = ["## Ranked systems", ""]
    found = groups(result, selection.group_by)
    for index, (label, items) in enumerate(found):
        count = f"{len(items)} system" + ("" if len(items) == 1 else "s")
        lines += _ranked_rows(result, items, f"### {md(selection.group_by)}: {md(label)} ({count})",
                              legend=index == len(found) - 1)
    return lines


def _ranked_rows(result: TriageResult, items: Sequence[SystemAssessment], heading: str,
                 legend: bool = True) -> list[str]:
    rows = []
    for item in items:
        weakest = item.weakest
        rows.append([
            str(item.rank),
            md(item.system.id) + ("\\*" if item.system.assumed else ""),
            _algorithm(weakest) if weakest else "(no uses)",
            md(weakest.use.purpose.value) if weakest else "n/a",
            f"{weakest.x_years:g}" if weakest else "n/a",
            f"{item.system.migration_years:g}",
            _start_band(item.start_by, system_band(item), result.as_of),
            _pct_band(item.exposure_probability, system_band(item)),
            _points(item),
            VERDICT_LABEL[item.verdict],
            md(flags_text(item.flags)) or "none",
            md(short_replacement(system_replacement(item))),
            md(item.rank_reason),
        ])
    lines = [heading, ""]
    lines += _table(
        ["#", "System", "Weakest use", "Purpose", "x (y)", "y (y)", "Start by", "P(exposed)", "Priority",
         "Verdict", "Flags", "Replace with", "Why here"],
        rows,
    )
    lines.append("")
    if not legend:
        return lines
    lines.append("Verdicts: " + "; ".join(f"**{VERDICT_LABEL[v]}**: {VERDICT_MEANING[v]}" for v in Verdict) + ".")
    lines.append("")
    lines.append(
        "Order: verdict first, then priority points (the exposure probability shown in whole percent, plus "
        "one point per whole year past the latest safe date, minus one per year of margin, capped at "
        f"{result.profile.priority.time_cap_years:g}, plus points for criticality and for exposure to "
        "interception); equal points fall back to the probability and margin shown, criticality, exposure and "
        "the id. \"Why here\" names the factor that put a row below the one above it."
    )
    if result.band is not None:
        lines.append("")
        lines.append(BAND_NOTE)
    if any(i.system.assumed for i in result.items):
        lines.append("")
        lines.append("\\* x or y of this system is an assumed default, not a fact from the inventory.")
    lines.append("")
    return lines


def system_detail(item: SystemAssessment, as_of: object = None) -> list[str]:
    """One system: its facts, then each use with its numbers and reason."""
    system = item.system
    lines = [f"### {item.rank}. {md(system.name)}", ""]
    facts = [
        ("Id", markdown_code(system.id)),
        ("Verdict", f"{VERDICT_LABEL[item.verdict]} ({md(item.reason)})"),
        ("Place", f"{item.rank}: {md(item.rank_reason)}"),
        ("Priority points", md(item.priority.text()) if item.priority else "n/a"),
        ("Flags", md(flags_text(item.flags)) or "none"),
        ("Shelf-life x", f"{system.shelf_life_years:g} years" + (" (assumed)" if "shelf_life_years" in system.assumed else "")),
        ("Migration y", f"{system.migration_years:g} years" + (" (assumed)" if "migration_years" in system.assumed else "")),
        ("Exposure probability", _pct_band(item.exposure_probability, system_band(item))),
        ("Margin", _margin(item.margin_years) + " years"),
        ("Start by", _start_band(item.start_by, system_band(item), as_of)),
        ("Criticality / exposure", f"{system.criticality.value} / {system.exposure.value}"),
    ]
    if system.owner:
        facts.append(("Owner", md(system.owner)))
    if system.depends_on:
        facts.append(("Depends on", ", ".join(markdown_code(d) for d in system.depends_on)))
    if system.description:
        facts.append(("Description", md(system.description)))
    if system.notes:
        facts.append(("Notes", md(system.notes)))
    if system.source:
        facts.append(("Source", markdown_code(str(system.source))))
    lines += [f"- {name}: {value}" for name, value in facts]
    lines.append("")
    rows = []
    for use in item.uses:
        spec = use.deciding or use.spec
        bits = f"{spec.classical_bits} bits" if spec and spec.classical_bits is not None else "bits n/a"
        rows.append([
            _algorithm(use),
            md(use.use.purpose.value),
            md(use.use.role),
            md(f"{classical_text(use.classical)}, {bits}") if use.classical else "n/a",
            spec.quantum_attack if spec else "n/a",
            f"{use.x_years:g}",
            _z_band(use.crqc_year, use.band),
            _pct_band(use.exposure_probability, use.band),
            _margin(use.margin_years),
            VERDICT_LABEL[use.verdict] + (f" + {md(flags_text(use.flags))}" if use.flags else ""),
            md(use.replacement or "none needed" if use.verdict != Verdict.UNASSESSED else "check by hand"),
            md(use.reason),
            markdown_code(str(use.use.source)) if use.use.source else "n/a",
        ])
    if rows:
        lines += _table(
            ["Algorithm", "Purpose", "Role", "Classical status", "Quantum attack", "x", "z", "P(exposed)",
             "Margin", "Verdict", "Replacement", "Reason", "Source"],
            rows,
        )
        lines.append("")
        lines.append("Facts each use rests on (origin and place):")
        lines.append("")
        for number, use in enumerate(item.uses, start=1):
            facts_line = "; ".join(md(fact_text(fact)) for fact in use.facts) or "none recorded"
            lines.append(f"{number}. {md(use.use.algorithm)}: {facts_line}")
        lines.append("")
    notes = sorted({a for use in item.uses for a in use.assumptions})
    if notes:
        lines.append("Assumptions for this system: " + "; ".join(md(n) for n in notes) + ".")
        lines.append("")
    return lines


def method_section(result: TriageResult) -> list[str]:
    """Mosca's inequality, how z is set, and the arrivals used."""
    profile = result.profile
    lines = ["## Method", ""]
    lines.append(
        "Mosca's inequality: a use is exposed when x + y > z, where x is how long the protected data "
        "(or a signature) must stay secure, y is the time to migrate the system, and z is the time until "
        "a cryptographically relevant quantum computer (CRQC) breaks the algorithm "
        "(IEEE Security & Privacy 16(5), 2018; IACR ePrint 2015/1075)."
    )
    lines.append("")
    if profile.deterministic:
        lines.append(f"z is fixed by a what-if: a CRQC on 1 January {profile.crqc_year}.")
    else:
        lines.append(
            f"z comes from the threat profile '{md(profile.name)}': the probability distribution of the "
            f"year the reference task ({md(profile.reference_task)}) is first achieved, conditioned on it "
            f"not having happened by {result.as_of.isoformat()}. The exposure probability of a use is "
            "P(z < today + x + y); z at the risk tolerance "
            f"({profile.risk_tolerance:.0%}) gives the margin (z - today - x - y, negative means overdue) and "
            "the latest start date (z - x - y)."
        )
    lines.append("")
    lines.append(f"Per-algorithm arrival: {md(result.arrival_model)}.")
    lines.append("")
    lines.append(
        "Ranking: classical breakage first, then the other verdicts; within a verdict, priority points "
        f"({md(_weights(result))}); the system id breaks remaining ties. A system's verdict is that of its "
        "weakest use in use; an offered use that is classically broken makes the system classically-broken, "
        "a weaker offered one is a downgrade flag. Verdicts and the ranking use the central values; the bands "
        "in parentheses are not used for ordering."
    )
    lines.append("")
    lines.append(
        "Classical status by date: the rules of NIST SP 800-131A Rev. 2 (2019) on the as-of date, and of the "
        "DRAFT NIST SP 800-131A Rev. 3 (October 2024) for the dates it sets later; disallowed or broken makes "
        "a use classically-broken, legacy or deprecated is a flag beside the verdict."
    )
    if result.band is not None:
        lines.append("")
        lines.append(f"Uncertainty: {md(result.band.describe())}")
    lines.append("")
    if result.arrivals:
        lines.append("Arrivals used (z at the risk tolerance, per algorithm, and the shift against the "
                     "reference task with its basis):")
        lines.append("")
        lines += _table(
            ["Algorithm", "z (year)", "Shift (years)", "Basis"],
            [[md(a.algorithm), fmt_year(a.crqc_year),
              "beyond horizon" if math.isinf(a.shift_years) else f"{a.shift_years:+.1f}", md(a.basis)]
             for a in result.arrivals],
        )
        lines.append("")
    return lines


def render_report(result: TriageResult, extra_sections: Sequence[str] = ()) -> str:
    """The whole report. Same inputs and --as-of give the same bytes."""
    inv = result.inventory
    lines = [f"# Post-quantum migration triage: {md(inv.organization)}", ""]
    lines += _table(
        ["Field", "Value"],
        [
            ["As of", result.as_of.isoformat()],
            ["Inventory", markdown_code(inv.source_path or "n/a")],
            ["Inventory SHA-256", markdown_code(inv.source_sha256 or "n/a")],
            ["Tool", f"pqtriage {__version__}"],
            ["Threat profile", f"{md(result.profile.name)} ({md(result.profile.source)})"],
            ["Risk tolerance", f"{result.profile.risk_tolerance:.0%}"],
        ],
    )
    lines.append("")
    lines.append("> **Caution.** " + md(CAUTIONS[0]) + " " + md(CAUTIONS[2]))
    lines.append("")
    if result.selection is not None:
        lines.append("> **View.** " + md(result.selection.describe()))
        lines.append("")
    lines += executive_summary(result)
    lines += ranked_table(result)
    lines += ["## System detail", ""]
    for item in result.items:
        lines += system_detail(item, result.as_of)
    for section in extra_sections:
        lines += [section.rstrip("\n"), ""]
    lines += method_section(result)
    lines += ["## Assumptions", ""]
    lines += [f"- {md(a)}" for a in assumptions(result)]
    if inv.warnings:
        lines += [f"- Input warning: {md(w)}" for w in inv.warnings]
    lines.append("")
    lines += ["## Cautions", ""]
    lines += [f"- {md(c)}" for c in CAUTIONS]
    lines.append("")
    lines += ["## Sources", ""]
    lines += [f"- {md(s)}" for s in SOURCES]
    if result.profile.source:
        lines.append(f"- Threat profile: {md(result.profile.source)}")
    lines.append("")
    return "\n".join(lines)


class MarkdownFormat(ResultFormat):
    """GitHub-flavoured Markdown report."""

    name = "markdown"

    def render(self, result: TriageResult) -> str:
        return render_report(result)
