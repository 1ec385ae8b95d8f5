"""Formatting for the report: numbers with sensible significant figures, units, typeset equations.

Presentation only: values are converted for display through :mod:`calcdoc.units` (the one place
for unit conversion) and never recomputed.
"""
from __future__ import annotations

import math
import re

from markupsafe import Markup, escape

from .. import units
from ..physics.calc import Calc, Term
from . import words

# Units in which substituted equations are shown: coherent with kPa and kJ so that a checker can
# redo the arithmetic (kPa·m³ = kJ); temperatures in equations are always absolute (K).
_SUBST_UNITS = {"Pa": "kPa", "J": "kJ", "J/kg": "kJ/kg", "J/(kg*K)": "kJ/(kg*K)", "J/K": "kJ/K", "W": "kW"}


def num(x: float | None, sig: int = 5, strip: bool = False) -> Markup:
    """A number for the report: a number with thousands separators is kept on one line."""
    text = _num(x, sig, strip)
    return Markup(f'<span class="nw">{text}</span>' if "\u2009" in text else text)


def refs(numbers) -> str:
    """Reference numbers as cited: runs of three or more joined as a range ([3, 9–14])."""
    nums = sorted(set(numbers))
    out: list[str] = []
    i = 0
    while i < len(nums):
        j = i
        while j + 1 < len(nums) and nums[j + 1] == nums[j] + 1:
            j += 1
        out.append(f"{nums[i]}–{nums[j]}" if j - i >= 2 else ", ".join(str(n) for n in nums[i:j + 1]))
        i = j + 1
    return ", ".join(out)


def css_string(text: str) -> Markup:
    """Job text made safe inside a double-quoted CSS string (page headers)."""
    out = []
    for ch in str(text):
        if ch in '"\\' or ord(ch) < 0x20 or ch in "<>&":
            out.append(f"\\{ord(ch):x} ")
        else:
            out.append(ch)
    return Markup("".join(out))


def _num(x: float | None, sig: int = 5, strip: bool = False) -> str:
    """A number to ``sig`` significant figures: plain from 1e-3 to 1e7 (thin-space thousands), else ×10ⁿ."""
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "—"
    if isinstance(x, float) and math.isinf(x):
        return "∞" if x > 0 else "−∞"
    if x == 0:
        return "0"
    ax = abs(x)
    if 1e-3 <= ax < 1e7:
        digits = max(0, sig - 1 - int(math.floor(math.log10(ax))))
        text = f"{x:,.{digits}f}"
        if strip and "." in text:
            text = text.rstrip("0").rstrip(".")
        return text.replace(",", "\u2009").replace("-", "−")
    mant, exp = f"{x:.{sig - 1}e}".split("e")
    return f"{mant.replace('-', '−')}×10<sup>{int(exp)}</sup>"


def qty(value: float | None, si_unit: str, system, sig: int = 5, difference: bool = False,
        strip: bool = False, absolute: bool = False) -> Markup:
    """A value with its unit in the job's display units (``absolute``: a pressure shown absolute even
    where the job shows gauge)."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return Markup("—")
    v, u = units.display(value, si_unit, system, difference=difference, absolute=absolute)
    return Markup(num(settled(v, value, si_unit), sig, strip) + ("\u202f" + u if u else ""))


def unit_of(si_unit: str, system, difference: bool = False, absolute: bool = False) -> str:
    """The typeset unit values of this SI unit are shown in (table headers)."""
    return units.display_label(si_unit, system, difference=difference, absolute=absolute)


def value_in(value: float | None, si_unit: str, system, sig: int = 5, difference: bool = False,
             absolute: bool = False) -> Markup:
    """Only the number of a value in the job's display units (for table cells under a unit header);
    a missing value (None or NaN: not computed at this point) is "—"."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return Markup("—")
    v, _ = units.display(value, si_unit, system, difference=difference, absolute=absolute)
    return Markup(num(settled(v, value, si_unit)))


#: Below these SI magnitudes a computed value is round-off of the computation, not a result: the path
#: integration and the flashes hold about 1e-9 relative on energies of order 1e5–1e6 J/kg (a few mJ/kg),
#: and first-law sums of states carry the same; such a value prints as 0, never as −1.0000e−06 kJ.
ZERO_BELOW = {"J": 1e-6, "J/kg": 1e-3, "W": 1e-3, "J/K": 1e-9, "J/(kg*K)": 1e-6}


def settled(shown: float, value_si: float, si_unit: str) -> float:
    """The shown value, or 0 where the SI value is below the computation's tolerance (``ZERO_BELOW``)."""
    tol = ZERO_BELOW.get(si_unit.split("|")[0])
    return 0.0 if tol is not None and abs(value_si) < tol else shown


def subst_value(t: Term) -> str:
    """An input of a substituted equation: coherent kPa/kJ units, absolute temperatures in K."""
    if t.unit in _SUBST_UNITS:
        u = _SUBST_UNITS[t.unit]
        v = units.convert(t.value, t.unit, u)
        return f"{num(v, 6, strip=True)}\u202f{units.pretty_unit(u)}"
    if t.unit == "":
        return num(t.value, 6, strip=True)
    return f"{num(t.value, 6, strip=True)}\u202f{units.pretty_unit(t.unit)}"


def flavour(c: Calc) -> str:
    """The display unit of a calc's result where its SI unit is shared (heat duty, head): see units._FLAVOURS."""
    sym = c.symbol.lstrip("Σ")
    if c.unit == "W" and sym.startswith("Q̇"):
        return "W|heat"
    if c.unit == "J/kg" and sym.startswith("H_"):
        return "J/kg|head"
    return c.unit


def result_si(c: Calc) -> Markup:
    """The result of a calc in the coherent units of its substituted equation (kPa, kJ, K)."""
    return Markup(subst_value(Term(c.symbol, c.value, c.unit)))


_SYM = re.compile("([A-Za-zΔηρ\u0307]+)_(\\{[^}]*\\}|[A-Za-z0-9]+)")   # \u0307: the dot of a rate (V̇, Q̇)
_LETTER = re.compile("(?<![A-Za-z&#])([A-Za-z]\u0307?)(?![A-Za-z;])")


def _plain(text: str, italic: bool) -> str:
    """Escaped text between symbols; in equations a lone Latin letter is a variable, set in italics."""
    out = str(escape(text))
    return _LETTER.sub(r"<i>\1</i>", out) if italic else out


def subscripts(text: str) -> Markup:
    """Plain text with the trade's subscripts typeset (P_0 → P₀), nothing else changed (notes)."""
    out = []
    pos = 0
    for m in _SYM.finditer(text):
        out.append(str(escape(text[pos:m.start()])))
        out.append(f"{escape(m.group(1))}<sub>{escape(m.group(2).strip('{}'))}</sub>")
        pos = m.end()
    out.append(str(escape(text[pos:])))
    return Markup("".join(out))


def symbol(text: str) -> Markup:
    """A symbol in the trade's notation: P_1 → P₁ (as HTML), Greek letters upright."""
    out = []
    pos = 0
    for m in _SYM.finditer(text):
        out.append(_plain(text[pos:m.start()], True))
        base, sub = m.group(1), m.group(2).strip("{}")
        out.append(f"<i>{escape(base)}</i><sub>{escape(sub)}</sub>" if base not in ("Δ",) else
                   f"{escape(base)}<sub>{escape(sub)}</sub>")
        pos = m.end()
    rest = text[pos:]
    if rest and re.fullmatch(r"Δ[A-Z]", rest):
        return Markup(f"Δ<i>{escape(rest[1])}</i>")
    out.append(_plain(rest, True))
    return Markup("".join(out))


def equation(c: Calc, numbers: bool) -> Markup:
    """The right-hand side of a calc, typeset: with symbols, or with the numbers put in."""
    if not c.equation:
        return Markup("")
    src = words.equation(c.equation)

    def field(key: str) -> str:
        t = c.inputs.get(key)
        if t is None:
            return str(escape(key))
        if not numbers:
            return str(symbol(t.symbol))
        text = subst_value(t)
        return f"({text})" if t.value < 0 else text

    return Markup(_typeset(src, field))


def _typeset(src: str, field) -> str:
    out: list[str] = []
    i = 0
    while i < len(src):
        ch = src[i]
        if ch == "{":
            j = src.index("}", i)
            out.append(field(src[i + 1:j]))
            i = j + 1
        elif ch == "^":
            i += 1
            if i < len(src) and src[i] == "(":
                depth, j = 1, i + 1
                while j < len(src) and depth:
                    depth += {"(": 1, ")": -1}.get(src[j], 0)
                    j += 1
                out.append(f"<sup>{_typeset(src[i + 1:j - 1], field)}</sup>")
                i = j
            elif i < len(src) and src[i] == "{":
                j = src.index("}", i)
                out.append(f"<sup>{field(src[i + 1:j])}</sup>")
                i = j + 1
            else:
                m = re.match(r"[A-Za-z0-9.]+", src[i:])
                tok = m.group(0) if m else ""
                out.append(f"<sup>{symbol(tok)}</sup>")
                i += len(tok)
        else:
            m = re.match(r"[^{^]+", src[i:])
            chunk = m.group(0) if m else src[i]
            out.append(str(symbol(chunk)))
            i += len(chunk)
    return "".join(out)


_KIND_WORDS = {"volume_flow": "actual volume flow", "mass_flow": "mass flow", "specific_energy": "specific energy",
               "specific_volume": "specific volume", "specific_entropy": "specific entropy", "molar_flow": "molar flow",
               "molar_mass": "molar mass"}


def unit_system_text(system) -> str:
    """The report's units in words: the base system and the units the job chose for itself."""
    spec = units.display_spec(system)
    base = "SI (kPa, °C, kJ)" if spec.system == "SI" else "US customary (psia, °F, Btu, hp)"
    if not spec.spelled:
        return base
    own = ", ".join(f"{_KIND_WORDS.get(kind, kind.replace('_', ' '))} in {units.display_label(si, spec)}"
                    + (" (gauge: above the site atmosphere)" if kind == "pressure" and spec.gauge else "")
                    for kind, si in ((k, units.DISPLAY_KINDS[k]) for k, _ in spec.spelled))
    return f"{base}, with the job's own units: {own}; temperature differences in " \
           f"{units.display_label('K', spec, difference=True)}"
