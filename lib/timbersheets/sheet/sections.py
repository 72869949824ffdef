"""The calc sheet's content, section by section, for one member.

A template notebook calls these in order; each returns a :class:`Block` that
shows as Markdown in JupyterLab and as LaTeX in the PDF. Every number comes from
the member's :class:`~timbersheets.engineering.design.MemberDesign`, the same objects that
write results.json, so a sheet cannot disagree with the verdict.
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import Any

from ..constants import CAUTION, RESULT_MIME, TITLE_NOTE_CHARS
from ..engineering.calc import format_number, format_value, unit_latex, unit_text
from ..engineering.checks import CheckResult
from ..engineering.data import DataSet
from ..engineering.design import MemberDesign, effects_of
from ..engineering.loads import EFFECT_UNITS, EFFECTS, KD_SYMBOLS, LOAD_TYPES, kd_permanent
from ..engineering.membertypes import MemberType, member_type
from ..engineering.sizing import design_sized
from ..engineering.units import to_display
from ..schedule.read import Member
from .blocks import Block, caption_para, heading, math_block, para, q, table
from .symbols import ACTION_WORDS, meaning, symbol_latex, symbol_unit
from .tabled import SHARED_TABLE_CHECKS, checks_by_name, interaction_joins, serviceability, shared_table_checks
from .tex import Cell, Table, escape, md_escape

LOAD_NAMES = {"D": "Dead", "L": "Live (use and occupancy)", "S": "Snow (with rain)", "W": "Wind", "E": "Earthquake"}
EFFECT_NAMES = {"P": "P", "w": "w", "M": "M", "V": "V", "F": "F"}
# Heavier sections that also pass, listed on a sheet below the chosen one (results.json and `size` give
# all the search kept): they are alternatives, not part of the chosen section's check, and two more
# rows pushed a sized tension member's last lines onto a third page.
SHEET_RUNNERS_UP = 3


class Sheet:
    """The sections of one member's calc sheet."""

    def __init__(self, design: MemberDesign, data: DataSet, codes: dict[str, str]) -> None:
        self.design = design
        self.data = data
        self.codes = codes

    @classmethod
    def from_params(cls, member: dict[str, Any], codes: dict[str, str], materials: str = "") -> "Sheet":
        """Rebuild the member from notebook parameters and design it."""
        data = DataSet(Path(materials) if materials else None)
        design = design_sized(Member.from_params(member), data)
        return cls(design, data, codes)

    @property
    def m(self) -> Member:
        assert self.design.member is not None
        return self.design.member

    @property
    def kind(self) -> MemberType:
        return member_type(self.m.type)

    # 1 -------------------------------------------------------------------------
    def member_section(self) -> Block:
        m, d = self.m, self.design
        section = d.context.section if d.context else None if m.size == "auto" else m.section
        size = (Cell(self._size_latex(section), self._size_text(section)) if section is not None
                else "auto: not sized (see section 5)")
        if section is not None and m.size == "auto":
            size = Cell("chosen by the search (schedule size = auto): " + size.latex, "auto: " + size.markdown)
        rows: list[list[object]] = [
            ["Type", f"{m.type} member (schedule row {m.row})"],
            ["Material", d.context.strengths.description if d.context else f"{m.species} {m.grade} {m.material}"],
            ["Size", size],
            ["Service condition", Cell(f"{m.service}; $K_T = {format_number(m.K_T)}$, $K_H = {format_number(m.K_H)}$ "
                                       "from the schedule", f"{m.service}; K_T = {m.K_T:g}, K_H = {m.K_H:g}")],
        ]
        if self.kind.shows("span") and section is not None:
            from .beamsheet import member_rows

            rows += member_rows(m, section, {c.check for c in d.checks} if not d.errors else None)
        if section is not None:
            length, net_area = self._axial_rows(m, section)
            rows += [row for name, row in (("length", length), ("net-area", net_area)) if self.kind.shows(name)]
        if m.entered:
            rows.append(["As entered", entered_cell(m)])
        if len(m.note or "") > TITLE_NOTE_CHARS:  # a shorter note is whole in the title block
            rows.append(["Note", m.note])
        return heading("Member") + table(Table(["Item", "Value"], rows, "lX"))

    @staticmethod
    def _axial_rows(m, section) -> list[list[object]]:
        return [
            ["Length", Cell(f"$L = {format_value(m.length, 'mm')}$; $K_e = {format_number(m.Ke)}$; "
                            f"$L_x = {format_value(m.Lx, 'mm')}$, $L_y = {format_value(m.Ly, 'mm')}$",
                            f"L = {m.length:g} mm; Ke = {m.Ke:g}; Lx = {m.Lx:g} mm, Ly = {m.Ly:g} mm")],
            ["Net area", Cell(f"$A_n = {format_number(m.net_area)}\\,A_g = {format_value(section.A * m.net_area, 'mm**2')}$",
                              f"A_n = {m.net_area:g} A_g")],
        ]

    @staticmethod
    def _size_latex(s) -> str:
        plies = f"{s.plies} plies of " if s.plies > 1 else ""
        return (f"{plies}${format_number(s.ply_b, 'mm')} \\times {format_number(s.d, 'mm')}$ mm; "
                f"$b = {format_value(s.b, 'mm')}$, $d = {format_value(s.d, 'mm')}$, "
                f"$A_g = {format_value(s.A, 'mm**2')}$, $S_x = {format_value(s.S_x, 'mm**3')}$, "
                f"$I_x = {format_value(s.I_x, 'mm**4')}$")

    @staticmethod
    def _size_text(s) -> str:
        return f"{s.label} mm; b = {s.b:g} mm, d = {s.d:g} mm, A = {s.A:g} mm²"

    def sizing_section(self) -> Block:
        """For size = auto: the search, the chosen section and the runners-up."""
        sz = self.design.sizing
        if sz is None:
            return Block("", "")
        from ..job.results import round_utilization

        def row(c, word):
            u = "--" if c.utilization == float("inf") else f"{round_utilization(c.utilization):.3f}"
            return [c.label, Cell(f"${format_number(c.section.A, 'mm**2')}$", format_number(c.section.A, "mm**2")),
                    Cell(f"${u}$", u), c.governing, word]

        rows = []
        if sz.chosen is not None:
            rows.append(row(sz.chosen, "chosen"))
        heavier = 0  # the sheet lists the next SHEET_RUNNERS_UP that pass; results.json has them all
        for c in sz.runners_up:
            if sz.chosen is not None and c.section.A < sz.chosen.section.A:
                rows.append(row(c, f"lighter; passed over for prefer = {self.m.prefer}"))
            elif heavier < SHEET_RUNNERS_UP:
                rows.append(row(c, "runner-up"))
                heavier += 1
        if sz.chosen is None and sz.best is not None:
            rows.append(row(sz.best, "best reached; does not pass"))
        words = (f"Size = auto: the catalogue's standard sections ({escape(self.m.material)} {escape(self.m.grade)}) "
                 f"were searched lightest first (least area, then least depth) under every check and combination; "
                 f"{sz.searched} were tried{'; constraints: ' + escape(sz.constraints) if sz.constraints else ''}."
                 f"{f' Below, the chosen one and the next {heavier} that pass.' if heavier else ''}")
        if sz.chosen is None:
            words += " No standard section passes; the sheet shows the best one found."
        return heading("Sizing", 2) + para(words) + table(Table(
            ["Size", "Area", "Utilization", "Governing", ""], rows, "lrrXl", ["mm", "mm²", "", "", ""]))

    # 2 -------------------------------------------------------------------------
    def present_effects(self) -> list[str]:
        ctx = self.design.context
        return effects_of(ctx.member if ctx else self.m).present()  # with the own weight the tool adds

    def loads_section(self) -> Block:
        m = self.m
        effects = self.present_effects()
        header = ["Load", "Symbol", *[Cell.math(EFFECT_NAMES[e]) for e in effects], "Duration class"]
        units = ["", "", *[unit_text_of(e) for e in effects], ""]
        rows = []
        from ..engineering.loads import DURATION_CLASS

        specified = effects_of(m)
        for t in LOAD_TYPES:
            if any(specified.get(e, t) for e in effects):
                rows.append([LOAD_NAMES[t], Cell.math(t), *[q(specified.get(e, t), EFFECT_UNITS[e]) for e in effects],
                             DURATION_CLASS[t] + " term"])
            if t == "D":
                rows += self.own_weight_rows(effects)
        sense = ("Line loads act downward, negative values upward (uplift); moments and shears are the frame "
                 "model's." if self.kind.axial is None else
                 "Positive $P$ acts in the member's sense: tension for a tension member, else compression.")
        weight = self.design.context.own_weight if self.design.context else None
        own = ("the own weight is added to D as its own line (worked below)." if weight else
               "the schedule's dead load includes the member's own weight (self_weight = no); the tool adds none.")
        intro = para("Specified loads from the schedule, importance factors included (NBC "
                     f"{escape(self.codes.get('nbc', '2020'))} Part 4); {escape(own)} {sense}")
        from .modelsheet import loads_block

        out = heading("Specified loads") + intro + table(Table(header, rows, "ll" + "r" * len(effects) + "l", units))
        return out + self.own_weight_block(weight, "F" in effects) + loads_block(m)

    def own_weight_rows(self, effects: list[str]) -> list[list[object]]:
        """The own weight's row: what it adds to each effect the table shows, as the design took it (the
        member with its own weight against the schedule's row): its w on a beam, its P on an axial member,
        its share of the total F on a beam model."""
        ctx = self.design.context
        if ctx is None or ctx.own_weight is None:
            return []
        with_weight, schedule = effects_of(ctx.member), effects_of(self.m)
        added = {e: with_weight.get(e, "D") - schedule.get(e, "D") for e in effects}
        if not any(added.values()):
            return []
        cells = [q(v, EFFECT_UNITS[e]) if v else "" for e, v in added.items()]
        return [["Own weight (in D)", Cell.math("D"), *cells, "long term"]]

    def own_weight_block(self, weight, totalled: bool = False) -> Block:
        """The own weight worked out: its line load, then what the loads table gives of it (an axial
        member's P at the base; with `totalled`, a beam model's F: the line over the model's length)."""
        if weight is None:
            return Block("", "")
        from ..engineering.ownweight import own_weight_line, own_weight_on_model, own_weight_total

        d = weight.density
        where = ("a uniform line load on the span" if weight.effect == "w" else
                 "axial load at the base: the whole weight, on the safe side of the weight above the critical section")
        out = para(f"Own weight, as {escape(where)}; density $\\rho$ of {escape(self.m.material)} "
                   f"{escape(self.m.species)} in {escape(self.m.service)} service from densities.csv "
                   f"({escape(d.table or 'table number not recorded')}; {escape(d.source)}; {escape(d.status)}); "
                   "$g$ = 9.81 N/kg:")
        out += math_block(own_weight_line.latex(weight.line))
        if weight.total is not None:
            out += math_block(own_weight_total.latex(weight.total))
        elif totalled and weight.effect == "w":
            from ..engineering.beamdesign import geometry_of

            length = geometry_of(self.design.context.member).length
            out += para("On the whole model, ends and overhangs included ($L$), the own weight's row of the table:")
            out += math_block(own_weight_on_model.latex(own_weight_on_model(w_sw=weight.value, L=length)))
        return out

    # 3 -------------------------------------------------------------------------
    def combinations_section(self) -> Block:
        d = self.design
        effects = self.present_effects()
        header = ["NBC case", "Combination", *[Cell.math(f"{EFFECT_NAMES[e]}_f") for e in effects], Cell.math("K_D"),
                  Cell("Basis of $K_D$", "Basis of K_D")]
        units = ["", "", *[unit_text_of(e) for e in effects], "", ""]
        rows = []
        for case in d.cases:
            rows.append([case.combination.id, case.label, *[q(case.factored[e], EFFECT_UNITS[e]) for e in effects],
                         Cell(f"${format_number(case.K_D)}$", format_number(case.K_D)), basis_cell(case.basis)])
        # the 5.3.2.3 rule is named where it can apply: a combination with L or S principal
        standard = any(case.combination.principal in ("L", "S") for case in d.cases)
        intro = para(f"ULS combinations of NBC {escape(self.codes.get('nbc', '2020'))} Table 4.1.3.2.-A by its "
                     "case numbers: each principal load with and without companions, 0.9D only where a load "
                     "opposes the dead load, repeats left out. $K_D$ by the principal load's duration class "
                     "(CSA O86-14 5.3.2, Table 5.1), one per combination" + (
                         "; with L or S principal, each effect that carries L or S is tested by 5.3.2.3 and the "
                         "lowest value used (dead load alone is checked in 1.4D, $K_D = 0.65$)." if standard else "."),
                     "ULS load combinations of NBC Table 4.1.3.2.-A; K_D by the principal load (CSA O86 5.3.2), one "
                     "value per combination.")
        if self.m.live_use == "storage" and any(self.m.values[f"{e}_L"] for e in EFFECTS):
            storage = ("Storage live load (live_use = storage): every companion 0.5L is raised to 1.0L (the NBC "
                       "4.1.3.2 note on storage areas, equipment areas and service rooms; recorded from memory), and "
                       "the live load is long-term load in K_D, as O86 Table 5.1 classes storage loads: 0.65 where L "
                       "is the principal load, and L counted in the long-term part X_lt elsewhere.")
            intro += para(escape(storage), storage)
        if any(self.m.values[f"{e}_{t}"] for e in EFFECTS for t in ("W", "E")):
            senses = ("Wind and earthquake act in both senses (wind_sense = both): every combination with W or E "
                      "is applied as the schedule gives the load (+) and reversed (−), with 0.9D where the reversed "
                      "load opposes the dead load." if self.m.wind_sense != "one-way" else
                      "Wind and earthquake act only in the sense the schedule gives (wind_sense = one-way).")
            intro += para(escape(senses), senses)
        out = heading("Load combinations") + intro + table(
            Table(header, rows, "rl" + "r" * len(effects) + "rX", units))
        reduced = [case for case in d.cases if case.kd_values]
        if reduced:  # the rule once, then each combination's K_D (a few lines each, not a paragraph)
            words = "; ".join(f"${symbol_latex(k)}$ is {v}" for k, v in KD_SYMBOLS.items())
            out += para("Where the long-term (dead) part exceeds the standard-term part, $K_D$ follows CSA O86-14 "
                        f"5.3.2.3 ({words}; named anew, as O86's letters are the schedule's load columns).")
        # combinations with the same parts on the same effect have the same K_D: worked once for them all
        alike: dict[tuple, list] = {}
        for case in reduced:
            key = (case.kd_effect, case.kd_values["X_lt"], case.kd_values["X_st"])
            alike.setdefault(key, []).append(case)
        for same in alike.values():
            case = same[0]
            unit = EFFECT_UNITS[case.kd_effect]
            latex = kd_permanent.latex(case.kd_values, units={"X_lt": unit, "X_st": unit})
            labels = [escape(c.label) for c in same]
            named = labels[0] if len(labels) == 1 else ", ".join(labels[:-1]) + " and " + labels[-1]
            out += para(f"For {named}{' (the same parts)' if len(same) > 1 else ''}, on ${case.kd_effect}$:")
            out += math_block(latex)
        if self.kind.shows("forces"):
            from .beamsheet import forces_block

            out += forces_block(d)
        return out

    def diagram(self) -> list[object]:
        """Bending members: the shear and moment diagram of the governing combination (else nothing)."""
        from .beamsheet import diagram

        return diagram(self.design) if self.kind.shows("diagram") else []

    def serviceability_section(self) -> Block:
        """Bending members: the SLS combinations used for deflection, with their sources."""
        from .beamsheet import serviceability_block

        return serviceability_block(self.design, self.data) if self.kind.shows("serviceability") else Block("", "")

    # 4 -------------------------------------------------------------------------
    def factors_section(self) -> Block:
        d = self.design
        rows = []
        seen: set[str] = set()
        for datum in d.data_used:
            if datum.symbol in seen or datum.label.startswith(("NBC combination", "SLS combination")) \
                    or datum.symbol == "K_D":
                continue
            seen.add(datum.symbol)
            unit = "MPa" if datum.symbol.startswith(("f_", "E")) else symbol_unit(datum.symbol)
            value = format_number(datum.value, unit) + (f"\\ {unit_latex(unit)}" if unit else "")
            where = f"{datum.table}; firm file {datum.firm}" if datum.firm else datum.table
            status = datum.status_text + (f"; firm value, built-in {datum.builtin:g}" if datum.builtin is not None else "")
            rows.append([Cell.math(symbol_latex(datum.symbol)), Cell(f"${value}$", value),
                         meaning(datum.symbol) or datum.label, where, status])
        m = self.m
        # the factors the schedule gives are in the member table (section 1): named here in a few words
        given = (("K_H", m.K_H), ("K_T", m.K_T)) + ((("K_e", m.Ke),) if self.kind.shows("length") else ())
        named = [(f"${symbol_latex(n)}$ ({meaning(n)})", f"${symbol_latex(n)}$ ({meaning(n)})") for n, _ in given]
        words = ", ".join(t for t, _ in named[:-1]) + " and " + named[-1][0]
        intro = para(f"Strengths for {escape(d.context.strengths.description) if d.context else ''} and the "
                     "factors the checks use, with their sources; " + words + " are the schedule's "
                     "(section 1). Unverified values were recorded from memory or secondary sources "
                     "(lib/timbersheets/data/README.md), to be checked against the standard.")
        return heading("Material and modification factors") + intro + table(
            Table(["Symbol", "Value", "Meaning", "Source", "Data status"], rows, "lrWNl"))

    # 5 -------------------------------------------------------------------------
    def checks_section(self) -> Block:
        d = self.design
        out = heading("Checks")
        if d.errors:
            items = "".join(f"\\item {escape(e)}\n" for e in d.errors)
            return out + Block(f"\\begin{{itemize}}\n{items}\\end{{itemize}}\n",
                               "".join(f"- {md_escape(e)}\n" for e in d.errors))
        governing = d.governing_by_check()
        cases = checks_by_name(d)
        shared = shared_table_checks(cases)
        pair = [cases.get(n, []) for n in ("deflection-live", "deflection-total")]
        together = all(len(p) == 1 and not p[0].where for p in pair) and \
            pair[0][0].steps[0].values["E_S"] == pair[1][0].steps[0].values["E_S"]
        for name, gov in governing.items():
            if together and name.startswith("deflection"):
                if name == "deflection-live":
                    out += self._deflection_block(pair[0][0], pair[1][0])
                continue
            joins = name == "interaction" and interaction_joins(cases, shared)
            out += self._check_block(name, gov, cases[name], tabled=name not in shared and not joins)
        if shared:
            # the heading keeps with the table's header and first rows (a breaking table starts on a new
            # page when those do not fit, which would leave the heading alone)
            out += Block("\\tsneedspace{9\\baselineskip}\n", "") + heading("Every combination", 2)
            names = list(shared)
            interaction = cases["interaction"] if interaction_joins(cases, shared) else None
            for k in range(0, len(names), SHARED_TABLE_CHECKS):
                out += self._shared_table([cases[n] for n in names[k:k + SHARED_TABLE_CHECKS]], governing,
                                          interaction if k == 0 else None)
        return out

    @staticmethod
    def _shared_table(columns: list[list[CheckResult]], governing: dict[str, CheckResult],
                      interaction: list[CheckResult] | None = None) -> Block:
        """One row per combination: K_D, then each check's effect, resistance and utilization (with
        `interaction`, its value last: the utilization of a limit of 1.0)."""
        header: list[object] = ["Combination", Cell.math("K_D")]
        units: list[object] = ["", ""]
        for results in columns:
            gov = governing[results[0].check]
            header += [Cell.math(gov.demand_symbol_latex), Cell.math(gov.resistance_symbol_latex),
                       Cell(f"${gov.demand_symbol_latex}/{gov.resistance_symbol_latex}$",
                            f"{gov.demand_symbol}/{gov.resistance_symbol}")]
            units += [unit_text(gov.unit), unit_text(gov.unit), ""]
        by_check = [{c.combination: c for c in results} for results in columns]
        combined = {c.combination: c for c in interaction or []}
        if interaction:
            gov = governing[interaction[0].check]
            header.append(Cell(f"${gov.demand_symbol_latex}$", gov.demand_symbol))
            units.append("")
        rows = []
        for label in dict.fromkeys(c.combination for results in columns for c in results):
            row = [checked.get(label) for checked in by_check]
            cells: list[object] = [label, kd_cell(next(c for c in row if c is not None))]
            for c in row:  # a check not made under this combination (no uplift at a bearing): a dash
                cells += ([num(c.demand, c.unit), num(c.resistance, c.unit), util_cell(c.utilization)]
                          if c is not None else [Cell("--", "–")] * 3)
            if interaction:  # not made where the combination gives no moment or no axial force
                cells.append(util_cell(combined[label].utilization) if label in combined else Cell("--", "–"))
            rows.append(cells)
        return table(Table(header, rows, "l" + "r" * (len(header) - 1), units))

    def _check_block(self, name: str, gov: CheckResult, all_cases: list[CheckResult], tabled: bool = True) -> Block:
        out = heading(f"{ACTION_WORDS.get(name, name)} ({gov.clause})", 2)
        shown = branches(name, all_cases)
        for result in shown:
            kd = ("specified loads; $K_D$ does not apply to stiffness" if serviceability(result)
                  else f"$K_D = {format_number(result.K_D)}$")
            branch = (("Negative moment (bottom edge in compression)" if result.demand < 0 else
                       "Positive moment (top edge in compression)") + ", shown in full for the combination that "
                      "governs it" if len(shown) > 1 else "Shown in full for the governing combination")
            at = f" at {escape(result.where)}" if result.where else ""
            alone = tabled and len(all_cases) == 1  # a one-row table would repeat the lines above it
            if alone:
                branch = "Shown in full for its one combination"
            listed = "" if alone else "; every combination is " + (
                "listed after" if tabled else "in the table that ends section 5")
            intro = f"{branch} {escape(result.combination)}{at} ({kd}){listed}."
            for k, step in enumerate(result.steps):
                caption = (f"\\emph{{{caption_latex(step.caption)}}}", f"*{md_escape(step.caption)}*") \
                    if step.caption else ("", "")
                if k == 0:  # the first caption runs on after the intro: one paragraph, not two short ones
                    out += caption_para(f"{intro} {caption[0]}".strip(), f"{intro}\n\n{caption[1]}".strip())
                elif step.caption:
                    out += caption_para(*caption)
                out += math_block(step.latex())
            if not result.steps:
                out += para(intro)
            out += math_block(self._utilization_latex(result))
        if not tabled or len(all_cases) == 1:
            return out
        unit = gov.unit
        header = ["Combination", Cell.math("K_D"), Cell.math(gov.demand_symbol_latex),
                  Cell.math(gov.resistance_symbol_latex), "Utilization"]
        if name == "interaction":
            header[2:4] = [Cell(f"Interaction ${gov.demand_symbol_latex}$", "Interaction"), "Limit"]
        units = ["", "", unit_text(unit), unit_text(unit), ""]
        placed = any(c.where for c in all_cases)
        listed = governing_places(all_cases) if placed else all_cases
        rows = [[c.combination, kd_cell(c), num(c.demand, unit), num(c.resistance, unit), util_cell(c.utilization)]
                for c in listed]
        if placed:  # a beam model: each combination at the place that governs it (a moment: of each sign)
            header.insert(1, "Where")
            units.insert(1, "")
            for row, c in zip(rows, listed):
                row.insert(1, c.where)
            if len(listed) < len(all_cases):
                sign = " (positive and negative moment apart)" if name == "bending" else ""
                out += caption_para(f"Each combination at the place that governs it{sign}; "
                                    f"{len(all_cases)} places and combinations were checked, and results.json "
                                    "lists every one:")
            return out + table(Table(header, rows, "lXrrrr", units))
        return out + table(Table(header, rows, "lrrrr", units))

    def _deflection_block(self, live: CheckResult, total: CheckResult) -> Block:
        """Both deflection checks, each made under its one SLS combination, under one heading: the stiffness
        E_S they share worked once, then each deflection against its limit."""
        out = heading(f"Deflection under live and total load ({live.clause})", 2)
        out += caption_para("Each shown in full for its one combination (specified loads; $K_D$ does not apply "
                            "to stiffness), with the stiffness both use:")
        for k, result in enumerate((live, total)):
            step = result.steps[0]
            if k == 0:
                out += math_block(step.calc.latex_lines(step.values, names=("E_S",)))
            out += caption_para(f"\\emph{{{caption_latex(step.caption)}}}", f"*{md_escape(step.caption)}*")
            out += math_block(step.calc.latex_lines(step.values, names=("Delta", "Delta_lim")))
            out += math_block(self._utilization_latex(result))
        return out

    @staticmethod
    def _utilization_latex(c: CheckResult) -> str:
        from ..job.results import round_utilization

        u = round_utilization(c.utilization)
        relation = r"\le 1.0\ \text{(passes)}" if c.utilization <= 1.0 else r"> 1.0\ \text{(does not pass)}"
        if c.check == "interaction":
            return f"$${c.demand_symbol_latex} = {u:.3f} {relation}$$"
        demand = f"{format_number(c.demand, c.unit)}\\ {unit_latex(c.unit)}"
        resistance = f"{format_number(c.resistance, c.unit)}\\ {unit_latex(c.unit)}"
        return (f"$$\\frac{{{c.demand_symbol_latex}}}{{{c.resistance_symbol_latex}}} = "
                f"\\frac{{{demand}}}{{{resistance}}} = {u:.3f} {relation}$$")

    # 6 -------------------------------------------------------------------------
    def summary_section(self) -> Block:
        d = self.design
        out = heading("Summary")
        if d.errors:
            verdict = "NOT DESIGNED"
            lines = ["The member could not be designed as described; see section 5."]
        else:
            from ..job.results import round_utilization

            rows = [[ACTION_WORDS.get(c.check, c.check), c.combination, kd_cell(c), util_cell(c.utilization)]
                    for c in d.governing_by_check().values()]
            if len(rows) > 1:  # with one check, its one row would say what the verdict box says
                out += table(Table(["Check", "Governing combination", Cell.math("K_D"), "Utilization"], rows, "llrr"))
            gov = d.governing
            verdict = "PASSES" if d.status == "pass" else "DOES NOT PASS"
            lines = [f"Governing check: {ACTION_WORDS.get(gov.check, gov.check).lower()}",
                     f"Combination: {gov.combination}",
                     f"Utilization: {round_utilization(gov.utilization):.3f}"]
        # the utilization beside the verdict, the governing check and combination on one line under it if they fit
        beside = f"\\quad\\mbox{{{escape(lines[-1])}}}" if not d.errors else ""
        body = "\\quad\n".join(f"\\mbox{{{escape(x)}}}" for x in (lines if d.errors else lines[:-1]))
        return out + Block(
            f"\\begin{{verdictbox}}\n{{\\Large {verdict}}}{beside}\\\\[2pt]\n{body}\n\\end{{verdictbox}}\n",
            f"> **{verdict}**  \n> " + "  \n> ".join(md_escape(x) for x in lines) + "\n")

    def cautions(self) -> Block:
        warnings = self.design.data_warnings
        listing = ""
        md = ""
        if warnings:
            from .cautions import unverified_listing

            described = frozenset(d.symbol for d in self.design.data_used if d.symbol != "K_D" and not
                                  d.label.startswith(("NBC combination", "SLS combination")))  # in the factor table
            listing, md = unverified_listing(self.design.data_used, described)
        source, extra, extra_md = self._data_note()
        listing, md = extra + listing, extra_md + md
        codes = (f" Designed to CSA O86:{escape(self.codes.get('o86', '2019'))[-2:]} with loads combined per "
                 f"NBC~{escape(self.codes.get('nbc', '2020'))} Part~4.")
        from ..engineering.edition import revision_notes

        revised = revision_notes(self.design)
        clauses = (" Methods, clause numbers and tables follow CSA O86-14 (each data value names its edition)"
                   + ("; those O86:19 is known to have revised are listed below." if revised else "."))
        notes = ""
        if revised:
            notes += _listed(("Earlier (O86-14) form used where O86:19 revised the clause; verify it:",
                              "Earlier (O86-14) forms used where O86:19 revised the clause; verify them:"), revised)
            md += "\n\nEarlier (O86-14) forms used where O86:19 revised the clause:\n" + "".join(
                f"- {md_escape(r)}\n" for r in revised)
        if self.design.warnings:
            notes += _listed(("Note on this member:", "Notes on this member:"), self.design.warnings)
            md += "\n\nNotes:\n" + "".join(f"- {md_escape(w)}\n" for w in self.design.warnings)
        return Block(f"\\begin{{cautionbox}}\n{escape(CAUTION)}{codes}{escape(clauses)}{escape(source)}\n{notes}"
                     f"{listing}\\end{{cautionbox}}\n",
                     f"**Caution.** {md_escape(CAUTION)}{md_escape(source)}{md}\n")

    def _data_note(self) -> tuple[str, str, str]:
        """Which data the sheet used (the firm file: name, hash, checkers) and the firm's corrections."""
        firm, values = self.data.firm, self.design.data_values
        supplied = sum(1 for v in values if v.firm)
        source = (f" Data: the built-in tables and {firm.description}; it supplies {supplied} of the "
                  f"{len(values)} values used here." if firm else " Data: the built-in tables; no firm data file.")
        if not self.design.data_warnings:
            source += " No data value used here is unverified."
        corrections = self.design.data_corrections
        if not corrections:
            return source, "", ""
        items = "".join(f"\\item {escape(c)}\n" for c in corrections)
        latex = ("\\par\\smallskip Firm values that differ from the built-in data (the firm value is used):\n"
                 f"\\begin{{itemize}}\\small\n{items}\\end{{itemize}}\n")
        md = "\n\nFirm values that differ from the built-in data:\n" + "".join(f"- {md_escape(c)}\n" for c in corrections)
        return source, latex, md

    def record(self) -> dict[str, Any]:
        """The member's results.json entry, as a display bundle the runner cross-checks."""
        from ..job.results import member_json

        return {RESULT_MIME: member_json(self.design), "text/plain": f"result record for {self.design.mark}"}


def _listed(heads: tuple[str, str], items: list[str]) -> str:
    """A caution's items under their head: one item run in after the head (a list's spacing for one line
    is most of a line), more as a list."""
    if len(items) == 1:
        text = caption_latex(items[0])
        return f"\\par\\smallskip {heads[0]} {text}{'' if text.endswith(('.', ')')) else '.'}\n"
    body = "".join(f"\\item {caption_latex(item)}\n" for item in items)
    return f"\\par\\smallskip {heads[1]}\n\\begin{{itemize}}\\small\n{body}\\end{{itemize}}\n"


_SYMBOL = re.compile(r"(?<![A-Za-z0-9\\])([A-Za-z]+)_([A-Za-z0-9]+)(?![A-Za-z0-9])")


def caption_latex(text: str) -> str:
    """A caption with its O86 symbols (K_L, V_fd, f_b) set as maths; schedule column names stay text."""
    out, pos = [], 0
    for match in _SYMBOL.finditer(text):
        head = match.group(1)
        if head.islower() and len(head) > 1 and head != "phi":
            continue  # a column name such as defl_L
        out += [escape(text[pos:match.start()]), f"${symbol_latex(match.group(0))}$"]
        pos = match.end()
    return "".join(out) + escape(text[pos:])


def entered_cell(m: Member) -> Cell:
    """Cells the schedule wrote in another unit (12 ft, 4.5 kip), as written, beside the value used."""
    from ..schedule.read import COLUMNS

    latex, text = [], []
    for name, written in m.entered.items():
        unit = COLUMNS[name].compute
        latex.append(f"\\texttt{{{escape(name)}}} {escape(written)} $= {format_value(m.values[name], unit)}$")
        shown, shown_unit = to_display(m.values[name], unit)
        text.append(f"{name} {written} = {format_number(shown, shown_unit)} {unit_text(shown_unit)}")
    return Cell("; ".join(latex), md_escape("; ".join(text)))
def branches(name: str, results: list[CheckResult]) -> list[CheckResult]:
    """The results a sheet works in full: the governing one of each branch of the check.

    Bending has two branches, positive and negative moment (top or bottom edge in compression, with its
    own f_b and L_u); each that occurs is shown for the combination that governs it, worst first."""
    if name != "bending":
        return [max(results, key=lambda c: c.utilization)]
    groups = [[c for c in results if (c.demand < 0) == negative] for negative in (False, True)]
    return sorted((max(g, key=lambda c: c.utilization) for g in groups if g), key=lambda c: -c.utilization)


def governing_places(results: list[CheckResult]) -> list[CheckResult]:
    """A beam model's check at every place under every combination, cut to the place that governs each
    combination (the highest utilization; a moment's positive and negative sides each keep theirs), in
    the order the combinations were checked."""
    worst: dict[tuple[str, bool], CheckResult] = {}
    for c in results:
        key = (c.combination, c.check == "bending" and c.demand < 0)
        if key not in worst or c.utilization > worst[key].utilization:
            worst[key] = c
    return list(worst.values())


def basis_cell(basis: str) -> Cell:
    """The K_D basis with its symbols set as maths."""
    latex = re.sub(r"X\\_lt( \(dead and storage L\))? \\textgreater\{\} X\\_st on (\w)",
                   lambda g: f"$X_{{lt}}${g[1]} $> X_{{st}}$ on ${g[2]}$" if g[1] else f"$X_{{lt}} > X_{{st}}$ on ${g[2]}$",
                   escape(basis))
    return Cell(latex, md_escape(basis))


def unit_text_of(effect: str) -> str:
    return unit_text(to_display(1.0, EFFECT_UNITS[effect])[1])


def num(value: float, unit: str) -> Cell:
    """A result in a check's table; deflections (mm) to 0.1 mm, like forces to 0.1 kN."""
    text = f"{value:.1f}" if unit == "mm" else format_number(value, unit)
    return Cell(f"${text}$", text)


def kd_cell(c: CheckResult) -> Cell:
    """K_D of a strength check; a dash for deflection, where K_D does not apply."""
    if serviceability(c):
        return Cell("--", "–")
    return Cell(f"${format_number(c.K_D)}$", format_number(c.K_D))


def util_cell(u: float) -> Cell:
    from ..job.results import round_utilization

    shown = f"{round_utilization(u):.3f}"
    flag = "" if u <= 1.0 else " > 1"
    return Cell(f"${shown}${flag}", f"{shown}{flag}")
