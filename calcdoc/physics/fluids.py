"""The fluids the equation-of-state library knows: names, aliases, and the closest names to a misspelt one."""
from __future__ import annotations

import difflib
from functools import lru_cache

__all__ = ["TRADE_NAMES", "closest_fluids", "component_name", "fluid_names", "known_fluid", "molar_mass"]


#: The trade's short names of mixture components → CoolProp fluid names (the one table).
TRADE_NAMES: dict[str, str] = {
    "C1": "Methane", "C2": "Ethane", "C3": "Propane", "iC4": "IsoButane", "nC4": "n-Butane",
    "iC5": "Isopentane", "nC5": "n-Pentane", "nC6": "n-Hexane", "N2": "Nitrogen", "CO2": "CarbonDioxide",
    "H2S": "HydrogenSulfide", "H2O": "Water", "He": "Helium", "H2": "Hydrogen", "Ar": "Argon",
}


def component_name(name: str) -> str:
    """The CoolProp name of a mixture component given by CoolProp name or by the trade's short name."""
    return TRADE_NAMES.get(name, name)


def molar_mass(name: str) -> float | None:
    """Molar mass of a pure fluid [kg/mol] from CoolProp, or None if the name is unknown."""
    import CoolProp.CoolProp as CP

    try:
        return float(CP.PropsSI("molar_mass", component_name(name)))
    except ValueError:
        return None


@lru_cache(maxsize=1)
def fluid_names() -> dict[str, str]:
    """Every name CoolProp accepts (fluid names and their aliases) → the fluid's own name."""
    import CoolProp.CoolProp as CP

    names = CP.get_global_param_string("FluidsList").split(",")
    out = {nm: nm for nm in names}
    for nm in names:
        try:
            for a in CP.get_fluid_param_string(nm, "aliases").split(","):
                if a:
                    out.setdefault(a, nm)
        except ValueError:
            continue
    return out


def known_fluid(name: str) -> bool:
    """True when CoolProp knows ``name`` as a pure fluid or an alias of one (not a mixture string such as
    'A&B' or a predefined '.mix', which CoolProp would parse itself)."""
    import CoolProp.CoolProp as CP

    if not name or any(ch in name for ch in "&[]") or name.lower().endswith((".mix", ".mixture")) or "::" in name:
        return False
    try:
        CP.get_fluid_param_string(name, "name")
    except ValueError:
        return False
    return True


def closest_fluids(name: str, n: int = 3) -> list[str]:
    """The fluids whose names or aliases are closest to ``name``."""
    known = fluid_names()
    close = difflib.get_close_matches(name, list(known), n=6, cutoff=0.6)
    return list(dict.fromkeys(known[c] for c in close))[:n]
