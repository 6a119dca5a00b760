"""Pure-component constants from the ``chemicals`` library, each with its data source.

Every value is taken with an explicitly chosen method (never the library's moving
default), and the method is recorded, so a case file says where each number came from
and reopens with the same numbers even if the library changes.

Choices
-------
- Formation enthalpy (ideal gas, 298.15 K): ``chemicals.reaction.Hfg`` with the first of
  ``HF_METHODS`` that has the compound. ATcT comes first; ``"TRC"`` is excluded (its
  values are at 0 K) and ``"WEBBOOK"`` too (wrong for some aromatics).
- Tc, Pc, Tb: the first method of ``chemicals``' own preference list that has the value.
- Heat capacity: the TRC ideal-gas correlation (Kabo & Roganov 1994) where tabulated,
  else the Poling et al. polynomial (5th ed.), converted to J/mol/K.
- Heat of vaporization at Tb: the CRC Handbook value (moved from the handbook's Tb to
  ours with Watson 1943 when they differ), else Perry's Table 2-150 (DIPPR equation 106)
  at Tb, else the Riedel estimate from Tb, Tc and Pc.
"""

from __future__ import annotations

import difflib
import functools
import math
from typing import Any

import numpy as np
from chemicals import critical, phase_change, reaction
from chemicals import heat_capacity as chemicals_cp
from chemicals.dippr import EQ106
from chemicals.identifiers import search_chemical
from scipy.constants import R

from model.errors import ComponentDataError, ComponentNotFoundError, InputError
from model.properties.cp_correlations import POLYNOMIAL, TRC, CpCorrelation
from model.properties.formula import molar_mass_of, parse_formula

HF_METHODS = ("ATCT_G", "CRC", "API_TDB_G", "JANAF", "YAWS", "JOBACK")
_ESTIMATES = {"JOBACK", "WILSON_JASPERSON", "PSRK"}

#: Names used for common process components (the database often prefers IUPAC names).
PREFERRED_NAMES = {
    "1333-74-0": "hydrogen",
    "7727-37-9": "nitrogen",
    "7782-44-7": "oxygen",
    "7440-37-1": "argon",
    "7440-59-7": "helium",
    "7664-41-7": "ammonia",
    "74-82-8": "methane",
    "7732-18-5": "water",
    "630-08-0": "carbon monoxide",
    "124-38-9": "carbon dioxide",
    "74-85-1": "ethylene",
    "74-84-0": "ethane",
    "74-86-2": "acetylene",
    "115-07-1": "propylene",
    "74-98-6": "propane",
    "106-97-8": "n-butane",
    "75-28-5": "isobutane",
    "106-98-9": "1-butene",
    "115-11-7": "isobutylene",
    "106-99-0": "1,3-butadiene",
    "109-66-0": "n-pentane",
    "110-54-3": "n-hexane",
    "142-82-5": "n-heptane",
    "111-65-9": "n-octane",
    "110-82-7": "cyclohexane",
    "67-56-1": "methanol",
    "64-17-5": "ethanol",
    "67-63-0": "isopropanol",
    "71-43-2": "benzene",
    "108-88-3": "toluene",
    "106-42-3": "p-xylene",
    "100-41-4": "ethylbenzene",
    "100-42-5": "styrene",
    "98-82-8": "cumene",
    "67-64-1": "acetone",
    "64-19-7": "acetic acid",
    "50-00-0": "formaldehyde",
    "75-07-0": "acetaldehyde",
    "115-10-6": "dimethyl ether",
    "75-21-8": "ethylene oxide",
    "107-21-1": "ethylene glycol",
    "1634-04-4": "methyl tert-butyl ether",
    "7783-06-4": "hydrogen sulfide",
    "7446-09-5": "sulfur dioxide",
    "7446-11-9": "sulfur trioxide",
    "7782-50-5": "chlorine",
    "7647-01-0": "hydrogen chloride",
    "10102-43-9": "nitric oxide",
    "10102-44-0": "nitrogen dioxide",
    "10024-97-2": "nitrous oxide",
    "74-90-8": "hydrogen cyanide",
    "463-58-1": "carbonyl sulfide",
    "75-15-0": "carbon disulfide",
    "75-01-4": "vinyl chloride",
}

#: Other common names, offered as suggestions next to the preferred ones.
_SYNONYMS = (
    "ethene",
    "propene",
    "butane",
    "pentane",
    "hexane",
    "heptane",
    "octane",
    "methyl alcohol",
    "ethyl alcohol",
    "isopropyl alcohol",
    "carbonic anhydride",
    "isobutene",
    "butadiene",
    "xylene",
    "steam",
)


def find_cas(query: str) -> str:
    """CAS number of a component given by name, formula or CAS number.

    Raises
    ------
    ComponentNotFoundError
        The query is unknown; ``suggestions`` holds close matches among known names.
    """
    text = query.strip() if isinstance(query, str) else ""
    if not text:
        raise InputError("component", query, "a component name, formula or CAS number")
    try:
        return search_chemical(text).CASs
    except ValueError:
        raise ComponentNotFoundError(query, close_matches(text)) from None


def close_matches(text: str, count: int = 3) -> list[str]:
    """Known component names that resemble ``text``, best first (difflib ratio >= 0.6)."""
    word = text.strip().lower()
    preferred = difflib.get_close_matches(word, _curated_names(), n=count, cutoff=0.6)
    others = difflib.get_close_matches(word, _database_names(), n=count, cutoff=0.6)
    matches: list[str] = []
    for name in preferred + others:
        if name not in matches and _resolves(name):
            matches.append(name)
    return matches[:count]


@functools.lru_cache(maxsize=1)
def _curated_names() -> tuple[str, ...]:
    return (*PREFERRED_NAMES.values(), *_SYNONYMS)


@functools.lru_cache(maxsize=1)
def _database_names() -> tuple[str, ...]:
    """Names from the chemicals tables this module reads (a few thousand)."""
    tables = (
        chemicals_cp.TRC_gas_data,
        chemicals_cp.Cp_data_Poling,
        phase_change.Hvap_data_CRC,
    )
    names = {str(name).strip().lower() for table in tables for name in table["Chemical"]}
    return tuple(sorted(names))


def _resolves(name: str) -> bool:
    try:
        search_chemical(name)
    except ValueError:
        return False
    return True


@functools.lru_cache(maxsize=512)
def component_record(cas: str) -> dict[str, Any]:
    """Every field of a component record for a CAS number, with a ``sources`` mapping.

    The result is cached (the library's look-ups are slow); callers must not mutate it.

    Raises
    ------
    ComponentDataError
        A value the property basis needs is missing from every source.
    """
    metadata = search_chemical(cas)
    name = PREFERRED_NAMES.get(cas, metadata.common_name)
    formula = metadata.formula
    Tc, Tc_method = _first_value(critical.Tc, critical.Tc_methods(cas), cas, name, "Tc")
    Pc_methods = critical.Pc_methods(cas)
    if Tc_method in Pc_methods:  # Tc and Pc from one source where possible
        Pc_methods = [Tc_method, *Pc_methods]
    Pc, Pc_method = _first_value(critical.Pc, Pc_methods, cas, name, "Pc")
    Tb, Tb_method = _first_value(phase_change.Tb, phase_change.Tb_methods(cas), cas, name, "Tb")
    Hf_ig, Hf_method = _first_value(reaction.Hfg, _hf_methods(cas), cas, name, "Hf_ig")
    cp = heat_capacity_correlation(cas, name)
    Hvap_Tb, Hvap_source = heat_of_vaporization_at_Tb(cas, Tb, Tc, Pc)
    return {
        "name": name,
        "formula": formula,
        "cas": cas,
        "molar_mass": molar_mass_of(parse_formula(formula)),
        "Tc": Tc,
        "Pc": Pc,
        "Tb": Tb,
        "Hf_ig": Hf_ig,
        "cp": cp,
        "Hvap_Tb": Hvap_Tb,
        "sources": {
            "name": "chemicals search_chemical"
            + (", name preferred by Loopwright" if cas in PREFERRED_NAMES else ""),
            "formula": "chemicals search_chemical",
            "molar_mass": "formula with the standard atomic weights of chemicals.elements",
            "Tc": _method_text("chemicals.critical Tc", Tc_method),
            "Pc": _method_text("chemicals.critical Pc", Pc_method),
            "Tb": _method_text("chemicals.phase_change Tb", Tb_method),
            "Hf_ig": _method_text("chemicals.reaction Hfg", Hf_method),
            "cp": cp.source,
            "Hvap_Tb": Hvap_source,
        },
    }


def _method_text(function: str, method: str) -> str:
    estimate = " (group-contribution estimate)" if method in _ESTIMATES else ""
    return f"{function}, method {method}{estimate}"


def _hf_methods(cas: str) -> list[str]:
    available = set(reaction.Hfg_methods(cas))
    return [method for method in HF_METHODS if method in available]


def _first_value(getter, methods, cas: str, name: str, field: str) -> tuple[float, str]:
    """The first finite value among the methods, and the method that gave it."""
    for method in methods:
        value = getter(cas, method=method)
        if value is not None and math.isfinite(value):
            return float(value), method
    raise ComponentDataError(
        field, name, f"a component for which chemicals has {field}; define it by hand"
    )


def heat_capacity_correlation(cas: str, name: str) -> CpCorrelation:
    """TRC ideal-gas correlation where tabulated, else the Poling polynomial."""
    trc = chemicals_cp.TRC_gas_data
    if cas in trc.index:
        row = trc.loc[cas]
        coefficients = tuple(float(row[f"a{i}"]) for i in range(8))
        if all(math.isfinite(c) for c in coefficients) and row["a6"] + row["a7"] > 0:
            return CpCorrelation(
                name=TRC,
                coefficients=coefficients,
                T_min=float(row["Tmin"]),
                T_max=float(row["Tmax"]),
                source="chemicals TRC_gas_data (Kabo & Roganov, Thermodynamics of Organic "
                "Compounds in the Gas State, TRC 1994)",
            )
    poling = chemicals_cp.Cp_data_Poling
    if cas in poling.index:
        row = poling.loc[cas]
        terms = np.array([row[f"a{i}"] for i in range(5)], dtype=float)
        if np.all(np.isfinite(terms)):
            return _poling_correlation(terms, float(row["Tmin"]), float(row["Tmax"]))
    raise ComponentDataError(
        "cp", name, "a component with an ideal-gas Cp correlation in chemicals; define it by hand"
    )


def _poling_correlation(terms: np.ndarray, T_min: float, T_max: float) -> CpCorrelation:
    """Poling's Cp/R polynomial as a J/mol/K polynomial, with its range."""
    source = (
        "chemicals Cp_data_Poling (Poling, Prausnitz & O'Connell, The Properties of Gases "
        "and Liquids, 5th ed.), coefficients multiplied by R"
    )
    if not (math.isfinite(T_min) and math.isfinite(T_max)):
        if np.all(terms[1:] == 0.0):
            # a constant Cp (2.5 R for a monatomic gas) holds wherever electronic
            # excitation is negligible, far beyond the solver's 6000 K bracket for argon
            T_min, T_max = 10.0, 6000.0
            source += "; constant Cp, range not tabulated, 10-6000 K taken by Loopwright"
        else:
            T_min, T_max = 50.0, 1000.0
            source += "; range not tabulated, Poling's general 50-1000 K taken"
    return CpCorrelation(
        name=POLYNOMIAL,
        coefficients=tuple(float(R * t) for t in terms),
        T_min=T_min,
        T_max=T_max,
        source=source,
    )


def heat_of_vaporization_at_Tb(cas: str, Tb: float, Tc: float, Pc: float) -> tuple[float, str]:
    """Heat of vaporization at the normal boiling point, J/mol, and its source."""
    crc = phase_change.Hvap_data_CRC
    if cas in crc.index and math.isfinite(crc.at[cas, "HvapTb"]):
        value, Tb_crc = float(crc.at[cas, "HvapTb"]), float(crc.at[cas, "Tb"])
        source = f"chemicals Hvap_data_CRC (CRC Handbook), {value:g} J/mol at {Tb_crc:g} K"
        if math.isfinite(Tb_crc) and Tb_crc != Tb and Tb_crc < Tc:
            value = phase_change.Watson(Tb, value, Tb_crc, Tc)
            source += f", moved to Tb = {Tb:g} K with Watson (1943)"
        return value, source
    perry = phase_change.phase_change_data_Perrys2_150
    if cas in perry.index:
        row = perry.loc[cas]
        value = float(EQ106(Tb, row["Tc"], row["C1"], row["C2"], row["C3"], row["C4"]))
        if math.isfinite(value) and value > 0.0:
            source = (
                "chemicals phase_change_data_Perrys2_150 (Perry's 8th ed. Table 2-150, "
                "DIPPR equation 106) at Tb"
            )
            if not row["Tmin"] <= Tb <= row["Tmax"]:
                source += f", extrapolated outside its {row['Tmin']:g}-{row['Tmax']:g} K"
            return value, source
    value = phase_change.Riedel(Tb, Tc, Pc)
    return float(value), "chemicals.phase_change Riedel estimate from Tb, Tc and Pc"
