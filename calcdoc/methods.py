"""The catalogue of methods: every formula calcdoc uses, with the source it comes from.

A ``Calc`` names a method id; the report numbers the references of the methods actually used.
A formula with no entry here is a defect (a test checks that every id used has one).
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

__all__ = ["METHODS", "REFERENCES", "Method", "fluid_reference", "method", "reference"]


@dataclass(frozen=True)
class Method:
    title: str
    equation: str
    refs: tuple[str, ...]


REFERENCES: dict[str, str] = {
    "cengel2019": "Çengel, Y. A., Boles, M. A., Kanoğlu, M. Thermodynamics: An Engineering Approach, "
                  "9th ed. McGraw-Hill Education, New York, 2019. Ch. 4 (moving boundary work, polytropic "
                  "process), ch. 7 (entropy, isentropic relations of ideal gases).",
    "moran2014": "Moran, M. J., Shapiro, H. N., Boettner, D. D., Bailey, M. B. Fundamentals of Engineering "
                 "Thermodynamics, 8th ed. Wiley, Hoboken NJ, 2014. Sec. 2.2 (energy transfer by work, "
                 "polytropic processes), sec. 6 (entropy).",
    "codata2018": "Tiesinga, E., Mohr, P. J., Newell, D. B., Taylor, B. N. CODATA recommended values of the "
                  "fundamental physical constants: 2018. Rev. Mod. Phys. 93, 025010 (2021). "
                  "doi:10.1103/RevModPhys.93.025010. Molar gas constant R = 8.314 462 618 J/(mol·K) (exact).",
    "usstd1976": "U.S. Standard Atmosphere, 1976. NOAA, NASA, U.S. Air Force, Washington DC, 1976, "
                 "NOAA-S/T 76-1562. Pressure in the troposphere, eq. (33a) with geopotential height eq. (18).",
    "bell2014": "Bell, I. H., Wronski, J., Quoilin, S., Lemort, V. Pure and Pseudo-pure Fluid Thermophysical "
                "Property Evaluation and the Open-Source Thermophysical Property Library CoolProp. "
                "Ind. Eng. Chem. Res. 53(6), 2498–2508 (2014). doi:10.1021/ie4033999.",
}

METHODS: dict[str, Method] = {
    "input": Method("Value as given in the job file", "", ()),
    "eos.real": Method("Real-gas properties from the fluid's reference Helmholtz-energy equation of state, "
                       "evaluated with CoolProp", "u, h, s, Z = f(two independent properties)", ("bell2014",)),
    "eos.ideal": Method("Ideal gas with constant specific heats", "P·v = R·T;  Δh = cp·ΔT;  Δu = cv·ΔT;  "
                        "Δs = cp·ln(T2/T1) − R·ln(P2/P1)", ("cengel2019",)),
    "ideal.R": Method("Specific gas constant from the molar gas constant", "R = R_u / M", ("codata2018",)),
    "ideal.cp": Method("Specific heats of an ideal gas from k and R", "cp = k·R/(k − 1);  cv = R/(k − 1)",
                       ("cengel2019",)),
    "atm.std": Method("Site atmospheric pressure from the standard atmosphere", "P = P0·(T0/(T0 + L·H))^(g0·M0/(R*·L))",
                      ("usstd1976",)),
    "gauge": Method("Absolute pressure from gauge pressure", "P = P_g + P_atm", ("cengel2019",)),
    "state.mass": Method("Mass of gas from volume and specific volume", "m = V / v", ("cengel2019",)),
    "state.volume": Method("Volume from mass and specific volume", "V = m·v", ("cengel2019",)),
    "path.polytropic": Method("Polytropic path", "P·Vⁿ = const", ("cengel2019", "moran2014")),
    "path.polytropic_n": Method("Polytropic exponent from two measured states",
                                "n = ln(P2/P1) / ln(V1/V2)", ("moran2014",)),
    "work.polytropic": Method("Boundary work of a polytropic process (n ≠ 1)",
                              "W = (P2·V2 − P1·V1)/(1 − n)", ("cengel2019", "moran2014")),
    "work.polytropic_n1": Method("Boundary work of a polytropic process, form exact for n = 1 and accurate "
                                 "near it", "W = P1·V1·[exp((1 − n)·ln r) − 1]/(1 − n), r = V2/V1; "
                                 "W = P1·V1·ln(V2/V1) at n = 1", ("cengel2019", "moran2014")),
    "work.isobaric": Method("Boundary work at constant pressure", "W = P·(V2 − V1)", ("cengel2019",)),
    "work.isochoric": Method("No boundary work at constant volume", "W = 0", ("cengel2019",)),
    "work.adiabatic": Method("Work of a reversible adiabatic (isentropic) process from the first law",
                             "W = −ΔU (Q = 0)", ("cengel2019",)),
    "heat.isothermal": Method("Heat of a reversible isothermal process from the definition of entropy",
                              "Q = T·ΔS", ("cengel2019", "moran2014")),
    "firstlaw.closed": Method("First law for a closed system", "Q = ΔU + W", ("cengel2019",)),
    "firstlaw.work": Method("Work from the first law for a closed system", "W = Q − ΔU", ("cengel2019",)),
    "ratio.leg": Method("Pressure or volume ratio of a leg, end over start (as the pressure ratio and "
                        "compression ratio of gas cycles)", "r_p = P_end / P_start;  r_v = v_end / v_start",
                        ("cengel2019",)),
    "prop.difference": Method("Change of an extensive property of a fixed mass", "ΔX = m·(x2 − x1)",
                              ("cengel2019",)),
}

_BIBTEX_FILE = "CoolPropBibTeXLibrary.bib"


def method(method_id: str) -> Method:
    return METHODS[method_id]


def reference(key: str) -> str:
    """Full citation of a reference key: ours, or a key of CoolProp's bibliography."""
    if key in REFERENCES:
        return REFERENCES[key]
    return fluid_reference(key)


@lru_cache(maxsize=64)
def fluid_reference(bibkey: str) -> str:
    """Citation of a CoolProp bibliography entry (the fluid's equation of state), from the BibTeX file
    CoolProp ships."""
    import os

    import CoolProp

    path = os.path.join(os.path.dirname(CoolProp.__file__), _BIBTEX_FILE)
    with open(path, encoding="utf-8", errors="replace") as fh:
        text = fh.read()
    m = re.search(r"@\w+\{" + re.escape(bibkey) + r",(.*?)\n\}", text, re.S)
    if not m:
        return f"{bibkey} (as named in CoolProp's bibliography)"
    fields = dict((k.lower(), v) for k, v in re.findall(r"(\w+)\s*=\s*\{(.*?)\},?\s*\n", m.group(1), re.S))

    def clean(s: str) -> str:
        s = re.sub(r"\\[a-zA-Z]+\{(.*?)\}", r"\1", s)
        s = s.replace("{", "").replace("}", "").replace("\\", "")
        return re.sub(r"\s+", " ", s).strip()

    authors = clean(fields.get("author", "")).replace(" and ", "; ")
    parts = [authors + ".", clean(fields.get("title", "")) + "."]
    journal = clean(fields.get("journal", fields.get("booktitle", "")))
    vol = clean(fields.get("volume", ""))
    num = clean(fields.get("number", ""))
    pages = clean(fields.get("pages", "")).replace("--", "–").replace("-", "–")
    year = clean(fields.get("year", ""))
    src = journal
    if vol:
        src += f" {vol}" + (f"({num})" if num else "")
    if pages:
        src += f", {pages}"
    if year:
        src += f" ({year})"
    parts.append(src + ".")
    doi = clean(fields.get("doi", ""))
    if doi:
        parts.append(f"doi:{doi}.")
    return " ".join(p for p in parts if p.strip(". "))
