"""The catalogue of methods: every formula calcdoc uses, with the source it comes from.

A ``Calc`` names a method id; the report numbers the references of the methods actually used.
A formula with no entry here is a defect (a test checks that every id used has one).
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

__all__ = ["METHODS", "REFERENCES", "Method", "Reference", "fluid_reference", "method", "reference"]


@dataclass(frozen=True)
class Method:
    title: str
    equation: str
    refs: tuple[str, ...]


@dataclass(frozen=True)
class Reference:
    """A source a signer can stand behind: who wrote it, what it is, which edition or year, and where in it.

    ``checked`` names the document at hand the entry was checked against (kept in the code, not printed):
    an entry no document at hand confirms does not belong here; say the method in general words instead.
    """

    authors: str
    title: str
    edition: str          # edition and/or year
    publisher: str        # publisher, journal or issuing body
    locator: str          # chapter, section or equation used
    checked: str

    def text(self) -> str:
        parts = [self.authors.rstrip(".") + ".", self.title.rstrip(".") + ".", self.edition.rstrip(".") + ".",
                 self.publisher.rstrip(".") + ".", self.locator.rstrip(".") + "."]
        return " ".join(p for p in parts if p.strip(". "))


REFERENCES: dict[str, Reference] = {
    "cengel2019cv": Reference(
        "Çengel, Y. A., Boles, M. A., Kanoğlu, M.", "Thermodynamics: An Engineering Approach",
        "9th ed., 2019", "McGraw-Hill Education, New York",
        "Ch. 5 (mass and energy analysis of control volumes: unsteady-flow processes, charging and "
        "discharging of rigid vessels), ch. 17 (compressible flow: isentropic flow through nozzles, critical "
        "ratios, choked flow)",
        "title page and table of contents of the 9th edition (stored public copy)"),
    "virtanen2020": Reference(
        "Virtanen, P., Gommers, R., Oliphant, T. E., et al. (SciPy 1.0 Contributors)",
        "SciPy 1.0: Fundamental Algorithms for Scientific Computing in Python", "2020",
        "Nature Methods 17(3), 261–272, doi:10.1038/s41592-019-0686-2",
        "The library as a whole; scipy.integrate.solve_ivp and scipy.optimize.brentq are used here (whole paper)",
        "SciPy's own citation page and CITATION.bib"),
    "cengel2019": Reference(
        "Çengel, Y. A., Boles, M. A., Kanoğlu, M.", "Thermodynamics: An Engineering Approach",
        "9th ed., 2019", "McGraw-Hill Education, New York",
        "Ch. 1 (pressure, gauge and absolute), ch. 4 (energy analysis of closed systems: boundary work, "
        "polytropic process, ideal-gas specific heats), ch. 5 (mass and energy analysis of control volumes: "
        "steady-flow devices, throttling), ch. 7 (entropy: isentropic and polytropic relations of ideal gases, "
        "reversible steady-flow work)",
        "title page and table of contents of the 9th edition (stored public copy)"),
    "codata2018": Reference(
        "CODATA Task Group on Fundamental Constants (Tiesinga, E., Mohr, P. J., Newell, D. B., Taylor, B. N.)",
        "The 2018 CODATA Recommended Values of the Fundamental Physical Constants",
        "2018 adjustment, released 20 May 2019", "NIST, Gaithersburg MD (physics.nist.gov/cuu/Constants)",
        "Molar gas constant R = 8.314 462 618… J/(mol·K), exact",
        "scipy.constants (CODATA 2018 table, molar gas constant listed as exact)"),
    "usstd1976": Reference(
        "NOAA, NASA, U.S. Air Force (U.S. Committee on Extension to the Standard Atmosphere)",
        "U.S. Standard Atmosphere, 1976", "1976", "U.S. Government Printing Office, Washington DC",
        "Lower atmosphere: temperature and pressure by layer in geopotential height; troposphere layer "
        "(lapse rate −6.5 K/km) used here",
        "COESA description of the 1976 standard (stored public pages)"),
    "bell2014": Reference(
        "Bell, I. H., Wronski, J., Quoilin, S., Lemort, V.",
        "Pure and Pseudo-pure Fluid Thermophysical Property Evaluation and the Open-Source Thermophysical "
        "Property Library CoolProp", "2014", "Ind. Eng. Chem. Res. 53(6), 2498–2508, doi:10.1021/ie4033999",
        "Whole paper (property evaluation from Helmholtz-energy equations of state)",
        "CoolProp's own bibliography file, entry Bell-IECR-2014"),
    "schultz1962": Reference(
        "Schultz, J. M.", "The Polytropic Analysis of Centrifugal Compressors", "1962",
        "American Society of Mechanical Engineers (paper, Journal of Engineering for Power)",
        "Whole paper: the real-gas polytropic relations with the compressibility functions X and Y, and the "
        "polytropic head factor f",
        "first page of the paper (stored public copy)"),
    "asmeptc10": Reference(
        "The American Society of Mechanical Engineers", "ASME PTC 10-1997, Performance Test Code on "
        "Compressors and Exhausters", "1997 edition, issued 30 September 1998", "ASME, New York",
        "Sec. 5 (computation of results, real-gas dimensionless parameters); figs. 3.6 and 3.7 (Schultz "
        "compressibility functions)",
        "title page, date of issuance and contents of PTC 10-1997 (stored public copies)"),
    "dixon2014": Reference(
        "Dixon, S. L., Hall, C. A.", "Fluid Mechanics and Thermodynamics of Turbomachinery",
        "7th ed., 2014 (published October 2013)", "Butterworth-Heinemann (Elsevier), Oxford",
        "Ch. 1, basic principles: the first law for steady flow, definitions of efficiency, small-stage "
        "(polytropic) efficiency of compressors and turbines",
        "publisher's page of the 7th edition with its table of contents"),
    "dormand1980": Reference(
        "Dormand, J. R., Prince, P. J.", "A family of embedded Runge–Kutta formulae", "1980",
        "Journal of Computational and Applied Mathematics 6(1), 19–26",
        "The 5(4) pair (coefficients of the embedded formulae)",
        "SciPy's RK45 docstring, reference [1]"),
    "hairer1993": Reference(
        "Hairer, E., Nørsett, S. P., Wanner, G.", "Solving Ordinary Differential Equations I: Nonstiff Problems",
        "2nd ed., 1993", "Springer, Berlin (Springer Series in Computational Mathematics 8)",
        "Sec. II.4 (practical computation: error estimation, step-size control, starting step)",
        "SciPy's RK45 docstring (sec. II.4) and stored reference lists giving the 2nd edition, 1993"),
    "Wagner-JPCRD-2002": Reference(
        "Wagner, W., Pruß, A.", "The IAPWS Formulation 1995 for the Thermodynamic Properties of Ordinary Water "
        "Substance for General and Scientific Use", "2002", "J. Phys. Chem. Ref. Data 31, 387–535, "
        "doi:10.1063/1.1461829", "Whole paper (the saturation pressure of water from the equation of state)",
        "CoolProp's own bibliography file, entry Wagner-JPCRD-2002"),
}

METHODS: dict[str, Method] = {
    "input": Method("Value as given in the job file", "", ()),
    "moist.ideal_mixture": Method(
        "Moist air as an ideal mixture (volumes additive at P and T) of the dry-air model and water vapour as an "
        "ideal gas at its partial pressure, with the ideal-gas properties of water from its reference equation of "
        "state (not the real-moist-air model of CoolProp's humid-air functions, which these results are checked "
        "against in calcdoc's tests); W in kg of water per kg of dry air",
        "W = ε·p_v/(P − p_v), ε = M_w/M_a;  v = w_a·v_a(P, T) + w_v·R_v·T/P;  h = w_a·h_a(P, T) + w_v·h_v°(T);  "
        "w_a = 1/(1 + W), w_v = W/(1 + W)", ("Wagner-JPCRD-2002", "bell2014")),
    "moist.p_ws": Method("Saturation pressure of water over liquid (dew point: its inverse), from the reference "
                         "equation of state of water, with no enhancement factor: the saturation humidity ratio is "
                         "then below that of real moist air (by about 0.4 % at 1 atm and 2 % at 8 bar against "
                         "CoolProp's real-moist-air functions), so condensate is slightly overstated",
                         "p_ws = p_sat,water(T)",
                         ("Wagner-JPCRD-2002",)),
    "moist.condensate": Method(
        "Cooling below the dew point: saturated outlet, the excess water drained as liquid at the outlet "
        "temperature; steady-flow energy balance with the drained liquid leaving",
        "ṁ_da = ṁ_1/(1 + W_1);  ṁ_c = ṁ_da·(W_1 − W_2);  Q̇ = (ṁ_1 − ṁ_c)·h_2 + ṁ_c·h_f − ṁ_1·h_1",
        ("cengel2019",)),
    "moist.receiver": Method(
        "Fixed mass of moist air at constant volume: the end pressure from the volume balance of the gas and any "
        "condensed liquid; heat from the first law with the liquid's internal energy",
        "m_da·(1 + W_2)·v(P_2, T_2, W_2) + m_c·v_f = V;  Q = ΔU = (m_g·u_2 + m_c·u_f) − m·u_1",
        ("cengel2019", "Wagner-JPCRD-2002")),
    "moist.liquid": Method("Enthalpy of the drained liquid water from the reference equation of state of water",
                           "h_f = h_water(P_2, T_2)", ("Wagner-JPCRD-2002", "bell2014")),
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
    "path.constant": Method("Property held constant along the path (the definition of the process)",
                            "x_2 = x_1 (T isothermal, P isobaric, v isochoric)", ("cengel2019",)),
    "state.specific_volume": Method("Specific volume of a fixed mass from its volume", "v = V / m", ("cengel2019",)),
    "state.volume": Method("Volume from mass and specific volume", "V = m·v", ("cengel2019",)),
    "path.polytropic": Method("Polytropic path", "P·Vⁿ = const", ("cengel2019",)),
    "path.polytropic_n": Method("Polytropic exponent from two measured states",
                                "n = ln(P2/P1) / ln(V1/V2)", ("cengel2019",)),
    "work.polytropic": Method("Boundary work of a polytropic process (n ≠ 1)",
                              "W = (P2·V2 − P1·V1)/(1 − n)", ("cengel2019",)),
    "work.polytropic_n1": Method("Boundary work of a polytropic process, form exact for n = 1 and accurate "
                                 "near it", "W = P1·V1·[exp((1 − n)·ln r) − 1]/(1 − n), r = V2/V1; "
                                 "W = P1·V1·ln(V2/V1) at n = 1", ("cengel2019",)),
    "work.isobaric": Method("Boundary work at constant pressure", "W = P·(V2 − V1)", ("cengel2019",)),
    "work.isochoric": Method("No boundary work at constant volume", "W = 0", ("cengel2019",)),
    "work.adiabatic": Method("Work of a reversible adiabatic (isentropic) process from the first law",
                             "W = −ΔU (Q = 0)", ("cengel2019",)),
    "heat.isothermal": Method("Heat of a reversible isothermal process from the definition of entropy",
                              "Q = T·ΔS", ("cengel2019",)),
    "firstlaw.closed": Method("First law for a closed system", "Q = ΔU + W", ("cengel2019",)),
    "firstlaw.work": Method("Work from the first law for a closed system", "W = Q − ΔU", ("cengel2019",)),
    "ratio.leg": Method("Pressure or volume ratio of a leg, end over start (as the pressure ratio and "
                        "compression ratio of gas cycles)", "r_p = P_end / P_start;  r_v = v_end / v_start",
                        ("cengel2019",)),
    "prop.difference": Method("Change of an extensive property of a fixed mass", "ΔX = m·(x2 − x1)",
                              ("cengel2019",)),
    # -- steady flow (calcdoc.flow) ---------------------------------------------------------------
    "flow.ratio": Method("Pressure ratio of a stage", "r = P2/P1", ("cengel2019",)),
    "flow.mass_flow": Method("Mass flow from a molar or volume flow", "ṁ = ṅ·M;  ṁ = V̇/v", ("cengel2019",)),
    "flow.firstlaw_adiabatic": Method("First law for an adiabatic steady-flow machine (kinetic and potential "
                                      "energy neglected)", "w_in = h2 − h1", ("cengel2019", "dixon2014")),
    "flow.firstlaw_heat": Method("First law for steady flow", "q_in + w_in = h2 − h1", ("cengel2019",)),
    "flow.head_isentropic": Method("Isentropic head: enthalpy rise to the isentropic end state at the end "
                                   "pressure", "H_s = h(P2, s1) − h1", ("dixon2014", "asmeptc10")),
    "flow.head_polytropic": Method("Polytropic head: ∫v·dP along the path of constant polytropic efficiency, "
                                   "where v·dP = η_p·dh (compressor) or dh = η_p·v·dP (expander)",
                                   "H_p = η_p·(h2 − h1) (compressor);  H_p = (h2 − h1)/η_p (expander)",
                                   ("schultz1962", "dixon2014")),
    "flow.eta_s": Method("Isentropic efficiency", "η_s = (h2s − h1)/(h2 − h1) (compressor); "
                         "η_s = (h2 − h1)/(h2s − h1) (expander)", ("cengel2019", "dixon2014")),
    "flow.direct": Method("Real-gas path of constant polytropic efficiency integrated with the equation of "
                          "state: dT/d(ln P) = P·[v·(e − 1) + T·(∂v/∂T)_P]/c_p with e = 1/η_p (compressor) or "
                          "η_p (expander), Dormand–Prince 5(4) pair with step control to 1e-6 relative in head",
                          "v·dP = η_p·dh", ("schultz1962", "dixon2014", "dormand1980", "hairer1993", "bell2014")),
    "flow.n_ends": Method("Polytropic exponent from the end states of a stage", "n = ln(P2/P1)/ln(v1/v2)",
                          ("schultz1962", "cengel2019")),
    "flow.power": Method("Power of the flow from a per-unit-mass quantity", "P = ṁ·w;  Q̇ = ṁ·q", ("cengel2019",)),
    "flow.shaft_power": Method("Shaft power from gas power and mechanical efficiency",
                               "P_shaft = P_gas/η_m (compressor);  P_shaft = P_gas·η_m (expander)",
                               ("dixon2014",)),
    "sign.trade": Method("A signed quantity in the trade's sense: heat removed, work done on the gas, power "
                         "delivered, each the signed value (work and heat INTO the gas positive) with its sign "
                         "reversed", "X_out = −X_in", ("cengel2019",)),
    "flow.total": Method("Total over the legs of the train", "ΣX = X_1 + X_2 + …", ("cengel2019",)),
    "flow.pressure_drop": Method("Outlet pressure of a heat exchanger from its pressure drop",
                                 "P2 = P1·(1 − δ)  or  P2 = P1 − ΔP", ("cengel2019",)),
    "flow.throttle": Method("Throttling: adiabatic, no work, enthalpy conserved", "h2 = h1", ("cengel2019",)),
    "flow.work_polytropic": Method("Reversible steady-flow work along P·vⁿ = const",
                                   "w_in = ∫v·dP = n/(n − 1)·(P2·v2 − P1·v1);  P1·v1·ln(P2/P1) at n = 1",
                                   ("cengel2019",)),
    "flow.work_isentropic_ideal": Method("Reversible adiabatic steady-flow work of an ideal gas",
                                         "w_in = k/(k − 1)·P1·v1·((P2/P1)^((k−1)/k) − 1)", ("cengel2019",)),
    "flow.work_isothermal_ideal": Method("Reversible isothermal steady-flow work of an ideal gas",
                                         "w_in = R·T·ln(P2/P1)", ("cengel2019",)),
    "ideal.isentropic_T": Method("Isentropic end temperature of an ideal gas", "T2s = T1·(P2/P1)^((k−1)/k)",
                                 ("cengel2019",)),
    "ideal.polytropic_T": Method("End temperature of an ideal-gas stage at constant polytropic efficiency",
                                 "T2/T1 = (P2/P1)^((k−1)/(k·η_p)) (compressor);  (P2/P1)^(η_p·(k−1)/k) (expander)",
                                 ("dixon2014",)),
    "ideal.polytropic_eta": Method("Polytropic efficiency of an ideal-gas stage from its end temperatures",
                                   "η_p = ((k−1)/k)·ln(P2/P1)/ln(T2/T1) (compressor)", ("dixon2014",)),
    "schultz.ns": Method("Isentropic volume exponent between the inlet and the isentropic end state (Schultz)",
                         "n_s = ln(P2/P1)/ln(v1/v2s)", ("schultz1962", "asmeptc10")),
    "schultz.f": Method("Schultz polytropic head factor", "f = (h2s − h1)/[n_s/(n_s − 1)·(P2·v2s − P1·v1)]",
                        ("schultz1962", "asmeptc10")),
    "schultz.head": Method("Polytropic head and efficiency by the Schultz method, as used in ASME PTC 10",
                           "H_p = f·n/(n − 1)·(P2·v2 − P1·v1);  η_p = H_p/(h2 − h1)", ("schultz1962", "asmeptc10")),
    # -- vessels over time (calcdoc.physics.vessel) ------------------------------------------------------
    "prop.change": Method("Change of a property over a leg, end minus start", "ΔX = X_2 − X_1", ("cengel2019",)),
    "orifice.area": Method("Flow area of a round orifice", "A = π·d²/4", ("cengel2019",)),
    "nozzle.critical": Method("Critical (choking) pressure ratio of isentropic nozzle flow of an ideal gas",
                              "P*/P_0 = (2/(k + 1))^(k/(k − 1))", ("cengel2019cv",)),
    "nozzle.ideal": Method("Mass flow of an isentropic nozzle of an ideal gas times a discharge coefficient, choked "
                           "or subsonic as the pressure ratio requires",
                           "ṁ = C_d·A·P_0·√(k/(R·T_0))·(2/(k + 1))^((k + 1)/(2(k − 1))) (choked);  "
                           "ṁ = C_d·A·P_0/√(R·T_0)·√(2k/(k − 1)·(r^(2/k) − r^((k + 1)/k))), r = P_b/P_0 (subsonic)",
                           ("cengel2019cv",)),
    "nozzle.real": Method("Mass flow of an isentropic nozzle of a real gas times a discharge coefficient: the "
                          "largest mass flux along the isentrope from the stagnation state (choked) or the flux at "
                          "the back pressure (subsonic), properties from the equation of state",
                          "ṁ = C_d·A·max over P_b ≤ P ≤ P_0 of ρ(P, s_0)·√(2·(h_0 − h(P, s_0)))",
                          ("cengel2019cv", "bell2014")),
    "vessel.balance": Method("Mass and energy balance of a rigid vessel with uniform contents, integrated in time "
                             "(SciPy solve_ivp, Dormand–Prince 8(5,3) pair), with an event at the end pressure",
                             "dm/dt = ṁ_in − ṁ_out;  d(m·u)/dt = ṁ_in·h_in − ṁ_out·h + Q̇",
                             ("cengel2019cv", "virtanen2020")),
    # -- reciprocating cylinders (calcdoc.physics.cylinder) ----------------------------------------
    "cylinder.displacement": Method("Piston displacement: the volume swept per revolution by every compressing "
                                    "end (the crank end loses the rod's cross-section), times the speed and the "
                                    "number of identical cylinders; derived from first principles (each line can be checked from its "
                                    "equation)",
                                    "V̇_d = π/4·D²·S·N·z (single acting);  π/4·(2·D² − d²)·S·N·z (double acting)", ()),
    "cylinder.volumetric_efficiency": Method(
        "Volumetric efficiency of a cylinder with clearance: the clearance gas re-expands along P·V^n_e = const "
        "before suction begins (its volume scaled by the compressibility ratio for a real gas), less an "
        "allowance L for valve and ring leakage; the inlet volume flow is η_v times the displacement",
        "η_v = 1 − L − c·((Z_s/Z_d)·r^(1/n_e) − 1);  V̇_in = η_v·V̇_d", ("cengel2019",)),
    "cylinder.mass_flow": Method("Mass flow a cylinder passes: its inlet volume flow at the suction density",
                                 "ṁ_cyl = η_v·V̇_d / v_s", ("cengel2019",)),
    "cylinder.capacity": Method("Capacity of the cylinders against the duty: the flow they pass over the flow "
                                "the job requires; derived from first principles (each line can be checked from its equation)",
                                "capacity = ṁ_cyl / ṁ", ()),
    "cylinder.rod_load": Method("Gas rod load at the dead points from the pressures on the piston faces (force "
                                "balance on piston and rod; no inertia, valve losses or pulsation); the "
                                "atmosphere acts on the rod's cross-section outside the packing; derived from first principles (each "
                                "line can be checked from its equation)",
                                "F_c = P_d·A_he − P_s·A_ce − P_atm·A_rod;  F_t = P_d·A_ce − P_s·A_he + P_atm·A_rod", ()),
    "cylinder.indicator": Method("Ideal indicator diagram: compression along P·V^n_c = const, discharge at P_d, "
                                 "re-expansion of the clearance gas along P·V^n_e = const, suction at P_s; the "
                                 "enclosed area is the work done on the gas per revolution of each end",
                                 "W = (P_d·V_2 − P_s·V_1)/(n_c − 1) + P_d·(V_2 − V_3) − (P_d·V_3 − P_s·V_4)/(n_e − 1) "
                                 "− P_s·(V_1 − V_4);  P_ind = ΣW·N·z", ("cengel2019",)),
    "cylinder.isentropic_exponent": Method("Isentropic volume exponent of the gas at suction, the slope of ln P "
                                           "against ln v at constant entropy, by a central difference of two "
                                           "isentropic states of the gas model (k = cp/cv for an ideal gas)",
                                           "k_v = −(v/P)·(∂P/∂v)_s", ("cengel2019",)),
    "cylinder.settle": Method("Interstage pressures of cylinders in series: the pressures at which every "
                              "cylinder passes the same mass flow, found by bracketing the root on a geometric "
                              "grid and refining it by Brent's method to a relative tolerance of 1e-12; derived from first "
                              "principles (each line can be checked from its equation)",
                              "ṁ_cyl,1(P_i) = ṁ_cyl,2(P_i) = …", ()),
    "staging.given": Method("Stage discharge pressures from the given stage ratios or interstage pressures; the "
                            "last stage takes the rest of the ratio; derived from first principles (each line can "
                            "be checked from its equation)", "P_d,k = r_k·P_s,k;  r_N = P_out/P_s,N", ()),
    "staging.ratio": Method("Equal stage pressure ratios with intercooler pressure drops",
                            "r^N·P_in·(1 − δ)^(N−1) = P_out  (or with absolute drops, solved for r)",
                            ("cengel2019",)),
}

_BIBTEX_FILE = "CoolPropBibTeXLibrary.bib"


def method(method_id: str) -> Method:
    """The catalogue entry of a method id."""
    return METHODS[method_id]


def reference(key: str) -> str:
    """Full citation of a reference key: ours, or a key of CoolProp's bibliography."""
    if key in REFERENCES:
        return REFERENCES[key].text()
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
    fields: dict[str, str] = dict((k.lower(), v) for k, v in re.findall(r"(\w+)\s*=\s*\{(.*?)\},?\s*\n", m.group(1), re.S))

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
