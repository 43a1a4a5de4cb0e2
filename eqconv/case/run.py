"""Run a validated case through the study functions.

:func:`run_case` turns a :class:`~eqconv.case.model.Case` (SI values already) into library
objects (reactions, species, feed, feed parameter), then calls the study layer: the
equilibrium conversion on the T × P grid, the target finders, and the staging of adiabatic
beds. The :class:`~eqconv.case.result.CaseResult` it returns prints a screen table and
writes CSV, JSON and PNG files.

The screen table needs only the core dependencies; the full sweep needs xarray and pandas
(``eqconv[studies]``), the plots matplotlib (``eqconv[plots]``). A missing optional package
skips those files with a note, it does not stop the run.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from typing import Any

import numpy as np

from ..errors import CaseFileError, EqconvError, InputError
from ..reaction import Reaction
from ..species import Species, get_species
from ..user_species import user_species
from . import CAUTION
from .model import Case
from .output import have
from .result import CaseResult, Progress

__all__ = ["CAUTION", "CaseResult", "run_case"]

_PHASES = {"gas": "g", "solid": "s", "liquid": "l"}


# ------------------------------------------------------------------------- building
def _user_species(case: Case) -> dict[str, Species]:
    out: dict[str, Species] = {}
    for i, s in enumerate(case.species):
        cp = s.heat_capacity
        try:
            out[s.key] = user_species(
                key=s.key,
                formula=s.formula,
                phase=_PHASES[s.phase],
                hf298=s.enthalpy_of_formation,
                s298=s.standard_entropy,
                cp={
                    "kind": cp.kind,
                    "value": cp.value,
                    "coeffs": cp.coefficients,
                    "T_min": cp.low_temperature,
                    "T_max": cp.high_temperature,
                },
                source=s.source,
                name=s.name,
                cas=s.cas,
            )
        except EqconvError as exc:
            raise CaseFileError(f"species[{i}] ({s.key}): {exc}") from None
    return out


def _resolver(case: Case, user: Mapping[str, Species]) -> Callable[[str, str], Species]:
    def resolve(name: str, where: str) -> Species:
        if name in user:
            return user[name]
        try:
            return get_species(name, data=case.data)
        except EqconvError as exc:
            raise CaseFileError(f"{where} = {name!r}: {exc}") from None

    return resolve


def _canonical_amounts(
    amounts: Mapping[str, float], resolve: Callable[[str, str], Species], where: str
) -> dict[str, float]:
    out: dict[str, float] = {}
    for name, value in amounts.items():
        key = resolve(name, f"{where}.{name}").key
        if key in out:
            raise CaseFileError(f"{where}: {name!r} names {key}, which is already listed")
        out[key] = float(value)
    return out


def _feed_parameter(case: Case, resolve: Callable[[str, str], Species]) -> Any:
    from ..studies import feeds

    spec = case.feed.parameter
    if spec is None:
        return None
    w = "feed.parameter"

    def key(name: str, field_name: str) -> str:
        return resolve(name, f"{w}.{field_name}").key

    def amounts(mapping: Mapping[str, float], field_name: str) -> dict[str, float]:
        return _canonical_amounts(mapping, resolve, f"{w}.{field_name}")

    try:
        if spec.kind == "steam_to_carbon":
            return feeds.steam_to_carbon(
                amounts(spec.hydrocarbons, "hydrocarbons"),
                steam=key(spec.steam, "steam"),
                others=amounts(spec.others, "others") or None,
            )
        if spec.kind == "H2_to_N2":
            return feeds.hydrogen_to_nitrogen(
                inerts=amounts(spec.inerts, "inerts") or None,
                hydrogen=key(spec.hydrogen, "hydrogen"),
                nitrogen=key(spec.nitrogen, "nitrogen"),
            )
        if spec.kind == "inert_fraction":
            return feeds.inert_fraction(
                amounts(spec.reactive, "reactive"), inert=key(spec.inert, "inert")
            )
        if spec.kind == "O2_excess":
            return feeds.oxygen_excess(
                amounts(spec.fuel, "fuel"),
                spec.stoichiometric_oxygen,
                oxygen=key(spec.oxygen, "oxygen"),
                companions=amounts(spec.companions, "companions") or None,
            )
        return feeds.ratio(
            spec.name,
            key(spec.numerator, "numerator"),
            key(spec.denominator, "denominator"),
            amounts(spec.base, "base"),
            unit=spec.unit,
        )
    except CaseFileError:
        raise
    except EqconvError as exc:
        raise CaseFileError(f"{w}: {exc}") from None


# -------------------------------------------------------------------------- running
def run_case(
    case: Case, *, sweep: bool | None = None, progress: Progress | None = None
) -> CaseResult:
    """Run every study a case asks for.

    Parameters
    ----------
    case : Case
        A validated case (:func:`eqconv.case.load_case`).
    sweep : bool, optional
        Also build the full :func:`eqconv.studies.sweep` Dataset (for files and plots).
        Default: when xarray is installed. ``False`` keeps to the core dependencies.
    progress : callable, optional
        Called with a short message before each stage and after each sweep chunk.

    Returns
    -------
    CaseResult

    Raises
    ------
    CaseFileError
        A species, reaction or feed entry that cannot be resolved (the message names it).
    ConvergenceError
        The solver failed at a grid point (the message gives the conditions).
    """
    from .. import studies
    from ..studies._solve import default_key

    say = progress or (lambda _msg: None)
    notes: list[str] = []
    user = _user_species(case)
    resolve = _resolver(case, user)
    reactions: list[Reaction] = []
    for i, eq in enumerate(case.reactions):
        try:
            reactions.append(Reaction(eq, data=case.data, species=list(user.values()) or None))
        except EqconvError as exc:
            raise CaseFileError(f"reactions[{i}] = {eq!r}: {exc}") from None
    feed = _canonical_amounts(case.feed.components, resolve, "feed.components")
    if case.conversion_of is not None:
        key = resolve(case.conversion_of, "conversion_of").key
    else:
        try:
            key = default_key(reactions, feed)
        except EqconvError as exc:
            raise CaseFileError(f"conversion_of: {exc}") from None
    involved = {k for r in reactions for k in r.keys}
    unknown_inerts = [k for k in feed if k not in involved]
    all_species: dict[str, Species] = {sp.key: sp for r in reactions for sp in r.species}
    for k in unknown_inerts:
        all_species.setdefault(k, user.get(k) or resolve(k, f"feed.components.{k}"))
    parameter = _feed_parameter(case, resolve)
    gas = case.gas
    species_arg = list(all_species.values())

    conversion = None
    ds = design_ds = None
    temperature_limits: list[Any] = []
    pressure_limits: list[Any] = []
    feed_ratio: list[Any] = []
    staging = None
    g = case.grid
    if g is not None:
        T = np.asarray(g.temperature)
        P = np.asarray(g.pressure)
        want_sweep = have("xarray") and have("pandas") if sweep is None else sweep

        def chunk(done: int, total: int) -> None:
            if total > 20_000:
                say(f"  {done}/{total} points")

        say(f"solving the {T.size} × {P.size} T × P grid")
        if want_sweep:
            design_ds = studies.sweep(
                reactions, feed, T, P, key=key, gas=gas, progress=chunk, species=all_species
            )
            conversion = np.asarray(design_ds["conversion"].transpose("T", "P").values, float)
        else:
            conversion = np.asarray(
                studies.equilibrium_conversion(
                    reactions, feed, T[:, None], P[None, :], key=key, gas=gas
                ),
                dtype=float,
            )
        if want_sweep and parameter is not None and case.feed.parameter is not None:
            values = np.asarray(case.feed.parameter.values)
            say(f"sweeping {T.size * P.size * values.size} grid points with {parameter.name}")
            ds = studies.sweep(
                reactions,
                parameter,
                T,
                P,
                values=values,
                key=key,
                gas=gas,
                progress=chunk,
                species=all_species,
            )
        else:
            ds = design_ds
        if gas == "ideal" and P.max() > 50e5:
            notes.append(
                "ideal gas above 50 bar: fugacity corrections move equilibrium "
                "conversion by roughly 5–30 % at 50–300 bar (common practice); "
                "compare with gas = 'peng-robinson'"
            )
    falls_with_T, rises_with_P = True, True
    T_bracket = P_bracket = None
    T_ends = P_ends = None
    t = case.targets
    if t is not None:
        levels = list(t.conversion)
        if t.temperature_limit and g is not None:
            lo, hi = _bracket(t.temperature_range, g.temperature, "targets.temperature_range")
            T_bracket = (lo, hi)
            T_ends = np.asarray(
                studies.equilibrium_conversion(
                    reactions,
                    feed,
                    np.array([lo, hi])[None, :],
                    np.asarray(g.pressure)[:, None],
                    key=key,
                    gas=gas,
                ),
                dtype=float,
            )
            mid = len(g.pressure) // 2
            falls_with_T = bool(T_ends[mid, 0] > T_ends[mid, 1])
            say("finding the temperature limit of each target")
            for x in levels:
                temperature_limits.append(
                    studies.temperature_for_conversion(
                        reactions,
                        feed,
                        x,
                        np.asarray(g.pressure),
                        (lo, hi),
                        key=key,
                        gas=gas,
                        on_unreachable="mask",
                    )
                )
        if t.pressure_limit and g is not None:
            lo, hi = _bracket(t.pressure_range, g.pressure, "targets.pressure_range")
            P_bracket = (lo, hi)
            P_ends = np.asarray(
                studies.equilibrium_conversion(
                    reactions,
                    feed,
                    np.asarray(g.temperature)[:, None],
                    np.array([lo, hi])[None, :],
                    key=key,
                    gas=gas,
                ),
                dtype=float,
            )
            mid = len(g.temperature) // 2
            rises_with_P = bool(P_ends[mid, 1] > P_ends[mid, 0])
            say("finding the target contours on the T–P plane")
            for x in levels:
                pressure_limits.append(
                    studies.conversion_contour(
                        reactions, feed, x, np.asarray(g.temperature), (lo, hi), key=key, gas=gas
                    )
                )
        if t.feed_ratio is not None:
            fr = t.feed_ratio
            say("finding the feed parameter that meets each target")
            for x in levels:
                try:
                    feed_ratio.append(
                        studies.feed_ratio_for_conversion(
                            reactions,
                            parameter,
                            x,
                            fr.temperature,
                            fr.pressure,
                            (fr.low, fr.high),
                            key=key,
                            gas=gas,
                            on_unreachable="mask",
                        )
                    )
                except InputError as exc:
                    raise CaseFileError(f"targets.feed_ratio: {exc}") from None
    s = case.staging
    if s is not None:
        say("staging adiabatic beds")
        T_in = list(s.inlet_temperature)
        try:
            staging = studies.stage_beds(
                reactions,
                feed,
                T_in if len(T_in) > 1 else T_in[0],
                s.pressure,
                n_beds=s.beds,
                target=s.target_conversion,
                max_beds=s.max_beds,
                key=key,
                gas=gas,
                approach_T=s.approach_to_equilibrium,
                species=species_arg,
            )
        except studies.UnreachableTargetError as exc:
            notes.append(f"staging: {exc}; showing {s.max_beds} beds")
            staging = studies.stage_beds(
                reactions,
                feed,
                T_in if len(T_in) > 1 else T_in[0],
                s.pressure,
                n_beds=s.max_beds,
                key=key,
                gas=gas,
                approach_T=s.approach_to_equilibrium,
                species=species_arg,
            )
    return CaseResult(
        case=case,
        reactions=tuple(reactions),
        feed=feed,
        key=key,
        species=tuple(all_species.values()),
        conversion=conversion,
        sweep=ds,
        design_sweep=design_ds,
        temperature_limits=tuple(temperature_limits),
        pressure_limits=tuple(pressure_limits),
        feed_ratio=tuple(feed_ratio),
        staging=staging,
        parameter=parameter,
        falls_with_T=falls_with_T,
        rises_with_P=rises_with_P,
        T_bracket=T_bracket,
        T_bracket_conversion=T_ends,
        P_bracket=P_bracket,
        P_bracket_conversion=P_ends,
        notes=tuple(notes),
    )


def _bracket(given: Any, axis: Sequence[float], where: str) -> tuple[float, float]:
    if given is not None:
        return float(given.low), float(given.high)
    if len(axis) < 2:
        raise CaseFileError(f"{where} is needed when the grid has a single value on that axis")
    return float(axis[0]), float(axis[-1])
