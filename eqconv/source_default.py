"""Species data from the ``chemicals`` and ``thermo`` libraries, ranked explicitly.

The libraries' own defaults are not used blindly: their default ideal-gas Cp of many
species is a narrow-range fit (to 450–725 K) that is extrapolated without warning, and their
default ΔfH° falls back silently to estimates (TRC, Joback) that can be tens of kJ/mol off.
Here each quantity is taken from the first source of a fixed ranking, the source is
recorded, and estimates are never used.

Ranking
-------
ΔfH°(298.15 K), gas : Active Thermochemical Tables > NIST WebBook > CRC Handbook > NIST-JANAF
                      > Yaws (no TRC, API-TDB or Joback estimates).
S°(298.15 K), gas   : NIST WebBook > CRC Handbook > NIST-JANAF > Yaws.
Cp°(T), gas         : NIST WebBook Shomate (all ranges) > TRC ideal-gas correlation >
                      Poling polynomial (≤ 1000 K).
Pure condensed phases are taken from NIST-JANAF (see :mod:`eqconv.source_janaf`).

References
----------
.. [1] B. Ruscic, D. H. Bross, Active Thermochemical Tables (ATcT), Argonne National
   Laboratory.
.. [2] NIST Chemistry WebBook, NIST Standard Reference Database 69.
.. [3] W. M. Haynes (ed.), CRC Handbook of Chemistry and Physics, CRC Press.
.. [4] B. E. Poling, J. M. Prausnitz, J. P. O'Connell, The Properties of Gases and Liquids,
   5th ed. (2001).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from functools import cache

from .constants import R
from .cp import CpModel, PiecewiseCp, PowerSeriesCp, TRCCp
from .errors import MissingDataError
from .identify import Identity

__all__ = ["DefaultRecord", "default_record"]

HF_RANKING: tuple[tuple[str, str], ...] = (
    ("ATCT_G", "Active Thermochemical Tables (via chemicals)"),
    ("WEBBOOK", "NIST Chemistry WebBook (via chemicals)"),
    ("CRC", "CRC Handbook (via chemicals)"),
    ("JANAF", "NIST-JANAF (via chemicals)"),
    ("YAWS", "Yaws' handbook (via chemicals)"),
)
S_RANKING: tuple[tuple[str, str], ...] = (
    ("WEBBOOK", "NIST Chemistry WebBook (via chemicals)"),
    ("CRC", "CRC Handbook (via chemicals)"),
    ("JANAF", "NIST-JANAF (via chemicals)"),
    ("YAWS", "Yaws' handbook (via chemicals)"),
)

#: Documented default standard uncertainties per source (this project's choice, used when
#: the source gives none): ΔfH° [J/mol], S° [J/(mol K)]. For ATcT values the uncertainty
#: that chemicals ships with the ATcT table is used where present (0.01–0.1 kJ/mol for
#: common small molecules); compilations are looser.
U_HF_BY_SOURCE = {"ATCT_G": 0.1e3, "WEBBOOK": 0.4e3, "CRC": 0.5e3, "JANAF": 0.4e3, "YAWS": 2.0e3}
U_S_BY_SOURCE = {"WEBBOOK": 0.2, "CRC": 0.3, "JANAF": 0.2, "YAWS": 1.0}
U_CP_REL_BY_METHOD = {"shomate": 0.002, "trc": 0.01, "poling": 0.02, "monatomic": 0.0}

#: He, Ne, Ar, Kr, Xe
_NOBLE_GASES = {"7440-59-7", "7440-01-9", "7440-37-1", "7439-90-9", "7440-63-3"}


@dataclass(frozen=True)
class DefaultRecord:
    """What the default sources contribute to a gas species (SI units)."""

    hf298: float
    hf_source: str
    s298: float
    s_source: str
    cp: CpModel
    cp_key: str
    u_hf298: float
    u_s298: float
    u_cp_rel: float


def _first(
    ranking: tuple[tuple[str, str], ...], getter: object, methods: list[str], cas: str
) -> tuple[float, str, str] | None:
    for key, label in ranking:
        if key in methods:
            value = getter(cas, method=key)  # type: ignore[operator]
            if value is not None:
                return float(value), key, label
    return None


def _cp_model(cas: str, key: str) -> tuple[CpModel, str]:
    from thermo import HeatCapacityGas

    obj = HeatCapacityGas(CASRN=cas)
    trc_p = (getattr(obj, "TRCCp_parameters", None) or {}).get("TRCIG")
    trc = None
    if trc_p:
        trc = TRCCp(
            tuple(float(trc_p[f"a{k}"]) for k in range(8)),
            float(trc_p["Tmin"]),
            float(trc_p["Tmax"]),
            method="TRC ideal-gas correlation (via thermo)",
        )
    shomate = {
        k: v
        for k, v in (getattr(obj, "Shomate_parameters", None) or {}).items()
        if k.startswith("WEBBOOK_SHOMATE_")
    }
    if shomate:
        pieces: list[CpModel] = []
        for name in sorted(shomate, key=lambda k: shomate[k]["Tmin"]):
            p = shomate[name]
            # thermo stores the Shomate constants already scaled to T in K:
            # Cp = A + B T + C T² + D T³ + E / T²
            pieces.append(
                PowerSeriesCp(
                    (p["A"], p["B"], p["C"], p["D"], p["E"]),
                    (0.0, 1.0, 2.0, 3.0, -2.0),
                    float(p["Tmin"]),
                    float(p["Tmax"]),
                    f"NIST WebBook Shomate {name[-1]}",
                )
            )
        method = "NIST WebBook Shomate"
        if pieces[0].T_min > 298.0 and trc is not None and trc.T_min <= 298.0:
            # the Shomate fit starts above 298.15 K (water: 500 K): bridge the gap with the
            # TRC correlation so the Kirchhoff integral from 298.15 K stays inside a fit
            pieces.insert(0, dataclasses.replace(trc, T_max=pieces[0].T_min))
            method = f"TRC below {pieces[1].T_min:g} K + NIST WebBook Shomate"
        if len(pieces) == 1:
            return pieces[0], "shomate"
        return PiecewiseCp(tuple(pieces), method=f"{method} (piecewise)"), "shomate"
    if trc is not None:
        return trc, "trc"
    if cas in _NOBLE_GASES:
        # an ideal monatomic gas has Cp° = 5/2 R exactly (translation only; electronic
        # excitation is negligible below ~5000 K) - common practice
        return PowerSeriesCp(
            (2.5 * R,), (0.0,), 50.0, 6000.0, "ideal monatomic gas, Cp° = 5/2 R"
        ), "monatomic"
    from chemicals.heat_capacity import Cp_data_Poling

    if cas in Cp_data_Poling.index:
        row = Cp_data_Poling.loc[cas]
        coeffs = [row[f"a{k}"] for k in range(5)]
        limits = (row["Tmin"], row["Tmax"])
        if all(c == c for c in (*coeffs, *limits)):  # no NaN
            return PowerSeriesCp(
                tuple(R * float(c) for c in coeffs),
                (0.0, 1.0, 2.0, 3.0, 4.0),
                float(row["Tmin"]),
                float(row["Tmax"]),
                "Poling et al. ideal-gas polynomial (via chemicals)",
            ), "poling"
    raise MissingDataError(
        f"no ranked ideal-gas Cp correlation (Shomate, TRC, Poling) for {key} (CAS {cas}); "
        "supply the species yourself or use data='janaf'"
    )


def _u_hf(cas: str, method: str, value: float, ident: Identity) -> float:
    """Standard uncertainty of ΔfH° [J/mol]: zero for an element in its reference state,
    ATcT's own where it gives one, else the documented default of the source."""
    if value == 0.0 and len(ident.atoms) == 1:
        return 0.0
    if method == "ATCT_G":
        from chemicals.reaction import Hfg_ATcT_data

        if cas in Hfg_ATcT_data.index:
            u = Hfg_ATcT_data.loc[cas, "uncertainty"]
            if u == u and float(u) > 0:  # not NaN
                return float(u)
    return U_HF_BY_SOURCE[method]


@cache
def default_record(ident: Identity) -> DefaultRecord:
    """Collect ranked ΔfH°, S° and Cp° for a gas species from chemicals/thermo.

    Raises
    ------
    MissingDataError
        If no ranked source has the datum (estimates are never used silently).
    """
    from chemicals import reaction as rx

    cas = ident.cas
    hf = _first(HF_RANKING, rx.Hfg, rx.Hfg_methods(cas), cas)
    if hf is None:
        raise MissingDataError(
            f"no measured ΔfH° (gas) for {ident.key} (CAS {cas}) in the ranked sources "
            f"{[k for k, _ in HF_RANKING]}; estimates are not used - supply it yourself"
        )
    s = _first(S_RANKING, rx.S0g, rx.S0g_methods(cas), cas)
    if s is None:
        raise MissingDataError(
            f"no measured S° (gas) for {ident.key} (CAS {cas}) in the ranked sources "
            f"{[k for k, _ in S_RANKING]}; supply it yourself"
        )
    cp, cp_key = _cp_model(cas, ident.key)
    return DefaultRecord(
        hf298=hf[0],
        hf_source=hf[2],
        s298=s[0],
        s_source=s[2],
        cp=cp,
        cp_key=cp_key,
        u_hf298=_u_hf(cas, hf[1], hf[0], ident),
        u_s298=U_S_BY_SOURCE[s[1]],
        u_cp_rel=U_CP_REL_BY_METHOD[cp_key],
    )
