"""The one place where units are parsed and converted.

Inside calcdoc every physical value is an SI float (Pa, K, m3, kg, J, W, ...), pressures absolute and
temperatures absolute. This module turns what a user wrote (``7 barg``, ``25 degC``, ``50 L``) into
those floats, remembers how it was entered, and converts SI values back to the report's unit system.

pint is imported lazily and one registry serves the whole program (pint docs: "a single registry
per application").
"""
from __future__ import annotations

import os
import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

__all__ = [
    "DIMENSIONS",
    "DISPLAY_KINDS",
    "DisplayUnits",
    "Units",
    "display_spec",
    "P_STD",
    "cache_dir",
    "convert",
    "say",
    "pretty_unit",
    "Parsed",
    "UnitParseError",
    "display",
    "display_unit",
    "parse_quantity",
    "registry",
    "standard_atmosphere_pressure",
    "to_si",
]

#: Standard atmosphere at sea level [Pa] (U.S. Standard Atmosphere, 1976, table 1; ISO 2533:1975).
P_STD = 101325.0

#: SI unit of each dimension calcdoc accepts, as pint spells it.
DIMENSIONS: dict[str, str] = {
    "pressure": "Pa",
    "pressure_difference": "Pa",
    "temperature": "K",
    "temperature_difference": "K",
    "volume": "m**3",
    "mass": "kg",
    "length": "m",
    "molar_mass": "kg/mol",
    "specific_gas_constant": "J/(kg*K)",
    "specific_volume": "m**3/kg",
    "specific_energy": "J/kg",
    "specific_entropy": "J/(kg*K)",
    "energy": "J",
    "entropy": "J/K",
    "power": "W",
    "mass_flow": "kg/s",
    "molar_flow": "mol/s",
    "volume_flow": "m**3/s",
    "standard_volume_flow": "m**3/s",
    "density": "kg/m**3",
    "force": "N",
    "rotational_speed": "1/s",       # revolutions per second (read by the job layer's own speed reader)
    "dimensionless": "",
    "time": "s",
    "area": "m**2",
    "specific_heat": "J/(kg*K)",
    "heat_transfer_coefficient": "W/(m**2*K)",
}

# Gauge markers: a pressure unit followed by "g" (barg, psig, kPag, MPag) or "(g)"/" gauge".
_GAUGE = re.compile(r"^(?P<unit>[A-Za-z/0-9]+?)(?:g|\s*\(g\)|\s+g(?:auge)?)$")
_ABS = re.compile(r"^(?P<unit>[A-Za-z/0-9]+?)(?:a|\s*\(a\)|\s+abs(?:olute)?)$")
_PRESSURE_UNITS = {"bar", "mbar", "psi", "kPa", "MPa", "Pa", "kpa", "mpa", "atm", "inHg", "mmHg", "kgf/cm2", "kg/cm2"}

# Volume-flow units that name standard (reference) conditions: accepted only as a standard volume flow,
# whose reference pressure and temperature the job states; converted as the plain volume unit.
_STANDARD_FLOW: dict[str, tuple[float, str]] = {
    "Nm3/h": (1.0, "m**3/hour"), "Nm3/s": (1.0, "m**3/s"), "Nm3/min": (1.0, "m**3/min"), "Nm3/d": (1.0, "m**3/day"),
    "Sm3/h": (1.0, "m**3/hour"), "Sm3/s": (1.0, "m**3/s"), "Sm3/min": (1.0, "m**3/min"), "Sm3/d": (1.0, "m**3/day"),
    "scfm": (1.0, "ft**3/min"), "SCFM": (1.0, "ft**3/min"), "scfh": (1.0, "ft**3/hour"), "SCFH": (1.0, "ft**3/hour"),
    "scfd": (1.0, "ft**3/day"), "SCFD": (1.0, "ft**3/day"), "MMSCFD": (1e6, "ft**3/day"), "MMscfd": (1e6, "ft**3/day"),
    "MMSCMD": (1e6, "m**3/day"), "MMscmd": (1e6, "m**3/day"),
}
_NUMBER = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")
_PERCENT = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*%\s*$")

# Spellings engineers write that pint does not know, mapped to pint's.
_ALIASES = {
    "m3": "m**3", "m2": "m**2", "mm2": "mm**2", "ft2": "ft**2", "cm3": "cm**3", "mm3": "mm**3", "ft3": "ft**3", "in3": "in**3",
    "L": "liter", "l": "liter", "kpa": "kPa", "mpa": "MPa",
    "m3/h": "m**3/hour", "m3/s": "m**3/s", "m3/min": "m**3/min", "ft3/min": "ft**3/min",
    "cfm": "ft**3/min", "acfm": "ft**3/min", "m3/kg": "m**3/kg", "ft3/lb": "ft**3/lb",
    "kg/h": "kg/hour", "kg/m3": "kg/m**3", "lb/ft3": "lb/ft**3", "lb/h": "lb/hour", "lb/hr": "lb/hour",
    "degC": "degC", "°C": "degC", "C": "degC", "degF": "degF", "°F": "degF", "F": "degF",
    "degR": "degR", "R": "degR", "K": "K", "kelvin": "K",
    "kgf/cm2": "kgf/cm**2", "kg/cm2": "kgf/cm**2", "hp": "hp", "g/mol": "g/mol", "kg/kmol": "kg/kmol",
}
_ABSOLUTE_TEMPERATURE_UNITS = {"degC", "degF", "K", "degR"}
# Pressure units by their case-folded spelling (PSIG, Bar, KPA); mPa (millipascal) is not a pressure anyone
# means in a job file, so "mpa" reads as MPa.
_PRESSURE_FOLD = {u.casefold(): u for u in sorted(_PRESSURE_UNITS)} | {"kpa": "kPa", "mpa": "MPa", "pa": "Pa"}
# Datasheet spellings, normalised before any other reading.
_DATASHEET_SPELLINGS = {
    "ACFM": "acfm", "CFM": "cfm", "lbm": "lb", "lbm/h": "lb/hour", "lbm/hr": "lb/hour", "lbm/s": "lb/s",
    "deg C": "degC", "deg F": "degF", "deg R": "degR", "US gal": "gallon", "USgal": "gallon", "gal": "gallon",
    "cu ft": "ft**3", "cu. ft.": "ft**3", "cu in": "in**3", "lb-mol/h": "lbmol/hour", "lbmol/h": "lbmol/hour",
    "lb-mol/hr": "lbmol/hour", "kmol/hr": "kmol/hour", "Am3/h": "m**3/hour", "Am3/min": "m**3/min",
    "kg/hr": "kg/hour", "m3/hr": "m**3/hour",
}


#: Units read without pint, whose import and registry cost ~0.2 s that ``calcdoc check`` and every job
#: load would pay for the commonest units: (pint's spelling, SI unit) → pint's own conversion factor. pint
#: converts a multiplicative unit as value·factor, so value·factor here is the very float pint gives;
#: tests/job/test_unit_fast.py compares every entry with pint. Anything else goes through pint.
_FAST: dict[tuple[str, str], float] = {
    ("N", "N"): 1.0, ("kN", "N"): 1000.0,
    ("bar", "Pa"): 100000.0, ("mbar", "Pa"): 100.0, ("psi", "Pa"): 6894.7572931683635, ("kPa", "Pa"): 1000.0,
    ("MPa", "Pa"): 1000000.0, ("Pa", "Pa"): 1.0, ("atm", "Pa"): 101325.0, ("hPa", "Pa"): 100.0,
    ("liter", "m**3"): 0.0010000000000000002, ("m**3", "m**3"): 1.0, ("cm**3", "m**3"): 1.0000000000000002e-06,
    ("ft**3", "m**3"): 0.028316846591999994, ("gallon", "m**3"): 0.0037854117839999993,
    ("in**3", "m**3"): 1.6387063999999996e-05, ("mm**3", "m**3"): 1e-09,
    ("kg", "kg"): 1.0, ("g", "kg"): 0.001, ("lb", "kg"): 0.4535923700000001, ("t", "kg"): 1000.0,
    ("m", "m"): 1.0, ("ft", "m"): 0.30479999999999996, ("km", "m"): 1000.0, ("mm", "m"): 0.001, ("cm", "m"): 0.01,
    ("g/mol", "kg/mol"): 0.001, ("kg/kmol", "kg/mol"): 0.001, ("kg/mol", "kg/mol"): 1.0,
    ("kg/s", "kg/s"): 1.0, ("kg/hour", "kg/s"): 0.0002777777777777778, ("kg/min", "kg/s"): 0.016666666666666666,
    ("lb/hour", "kg/s"): 0.0001259978805555556, ("lb/s", "kg/s"): 0.4535923700000001,
    ("lb/min", "kg/s"): 0.007559872833333334, ("t/hour", "kg/s"): 0.2777777777777778,
    ("m**3/hour", "m**3/s"): 0.0002777777777777778, ("m**3/s", "m**3/s"): 1.0,
    ("m**3/min", "m**3/s"): 0.016666666666666666, ("ft**3/min", "m**3/s"): 0.0004719474431999999,
    ("m**3/day", "m**3/s"): 1.1574074074074073e-05, ("ft**3/day", "m**3/s"): 3.2774127999999993e-07,
    ("ft**3/hour", "m**3/s"): 7.865790719999999e-06, ("liter/s", "m**3/s"): 0.0010000000000000002,
    ("liter/min", "m**3/s"): 1.666666666666667e-05,
    ("kW", "W"): 1000.0, ("W", "W"): 1.0, ("MW", "W"): 1000000.0, ("hp", "W"): 745.6998715822701,
    ("kJ/kg", "J/kg"): 1000.0, ("J/kg", "J/kg"): 1.0, ("MJ/kg", "J/kg"): 1000000.0,
    ("m**3/kg", "m**3/kg"): 1.0,
    ("kJ", "J"): 1000.0, ("J", "J"): 1.0, ("MJ", "J"): 1000000.0,
    ("J/(kg*K)", "J/(kg*K)"): 1.0, ("kJ/(kg*K)", "J/(kg*K)"): 1000.0,
    ("mol/s", "mol/s"): 1.0, ("kmol/hour", "mol/s"): 0.2777777777777778, ("kmol/s", "mol/s"): 1000.0,
    ("mol/hour", "mol/s"): 0.0002777777777777778,
    ("kg/m**3", "kg/m**3"): 1.0,
    ("s", "s"): 1.0, ("min", "s"): 60.0, ("hour", "s"): 3600.0, ("ms", "s"): 0.001,
    ("m**2", "m**2"): 1.0, ("cm**2", "m**2"): 0.0001, ("mm**2", "m**2"): 1e-06, ("ft**2", "m**2"): 0.09290303999999999, ("in**2", "m**2"): 0.00064516,
    ("W/(m**2*K)", "W/(m**2*K)"): 1.0,
}
#: Temperature differences: pint's factor to kelvin.
_FAST_DT: dict[str, float] = {"K": 1.0, "degR": 0.5555555555555556}
#: Absolute temperatures the same way: pint's (scale, offset) to kelvin, T = value·scale + offset.
_FAST_T: dict[str, tuple[float, float]] = {"K": (1.0, 0.0), "degC": (1.0, 273.15),
                                          "degF": (0.5555555555555556, 255.37222222222223)}


#: Display conversions without pint, for every unit the SI and US systems, the trade flavours and the
#: common units above show: (SI unit, display unit) → (scale, offset), value = value_si·scale + offset,
#: computed once with pint by :func:`_factor`'s own formula, so a report shows the very floats pint gives
#: (tests/job/test_unit_fast.py compares every entry with pint). A job's other units go through pint.
_FAST_DISPLAY: dict[tuple[str, str], tuple[float, float]] = {
    ('J', 'Btu_it'): (0.0009478171203133171, 0.0),
    ('J', 'MJ'): (1e-06, 0.0),
    ('J', 'kJ'): (0.001, 0.0),
    ('J/(kg*K)', 'Btu_it/(lb*degR)'): (0.00023884589662749594, 0.0),
    ('J/(kg*K)', 'kJ/(kg*K)'): (0.001, 0.0),
    ('J/K', 'Btu_it/degR'): (0.0005265650668407318, 0.0),
    ('J/K', 'kJ/K'): (0.001, 0.0),
    ('J/kg', 'Btu_it/lb'): (0.0004299226139294927, 0.0),
    ('J/kg', 'MJ/kg'): (1e-06, 0.0),
    ('J/kg', 'ft*lbf/lb'): (0.3345525633129686, 0.0),
    ('J/kg', 'kJ/kg'): (0.001, 0.0),
    ('K', 'degC'): (1.0, -273.15),
    ('K', 'degF'): (1.8000000000000114, -459.67),
    ('K', 'degR'): (1.7999999999999998, 0.0),
    ('K', 'delta_degF'): (1.7999999999999998, 0.0),
    ('N', 'kN'): (0.001, 0.0),
    ('N', 'lbf'): (0.22480894309971053, 0.0),
    ('Pa', 'MPa'): (1e-06, 0.0),
    ('Pa', 'atm'): (9.869232667160129e-06, 0.0),
    ('Pa', 'bar'): (1e-05, 0.0),
    ('Pa', 'hPa'): (0.01, 0.0),
    ('Pa', 'kPa'): (0.001, 0.0),
    ('Pa', 'mbar'): (0.01, 0.0),
    ('Pa', 'psi'): (0.0001450377377302092, 0.0),
    ('W', 'Btu/hour'): (3.412141156488376, 0.0),
    ('W', 'MW'): (1e-06, 0.0),
    ('W', 'hp'): (0.0013410220895950279, 0.0),
    ('W', 'kW'): (0.001, 0.0),
    ('W/(m**2*K)', 'Btu_it/(hour*ft**2*degR)'): (0.17611018368230585, 0.0),
    ('kg', 'g'): (1000.0, 0.0),
    ('kg', 'lb'): (2.2046226218487757, 0.0),
    ('kg', 't'): (0.001, 0.0),
    ('kg/m**3', 'lb/ft**3'): (0.062427960576144616, 0.0),
    ('kg/mol', 'g/mol'): (1000.0, 0.0),
    ('kg/mol', 'kg/kmol'): (1000.0, 0.0),
    ('kg/mol', 'lb/lbmol'): (1000.0, 0.0),
    ('kg/s', 'kg/hour'): (3600.0, 0.0),
    ('kg/s', 'kg/min'): (60.0, 0.0),
    ('kg/s', 'lb/hour'): (7936.641438655593, 0.0),
    ('kg/s', 'lb/min'): (132.27735731092656, 0.0),
    ('kg/s', 'lb/s'): (2.2046226218487757, 0.0),
    ('kg/s', 't/hour'): (3.6, 0.0),
    ('m', 'cm'): (100.0, 0.0),
    ('m', 'ft'): (3.2808398950131235, 0.0),
    ('m', 'inch'): (39.37007874015748, 0.0),
    ('m', 'km'): (0.001, 0.0),
    ('m', 'mm'): (1000.0, 0.0),
    ('m**2', 'cm**2'): (10000.0, 0.0),
    ('m**2', 'ft**2'): (10.763910416709724, 0.0),
    ('m**2', 'in**2'): (1550.0031000062002, 0.0),
    ('m**2', 'mm**2'): (1000000.0, 0.0),
    ('m**3', 'L'): (999.9999999999999, 0.0),
    ('m**3', 'cm**3'): (999999.9999999999, 0.0),
    ('m**3', 'ft**3'): (35.3146667214886, 0.0),
    ('m**3', 'gallon'): (264.1720523581485, 0.0),
    ('m**3', 'in**3'): (61023.7440947323, 0.0),
    ('m**3', 'liter'): (999.9999999999999, 0.0),
    ('m**3', 'mm**3'): (999999999.9999999, 0.0),
    ('m**3/kg', 'ft**3/lb'): (16.018463373960145, 0.0),
    ('m**3/s', 'ft**3/day'): (3051187.204736615, 0.0),
    ('m**3/s', 'ft**3/hour'): (127132.80019735896, 0.0),
    ('m**3/s', 'ft**3/min'): (2118.880003289316, 0.0),
    ('m**3/s', 'liter/min'): (59999.99999999999, 0.0),
    ('m**3/s', 'liter/s'): (999.9999999999999, 0.0),
    ('m**3/s', 'm**3/day'): (86400.0, 0.0),
    ('m**3/s', 'm**3/h'): (3600.0, 0.0),
    ('m**3/s', 'm**3/hour'): (3600.0, 0.0),
    ('m**3/s', 'm**3/min'): (60.0, 0.0),
    ('mol/s', 'kmol/h'): (3.6, 0.0),
    ('mol/s', 'kmol/hour'): (3.6, 0.0),
    ('mol/s', 'kmol/s'): (0.001, 0.0),
    ('mol/s', 'lbmol/hour'): (7.9366414386555935, 0.0),
    ('mol/s', 'mol/hour'): (3600.0, 0.0),
    ('s', 'hour'): (0.0002777777777777778, 0.0),
    ('s', 'min'): (0.016666666666666666, 0.0),
    ('s', 'ms'): (1000.0, 0.0),
}


def is_gauge_text(text: str) -> bool:
    """Whether a pressure as written carries a gauge marker (barg, psig, bar(g), ...)."""
    m = _NUMBER.match(text)
    if not m:
        return False
    unit = _spelling(m.group("unit"))
    gm = _GAUGE.match(unit) or _GAUGE.match(unit[:-1] + unit[-1:].lower()) if unit else None
    return bool(gm and _PRESSURE_FOLD.get(gm.group("unit").casefold()))


def _spelling(unit_text: str) -> str:
    text = unit_text.strip().replace("³", "3").replace("²", "2")
    return _DATASHEET_SPELLINGS.get(text, text)


class UnitParseError(ValueError):
    """A quantity could not be read; the message says what was found and what would be valid."""

    def __init__(self, found: str, valid: str):
        self.found = found
        self.valid = valid
        super().__init__(f"{found}; {valid}")


def cache_dir(*parts: str) -> Path | None:
    """calcdoc's folder in the user's cache directory (``$CALCDOC_CACHE_DIR``, else
    ``$XDG_CACHE_HOME/calcdoc``, else ``~/.cache/calcdoc``), with ``parts`` below it, created when
    missing; None when it cannot be made or ``CALCDOC_CACHE_DIR`` is set empty (caching off).

    Everything in it is derived data, keyed by the versions that made it: it is safe to delete at any
    time, and calcdoc works (more slowly) without it."""
    root = os.environ.get("CALCDOC_CACHE_DIR")
    if root is None:
        base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
        root = os.path.join(base, "calcdoc")
    if not root:
        return None
    path = Path(root, *parts)
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError:
        return None
    return path


def write_cached(path: Path, text: str) -> None:
    """Put ``text`` in ``path`` (a file in :func:`cache_dir`): written to a private name beside it, then
    renamed into place (atomic on POSIX), so a reader never sees half a file; a cache that cannot be written
    is not an error (the data is computed again next time)."""
    import tempfile

    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}-", suffix=".tmp", dir=path.parent)
    except OSError:
        return
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except OSError:
        try:
            os.unlink(tmp)
        except OSError:
            pass


def _pint_cache(pint: Any) -> str | None:
    """pint's cache of its parsed unit definitions (building the registry: ~0.2 s without, ~0.02 s
    with). pint writes its cache files in place, so a fresh cache is built in a private folder and
    renamed into place whole: a process never reads another's half-written file."""
    root = cache_dir()
    if root is None:
        return None
    final = root / f"pint-{pint.__version__}"
    if final.is_dir():
        return str(final)
    import shutil  # here, not at the top: only the first run on a machine builds the cache
    import tempfile

    try:
        tmp = tempfile.mkdtemp(prefix=".pint-", dir=root)
    except OSError:
        return None
    try:
        pint.UnitRegistry(cache_folder=tmp)
        os.rename(tmp, final)
    except Exception:        # another process was first (rename refused), or pint could not write
        shutil.rmtree(tmp, ignore_errors=True)
    return str(final) if final.is_dir() else None


@lru_cache(maxsize=1)
def registry() -> Any:
    """The one pint registry (created on first use; ~0.3 s, ~0.05 s from the cache)."""
    import pint

    lib: Any = pint             # pint's own annotations are incomplete
    try:
        ureg = lib.UnitRegistry(cache_folder=_pint_cache(lib))
    except Exception:        # an unreadable cache (pint raises several types): build from the definitions
        ureg = lib.UnitRegistry()
    ureg.define("kmol = 1000 * mol")
    ureg.define("lbmol = 453.59237 * mol")     # pound-mole: the avoirdupois pound is 453.592 37 g (exact)
    lib.set_application_registry(ureg)
    return ureg


@dataclass(frozen=True)
class Parsed:
    """A quantity as the user entered it and as calcdoc uses it (SI, absolute)."""

    si: float
    unit: str          # SI unit of ``si`` as pint spells it
    entered: str       # the text as written in the job file
    gauge: bool = False
    percent: bool = False


def _pint_unit(text: str) -> str:
    text = text.strip()
    text = _ALIASES.get(text, text)
    # powers of a length inside a compound unit, as engineers write them: W/(m2*K) → W/(m**2*K)
    text = _LENGTH_POWER.sub(r"\1**\2", text)
    # the Btu engineers mean is the International Table Btu (1 Btu/lb = 2.326 kJ/kg exactly, NIST SP 811);
    # pint's plain "Btu" is the rounded ISO value 1055.056 J
    return _BTU.sub("Btu_it", text)


_LENGTH_POWER = re.compile(r"(?<![\w*])(mm|cm|m|ft|in)([23])\b")
_BTU = re.compile(r"\b(?:Btu|BTU)\b")


def standard_atmosphere_pressure(z: float) -> float:
    """Pressure of the standard atmosphere at a geometric elevation z [m], valid -610 to 11 000 m.

    P = P0 · (T0 / (T0 + L·H))^(g0·M0 / (R*·L)), H = r0·z / (r0 + z)

    Parameters
    ----------
    z : float  Geometric elevation above mean sea level [m]

    Returns
    -------
    float  Static pressure [Pa]

    Notes
    -----
    Troposphere layer only (lapse rate L = -0.0065 K/m over geopotential height H); constants of the
    1976 standard: P0 = 101 325 Pa, T0 = 288.15 K, g0 = 9.80665 m/s2, M0 = 0.0289644 kg/mol,
    R* = 8.31432 J/(mol K), r0 = 6 356 766 m.

    References
    ----------
    U.S. Standard Atmosphere, 1976. NOAA, NASA, USAF, Washington DC, NOAA-S/T 76-1562, eq. (18) and
    (33a). ISO 2533:1975 gives the same values to 10 km.

    Example: z = 1000 m gives 89 876 Pa (table 1 of the 1976 standard, from memory).

    >>> round(standard_atmosphere_pressure(1000.0))
    89876
    """
    if not -610.0 <= z <= 11000.0:
        raise ValueError("elevation outside the troposphere layer of the standard atmosphere (-610 m to 11 000 m)")
    r0, T0, L, g0, M0, Rstar = 6356766.0, 288.15, -0.0065, 9.80665, 0.0289644, 8.31432
    H = r0 * z / (r0 + z)
    return float(P_STD * (T0 / (T0 + L * H)) ** (g0 * M0 / (Rstar * L)))


def _split(text: str, kind: str) -> tuple[float, str]:
    m = _NUMBER.match(text)
    if m and re.match(r"^,\d", m.group("unit")):
        raise UnitParseError(f"'{text}' has a decimal comma",
                             f"write the decimal point, for example '{m.group('num')}.{m.group('unit')[1:]}'")
    if not m:
        raise UnitParseError(f"'{text}' is not a number followed by a unit",
                             f"write a {kind} as a number and a unit, for example {_EXAMPLES.get(kind, '1 Pa')}")
    return float(m.group("num")), m.group("unit")


_EXAMPLES = {
    "pressure": "'7 barg', '8 bara', '101.3 kPa' or '120 psig'",
    "pressure_difference": "'0.2 bar' or '2 %'",
    "temperature": "'25 degC', '77 degF' or '298.15 K'",
    "temperature_difference": "'10 K' or '18 delta_degF'",
    "volume": "'50 L', '0.05 m3' or '3 ft3'",
    "mass": "'2 kg' or '4.4 lb'",
    "time": "'90 s', '15 min' or '2 h'",
    "area": "'9 m2' or '95 ft2'",
    "specific_heat": "'0.49 kJ/(kg*K)'",
    "heat_transfer_coefficient": "'8 W/(m2*K)'",
    "length": "'450 m' or '1500 ft'",
    "molar_mass": "'28.97 g/mol' or '28.97 kg/kmol'",
    "specific_gas_constant": "'287 J/(kg*K)'",
    "mass_flow": "'12 kg/s' or '3000 kg/h'",
    "molar_flow": "'100 kmol/h'",
    "volume_flow": "'1200 m3/h' or '800 ft3/min'",
    "standard_volume_flow": "'60000 Nm3/h', '5000 scfm', '12 MMSCFD' or '1200 m3/h'",
    "power": "'250 kW' or '340 hp'",
    "specific_energy": "'120 kJ/kg'",
    "specific_volume": "'0.1 m3/kg'",
    "energy": "'10 kJ'",
    "force": "'60 kN' or '13500 lbf'",
    "dimensionless": "'3.5'",
}


def parse_quantity(value: Any, kind: str, atmosphere: float | None = None, allow_percent: bool = False) -> Parsed:
    """Read a quantity of the given kind (a key of :data:`DIMENSIONS`) from job-file text.

    Pressures: a unit with a gauge marker (``barg``, ``psig``, ``kPag``, ``bar(g)``, ``bar gauge``) is
    gauge and needs ``atmosphere`` [Pa]; ``bara``/``psia`` and plain units are absolute.
    Temperatures in degC/degF/K/degR are absolute temperatures; a difference is refused here (and
    differences in degC are refused where an absolute is meant).
    """
    entered = str(value).strip() if not isinstance(value, bool) else str(value)
    if isinstance(value, bool) or value is None:
        raise UnitParseError(f"'{entered}' is not a quantity", f"write a number and a unit, for example {_EXAMPLES.get(kind, '')}")
    if kind == "dimensionless":
        if isinstance(value, (int, float)):
            return Parsed(float(value), "", entered)
        num, unit = _split(entered, kind)
        if unit in ("", "-"):
            return Parsed(num, "", entered)
        if unit == "%":
            return Parsed(num / 100.0, "", entered, percent=True)
        raise UnitParseError(f"'{entered}' has a unit where a plain number is meant", "write a plain number, for example '3.5'")
    if isinstance(value, (int, float)):
        raise UnitParseError(f"the number {entered} has no unit",
                             f"write a {kind.replace('_', ' ')} with its unit, for example {_EXAMPLES.get(kind, '')}")
    if allow_percent:
        m = _PERCENT.match(entered)
        if m:
            return Parsed(float(m.group("num")) / 100.0, "", entered, percent=True)
    num, unit_text = _split(entered, kind)
    if not unit_text:
        raise UnitParseError(f"'{entered}' has no unit",
                             f"write a {kind.replace('_', ' ')} with its unit, for example {_EXAMPLES.get(kind, '')}")
    unit_text = _spelling(unit_text)
    gauge = False
    if kind == "pressure":
        gm = _GAUGE.match(unit_text) or _GAUGE.match(unit_text[:-1] + unit_text[-1:].lower())
        am = _ABS.match(unit_text) or _ABS.match(unit_text[:-1] + unit_text[-1:].lower())
        if gm and _PRESSURE_FOLD.get(gm.group("unit").casefold()):
            gauge = True
            unit_text = _PRESSURE_FOLD[gm.group("unit").casefold()]
        elif am and _PRESSURE_FOLD.get(am.group("unit").casefold()):
            unit_text = _PRESSURE_FOLD[am.group("unit").casefold()]
        elif unit_text.casefold() in _PRESSURE_FOLD:
            unit_text = _PRESSURE_FOLD[unit_text.casefold()]
    elif unit_text.endswith(("g", "(g)")) and kind != "pressure" and unit_text[:-1] in _PRESSURE_UNITS:
        raise UnitParseError(f"'{entered}' is a gauge pressure",
                             f"a {kind.replace('_', ' ')} cannot be gauge; write it as a plain difference, for example '0.3 bar'")
    if unit_text in _STANDARD_FLOW:
        if kind != "standard_volume_flow":
            raise UnitParseError(f"'{entered}' is a volume flow at standard conditions",
                                 "give it as standard_volume_flow, with standard_pressure and standard_temperature "
                                 "stating the reference conditions, or give the actual volume flow (m3/h, acfm)")
        factor, unit_text = _STANDARD_FLOW[unit_text]
        num *= factor
    si_unit = DIMENSIONS[kind]
    if kind in ("temperature",):
        return _parse_temperature(num, unit_text, entered)
    if kind == "temperature_difference":
        return _parse_temperature_difference(num, unit_text, entered)
    fast = _FAST.get((_pint_unit(unit_text), si_unit))
    if fast is not None:
        si = num * fast
    else:
        si = _pint_si(num, unit_text, si_unit, kind, entered)
    if gauge:
        if atmosphere is None:
            raise UnitParseError(
                f"'{entered}' is a gauge pressure but the job gives no site atmosphere",
                "add site: {atmosphere: 101.325 kPa} or site: {elevation: 450 m}, or write the pressure as absolute (bara, psia, kPa)")
        si = si + atmosphere
    return Parsed(float(si), si_unit, entered, gauge=gauge)


def _pint_si(num: float, unit_text: str, si_unit: str, kind: str, entered: str) -> float:
    ureg = registry()
    try:
        q = ureg.Quantity(num, _pint_unit(unit_text))
        return float(q.to(si_unit).magnitude)
    except Exception as exc:  # pint raises several unrelated types for bad unit text
        raise UnitParseError(
            f"'{entered}': {_unit_problem(unit_text, exc, kind)}",
            f"write a {kind.replace('_', ' ')} such as {_EXAMPLES.get(kind, '')}") from None


def _unit_problem(unit_text: str, exc: Exception, kind: str) -> str:
    name = type(exc).__name__
    if name == "DimensionalityError":
        return f"'{unit_text}' is not a unit of {kind.replace('_', ' ')}"
    close = suggest_unit(unit_text, kind)
    return f"'{unit_text}' is not a unit calcdoc knows" + (f" (did you mean '{close}'?)" if close else "")


#: Spellings offered as "did you mean" for a unit calcdoc does not know, by kind.
_SPELLINGS = {
    "pressure": ("bara", "barg", "bar", "mbar", "psia", "psig", "psi", "kPa", "kPag", "MPa", "MPag", "Pa", "atm"),
    "temperature": ("degC", "degF", "K", "degR"),
    "volume": ("m3", "L", "ft3", "cm3", "mm3", "in3"),
    "mass": ("kg", "g", "lb", "t"),
    "length": ("m", "ft", "km"),
    "molar_mass": ("g/mol", "kg/kmol"),
    "mass_flow": ("kg/s", "kg/h", "lb/h"),
    "volume_flow": ("m3/h", "m3/s", "m3/min", "ft3/min"),
}


def suggest_unit(unit_text: str, kind: str) -> str | None:
    """The spelling calcdoc knows closest to ``unit_text`` for a quantity of ``kind``, or None."""
    import difflib

    known = _SPELLINGS.get(kind, ())
    squeezed = unit_text.replace(" ", "").replace("°", "deg").lower()
    by_lower = {k.lower(): k for k in known}
    if squeezed in by_lower:
        return by_lower[squeezed]
    close = difflib.get_close_matches(squeezed, list(by_lower), n=1, cutoff=0.6)
    return by_lower[close[0]] if close else None


def _parse_temperature(num: float, unit_text: str, entered: str) -> Parsed:
    unit = _pint_unit(unit_text)
    if unit in ("delta_degC", "delta_degF", "Δ°C", "ΔdegC"):
        raise UnitParseError(f"'{entered}' is a temperature difference where an absolute temperature is meant",
                             "write the temperature itself, for example '25 degC' or '298.15 K'")
    if unit not in _ABSOLUTE_TEMPERATURE_UNITS:
        ureg = registry()
        try:
            ureg.Quantity(1.0, unit).to("K")
        except Exception:
            close = suggest_unit(unit_text, "temperature")
            raise UnitParseError(f"'{entered}': '{unit_text}' is not a unit of temperature"
                                 + (f" (did you mean '{close}'?)" if close else ""),
                                 "write a temperature such as '25 degC', '77 degF' or '298.15 K'") from None
    if unit in _FAST_T:
        scale, offset = _FAST_T[unit]
        return Parsed(float(num * scale + offset), "K", entered)
    ureg = registry()
    T = ureg.Quantity(num, unit).to("K").magnitude  # offset units converted as absolute temperatures
    return Parsed(float(T), "K", entered)


def _parse_temperature_difference(num: float, unit_text: str, entered: str) -> Parsed:
    # where a difference is meant (a margin, a temperature rise), °C and °F are read as differences
    unit = {"K": "K", "kelvin": "K", "degR": "degR", "R": "degR", "delta_degC": "K", "delta_degF": "degR",
            "degC": "K", "°C": "K", "C": "K", "degF": "degR", "°F": "degR", "F": "degR"}.get(unit_text.strip(), "?")
    if unit == "?":
        raise UnitParseError(f"'{entered}': '{unit_text}' is not a unit of temperature difference",
                             "write a difference such as '10 K' or '18 delta_degF'")
    if unit in _FAST_DT:
        return Parsed(float(num * _FAST_DT[unit]), "K", entered)
    ureg = registry()
    return Parsed(float(ureg.Quantity(num, unit).to("K").magnitude), "K", entered)


def to_si(value: float, unit: str, kind: str) -> float:
    """Convert a plain value in a pint-readable unit to SI (absolute temperatures for offset units)."""
    ureg = registry()
    return float(ureg.Quantity(value, _pint_unit(unit)).to(DIMENSIONS[kind]).magnitude)


# Display units of the report's unit systems, by the SI unit of the value.
_SYSTEMS = {
    "SI": {
        "Pa": "kPa", "K": "degC", "m**3": "m**3", "kg": "kg", "m**3/kg": "m**3/kg",
        "J/kg": "kJ/kg", "J/(kg*K)": "kJ/(kg*K)", "J": "kJ", "J/K": "kJ/K", "W": "kW",
        "kg/s": "kg/s", "mol/s": "kmol/h", "m**3/s": "m**3/h", "kg/m**3": "kg/m**3", "": "",
        "kg/mol": "g/mol", "m": "m", "s": "s", "m**2": "m**2", "W/(m**2*K)": "W/(m**2*K)", "N": "kN", "1/s": "1/s",
    },
    "US": {
        "Pa": "psi", "K": "degF", "m**3": "ft**3", "kg": "lb", "m**3/kg": "ft**3/lb",
        "J/kg": "Btu_it/lb", "J/(kg*K)": "Btu_it/(lb*degR)", "J": "Btu_it", "J/K": "Btu_it/degR", "W": "hp",
        "kg/s": "lb/hour", "mol/s": "lbmol/hour", "m**3/s": "ft**3/min", "kg/m**3": "lb/ft**3", "": "",
        "kg/mol": "lb/lbmol", "m": "ft", "s": "s", "m**2": "ft**2", "W/(m**2*K)": "Btu_it/(hour*ft**2*degR)", "N": "lbf", "1/s": "1/s",
    },
}
_PRETTY = {
    "kPa": "kPa", "psi": "psia", "degC": "°C", "degF": "°F", "m**3": "m³", "ft**3": "ft³", "kg": "kg", "lb": "lb",
    "m**3/kg": "m³/kg", "ft**3/lb": "ft³/lb", "kJ/kg": "kJ/kg", "Btu/lb": "Btu/lb", "kJ/(kg*K)": "kJ/(kg·K)",
    "Btu/(lb*degR)": "Btu/(lb·°R)", "kJ": "kJ", "Btu": "Btu", "kJ/K": "kJ/K", "Btu/degR": "Btu/°R", "kW": "kW",
    "hp": "hp", "Btu/hour": "Btu/h", "ft*lbf/lb": "ft·lbf/lb", "kg/s": "kg/s", "lb/hour": "lb/h", "kmol/h": "kmol/h", "lbmol/hour": "lbmol/h",
    "L": "L", "in**3": "in³", "in**2": "in²",
    "m**3/h": "m³/h", "ft**3/min": "ft³/min", "kg/m**3": "kg/m³", "lb/ft**3": "lb/ft³", "": "",
    "g/mol": "g/mol", "lb/lbmol": "lb/lbmol", "m": "m", "ft": "ft", "K": "K", "Pa": "Pa",
    "J/kg": "J/kg", "J/(kg*K)": "J/(kg·K)", "J": "J", "J/K": "J/K", "W": "W", "m**3/s": "m³/s",
    "kg/mol": "kg/mol", "mol/s": "mol/s", "s": "s", "m**2": "m²", "ft**2": "ft²",
    "W/(m**2*K)": "W/(m²·K)", "Btu_it/(hour*ft**2*degR)": "Btu/(h·ft²·°R)",
    "kN": "kN", "lbf": "lbf", "N": "N", "mm": "mm", "inch": "in",
    "1/s": "rev/s",
    "Btu_it/lb": "Btu/lb", "Btu_it/(lb*degR)": "Btu/(lb·°R)", "Btu_it": "Btu", "Btu_it/degR": "Btu/°R",
}


#: Display units of quantities that share an SI unit with others but are shown in their own trade unit:
#: "W|heat" (a heat duty: Btu/h in US, not hp) and "J/kg|head" (a head: ft·lbf/lb in US, not Btu/lb).
_FLAVOURS = {
    ("W|heat", "SI"): "kW", ("W|heat", "US"): "Btu/hour",
    ("J/kg|head", "SI"): "kJ/kg", ("J/kg|head", "US"): "ft*lbf/lb",
    ("m|bore", "SI"): "mm", ("m|bore", "US"): "inch",       # machine dimensions (bore, stroke, rod)
    ("m**3|cyl", "SI"): "L", ("m**3|cyl", "US"): "in**3",   # cylinder volumes
}


#: Quantity kinds a job may give its own display unit for (``units: {system: SI, pressure: barg, ...}``):
#: kind → the SI unit (with flavour) of the values it applies to.
DISPLAY_KINDS: dict[str, str] = {
    "pressure": "Pa", "temperature": "K", "volume": "m**3", "mass": "kg", "length": "m",
    "specific_volume": "m**3/kg", "density": "kg/m**3", "specific_energy": "J/kg", "head": "J/kg|head",
    "specific_entropy": "J/(kg*K)", "energy": "J", "entropy": "J/K", "power": "W", "duty": "W|heat",
    "mass_flow": "kg/s", "molar_flow": "mol/s", "volume_flow": "m**3/s", "molar_mass": "kg/mol",
}


@dataclass(frozen=True, eq=False)
class DisplayUnits:
    """The units a report shows values in: a base system (SI or US) and the job's own unit for any
    quantity kind (``units: {system: SI, pressure: barg, volume: L, power: kW}``).

    ``units`` maps an SI unit (with flavour, see :data:`DISPLAY_KINDS`) to a pint unit and its typeset
    form, (si unit, pint unit, typeset); ``gauge``
    shows pressures above the site atmosphere ``P_atm`` [Pa] (barg, psig). Equal to the text of its
    base system when it names no unit of its own ("SI" == DisplayUnits("SI")).
    """

    system: str = "SI"
    units: tuple[tuple[str, str, str], ...] = ()
    gauge: bool = False
    P_atm: float | None = None
    spelled: tuple[tuple[str, str], ...] = ()     # (kind, unit as the user wrote it), for the report

    def __eq__(self, other: object) -> bool:
        if isinstance(other, str):
            return self.system == other and not self.units
        if isinstance(other, DisplayUnits):
            return (self.system, self.units, self.gauge, self.P_atm) == (other.system, other.units, other.gauge,
                                                                         other.P_atm)
        return NotImplemented

    def __hash__(self) -> int:
        return hash((self.system, self.units, self.gauge, self.P_atm))

    def __str__(self) -> str:
        return self.system

    def unit_for(self, si_unit: str) -> str | None:
        """The job's own display unit for values of this SI unit (with flavour), or None."""
        for key, unit, _ in self.units:
            if key == si_unit:
                return unit
        return None

    def typeset_for(self, si_unit: str) -> str | None:
        """The job's own display unit for values of this SI unit, typeset (L/s, m³/h), or None."""
        for key, _, pretty in self.units:
            if key == si_unit:
                return pretty
        return None


#: What a display function takes as the units to show values in: a base system's name or a DisplayUnits.
Units = str | DisplayUnits


def display_spec(system: Units) -> DisplayUnits:
    """A display-units spec from a spec or the name of a base system ("SI", "US")."""
    if isinstance(system, DisplayUnits):
        return system
    return DisplayUnits(str(system) if system in _SYSTEMS else "SI")


def display_unit(si_unit: str, system: Units) -> str:
    """The unit a report in ``system`` (SI, US or a :class:`DisplayUnits`) shows a value of SI unit
    ``si_unit`` in; ``si_unit`` may carry a flavour after '|' (see ``_FLAVOURS``)."""
    spec = display_spec(system)
    own = spec.unit_for(si_unit)
    if own is not None:
        return own
    if "|" in si_unit:
        base = si_unit.split("|")[0]
        own = spec.unit_for(base)
        if own is not None and (si_unit, spec.system) not in _FLAVOURS:
            return own
        return _FLAVOURS.get((si_unit, spec.system)) or display_unit(base, spec)
    return _SYSTEMS[spec.system].get(si_unit, si_unit)


def pretty_unit(unit: str) -> str:
    """A unit as typeset in the report (m³, °C, kJ/(kg·K))."""
    return _PRETTY.get(unit, unit.replace("**", "^").replace("*", "·"))


@lru_cache(maxsize=256)
def _factor(si_unit: str, unit: str) -> tuple[float, float]:
    """Scale and offset with value_unit = scale * value_si + offset."""
    if si_unit == unit or si_unit == "":
        return 1.0, 0.0
    fast = _FAST_DISPLAY.get((si_unit, unit))
    if fast is not None:
        return fast
    ureg = registry()
    a = ureg.Quantity(0.0, si_unit).to(unit).magnitude
    b = ureg.Quantity(1.0, si_unit).to(unit).magnitude
    return b - a, a


def convert(value_si: float, si_unit: str, unit: str, difference: bool = False) -> float:
    """An SI value in another unit; ``difference`` converts a temperature difference (no offset)."""
    scale, offset = _factor(si_unit, unit)
    return value_si * scale + (0.0 if difference else offset)


def say(value_si: float, si_unit: str, system: Units, sig: int = 5, difference: bool = False) -> str:
    """A value for a sentence (warnings, messages) in the job's units: '1014.5 psia', '−2.6 °F'."""
    v, u = display(value_si, si_unit, system, difference=difference)
    return f"{v:.{sig}g} {u}".strip()


def _temperature_difference_unit(spec: DisplayUnits) -> str:
    # a temperature difference is shown in K, or in Δ°F where the job shows °F; never in °R
    own = spec.unit_for("K")
    if own is not None:
        return "delta_degF" if own in ("degF", "degR") else "K"
    return "K" if spec.system == "SI" else "delta_degF"


def display(value_si: float, si_unit: str, system: Units, difference: bool = False,
            absolute: bool = False) -> tuple[float, str]:
    """An SI value converted for a report in ``system`` (SI, US or a :class:`DisplayUnits`):
    (number, pretty unit).

    Temperature differences (``difference=True``) are shown in K or Δ°F, never in °C or °R; pressure
    differences in the pressure unit without a gauge or absolute mark (a difference is neither).
    Pressures are shown gauge where the job asks for a gauge unit, unless ``absolute``.
    """
    spec = display_spec(system)
    unit = display_unit(si_unit, spec)
    base = si_unit.split("|")[0]
    if difference and base == "K":
        unit = _temperature_difference_unit(spec)
        val = convert(value_si, "K", "K" if unit == "K" else "degR", difference=True)
        return val, "K" if unit == "K" else "Δ°F"
    P_atm = spec.P_atm if spec.gauge and not difference and not absolute and base == "Pa" else None
    gauge = P_atm is not None
    val = convert(value_si - (P_atm or 0.0), base, unit, difference=difference)
    if base == "Pa":
        return val, _pressure_label(unit, gauge, difference)
    own = spec.typeset_for(si_unit) if spec.unit_for(si_unit) is not None else (
        spec.typeset_for(base) if spec.unit_for(base) == unit else None)
    return val, own if own is not None else pretty_unit(unit)


def display_label(si_unit: str, system: Units, difference: bool = False, absolute: bool = False) -> str:
    """The typeset unit a value of SI unit ``si_unit`` is shown in (table headers, chart axes)."""
    return display(0.0, si_unit, system, difference=difference, absolute=absolute)[1]


def typeset_unit(text: str) -> str:
    """A unit as a user wrote it, typeset for the report: m3/h → m³/h, degC → °C."""
    out = re.sub(r"(?<=[a-zA-Z])3(?![0-9])", "³", re.sub(r"(?<=[a-zA-Z])2(?![0-9])", "²", text.strip()))
    return out.replace("delta_degF", "Δ°F").replace("degC", "°C").replace("degF", "°F").replace("degR", "°R").replace("*", "·")


def display_unit_of(text: str, kind: str) -> tuple[str, bool]:
    """A display unit as a job names it, checked against the quantity kind: (pint unit, gauge).

    Raises :class:`UnitParseError` when the text is not a unit of that kind. A gauge unit (barg, psig)
    is allowed for pressure only.
    """
    spelled = _spelling(text)
    si = DISPLAY_KINDS[kind].split("|")[0]
    gauge = False
    if kind == "pressure":
        gm = _GAUGE.match(spelled)
        am = _ABS.match(spelled)
        if gm and _PRESSURE_FOLD.get(gm.group("unit").casefold()):
            gauge, spelled = True, _PRESSURE_FOLD[gm.group("unit").casefold()]
        elif am and _PRESSURE_FOLD.get(am.group("unit").casefold()):
            spelled = _PRESSURE_FOLD[am.group("unit").casefold()]
        elif spelled.casefold() in _PRESSURE_FOLD:
            spelled = _PRESSURE_FOLD[spelled.casefold()]
    if spelled in _STANDARD_FLOW:
        raise UnitParseError(f"'{text}' is a volume flow at standard conditions",
                             "report actual volume flows in an actual unit (m3/h, L/s, ft3/min)")
    unit = _pint_unit(spelled)
    fast = re.sub(r"^(L|l)/", "liter/", unit)
    if (fast, si) in _FAST or unit == si or (kind == "temperature" and unit in _ABSOLUTE_TEMPERATURE_UNITS):
        return unit, gauge          # a unit of the kind that needs no pint to know (start-up of `check`)
    try:
        registry().Quantity(1.0, unit).to(si)
    except Exception:
        close = suggest_unit(text, kind)
        raise UnitParseError(f"'{text}' is not a unit of {kind.replace('_', ' ')}"
                             + (f" (did you mean '{close}'?)" if close else ""),
                             f"name a unit of {kind.replace('_', ' ')}, for example {_DISPLAY_EXAMPLES.get(kind, si)}") from None
    return unit, gauge


_DISPLAY_EXAMPLES = {"pressure": "bar, barg, kPa, psig", "temperature": "degC, degF, K", "volume": "L, m3, ft3",
                     "power": "kW, MW, hp", "duty": "kW, MW, Btu/h", "volume_flow": "L/s, m3/h, ft3/min",
                     "mass_flow": "kg/s, kg/h, t/h", "head": "kJ/kg, ft*lbf/lb",
                     "specific_energy": "kJ/kg, Btu/lb", "energy": "kJ, MJ", "mass": "kg, t, lb"}


def _pressure_label(unit: str, gauge: bool, difference: bool) -> str:
    if difference:
        return pretty_unit(unit) if unit != "psi" else "psi"
    if gauge:
        return {"bar": "barg", "psi": "psig", "kPa": "kPag", "MPa": "MPag"}.get(unit, pretty_unit(unit) + " (gauge)")
    return {"bar": "bara", "psi": "psia"}.get(unit, pretty_unit(unit))


class _Phrase:
    """Fills a template of a message with values in a unit system (see :func:`phrase`)."""

    def __init__(self, system: Units):
        import string

        outer = self

        class _F(string.Formatter):
            def format_field(self, value: Any, spec: str) -> str:
                return outer.field(value, spec)

        self.system = system
        self.formatter = _F()

    def field(self, value: Any, spec: str) -> str:
        if not spec or isinstance(value, str):
            return format(value, spec if not isinstance(value, str) else "")
        unit, _, sig = spec.partition("~")
        diff = unit.startswith("d") and unit[1:] in ("K", "Pa")
        si = unit[1:] if diff else unit
        if si in _SYSTEMS["SI"] or "|" in si:
            return say(float(value), si, self.system, int(sig) if sig else 5, difference=diff)
        return format(value, spec)


def phrase(template: str, values: dict[str, Any], system: Units = "SI") -> str:
    """A message from a template and SI values, each shown in the job's unit system.

    A field ``{P:Pa}`` is the SI value ``P`` [Pa] shown in the system's pressure unit (kPa, psia), ``{T:K~4}``
    a temperature to 4 significant figures (``~`` then the number of figures) (°C, °F), ``{dT:dK}`` a temperature difference (K, Δ°F) and
    ``{dP:dPa}`` a pressure difference; any other spec is Python's (``{eta:.3f}``), and text is put in as it is.
    """
    return _Phrase(system).formatter.format(template, **values)
