"""The range over which each shipped fluid's reference equation of state was validated by its authors.

CoolProp evaluates these equations beyond that range (nitrogen up to 2000 K, for example): there the
numbers are extrapolations. Each entry is the range stated in the title of the fluid's reference paper,
the paper CoolProp names for the fluid's equation of state (``CoolProp.CoolProp.get_BibTeXKey(fluid,
'EOS')``); the full citation is in CoolProp's bibliography and printed in the report's references.
"""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["PAPER_RANGE", "PaperRange", "paper_range"]


@dataclass(frozen=True)
class PaperRange:
    """Upper temperature [K] and pressure [Pa] of a reference equation's stated range, and its bibliography key."""

    bibkey: str
    Tmax: float
    pmax: float


PAPER_RANGE: dict[str, PaperRange] = {
    # Span, Lemmon, Jacobsen, Wagner, Yokozeki, J. Phys. Chem. Ref. Data 29, 1361 (2000): "... Nitrogen for
    # Temperatures from 63.151 to 1000 K and Pressures to 2200 MPa"
    "Nitrogen": PaperRange("Span-JPCRD-2000", 1000.0, 2200e6),
    # Setzmann, Wagner, J. Phys. Chem. Ref. Data 20, 1061 (1991): "... Methane Covering the Range from the
    # Melting Line to 625 K at Pressures up to 1000 MPa"
    "Methane": PaperRange("Setzmann-JPCRD-1991", 625.0, 1000e6),
    # Span, Wagner, J. Phys. Chem. Ref. Data 25, 1509 (1996): "... Carbon Dioxide Covering the Fluid Region from
    # the Triple Point Temperature to 1100 K at Pressures up to 800 MPa"
    "CarbonDioxide": PaperRange("Span-JPCRD-1996", 1100.0, 800e6),
    # Lemmon, Jacobsen, Penoncello, Friend, J. Phys. Chem. Ref. Data 29, 331 (2000): "... Air and Mixtures of
    # Nitrogen, Argon, and Oxygen from 60 to 2000 K at Pressures to 2000 MPa"
    "Air": PaperRange("Lemmon-JPCRD-2000", 2000.0, 2000e6),
    # Tegeler, Span, Wagner, J. Phys. Chem. Ref. Data 28, 779 (1999): "... Argon Covering the Fluid Region for
    # Temperatures From the Melting Line to 700 K at Pressures up to 1000 MPa"
    "Argon": PaperRange("Tegeler-JPCRD-1999", 700.0, 1000e6),
    # Buecker, Wagner, J. Phys. Chem. Ref. Data 35, 205 (2006): "... Ethane for Temperatures from the Melting
    # Line to 675 K and Pressures up to 900 MPa"
    "Ethane": PaperRange("Buecker-JPCRD-2006", 675.0, 900e6),
    # Lemmon, McLinden, Wagner, J. Chem. Eng. Data 54, 3141 (2009): "... Propane for Temperatures from the
    # Melting Line to 650 K and Pressures up to 1000 MPa"
    "Propane": PaperRange("Lemmon-JCED-2009", 650.0, 1000e6),
}


def paper_range(fluid: str) -> PaperRange | None:
    """The stated range of the fluid's reference equation (``fluid`` as CoolProp names it), if tabulated."""
    return PAPER_RANGE.get(fluid)
