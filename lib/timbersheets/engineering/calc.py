"""Design equations written once: they compute, and they render themselves.

A design equation is a plain Python function of floats whose body is a list of
assignments ending in ``return locals()``. Every variable is declared with the
unit it is computed in (the consistent system N, mm, MPa, N·mm), so

* the sizing search calls it directly on floats (fast, no rendering), and
* the sheet renders the *same source*, with the values it computed, through
  handcalcs' pure ``latex()`` function: symbolic, then substituted, then result.

The function body is read with ``ast`` (never by substring), so no line is lost:
handcalcs' own decorator drops any line containing ``def``, ``return`` or ``@``.
Only straight assignments are allowed in a body, so what is rendered is exactly
what was computed; piecewise rules are chosen by the caller, which then renders
the branch that applies.
"""

from __future__ import annotations

import ast
import inspect
import math
import re
import textwrap
from collections import deque
from collections.abc import Callable, Mapping
from functools import cached_property
from typing import Any

from ..constants import UNIT_LATEX, UNIT_TEXT
from .units import display_unit, to_display

class Calc:
    """One design equation group, e.g. the factored tensile resistance.

    `units` maps every variable of the function (arguments and assigned names)
    to the unit it is computed in; "" is dimensionless.
    """

    def __init__(self, func: Callable[..., dict], units: Mapping[str, str], clause: str = "") -> None:
        self.func = func
        self.units = dict(units)
        self.clause = clause
        self.name = func.__name__

    def __repr__(self) -> str:
        return f"Calc({self.name})"

    def __call__(self, **inputs: float) -> dict[str, float]:
        """Evaluate on floats in compute units; returns every variable."""
        values = self.func(**inputs)
        return {k: v for k, v in values.items() if k in self.units}

    @cached_property
    def statements(self) -> list[ast.Assign]:
        """The assignments of the function body, checked to be the only statements."""
        tree = ast.parse(textwrap.dedent(inspect.getsource(self.func)))
        func = tree.body[0]
        assert isinstance(func, ast.FunctionDef)
        body = list(func.body)
        if body and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant):
            body = body[1:]  # docstring
        if not body or not isinstance(body[-1], ast.Return):
            raise TypeError(f"{self.name}: the body must end with 'return locals()'")
        assigns = body[:-1]
        for stmt in assigns:
            if not (isinstance(stmt, ast.Assign) and len(stmt.targets) == 1 and isinstance(stmt.targets[0], ast.Name)):
                raise TypeError(f"{self.name}: line {stmt.lineno} is not a single assignment")
        return assigns  # type: ignore[return-value]

    @cached_property
    def outputs(self) -> tuple[str, ...]:
        """Names assigned in the body, in order."""
        return tuple(s.targets[0].id for s in self.statements)  # type: ignore[union-attr]

    @cached_property
    def source(self) -> str:
        """The body as handcalcs cell source, one statement per line."""
        return "\n".join(ast.unparse(s) for s in self.statements)

    def latex(self, values: Mapping[str, float], precision: int = 3,
              units: Mapping[str, str] | None = None, source: str | None = None) -> str:
        """Render the equations with `values` (as returned by ``__call__``).

        `units` overrides the declared compute units (e.g. K_D on moments).
        """
        declared = {**self.units, **(units or {})}
        from handcalcs import global_config
        from handcalcs.handcalcs import latex

        _remember_parsed_lines()

        shown: dict[str, Any] = {name: Shown(r"\pi") for name in ("pi",)}
        for name, value in values.items():
            shown[name] = Shown(format_value(value, declared.get(name, ""), precision))
        config = dict(global_config._config)
        return result_beside(latex(source if source is not None else self.source, shown, "", config, precision, False))

    def formula(self, *names: str) -> str:
        """The equations of `names` (all when none) as symbols only, one display block: the same source
        the values are computed from, for a sheet that states the equations before tabulating them."""
        from handcalcs import global_config
        from handcalcs.handcalcs import latex

        chosen = [s for s in self.statements if not names or s.targets[0].id in names]  # type: ignore[union-attr]
        source = "\n".join(ast.unparse(s) for s in chosen)
        return latex(source, {}, "symbolic", dict(global_config._config), 3, False)

    def formula_lines(self, *names: str) -> str:
        """The rows of :meth:`formula`'s aligned block (``M_{f} &= …``), to join with other Calcs' rows."""
        return self.formula(*names).split("\\begin{aligned}", 1)[1].split("\\end{aligned}", 1)[0].strip()

    def inline(self, name: str) -> str:
        """The equation of `name` as symbols, for running text (no $ signs): e.g. ``E_{S} = E \\cdot …``."""
        return self.formula_lines(name).replace("&=", "=").replace("\\;", "").strip()

    def latex_lines(self, values: Mapping[str, float], units: Mapping[str, str] | None = None,
                    numbers_only: bool = False, names: tuple[str, ...] = ()) -> str:
        """Like :meth:`latex`, one display block per statement (those assigning `names`, when given).

        With `numbers_only` an equation that handcalcs sets on several rows loses its symbolic row
        (``K = numbers = result``): for a calc whose symbols the sheet has just shown with another
        calc of the same form (the weak axis after the strong)."""
        chosen = [s for s in self.statements if not names or s.targets[0].id in names]  # type: ignore[union-attr]
        blocks = (self.latex(values, units=units, source=ast.unparse(s)) for s in chosen)
        return "\n".join(numbers_row(b) if numbers_only else b for b in blocks)


_parses_remembered = False


def _remember_parsed_lines() -> None:
    """Parse each source line once per process in handcalcs, not on every rendering.

    handcalcs' ``expr_parser(line)`` builds its pyparsing grammar anew on every call and is
    called several times per line: about 60 % of a sheet's execution. A line's parse depends
    only on its text (the values are substituted later), and our equations are the same few
    hundred lines on every sheet, so the parse is kept by line and a copy handed out (the
    callers consume the deques they get): nested deques copied, their strings shared, as
    ``copy.deepcopy`` would give but without its bookkeeping. handcalcs' ``get_function_name``
    deep-copies every deque it is asked about only to drop its first item; a shallow copy does
    that alike (what it returns is a string either way). ``tests/test_render.py`` checks that the
    rendering is the same with and without both.
    """
    from handcalcs import handcalcs

    global _parses_remembered
    if _parses_remembered:
        return
    _parses_remembered = True
    parse = handcalcs.expr_parser
    parsed: dict[str, Any] = {}

    def expr_parser(line: str):
        if line not in parsed:
            parsed[line] = parse(line)
        return _copy_parsed(parsed[line])

    expr_parser.remembers_lines = True  # type: ignore[attr-defined]
    expr_parser.original = parse  # type: ignore[attr-defined]
    handcalcs.expr_parser = expr_parser

    is_function = handcalcs.test_for_function_name
    original = handcalcs.get_function_name

    def get_function_name(d: deque) -> str:
        rest = deque(d)
        rest.popleft()
        if is_function(d):
            return d[0]
        if is_function(rest):
            return rest[0]
        return ""

    get_function_name.original = original  # type: ignore[attr-defined]
    handcalcs.get_function_name = get_function_name


_SHARED = (str, int, float, bool, type(None))


def _copy_parsed(item: Any) -> Any:
    """A parsed line's deques copied, as deep as they nest; strings and numbers shared (they cannot
    change); anything else deep-copied."""
    if type(item) is deque:
        return deque(_copy_parsed(e) for e in item)
    if type(item) in _SHARED:
        return item
    import copy

    return copy.deepcopy(item)


def calc(units: Mapping[str, str], clause: str = "") -> Callable[[Callable[..., dict]], Calc]:
    """Decorator: turn an equation function into a :class:`Calc`."""

    def wrap(func: Callable[..., dict]) -> Calc:
        return Calc(func, units, clause)

    return wrap


class Shown:
    """A value already formatted as LaTeX; handcalcs prints it as it is."""

    __slots__ = ("text",)

    def __init__(self, text: str) -> None:
        self.text = text

    def __format__(self, spec: str) -> str:
        return self.text

    def __str__(self) -> str:
        return self.text

    __repr__ = __str__


def unit_latex(u: str) -> str:
    """LaTeX for a display unit."""
    return UNIT_LATEX[u] if u in UNIT_LATEX else rf"\mathrm{{{u}}}"


def unit_text(u: str) -> str:
    """Plain-text symbol for a display unit (kN·m, mm²)."""
    return UNIT_TEXT.get(u, u)


FORCE_UNITS = ("kN", "kN*m", "kN/m")
#: Lengths to 0.1 mm at least, so that a dimension prints as used.
LEAST_DECIMALS = {"mm": 1, "m": 4}


def _decimals(value: float, unit: str, sig: int) -> int:
    """Decimal places for `sig` significant figures; forces and moments to 0.1 at least, lengths to 0.1 mm.

    A length keeps its tenth so that a dimension shows as used: 152.4 mm (6 in), not 152 mm,
    and 175 mm x 152.4 mm = 26670 mm² reproduces on a calculator.
    """
    digits = sig - 1 - math.floor(math.log10(abs(value)))
    return max(digits, LEAST_DECIMALS.get(unit, 1 if unit in FORCE_UNITS else digits))


def round_sig(value: float, unit: str = "", sig: int = 3) -> float:
    """Round for display: three significant figures, forces and moments to at least 0.1.

    The same rounding is used on the sheet and in results.json, so the two agree.
    """
    if value == 0 or not math.isfinite(value):
        return value
    return round(value, max(_decimals(value, unit, sig), 0))


def format_number(value: float, unit: str = "", sig: int = 3) -> str:
    """A number as text to `sig` significant figures.

    Trailing zeros are dropped only where the value is exactly the shorter
    number (0.9, 5.5 MPa, but 12.98 → 13.0). Forces and moments keep 0.1
    (``185.0`` kN); plain factors keep one decimal (``1.0``); very large or
    small values use powers of ten.
    """
    if value == 0:
        return "0"
    if not math.isfinite(value):
        return r"\infty" if value > 0 else r"-\infty"
    if abs(value) >= 1e6 or abs(value) < 1e-3:
        mantissa, exponent = f"{value:.{sig - 1}e}".split("e")
        return rf"{mantissa} \times 10^{{{int(exponent)}}}"
    decimals = max(_decimals(value, unit, sig), 0)
    text = f"{round(value, decimals):.{decimals}f}"
    if "." in text:
        keep = 1 if unit in FORCE_UNITS or unit == "" else 0
        whole, frac = text.split(".")
        short = frac.rstrip("0")
        if abs(float(f"{whole}.{short or '0'}") - value) <= 1e-9 * max(1.0, abs(value)):
            frac = short  # the zeros were not significant: the value is exactly this
        frac = frac if len(frac) >= keep else frac.ljust(keep, "0")
        text = f"{whole}.{frac}" if frac else whole
    elif unit == "":
        text += ".0"
    return text


def format_metres(mm: float) -> str:
    """A length in mm as metres, to 0.1 mm, trailing zeros dropped (8026.65 mm → '8.0267')."""
    return f"{mm / 1000:.4f}".rstrip("0").rstrip(".")


def format_value(value: float, compute_unit: str, sig: int = 3) -> str:
    """LaTeX for a compute-unit value in its display unit: ``52.6\\ \\mathrm{kN}``."""
    shown_value, shown_unit = to_display(value, compute_unit)
    number = format_number(shown_value, shown_unit, sig)
    return f"{number}\\ {unit_latex(shown_unit)}" if shown_unit else number


def shown_unit(compute_unit: str) -> str:
    """Display unit for a compute unit (re-exported for sheets)."""
    return display_unit(compute_unit)


#: The widest row, in characters as printed (see :func:`printed_width`), that a result may join. A
#: one-line equation of 58 such characters fills about four fifths of the sheet's text width.
RESULT_ROW_CHARS = 60

# handcalcs' long form: the symbols, then "\\&= numbers", then "\\&= result" on a row of its own
_LONG_TAIL = re.compile(r"\\\\(&= [^\n]*?) \\\\&= ([^\n&]*?)\s*\\\\\s*\n\\end\{aligned\}")


def result_beside(tex: str) -> str:
    """handcalcs' long form with the result moved up beside the substituted numbers, where the two fit
    on one row: ``K = min(…) \\ = min(6.3 · …) = 1.10`` in two rows instead of three."""
    def join(match: re.Match) -> str:
        numbers, value = match.group(1), match.group(2).strip()
        if printed_width(f"{numbers} = {value}") > RESULT_ROW_CHARS:
            return match.group(0)
        return f"\\\\{numbers} = {value}\n\\end{{aligned}}"

    return _LONG_TAIL.sub(join, tex)


def numbers_row(tex: str) -> str:
    """An equation block without its symbolic row when it has more than one row (``A &= sym \\ &= nums``
    becomes ``A &= nums``); a one-row equation stays as it is."""
    head, sep, rest = tex.partition("&=")
    _, newline, tail = rest.partition("\\\\&=")
    return f"{head}&={tail}" if sep and newline and tail else tex


def printed_width(tex: str) -> int:
    """About how many characters wide a row of maths prints: units and operator names as their letters,
    a command (\\cdot, \\phi) as one, a simple fraction as its longer part; braces, spaces, sub- and
    superscript marks as nothing. Nested fractions count both parts: on the safe, wide side."""
    def plain(t: str) -> str:
        t = re.sub(r"\\mathrm\{([^}]*)\}", r"\1", t)
        t = re.sub(r"\\(left|right|operatorname)\b", "", t)
        t = re.sub(r"\\[a-zA-Z]+", "x", t)
        return re.sub(r"\\ |[{}\s&^_]", "", t)

    t = re.sub(r"\\frac\{([^{}]*)\}\{([^{}]*)\}", lambda m: "x" * max(len(plain(m.group(1))), len(plain(m.group(2)))), tex)
    return len(plain(t))
