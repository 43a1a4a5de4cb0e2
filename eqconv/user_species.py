"""User-supplied species for what neither built-in source covers.

The input is validated by a frozen pydantic model that forbids unknown keys; past it, a
plain :class:`~eqconv.species.Species` flows on.

Examples
--------
>>> sp = user_species(key="X2", formula="N2", hf298=0.0, s298=191.6,
...                   cp={"kind": "constant", "value": 29.1}, source="invented test datum")
>>> sp.sources["cp"]
'invented test datum'
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from .cp import CpModel, constant_cp, maier_kelley_cp, nasa7_cp, polynomial_cp, shomate_cp
from .errors import InputError
from .identify import parse_formula
from .species import Species

__all__ = ["CpSpec", "UserSpeciesData", "user_species"]


class CpSpec(BaseModel):
    """Heat-capacity model of a user species.

    ``kind``: ``"constant"`` (``value`` [J/(mol K)]), ``"polynomial"`` (``coeffs`` a0, a1, …
    in ascending powers of T [K], Cp in J/(mol K)), ``"shomate"`` (``coeffs`` A–E, NIST
    convention t = T/1000), ``"nasa7"`` (``coeffs`` a1–a5 or a1–a7, Cp/R), or
    ``"maier_kelley"`` (``coeffs`` a, b, c: Cp = a + bT + c/T²).
    """

    model_config = ConfigDict(frozen=True, extra="forbid")

    kind: Literal["constant", "polynomial", "shomate", "nasa7", "maier_kelley"]
    value: float | None = Field(None, description="constant Cp [J/(mol K)]")
    coeffs: tuple[float, ...] | None = Field(None, description="coefficients (see kind)")
    T_min: Annotated[float, Field(gt=0, description="lowest valid T [K]")] = 200.0
    T_max: Annotated[float, Field(gt=0, description="highest valid T [K]")] = 1500.0


class UserSpeciesData(BaseModel):
    """Validated data of one user species (SI units)."""

    model_config = ConfigDict(frozen=True, extra="forbid")

    key: Annotated[str, Field(min_length=1, description="label used in reactions/results")]
    formula: Annotated[str, Field(min_length=1, description="formula, e.g. 'CH3OH'")]
    phase: Literal["g", "s", "l"] = "g"
    hf298: float = Field(description="standard enthalpy of formation at 298.15 K [J/mol]")
    s298: Annotated[float, Field(gt=0, description="standard entropy, 298.15 K, 1 bar [J/(mol K)]")]
    cp: CpSpec
    source: Annotated[str, Field(min_length=1, description="where these data come from")]
    name: str = ""
    cas: str = ""
    u_hf298: float = Field(0.0, ge=0, description="standard uncertainty of ΔfH° [J/mol]")
    u_s298: float = Field(0.0, ge=0, description="standard uncertainty of S° [J/(mol K)]")
    u_cp_rel: float = Field(0.0, ge=0, description="relative uncertainty of Cp° [-]")


def _cp_model(spec: CpSpec, source: str) -> CpModel:
    c = spec.coeffs
    if spec.T_min >= spec.T_max:
        raise InputError(f"cp.T_min ({spec.T_min} K) must be below cp.T_max ({spec.T_max} K)")
    if spec.kind == "constant":
        if spec.value is None:
            raise InputError("cp kind 'constant' needs 'value' [J/(mol K)]")
        return constant_cp(spec.value, spec.T_min, spec.T_max, source)
    if c is None:
        raise InputError(f"cp kind {spec.kind!r} needs 'coeffs'")
    if spec.kind == "polynomial":
        return polynomial_cp(c, spec.T_min, spec.T_max, source)
    if spec.kind == "shomate":
        if len(c) != 5:
            raise InputError(f"cp kind 'shomate' takes 5 coefficients A-E; got {len(c)}")
        return shomate_cp(*c, T_min=spec.T_min, T_max=spec.T_max, method=source)
    if spec.kind == "maier_kelley":
        if len(c) != 3:
            raise InputError(f"cp kind 'maier_kelley' takes 3 coefficients a, b, c; got {len(c)}")
        return maier_kelley_cp(*c, T_min=spec.T_min, T_max=spec.T_max, method=source)
    return nasa7_cp(c, spec.T_min, spec.T_max, source)


def user_species(**fields: object) -> Species:
    """Build a :class:`Species` from user data (see :class:`UserSpeciesData` for the keys).

    Raises
    ------
    InputError
        A key is unknown or missing, or a value is out of bounds; the message names it.
    """
    try:
        d = UserSpeciesData.model_validate(fields)
    except ValidationError as exc:
        first = exc.errors()[0]
        loc = ".".join(str(p) for p in first["loc"])
        raise InputError(
            f"user species: {loc}: {first['msg']} (got {first.get('input')!r})"
        ) from None
    atoms = parse_formula(d.formula)
    return Species(
        key=d.key,
        cas=d.cas,
        name=d.name or d.key,
        formula=d.formula,
        atoms=atoms,
        phase=d.phase,
        hf298=d.hf298,
        s298=d.s298,
        cp_model=_cp_model(d.cp, d.source),
        data="user",
        sources={"hf298": d.source, "s298": d.source, "cp": d.source},
        u_hf298=d.u_hf298,
        u_s298=d.u_s298,
        u_cp_rel=d.u_cp_rel,
    )
