"""Every equation renders completely, with units as symbols.

handcalcs' own decorator silently drops source lines containing 'def', 'return'
or '@'; our Calc reads the function with ast, so every assignment must appear in
the rendered LaTeX. The list of calcs is discovered, so a new check is covered.
"""

import ast
import importlib
import inspect
import pkgutil
import re

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

import timbersheets
from timbersheets.engineering.calc import Calc
from timbersheets.engineering.checks import Step


def all_calcs() -> list[Calc]:
    found = []
    for info in pkgutil.walk_packages(timbersheets.__path__, "timbersheets."):
        if info.name.endswith((".cli", ".__main__")):
            continue
        module = importlib.import_module(info.name)
        found += [obj for obj in vars(module).values() if isinstance(obj, Calc) and obj.func.__module__ == info.name]
    return list({c.name: c for c in found}.values())


CALCS = all_calcs()


def latex_symbol(name: str) -> str:
    """handcalcs' rendering of a variable name: K_Zt → K_{Zt}, phi → \\phi, Delta → \\Delta."""
    head, _, tail = name.partition("_")
    head = {"phi": r"\phi", "pi": r"\pi", "Delta": r"\Delta", "gamma": r"\gamma"}.get(head, head)
    return f"{head}_{{{tail}}}" if tail else head


def sample_inputs(c: Calc) -> dict[str, float]:
    params = inspect.signature(c.func).parameters
    # distinct values, so no equation divides by zero (e.g. 1 − P_f/P_E)
    return {p: 1.5 + 0.1 * i if c.units.get(p, "") == "" else 100.0 * (i + 1) for i, p in enumerate(params)}


def test_calcs_were_found():
    names = {c.name for c in CALCS}
    assert {"sawn_tension", "glulam_tension", "sawn_compression_x", "glulam_compression_y", "kd_permanent"} <= names


def rendered_targets(latex: str) -> list[str]:
    """The left-hand sides of every aligned equation block in `latex`, in order."""
    starts = []
    for block in re.findall(r"\\begin\{aligned\}(.*?)\\end\{aligned\}", latex, re.S):
        for line in block.split(r"\\"):
            if "&=" in line and not line.strip().startswith("&="):
                starts.append(line.split("&=")[0].strip())
    return starts


@pytest.mark.parametrize("c", CALCS, ids=[c.name for c in CALCS])
def test_every_assignment_is_rendered(c):
    tree = ast.parse(inspect.getsource(c.func).lstrip())
    assigned = [n.targets[0].id for n in ast.walk(tree) if isinstance(n, ast.Assign)]
    assert assigned, "a calc with no equations"
    values = c(**sample_inputs(c))
    # the path a sheet's checks print (one display block per equation), and the one-block path
    # the K_D derivation prints
    for latex in (Step(c, values).latex(), c.latex(values)):
        assert rendered_targets(latex) == [latex_symbol(n) for n in assigned], latex


@pytest.mark.parametrize("c", CALCS, ids=[c.name for c in CALCS])
def test_units_are_symbols(c):
    latex = c.latex(c(**sample_inputs(c)))
    assert "megapascal" not in latex and "millimeter" not in latex and "newton" not in latex
    assert not re.search(r"MPa\}?\s*\\cdot\s*\\mathrm\{mm\}\^\{2\}\s*&?=", latex)


@pytest.mark.parametrize("c", CALCS, ids=[c.name for c in CALCS])
def test_every_variable_has_a_unit(c):
    names = set(inspect.signature(c.func).parameters) | set(c.outputs)
    assert names <= set(c.units), f"undeclared units: {names - set(c.units)}"


def test_rendered_numbers(tmp_path, data):
    from conftest import design_row

    d = design_row(tmp_path, data, type="tension", net_area="0.85", P_D="2", P_L="6")
    c = next(c for c in d.checks if c.combination == "1.25D + 1.5L")
    latex = c.steps[0].latex()
    assert r"5.5\ \mathrm{MPa}" in latex  # f_t substituted
    assert r"4522\ \mathrm{mm}^{2}" in latex  # A_n = 0.85 · 5320; integer digits are kept
    assert r"29.1\ \mathrm{kN}" in latex  # T_r converted to kN, 0.1 kN


def test_remembered_line_parses_render_the_same():
    """Parsing each source line once per process and the shallow copy in get_function_name
    (calc._remember_parsed_lines) change nothing on the sheet: every calc, rendered twice with
    different values, gives handcalcs' own output."""
    from handcalcs import handcalcs

    c_first = [c.latex(sample_inputs(c)) for c in CALCS]  # the remembered parser is in place now
    remembered, named = handcalcs.expr_parser, handcalcs.get_function_name
    assert remembered.remembers_lines and named.original is not named
    try:
        handcalcs.expr_parser, handcalcs.get_function_name = remembered.original, named.original
        own = [c.latex(sample_inputs(c)) for c in CALCS]
        twice = [c.latex({k: v * 2 for k, v in sample_inputs(c).items()}) for c in CALCS]
    finally:
        handcalcs.expr_parser, handcalcs.get_function_name = remembered, named
    assert c_first == own
    assert [c.latex({k: v * 2 for k, v in sample_inputs(c).items()}) for c in CALCS] == twice


def test_the_shallow_function_name_lookup_answers_as_handcalcs_own():
    """calc._remember_parsed_lines replaces handcalcs' get_function_name (which deep-copies its
    deque only to drop the first item) with a shallow copy: the same answer for every deque of
    lines with functions, nested or not, and for deques built to reach each of its branches."""
    from collections import deque

    from handcalcs import handcalcs

    CALCS[0].latex(sample_inputs(CALCS[0]))  # puts the replacement in place
    shallow = handcalcs.get_function_name
    own = shallow.original
    lines = ["y = -sqrt(x)", "y = a*(-log10(b/c))", "y = max(1.0 - 0.5*log10(a/b), 0.65)",
             "y = (sqrt(a) + 1)**2", "y = -min(a, b) * exp(c)", *[c.source for c in CALCS]]
    seen = 0

    def each(d):
        nonlocal seen
        if isinstance(d, deque):
            if d:
                assert shallow(d) == own(d), d
                seen += 1
            for item in d:
                each(item)

    for source in lines:
        for line in source.splitlines():
            each(handcalcs.expr_parser.original(line))
    built = [deque(["\\left(", "sqrt", "x"]), deque(["sqrt", deque(["a", "+", "b"])]), deque(["a", "+", "b"])]
    assert [shallow(d) for d in built] == [own(d) for d in built] == ["sqrt", "sqrt", ""]
    assert seen > 100  # the walk reached the nested deques (188 when written)


def test_weak_axis_after_the_strong_gives_numbers_and_results_only():
    # O86-14 7.5.6.5 (memory, unverified): K_C has the same form about both axes, with b and L_y about y;
    # shown in symbols about x, the y equations need only their numbers (common practice in hand calcs).
    from timbersheets.engineering.checks.compression import sawn_compression_y

    values = sawn_compression_y(F_c=9.9, K_T=1.0, K_e=1.0, L_y=3000.0, b=140.0, E_05=5000.0, K_SE=1.0,
                                phi=0.8, A=140.0 * 191.0)
    full = sawn_compression_y.latex_lines(values)
    numbers = Step(sawn_compression_y, values, numbers_only=True).latex()
    assert "35 \\cdot E_{05}" in full and "35 \\cdot E_{05}" not in numbers  # the symbolic row is gone
    assert "35 \\cdot 5000" in numbers  # its numbers stay
    for name in ("C_{cy}", "K_{Zcy}", "K_{Cy}", "P_{ry}"):  # every variable still computed on the page
        assert f"{name} &=" in numbers
    # C_cy = 1.0 · 3000 / 140 = 21.4 (hand arithmetic): a one-row equation keeps its symbols
    assert "\\frac{ L_{y} }{ b }" in numbers and "21.4" in numbers


@example("1.25D,,1.5L")
@example("D.Fir-L -- No.1")
@example("span 6 m\u00a0(wet)")
@given(st.text(alphabet=st.sampled_from("aZ09 .,-;:()/+=*'é°µ±×αφ–—\\{}$&#^_%~<>|\u00a0\u00ad\n\t✓ᐃ"), max_size=24))
def test_the_escapers_shortcut_prints_what_it_would_character_by_character(text):
    """Text of plain characters is returned as it is (most of a sheet's words); the shortcut must never
    skip a character the escaper rewrites: TeX's specials, doubled - and , (TeX would join them), spaces
    and characters outside the sheet's font."""
    from timbersheets.sheet.tex import _escape_each, escape

    assert escape(text) == _escape_each(text)
