"""Staging a compressor: equal stage pressure ratios that allow for the intercooler pressure drops,
and the fewest stages that keep every discharge temperature under a limit.

SI floats: pressures [Pa] absolute, temperatures [K].
"""
from __future__ import annotations

from ..errors import PhysicsError
from .calc import Calc, Term

__all__ = ["equal_stage_ratio", "stage_ratio_calc", "suction_pressures"]


def suction_pressures(P_in: float, r: float, N: int, fraction: float | None, absolute: float | None) -> list[float]:
    """Suction pressure of each stage and the final discharge pressure, for stage ratio r [Pa].

    Stage k discharges at r·P_k; its intercooler lowers that by the drop, giving P_(k+1) (the algebra of the
    chain of stages; see :func:`equal_stage_ratio` for the reference).
    """
    out = [P_in]
    P = P_in
    for k in range(N):
        Pd = r * P
        if k == N - 1:
            out.append(Pd)
        else:
            P = Pd * (1.0 - fraction) if fraction is not None else Pd - (absolute or 0.0)
            out.append(P)
    return out


def equal_stage_ratio(P_in: float, P_out: float, N: int, fraction: float | None = None,
                      absolute: float | None = None) -> float:
    """The pressure ratio r, equal for every one of N stages, that reaches P_out with intercooler
    drops between stages.

    Drop as a fraction δ of the intercooler inlet pressure (closed form):

        r = [P_out / (P_in·(1 − δ)^(N−1))]^(1/N)

    Absolute drop ΔP: r solves r^N·P_in − ΔP·(r^(N−1) + … + r) = P_out (bisection on r, to 1e-14).
    With no drop both give r = (P_out/P_in)^(1/N), the equal-ratio rule that minimises the total
    work of ideal-gas stages with perfect intercooling.

    References: Çengel & Boles (2019), ch. 7, multistage compression with intercooling (equal
    pressure ratios minimise the work); the allowance for drops is plain algebra of the chain.
    Example: P_in = 100 kPa, P_out = 900 kPa, N = 2, no drop: r = 3.

    >>> round(equal_stage_ratio(100e3, 900e3, 2), 12)
    3.0
    """
    if fraction is not None or not absolute:
        d = fraction or 0.0
        return float((P_out / (P_in * (1.0 - d) ** (N - 1))) ** (1.0 / N))
    lo, hi = 1.0, 2.0
    while suction_pressures(P_in, hi, N, None, absolute)[-1] < P_out:
        hi *= 2.0
        if hi > 1e6:
            raise PhysicsError("staging.no_ratio")
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if suction_pressures(P_in, mid, N, None, absolute)[-1] < P_out:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-14 * hi:
            break
    return 0.5 * (lo + hi)


def stage_ratio_calc(P_in: float, P_out: float, N: int, fraction: float | None, absolute: float | None) -> Calc:
    """The stage ratio as a calc a checker can follow (method and reference as :func:`equal_stage_ratio`)."""
    r = equal_stage_ratio(P_in, P_out, N, fraction, absolute)
    ins = {"Pout": Term("P_out", P_out, "Pa"), "Pin": Term("P_in", P_in, "Pa"), "N": Term("N", float(N), "")}
    if absolute:
        ins["dP"] = Term("ΔP_ic", absolute, "Pa")
        return Calc("r_stage", r, "", "~stage_ratio_absolute", "staging.ratio",
                    ins, note="stage_ratio_absolute")
    if fraction:
        ins["d"] = Term("δ_ic", fraction, "")
        return Calc("r_stage", r, "", "({Pout}/({Pin}·(1 − {d})^({N} − 1)))^(1/{N})", "staging.ratio", ins,
                    note="stage_ratio_fraction")
    return Calc("r_stage", r, "", "({Pout}/{Pin})^(1/{N})", "staging.ratio", ins, note="stage_ratio")

