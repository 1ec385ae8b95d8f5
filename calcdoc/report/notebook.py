"""Results shown as tables in a notebook (``Results._repr_html_``). Presentation only."""
from __future__ import annotations

from html import escape

from .. import units
from .words import gas_text, say


def _v(value, si_unit: str, system: str, sig: int = 5) -> str:
    if value is None:
        return "—"
    v, _ = units.display(value, si_unit, system)
    return f"{v:.{sig}g}"


def _u(si_unit: str, system: str) -> str:
    return escape(units.display_label(si_unit, system))


def results_html(res) -> str:
    """The states, the legs and the checks of a job as HTML tables (units of the job's unit system)."""
    S = res.job.units
    t = res.job.calc
    out = [f"<div><b>{escape(t.number)} rev {escape(t.revision)}</b>: {escape(t.title)}<br>"
           f"<small>{escape(gas_text(res.gas))}</small>"]
    cols = (("P", "Pa"), ("T", "K"), ("v", "m**3/kg"), ("u", "J/kg"), ("h", "J/kg"), ("s", "J/(kg*K)"), ("Z", ""))
    out.append("<table><thead><tr><th>State</th>" + "".join(
        f"<th>{c} [{_u(u, S)}]</th>" if u else f"<th>{c}</th>" for c, u in cols) + "<th>Phase</th></tr></thead><tbody>")
    for rec in res.states:
        out.append(f"<tr><td>{escape(rec.label)}</td>" + "".join(
            f"<td>{_v(getattr(rec.state, c), u, S)}</td>" for c, u in cols) + f"<td>{escape(rec.state.phase)}</td></tr>")
    out.append("</tbody></table>")
    keys = list(dict.fromkeys(k for leg in res.legs for k in leg.quantities))
    units_of = {k: c.unit for leg in res.legs for k, c in leg.quantities.items()}
    out.append("<table><thead><tr><th>Leg</th><th>Process</th>" + "".join(
        f"<th>{escape(k)}" + (f" [{_u(units_of[k], S)}]" if units_of[k] else "") + "</th>" for k in keys)
        + "</tr></thead><tbody>")
    for leg in res.legs:
        cells = "".join(f"<td>{_v(leg.quantities[k].value, units_of[k], S) if k in leg.quantities else '—'}</td>"
                        for k in keys)
        out.append(f"<tr><td>{leg.i}→{leg.i + 1} {escape(leg.name)}</td><td>{escape(leg.process)}</td>{cells}</tr>")
    out.append("</tbody></table>")
    if res.checks:
        out.append("<table><thead><tr><th>Check</th><th>At</th><th>Value</th><th>Limit</th><th>Margin</th>"
                   "<th>Result</th></tr></thead><tbody>")
        for c in res.checks:
            u = _u(c.unit, S) if c.unit else ""
            mu = escape(units.display(1.0, c.unit, S, difference=True)[1]) if c.unit else ""
            margin = units.display(c.margin, c.unit, S, difference=True)[0] if c.unit else c.margin
            out.append(f"<tr><td>{escape(c.name)}</td><td>{escape(c.where)}</td><td>{_v(c.value.value, c.unit, S)} {u}</td>"
                       f"<td>{c.kind} {_v(c.limit, c.unit, S)} {u}</td><td>{margin:.4g} {mu}</td>"
                       f"<td><b>{c.status.upper()}</b></td></tr>")
        out.append("</tbody></table>")
        out.append(f"<p><b>{'All checks pass.' if res.passed else 'A design check FAILS: this calculation does not pass.'}</b></p>")
    for w in res.warnings:
        out.append(f"<p>Warning: {escape(say(w, S))}</p>")
    out.append("</div>")
    return "\n".join(out)
