"""Reactor operating-window studies built on the equilibrium solver.

* :mod:`~eqconv.studies.feeds` — feed parameters (steam-to-carbon, H2:N2, inert fraction,
  O2 excess, any ratio) that generate feeds from one number;
* :mod:`~eqconv.studies.sweep` — T × P × feed-parameter sweeps as ``xarray.Dataset``
  (chunked, dask-ready), with :mod:`~eqconv.studies.export` to DataFrame, CSV and JSON;
* :mod:`~eqconv.studies.targets` — exact T, P or feed ratio that meets a conversion target,
  and the target contour on the T–P plane;
* :mod:`~eqconv.studies.adiabatic` — enthalpy balances, adiabatic lines and adiabatic
  equilibrium outlets;
* :mod:`~eqconv.studies.staging` — intercooled multi-bed converters;
* :mod:`~eqconv.studies.carbon` — carbon-formation boundary of a reformer feed (minimum
  steam-to-carbon ratio, carbon-free temperature range).

xarray, pandas and dask are optional: they are imported only by the functions that need
them, with an ``ImportError`` naming the extra to install.
"""

from __future__ import annotations

from ._solve import equilibrium_conversion
from .adiabatic import (
    AdiabaticResult,
    adiabatic_equilibrium,
    adiabatic_line,
    adiabatic_rise,
    mixture_enthalpy,
)
from .carbon import (
    CarbonActivity,
    CarbonLimitResult,
    CarbonRangeResult,
    carbon_activity,
    carbon_free_temperatures,
    minimum_steam_to_carbon,
)
from .errors import UnreachableTargetError
from .export import (
    read_sweep_csv,
    read_sweep_json,
    sweep_dataframe,
    write_sweep_csv,
    write_sweep_json,
)
from .feeds import (
    FeedParameter,
    hydrogen_to_nitrogen,
    inert_fraction,
    oxygen_excess,
    ratio,
    steam_to_carbon,
)
from .staging import StagingResult, stage_beds
from .sweep import sweep
from .targets import (
    TargetResult,
    conversion_contour,
    feed_ratio_for_conversion,
    pressure_for_conversion,
    temperature_for_conversion,
)

__all__ = [
    "AdiabaticResult",
    "CarbonActivity",
    "CarbonLimitResult",
    "CarbonRangeResult",
    "FeedParameter",
    "StagingResult",
    "TargetResult",
    "UnreachableTargetError",
    "adiabatic_equilibrium",
    "adiabatic_line",
    "adiabatic_rise",
    "carbon_activity",
    "carbon_free_temperatures",
    "conversion_contour",
    "equilibrium_conversion",
    "feed_ratio_for_conversion",
    "hydrogen_to_nitrogen",
    "inert_fraction",
    "minimum_steam_to_carbon",
    "mixture_enthalpy",
    "oxygen_excess",
    "pressure_for_conversion",
    "ratio",
    "read_sweep_csv",
    "read_sweep_json",
    "stage_beds",
    "steam_to_carbon",
    "sweep",
    "sweep_dataframe",
    "temperature_for_conversion",
    "write_sweep_csv",
    "write_sweep_json",
]
