"""Charts of the report: P–v and T–s diagrams as deterministic SVG (matplotlib, imported lazily).

Every leg is drawn along the states the engine computed on its path, not as a straight line
between its end points. Values are converted for display through :mod:`calcdoc.units`.
"""
from __future__ import annotations

import base64
import io
import math

from .. import units

# Our own sober palette: ink blue, rust, moss, plum, ochre, slate, teal, brick.
PALETTE = ["#1f3b5a", "#b4532a", "#5b7b3a", "#7a3b6e", "#c08a1e", "#56606b", "#2f7f7a", "#8c2f2f"]


class _Figures:
    """Figures without pyplot (no global figure state, a lighter import): ``subplots`` and ``close``."""

    @staticmethod
    def subplots(*args, figsize=(6.4, 4.8), **kwargs):
        from matplotlib.figure import Figure

        fig = Figure(figsize=figsize)
        return fig, fig.subplots(*args, **kwargs)

    @staticmethod
    def close(fig) -> None:
        fig.clear()


def _pyplot():
    import matplotlib

    matplotlib.rcParams.update({
        "svg.hashsalt": "calcdoc",
        "svg.fonttype": "path",
        "font.family": "DejaVu Sans",
        "font.size": 8.5,
        "axes.edgecolor": "#333333",
        "axes.linewidth": 0.7,
        "axes.grid": True,
        "grid.color": "#d8d8d8",
        "grid.linewidth": 0.5,
        "axes.spines.top": False,
        "axes.spines.right": False,
        "legend.frameon": False,
        "lines.linewidth": 1.6,
        "path.simplify": False,
        "text.parse_math": False,      # names and titles are the user's text, drawn as written (no mathtext)
    })
    return _Figures


def _clip(text: str, most: int = 48) -> str:
    """A user's text for a legend or title: as written, cut with a mark where it would not fit."""
    return text if len(text) <= most else text[: most - 1] + "…"


def _svg(fig) -> str:
    buf = io.BytesIO()
    fig.savefig(buf, format="svg", metadata={"Date": None}, bbox_inches="tight")
    return "data:image/svg+xml;base64," + base64.b64encode(buf.getvalue()).decode("ascii")


def _conv(values, si_unit, system, difference=False):
    return [units.display(x, si_unit, system, difference=difference, absolute=True)[0] for x in values]


def _label(name, si_unit, system):
    return f"{name} [{units.display_label(si_unit, system, absolute=True)}]"


def diagrams(results, system: str) -> dict[str, str]:
    """P–v and T–s diagrams of a job, as SVG data URIs, keyed 'pv' and 'ts'."""
    plt = _pyplot()
    out = {}
    legs = results.legs
    sat = results.saturation
    # --- P–v
    fig, ax = plt.subplots(figsize=(6.3, 3.6))
    allv, allP = _plot_paths(ax, results, system, "v", "P")
    vs = Ps = None
    if sat and getattr(results.gas, "pure", True):   # a mixture's envelope: on T–s and P–h only
        vs = _conv([p[2] for p in sat], "m**3/kg", system)
        Ps = _conv([p[1] for p in sat], "Pa", system)
        _dome(ax, vs, Ps)
    if allv and max(allv) / max(min(allv), 1e-300) > 6:
        ax.set_xscale("log")
    if allP and max(allP) / max(min(allP), 1e-300) > 6:
        ax.set_yscale("log")
    if allv:
        _limits(ax, allv, allP, vs, Ps)
    _plain_log_ticks(ax)
    ax.set_xlabel(_label("specific volume v", "m**3/kg", system))
    ax.set_ylabel(_label("pressure P (absolute)", "Pa", system))
    ax.legend(fontsize=7.5, loc="best")
    out["pv"] = _svg(fig)
    plt.close(fig)
    # --- T–s
    fig, ax = plt.subplots(figsize=(6.3, 3.6))
    alls, allT = _plot_paths(ax, results, system, "s", "T")
    ss = Ts = None
    if sat:
        ss = _conv([p[3] for p in sat], "J/(kg*K)", system)
        Ts = _conv([p[0] for p in sat], "K", system)
        _dome(ax, ss, Ts)
    if alls:
        _limits(ax, alls, allT, ss, Ts)
    ax.set_xlabel(_label("specific entropy s", "J/(kg*K)", system) + "  (differences only)")
    ax.set_ylabel(_label("temperature T", "K", system))
    ax.legend(fontsize=7.5, loc="best")
    out["ts"] = _svg(fig)
    plt.close(fig)
    if sat and len(sat[0]) > 4 and any(st.quality is not None for leg in legs for st in leg.path):
        out["ph"] = _ph(plt, results, system, sat)
    return out


def _ph(plt, results, system: str, sat) -> str:
    """P–h diagram with the saturation dome or phase envelope, drawn where a state is two-phase."""
    fig, ax = plt.subplots(figsize=(6.3, 3.6))
    allh, allP = _plot_paths(ax, results, system, "h", "P")
    hs = _conv([p[4] for p in sat], "J/kg", system)
    Ps = _conv([p[1] for p in sat], "Pa", system)
    _dome(ax, hs, Ps)
    if allP and max(allP) / max(min(allP), 1e-300) > 6:
        ax.set_yscale("log")
    _limits(ax, allh, allP, hs, Ps)
    # a throttle is a vertical line on P–h: widen to show the envelope around it
    x0, x1 = ax.get_xlim()
    want = 0.5 * (max(hs) - min(hs))
    if x1 - x0 < want:
        mid = 0.5 * (x0 + x1)
        ax.set_xlim(mid - want / 2, mid + want / 2)
    ax.ticklabel_format(axis="x", useOffset=False)
    _plain_log_ticks(ax)
    ax.set_xlabel(_label("specific enthalpy h", "J/kg", system) + "  (differences only)")
    ax.set_ylabel(_label("pressure P (absolute)", "Pa", system))
    ax.legend(fontsize=7.5, loc="best")
    out = _svg(fig)
    plt.close(fig)
    return out


def _dome(ax, xs, ys):
    """The saturation dome (liquid line, then vapour line back): a dashed outline over a light fill."""
    ax.fill(xs, ys, color="#e6e3dc", zorder=0, lw=0)
    ax.plot(xs, ys, color="#7d7d7d", lw=0.9, ls="--", zorder=1, label="saturation (two-phase inside)")


def _plain_log_ticks(ax) -> None:
    """Log axes labelled with plain numbers (2, 5, 10, 20, ...) rather than powers of ten."""
    from matplotlib.ticker import FuncFormatter, LogLocator

    fmt = FuncFormatter(lambda x, _pos: f"{x:g}")
    for axis, scale in ((ax.xaxis, ax.get_xscale()), (ax.yaxis, ax.get_yscale())):
        if scale == "log":
            axis.set_major_locator(LogLocator(base=10, subs=(1.0, 2.0, 5.0)))
            axis.set_major_formatter(fmt)
            axis.set_minor_formatter(FuncFormatter(lambda x, _pos: ""))


def _limits(ax, xs, ys, dome_x=None, dome_y=None):
    """Frame the process, widened to take in the part of the saturation dome that lies near it."""
    logx, logy = ax.get_xscale() == "log", ax.get_yscale() == "log"

    def t(v, log):
        return math.log(v) if log else v

    def pad(lo, hi, log):
        if log:
            return lo / 1.25, hi * 1.25
        span = (hi - lo) or abs(hi) * 0.1 or 1.0
        return lo - 0.08 * span, hi + 0.08 * span
    x0, x1, y0, y1 = min(xs), max(xs), min(ys), max(ys)
    if dome_x:
        # "near": within the process's own extent again on every side (in the scale of each axis)
        ex = (t(x1, logx) - t(x0, logx)) or abs(t(x1, logx)) * 0.2 or 1.0
        ey = (t(y1, logy) - t(y0, logy)) or abs(t(y1, logy)) * 0.2 or 1.0
        near = [(x, y) for x, y in zip(dome_x, dome_y, strict=True)
                if (not logx or x > 0) and (not logy or y > 0)
                and t(x0, logx) - ex <= t(x, logx) <= t(x1, logx) + ex
                and t(y0, logy) - ey <= t(y, logy) <= t(y1, logy) + ey]
        if near:
            x0, x1 = min(x0, *(p[0] for p in near)), max(x1, *(p[0] for p in near))
            y0, y1 = min(y0, *(p[1] for p in near)), max(y1, *(p[1] for p in near))
    ax.set_xlim(*pad(x0, x1, logx))
    ax.set_ylim(*pad(y0, y1, logy))


#: The SI unit of each state property a chart draws.
_STATE_UNITS = {"v": "m**3/kg", "P": "Pa", "s": "J/(kg*K)", "T": "K", "h": "J/kg"}


def _leg_label(leg) -> str:
    """A leg in a chart legend: its states and its name as written (cut with a mark when long)."""
    return f"{leg.i}→{leg.i + 1}  {_clip(leg.name)}"


def _plot_paths(ax, results, system, x: str, y: str) -> tuple[list[float], list[float]]:
    """Every leg drawn along its computed path in the plane (x, y), and the numbered states marked; returns
    every plotted x and y (in display units) for framing the axes."""
    xs: list[float] = []
    ys: list[float] = []
    for k, leg in enumerate(results.legs):
        xv = _conv([getattr(st, x) for st in leg.path], _STATE_UNITS[x], system)
        yv = _conv([getattr(st, y) for st in leg.path], _STATE_UNITS[y], system)
        xs += xv
        ys += yv
        ax.plot(xv, yv, color=PALETTE[k % len(PALETTE)], label=_leg_label(leg))
    _mark_states(ax, results, system, x, y)
    return xs, ys


def _mark_states(ax, results, system, x, y):
    unit = _STATE_UNITS
    for rec in results.states:
        xv = units.display(getattr(rec.state, x), unit[x], system, absolute=True)[0]
        yv = units.display(getattr(rec.state, y), unit[y], system, absolute=True)[0]
        ax.plot([xv], [yv], "o", ms=3.5, color="#111111", zorder=5)
        ax.annotate(rec.label, (xv, yv), textcoords="offset points", xytext=(4, 4), fontsize=7.5)


def sweep_chart(sweep: dict, system: str) -> str:
    """The followed results of a sweep against the varied input: one small panel per result (at most
    six), sharing the input axis. Values as the results file holds them, converted for display."""
    plt = _pyplot()
    series = sweep["series"][:6]
    unit = sweep["unit"]
    xs = [p["value"]["value"] for p in sweep["points"]]
    x = _conv(xs, unit, system) if unit else xs
    fig, axes = plt.subplots(max(1, len(series)), 1, figsize=(6.3, 1.7 * max(1, len(series)) + 0.4), sharex=True,
                             squeeze=False)
    for k, s in enumerate(series):
        ax = axes[k][0]
        pts = [(xv, yv) for xv, yv in zip(x, s["values"], strict=True) if yv is not None]
        y = _conv([p[1] for p in pts], s["unit"], system) if s["unit"] else [p[1] for p in pts]
        ax.plot([p[0] for p in pts], y, "o-", ms=3, color=PALETTE[k % len(PALETTE)])
        ax.set_ylabel(units.display_label(s["unit"], system) if s["unit"] else "", fontsize=7.5)
        ax.set_title(_clip(s["name"], 90), fontsize=8, loc="left")
    axes[-1][0].set_xlabel(_label(sweep["input"], unit, system) if unit else sweep["input"])
    fig.tight_layout()
    out = _svg(fig)
    plt.close(fig)
    return out


def time_chart(results, system: str) -> str:
    """Pressure and gas temperature in a vessel against time (two panels sharing the time axis), legs one
    after another, each along its computed time series; the wall temperature dashed where a wall is modelled."""
    plt = _pyplot()
    fig, (axP, axT) = plt.subplots(2, 1, figsize=(6.3, 4.6), sharex=True)
    t0 = 0.0
    for k, leg in enumerate(results.legs):
        ts = leg.series or {}
        if not ts:
            continue
        t = [t0 + x for x in ts["t"]]
        colour = PALETTE[k % len(PALETTE)]
        label = _leg_label(leg)
        axP.plot(t, _conv(ts["P"], "Pa", system), color=colour, label=label)
        axT.plot(t, _conv(ts["T"], "K", system), color=colour, label=label)
        if "T_wall" in ts:
            axT.plot(t, _conv(ts["T_wall"], "K", system), color=colour, ls="--", lw=1.1, label=f"{leg.name}: wall")
        t0 = t[-1]
    axP.set_ylabel(_label("pressure P (absolute)", "Pa", system))
    axT.set_ylabel(_label("temperature T", "K", system))
    axT.set_xlabel(_label("time t", "s", system))
    for ax in (axP, axT):
        ax.legend(fontsize=7, loc="best")
    fig.tight_layout()
    out = _svg(fig)
    plt.close(fig)
    return out


#: The processes of the ideal indicator diagram as the chart labels them (corner numbers of the cycle).
_PROCESS_LABELS = {"compression": "1→2 compression", "discharge": "2→3 discharge",
                   "re_expansion": "3→4 re-expansion", "suction": "4→1 suction"}


def indicator_chart(cyl: dict, system: str) -> str:
    """The ideal indicator diagram of one cylinder's head end (pressure against cylinder volume for one
    revolution), each process drawn and labelled, from the points in the results file."""
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(6.3, 3.3))
    loop = cyl["indicator_head_end"]
    for k, (proc, label) in enumerate(_PROCESS_LABELS.items()):
        V = _conv(loop[proc]["V"]["value"], "m**3|cyl", system)
        P = _conv(loop[proc]["P"]["value"], "Pa", system)
        ax.plot(V, P, color=PALETTE[k], label=label)
        mid = len(V) // 2
        at = (V[mid], P[mid]) if len(V) > 2 else (0.5 * (V[0] + V[-1]), P[0])
        ax.annotate(label, at, textcoords="offset points",
                    xytext=(4, 6 if proc != "suction" else -12), fontsize=7.5, color=PALETTE[k])
    ax.set_xlabel(_label("cylinder volume V (head end)", "m**3|cyl", system))
    ax.set_ylabel(_label("pressure P (absolute)", "Pa", system))
    ax.set_xlim(left=0)
    ax.set_ylim(bottom=0)
    ax.legend(fontsize=7.5, loc="upper right")
    out = _svg(fig)
    plt.close(fig)
    return out
