"""The reference side of the verification cases: expected values from a stated formula or library call.

A verification case writes its expected value as a small expression over its own given values, for
example ``P1*V1*log(V2/V1)`` (a closed form from the cited textbook) or
``quad(lambda V: PropsSI('P', 'T', T1, 'Dmass', m/V, 'Nitrogen'), V1, V2)`` (a reference library
called directly). This module evaluates such expressions with Python's ``math`` module, CoolProp's
``PropsSI``, SciPy's ``quad`` and ``brentq``, and ``rk4``, a plain fixed-step Runge–Kutta integrator
written out below for paths that are differential equations rather than integrals (for example the
enthalpy along a compressor path of constant polytropic efficiency, dh/dlnP = P·v(P, h)/η_p).

It deliberately imports nothing from calcdoc: an expected value never passes through calcdoc's own
code paths (a test checks the imports of this module). Expressions are parsed and only a small set of
syntax is accepted (arithmetic, calls of the functions below, ``lambda``), so a case file cannot run
arbitrary code.
"""
from __future__ import annotations

import ast
import math
from dataclasses import dataclass, field
from importlib import metadata
from typing import Any

__all__ = ["ExpressionError", "Evaluation", "FUNCTIONS", "LIBRARIES", "evaluate", "library_version", "names_used", "rk4"]


class ExpressionError(ValueError):
    """An expression in a case file is malformed or uses something not allowed."""


def _coolprop_propssi(*args):
    import CoolProp.CoolProp as CP

    return CP.PropsSI(*args)


#: Relative accuracy asked of SciPy's adaptive quadrature (its ``epsrel``); absolute accuracy off.
QUAD_EPSREL = 1e-12


def _scipy_quad(f, a, b):
    from scipy.integrate import quad

    value, _abserr = quad(f, a, b, epsabs=0.0, epsrel=QUAD_EPSREL, limit=200)
    return value


def _scipy_brentq(f, a, b):
    from scipy.optimize import brentq

    return brentq(f, a, b, xtol=1e-300, rtol=1e-15, maxiter=200)


#: Most steps ``rk4`` accepts (a guard against a case file asking for an endless loop).
RK4_MAX_STEPS = 100_000


def rk4(f, x0, y0, x1, steps):
    """y(x1) for dy/dx = f(x, y), y(x0) = y0: the classical fourth-order Runge–Kutta method with
    ``steps`` equal steps (Kutta 1901; Hairer, Nørsett & Wanner, Solving Ordinary Differential
    Equations I, 2nd ed., 1993, sec. II.1, table 1.2). Its global error falls as the fourth power of
    the step, so halving the step shows the error of a result.

    Deliberately the plainest scheme, with no step-size control: it shares nothing with the adaptive
    integration in calcdoc's engine.
    """
    n = int(steps)
    if n != steps or not 1 <= n <= RK4_MAX_STEPS:
        raise ExpressionError(f"rk4 takes a whole number of steps from 1 to {RK4_MAX_STEPS}, not {steps!r}")
    x0, x1, y = float(x0), float(x1), float(y0)
    dx = (x1 - x0) / n
    for i in range(n):
        x = x0 + i * dx
        k1 = f(x, y)
        k2 = f(x + dx / 2, y + dx / 2 * k1)
        k3 = f(x + dx / 2, y + dx / 2 * k2)
        k4 = f(x + dx, y + dx * k3)
        y += dx / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
    return y


@dataclass(frozen=True)
class _Fn:
    call: object
    library: str          # distribution name whose version is recorded ("" for Python's math)
    what: str             # one line for the report


FUNCTIONS: dict[str, _Fn] = {
    "PropsSI": _Fn(_coolprop_propssi, "CoolProp", "CoolProp.CoolProp.PropsSI (high-level interface), called directly"),
    "quad": _Fn(_scipy_quad, "scipy", f"scipy.integrate.quad, adaptive Gauss–Kronrod, epsrel = {QUAD_EPSREL:g}"),
    "brentq": _Fn(_scipy_brentq, "scipy", "scipy.optimize.brentq, bracketed root"),
    "rk4": _Fn(rk4, "", "classical fourth-order Runge–Kutta, equal steps (calcdoc.selftest.reference.rk4, no calcdoc physics)"),
    "sqrt": _Fn(math.sqrt, "", "math.sqrt"),
    "exp": _Fn(math.exp, "", "math.exp"),
    "expm1": _Fn(math.expm1, "", "math.expm1"),
    "log": _Fn(math.log, "", "math.log (natural logarithm)"),
    "log1p": _Fn(math.log1p, "", "math.log1p"),
    "log10": _Fn(math.log10, "", "math.log10"),
    "abs": _Fn(abs, "", "absolute value"),
    "min": _Fn(min, "", "minimum"),
    "max": _Fn(max, "", "maximum"),
}
CONSTANTS = {"pi": math.pi, "inf": math.inf}

#: Display names of the reference libraries by distribution name.
LIBRARIES = {"CoolProp": "CoolProp", "scipy": "SciPy"}

_ALLOWED = (ast.Expression, ast.BinOp, ast.UnaryOp, ast.Constant, ast.Name, ast.Load, ast.Call, ast.Lambda,
            ast.arguments, ast.arg, ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow, ast.USub, ast.UAdd)


@dataclass(frozen=True)
class Evaluation:
    value: object
    libraries: tuple[str, ...] = field(default_factory=tuple)   # distribution names used


def _parse(text: str) -> ast.Expression:
    try:
        tree = ast.parse(str(text).strip(), mode="eval")
    except SyntaxError as exc:
        raise ExpressionError(f"'{text}' is not a valid expression ({exc.msg})") from None
    for node in ast.walk(tree):
        if not isinstance(node, _ALLOWED):
            raise ExpressionError(f"'{text}': {type(node).__name__} is not allowed in an expected value; "
                                  "use arithmetic, the functions " + ", ".join(FUNCTIONS) + " and lambda")
        if isinstance(node, ast.Call):
            if not isinstance(node.func, ast.Name) or node.func.id not in FUNCTIONS or node.keywords:
                name = node.func.id if isinstance(node.func, ast.Name) else ast.unparse(node.func)
                raise ExpressionError(f"'{text}': the call {name}(...) is not allowed; allowed: " + ", ".join(FUNCTIONS)
                                      + " (positional arguments only)")
        if isinstance(node, ast.Constant) and not isinstance(node.value, (int, float, str)):
            raise ExpressionError(f"'{text}': the constant {node.value!r} is not allowed")
    return tree


def names_used(text: str) -> set[str]:
    """Every plain name an expression refers to (givens, functions, lambda arguments)."""
    return {n.id for n in ast.walk(_parse(text)) if isinstance(n, ast.Name)}


def evaluate(text, given: dict[str, object]) -> Evaluation:
    """Evaluate an expected-value expression over the case's given values.

    A number is returned as it is. Unknown names raise :class:`ExpressionError` naming them.
    """
    if isinstance(text, bool):
        raise ExpressionError(f"{text!r} is not a number or an expression")
    if isinstance(text, (int, float)):
        return Evaluation(float(text))
    tree = _parse(text)
    lambda_args = {a.arg for n in ast.walk(tree) if isinstance(n, ast.Lambda) for a in n.args.args}
    used = {n.id for n in ast.walk(tree) if isinstance(n, ast.Name)}
    unknown = sorted(used - set(given) - set(FUNCTIONS) - set(CONSTANTS) - lambda_args)
    if unknown:
        raise ExpressionError(f"'{text}' uses {', '.join(unknown)}, which the case does not give")
    scope: dict[str, Any] = dict(CONSTANTS)
    scope.update({k: fn.call for k, fn in FUNCTIONS.items()})
    scope.update(given)
    value = _interpret(tree.body, scope)
    libs = tuple(sorted({FUNCTIONS[n].library for n in used if n in FUNCTIONS and FUNCTIONS[n].library}))
    return Evaluation(float(value) if isinstance(value, (int, float)) else value, libs)


_BINARY = {ast.Add: lambda a, b: a + b, ast.Sub: lambda a, b: a - b, ast.Mult: lambda a, b: a * b,
           ast.Div: lambda a, b: a / b, ast.Pow: lambda a, b: a ** b}
_UNARY = {ast.USub: lambda a: -a, ast.UAdd: lambda a: +a}


def _interpret(node: ast.AST, scope: dict):
    """Walk the restricted syntax tree (see :func:`_parse`): arithmetic, names, calls, lambdas. No eval."""
    if isinstance(node, ast.Constant):
        return node.value
    if isinstance(node, ast.Name):
        return scope[node.id]
    if isinstance(node, ast.BinOp):
        return _BINARY[type(node.op)](_interpret(node.left, scope), _interpret(node.right, scope))
    if isinstance(node, ast.UnaryOp):
        return _UNARY[type(node.op)](_interpret(node.operand, scope))
    if isinstance(node, ast.Call):
        assert isinstance(node.func, ast.Name)             # _parse admits calls of plain names only
        return scope[node.func.id](*(_interpret(a, scope) for a in node.args))
    if isinstance(node, ast.Lambda):
        params = [a.arg for a in node.args.args]
        body = node.body
        return lambda *vals: _interpret(body, {**scope, **dict(zip(params, vals, strict=False))})
    raise ExpressionError(f"{type(node).__name__} is not allowed in an expected value")


def library_version(dist: str) -> str:
    """The installed version of a distribution, or 'not installed'."""
    try:
        return metadata.version(dist)
    except metadata.PackageNotFoundError:
        return "not installed"
