"""Validated models of a case file (pydantic v2, frozen, unknown keys forbidden).

A case file describes one screening study: the reactions and the species data they use, the
feed, the temperature × pressure grid, the gas model and data source, conversion targets,
adiabatic beds with interstage cooling, and what to write. Every dimensional value is written
with its unit (``"450 degC"``, ``"150 bar"``, ``"1200 kmol/h"``) and converted to SI once,
while the model is validated (:mod:`eqconv.case.units`): past validation every field holds
plain floats in K, Pa, mol (or mol/s), J/mol and J/(mol K).

Key names are plain trade words. A minimal case::

    title = "Invented shift converter"
    reactions = ["CO + H2O = CO2 + H2"]
    conversion_of = "CO"

    [feed]
    components = { CO = 1.0, H2O = 2.5, H2 = 0.5 }

    [grid]
    temperature = { start = "200 degC", stop = "450 degC", points = 26 }
    pressure = "30 bar"
"""

from __future__ import annotations

import itertools
import math
import re
from collections.abc import Callable, Mapping
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    PrivateAttr,
    ValidatorFunctionWrapHandler,
    WithJsonSchema,
    model_validator,
)

from ..errors import InputError
from .units import UNITS, Kind, parse_number_unit, to_si

__all__ = [
    "AXIS_MAX_POINTS",
    "Case",
    "Feed",
    "FeedParameterSpec",
    "FeedRatioTarget",
    "Grid",
    "HeatCapacity",
    "HydrogenToNitrogen",
    "InertFraction",
    "Output",
    "OxygenExcess",
    "Ratio",
    "Staging",
    "SteamToCarbon",
    "Targets",
    "UserSpecies",
]

#: Largest number of points on one grid axis.
AXIS_MAX_POINTS = 2000

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"


def _quantity_pattern(kind: Kind) -> str:
    units = "|".join(re.escape(u) for u in sorted(UNITS[kind], key=len, reverse=True))
    return rf"^\s*{_NUMBER}\s*(?:{units})\s*$"


def _quantity_schema(kind: Kind, example: str) -> dict[str, Any]:
    return {
        "type": "string",
        "pattern": _quantity_pattern(kind),
        "examples": [example],
        "description": f"a {kind.replace('_', ' ')} with its unit; accepted units: "
        + ", ".join(UNITS[kind]),
    }


def _to_si(kind: Kind) -> Callable[[Any], float]:
    def convert(value: Any) -> float:
        return to_si(value, kind)

    return convert


# Text with a unit in, SI float out; the JSON Schema shows the text form.
Temperature = Annotated[
    float,
    BeforeValidator(_to_si("temperature")),
    WithJsonSchema(_quantity_schema("temperature", "450 degC")),
]
TemperatureDifference = Annotated[
    float,
    BeforeValidator(_to_si("temperature_difference")),
    WithJsonSchema(_quantity_schema("temperature_difference", "10 K")),
]
Pressure = Annotated[
    float,
    BeforeValidator(_to_si("pressure")),
    WithJsonSchema(_quantity_schema("pressure", "150 bar")),
]
MolarEnergy = Annotated[
    float,
    BeforeValidator(_to_si("molar_energy")),
    WithJsonSchema(_quantity_schema("molar_energy", "-45.9 kJ/mol")),
]
MolarEntropy = Annotated[
    float,
    BeforeValidator(_to_si("molar_entropy")),
    WithJsonSchema(_quantity_schema("molar_entropy", "192.8 J/(mol K)")),
]

Fraction = Annotated[float, Field(gt=0.0, lt=1.0)]
NonNegative = Annotated[float, Field(ge=0.0, allow_inf_nan=False)]


class _Model(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")


# ----------------------------------------------------------------------------------- axes
def _axis(kind: Kind) -> Callable[[Any], tuple[float, ...]]:
    """Validator of one grid axis: four input forms, one SI tuple out."""

    def convert(value: Any) -> tuple[float, ...]:
        if isinstance(value, str | int | float):
            out = [to_si(value, kind)]
        elif isinstance(value, list | tuple):
            if not value:
                raise InputError("expected at least one value")
            out = [to_si(v, kind) for v in value]
        elif isinstance(value, Mapping):
            keys = set(value)
            if "values" in keys:
                extra = keys - {"values", "unit"}
                if extra or "unit" not in keys:
                    raise InputError(
                        "a list of values takes exactly the keys 'values' and 'unit' "
                        f"(e.g. values = [100, 200], unit = 'bar'); got keys {sorted(keys)}"
                    )
                nums, unit = value["values"], value["unit"]
                if not isinstance(unit, str) or not isinstance(nums, list | tuple) or not nums:
                    raise InputError("'values' must be a non-empty list of numbers and 'unit' text")
                if any(isinstance(x, bool) or not isinstance(x, int | float) for x in nums):
                    raise InputError(f"'values' must hold bare numbers in {unit!r}; got {nums!r}")
                out = [to_si(f"{float(x)!r} {unit}", kind) for x in nums]
            else:
                allowed = {"start", "stop", "points", "spacing"}
                missing = {"start", "stop", "points"} - keys
                if keys - allowed or missing:
                    raise InputError(
                        "a range takes the keys 'start', 'stop', 'points' and optionally "
                        "'spacing' ('linear' or 'log'), or a list takes 'values' and 'unit'; "
                        f"got keys {sorted(keys)}"
                    )
                lo, hi = to_si(value["start"], kind), to_si(value["stop"], kind)
                n = value["points"]
                if isinstance(n, bool) or not isinstance(n, int) or not 2 <= n <= AXIS_MAX_POINTS:
                    raise InputError(
                        f"'points' must be a whole number from 2 to {AXIS_MAX_POINTS}; got {n!r}"
                    )
                spacing = value.get("spacing", "linear")
                if spacing not in ("linear", "log"):
                    raise InputError(f"'spacing' must be 'linear' or 'log'; got {spacing!r}")
                if not lo < hi:
                    raise InputError(f"'start' must be below 'stop'; got {lo:g} and {hi:g} (SI)")
                if spacing == "log":
                    a, b = math.log(lo), math.log(hi)
                    out = [math.exp(a + (b - a) * i / (n - 1)) for i in range(n)]
                    out[0], out[-1] = lo, hi
                else:
                    out = [lo + (hi - lo) * i / (n - 1) for i in range(n)]
        else:
            raise InputError(
                "expected a value with its unit, a list of them, a range "
                "{start, stop, points} or {values, unit}"
            )
        if len(out) > AXIS_MAX_POINTS:
            raise InputError(f"an axis may hold at most {AXIS_MAX_POINTS} values; got {len(out)}")
        if any(b <= a for a, b in itertools.pairwise(out)):
            raise InputError("the values of an axis must increase strictly")
        return tuple(out)

    return convert


def _axis_schema(kind: Kind, example: str, unit_example: str) -> dict[str, Any]:
    q = _quantity_schema(kind, example)
    return {
        "description": f"one {kind}, a list of them, a range or a list of bare numbers with "
        "one unit; values must increase",
        "anyOf": [
            q,
            {"type": "array", "items": q, "minItems": 1, "maxItems": AXIS_MAX_POINTS},
            {
                "type": "object",
                "additionalProperties": False,
                "required": ["start", "stop", "points"],
                "properties": {
                    "start": q,
                    "stop": q,
                    "points": {"type": "integer", "minimum": 2, "maximum": AXIS_MAX_POINTS},
                    "spacing": {"enum": ["linear", "log"], "default": "linear"},
                },
            },
            {
                "type": "object",
                "additionalProperties": False,
                "required": ["values", "unit"],
                "properties": {
                    "values": {"type": "array", "items": {"type": "number"}, "minItems": 1},
                    "unit": {"enum": list(UNITS[kind]), "examples": [unit_example]},
                },
            },
        ],
    }


TemperatureAxis = Annotated[
    tuple[float, ...],
    BeforeValidator(_axis("temperature")),
    WithJsonSchema(_axis_schema("temperature", "450 degC", "degC")),
]
PressureAxis = Annotated[
    tuple[float, ...],
    BeforeValidator(_axis("pressure")),
    WithJsonSchema(_axis_schema("pressure", "150 bar", "bar")),
]


def _parameter_values(value: Any) -> tuple[float, ...]:
    """Values of a swept feed parameter: a list of numbers or {start, stop, points}."""
    if isinstance(value, int | float) and not isinstance(value, bool):
        out = [float(value)]
    elif isinstance(value, list | tuple) and value:
        if any(isinstance(x, bool) or not isinstance(x, int | float) for x in value):
            raise InputError(f"expected a list of numbers; got {value!r}")
        out = [float(x) for x in value]
    elif isinstance(value, Mapping):
        keys = set(value)
        if keys != {"start", "stop", "points"}:
            raise InputError(
                f"a range takes exactly the keys 'start', 'stop', 'points'; got {sorted(keys)}"
            )
        lo, hi, n = value["start"], value["stop"], value["points"]
        if any(isinstance(x, bool) or not isinstance(x, int | float) for x in (lo, hi)):
            raise InputError(f"'start' and 'stop' must be numbers; got {lo!r}, {hi!r}")
        if isinstance(n, bool) or not isinstance(n, int) or not 2 <= n <= AXIS_MAX_POINTS:
            raise InputError(f"'points' must be a whole number from 2 to {AXIS_MAX_POINTS}")
        if not lo < hi:
            raise InputError(f"'start' must be below 'stop'; got {lo!r} and {hi!r}")
        out = [lo + (hi - lo) * i / (n - 1) for i in range(n)]
    else:
        raise InputError("expected a non-empty list of numbers or {start, stop, points}")
    if not all(math.isfinite(x) for x in out):
        raise InputError(f"values must be finite; got {out!r}")
    if any(b <= a for a, b in itertools.pairwise(out)):
        raise InputError("the values must increase strictly")
    return tuple(out)


ParameterValues = Annotated[
    tuple[float, ...],
    BeforeValidator(_parameter_values),
    WithJsonSchema(
        {
            "description": "values of the feed parameter: a list of numbers or a range",
            "anyOf": [
                {"type": "number"},
                {"type": "array", "items": {"type": "number"}, "minItems": 1},
                {
                    "type": "object",
                    "additionalProperties": False,
                    "required": ["start", "stop", "points"],
                    "properties": {
                        "start": {"type": "number"},
                        "stop": {"type": "number"},
                        "points": {"type": "integer", "minimum": 2},
                    },
                },
            ],
        }
    ),
]


# -------------------------------------------------------------------------------- species
class HeatCapacity(_Model):
    """Heat-capacity model of a user species (Cp in J/(mol K), T in K)."""

    kind: Literal["constant", "polynomial", "shomate", "nasa7", "maier_kelley"] = Field(
        description="'constant' (needs value); 'polynomial' (coefficients a0, a1, ... in "
        "ascending powers of T [K]); 'shomate' (A-E, t = T/1000); 'nasa7' (a1-a5 or a1-a7, "
        "Cp/R); 'maier_kelley' (a, b, c: Cp = a + bT + c/T^2)"
    )
    value: MolarEntropy | None = Field(None, description="constant Cp, e.g. '35.6 J/(mol K)'")
    coefficients: tuple[float, ...] | None = Field(
        None, min_length=1, description="coefficients of the correlation (see kind), bare numbers"
    )
    low_temperature: Temperature = Field(
        "200 K", validate_default=True, description="lowest valid temperature of the model"
    )
    high_temperature: Temperature = Field(
        "1500 K", validate_default=True, description="highest valid temperature of the model"
    )

    @model_validator(mode="after")
    def _check(self) -> HeatCapacity:
        if self.kind == "constant" and self.value is None:
            raise InputError("kind 'constant' needs 'value', e.g. value = '35.6 J/(mol K)'")
        if self.kind != "constant" and self.coefficients is None:
            raise InputError(f"kind {self.kind!r} needs 'coefficients'")
        if not self.low_temperature < self.high_temperature:
            raise InputError("'low_temperature' must be below 'high_temperature'")
        return self


class UserSpecies(_Model):
    """A species that neither built-in data source covers, with the source of its data."""

    key: str = Field(min_length=1, description="label used in reactions, feed and results")
    formula: str = Field(min_length=1, description="chemical formula, e.g. 'CH3OH'")
    phase: Literal["gas", "solid", "liquid"] = Field(
        "gas", description="standard state: ideal gas at 1 bar, or the pure condensed phase"
    )
    enthalpy_of_formation: MolarEnergy = Field(
        description="standard enthalpy of formation at 298.15 K"
    )
    standard_entropy: MolarEntropy = Field(
        gt=0.0, description="standard entropy at 298.15 K and 1 bar, > 0"
    )
    heat_capacity: HeatCapacity
    source: str = Field(min_length=1, description="where these data come from")
    name: str = Field("", description="common name")
    cas: str = Field("", description="CAS registry number, if any")


# ----------------------------------------------------------------------------------- feed
_AmountMap = dict[str, NonNegative]


class SteamToCarbon(_Model):
    """Sweep the steam-to-carbon ratio S/C [mol H2O per mol C in the hydrocarbons]."""

    kind: Literal["steam_to_carbon"]
    values: ParameterValues
    hydrocarbons: _AmountMap = Field(
        min_length=1, description="relative amounts of the carbon-bearing feed species [mol]"
    )
    steam: str = Field("H2O", description="key of steam")
    others: _AmountMap = Field(
        default_factory=dict, description="fixed extra amounts, e.g. {H2 = 0.05} [mol]"
    )


class HydrogenToNitrogen(_Model):
    """Sweep the H2:N2 ratio of an ammonia synthesis gas (1 mol in total)."""

    kind: Literal["H2_to_N2"]
    values: ParameterValues
    inerts: dict[str, Fraction] = Field(
        default_factory=dict, description="mole fractions of inerts, e.g. {Ar = 0.03, CH4 = 0.02}"
    )
    hydrogen: str = Field("H2", description="key of hydrogen")
    nitrogen: str = Field("N2", description="key of nitrogen")


class InertFraction(_Model):
    """Sweep the mole fraction of one inert added to a fixed reactive mixture."""

    kind: Literal["inert_fraction"]
    values: ParameterValues
    reactive: _AmountMap = Field(min_length=1, description="relative reactive amounts [mol]")
    inert: str = Field("Ar", description="key of the inert")


class OxygenExcess(_Model):
    """Sweep the oxygen excess over a stated stoichiometric need (0.1 = 10 % excess)."""

    kind: Literal["O2_excess"]
    values: ParameterValues
    fuel: _AmountMap = Field(min_length=1, description="fixed amounts of what is oxidised [mol]")
    stoichiometric_oxygen: float = Field(gt=0, description="O2 needed for the fuel [mol]")
    oxygen: str = Field("O2", description="key of oxygen")
    companions: _AmountMap = Field(
        default_factory=dict,
        description="mol carried per mol O2, e.g. air: {N2 = 3.76}",
    )


class Ratio(_Model):
    """Sweep a generic ratio n(numerator) / n(denominator) against a base feed."""

    kind: Literal["ratio"]
    values: ParameterValues
    name: str = Field(pattern=r"^[A-Za-z_][A-Za-z0-9_]*$", description="dimension name")
    numerator: str = Field(min_length=1, description="key of the species that is varied")
    denominator: str = Field(min_length=1, description="key of the reference species")
    base: _AmountMap = Field(min_length=1, description="the other feed amounts [mol]")
    unit: str = Field("mol/mol", description="unit of the ratio, for labels")


FeedParameterSpec = Annotated[
    SteamToCarbon | HydrogenToNitrogen | InertFraction | OxygenExcess | Ratio,
    Field(discriminator="kind"),
]


def _feed_amount(value: Any) -> tuple[float, str]:
    """A feed amount: a bare number (relative mol), an amount or a molar flow."""
    if isinstance(value, bool):
        raise InputError(f"expected an amount; got {value!r}")
    if isinstance(value, int | float):
        return float(value), "mol"
    if isinstance(value, str):
        _, unit = parse_number_unit(value)
        if not unit:
            return float(parse_number_unit(value)[0]), "mol"
        if unit in UNITS["molar_flow"]:
            return to_si(value, "molar_flow"), "mol/s"
        if unit in UNITS["amount"]:
            return to_si(value, "amount"), "mol"
        raise InputError(
            f"unit {unit!r} in {value!r} is neither a molar flow ({', '.join(UNITS['molar_flow'])})"
            f" nor an amount ({', '.join(UNITS['amount'])})"
        )
    raise InputError(f"expected a number or text such as '1200 kmol/h'; got {value!r}")


_FEED_SCHEMA: dict[str, Any] = {
    "anyOf": [
        {"type": "number", "minimum": 0, "description": "relative amount [mol]"},
        {
            "type": "string",
            "pattern": rf"^\s*{_NUMBER}\s*(?:"
            + "|".join(re.escape(u) for u in [*UNITS["molar_flow"], *UNITS["amount"]])
            + r")\s*$",
            "examples": ["1200 kmol/h", "5 kmol"],
        },
    ]
}


def _feed_value(value: Any) -> float:
    number, _ = _feed_amount(value)
    if not (math.isfinite(number) and number >= 0.0):
        raise InputError(f"a feed amount must be finite and >= 0; got {value!r}")
    return number


FeedValue = Annotated[float, BeforeValidator(_feed_value), WithJsonSchema(_FEED_SCHEMA)]


class Feed(_Model):
    """The design feed, and optionally a swept feed parameter.

    ``components`` maps species (formula, name or CAS number, or a user species key) to a
    bare relative amount [mol], an amount (``"5 kmol"``) or a molar flow (``"1200 kmol/h"``);
    all entries must be of one kind. Equilibrium conversion does not depend on the basis; the
    basis sets the unit of heat duties (J with amounts, W with flows).
    """

    components: dict[str, FeedValue] = Field(
        min_length=1, description="design feed: species -> amount or molar flow (one kind)"
    )
    parameter: FeedParameterSpec | None = Field(
        None, description="a feed parameter swept as a third grid dimension"
    )
    _basis: str = PrivateAttr("mol")

    @model_validator(mode="wrap")
    @classmethod
    def _set_basis(cls, data: Any, handler: ValidatorFunctionWrapHandler) -> Feed:
        kinds: set[str] = set()
        if isinstance(data, Mapping) and isinstance(data.get("components"), Mapping):
            for v in data["components"].values():
                try:
                    kinds.add(_feed_amount(v)[1])
                except InputError:
                    pass  # reported by the field validator with its key
        feed = handler(data)
        if len(kinds) > 1:
            raise InputError(
                "feed components mix molar flows (e.g. 'kmol/h') with amounts or bare numbers; "
                "give them all in one kind"
            )
        feed._basis = kinds.pop() if kinds else "mol"
        return feed

    @model_validator(mode="after")
    def _check(self) -> Feed:
        if not any(v > 0.0 for v in self.components.values()):
            raise InputError("at least one feed component must have an amount > 0")
        return self

    @property
    def basis(self) -> str:
        """``"mol"`` (amounts) or ``"mol/s"`` (molar flows): the unit of the SI amounts."""
        return self._basis


# ----------------------------------------------------------------------------- the study
class Grid(_Model):
    """The temperature × pressure grid of the operating-window sweep."""

    temperature: TemperatureAxis = Field(description="grid temperatures, converted to K")
    pressure: PressureAxis = Field(description="grid absolute pressures, converted to Pa")


class TemperatureRange(_Model):
    """A temperature bracket."""

    low: Temperature
    high: Temperature

    @model_validator(mode="after")
    def _check(self) -> TemperatureRange:
        if not self.low < self.high:
            raise InputError(f"'low' must be below 'high'; got {self.low:g} K and {self.high:g} K")
        return self


class PressureRange(_Model):
    """A pressure bracket."""

    low: Pressure
    high: Pressure

    @model_validator(mode="after")
    def _check(self) -> PressureRange:
        if not self.low < self.high:
            raise InputError(
                f"'low' must be below 'high'; got {self.low:g} Pa and {self.high:g} Pa"
            )
        return self


class FeedRatioTarget(_Model):
    """Find the feed-parameter value that meets each target conversion at one T and P."""

    temperature: Temperature
    pressure: Pressure
    low: float = Field(allow_inf_nan=False, description="low end of the parameter bracket")
    high: float = Field(allow_inf_nan=False, description="high end of the parameter bracket")

    @model_validator(mode="after")
    def _check(self) -> FeedRatioTarget:
        if not self.low < self.high:
            raise InputError(f"'low' must be below 'high'; got {self.low!r} and {self.high!r}")
        return self


class Targets(_Model):
    """Target equilibrium conversions of the key species, and what to find for them."""

    conversion: tuple[Fraction, ...] = Field(
        min_length=1, description="target equilibrium conversions, fractions between 0 and 1"
    )
    temperature_limit: bool = Field(
        True, description="at each grid pressure, the temperature where conversion crosses it"
    )
    pressure_limit: bool = Field(
        True, description="at each grid temperature, the pressure where conversion crosses it"
    )
    temperature_range: TemperatureRange | None = Field(
        None, description="bracket of the temperature search (default: the grid's range)"
    )
    pressure_range: PressureRange | None = Field(
        None, description="bracket of the pressure search (default: the grid's range)"
    )
    feed_ratio: FeedRatioTarget | None = Field(
        None, description="find the feed-parameter value that meets each target"
    )


def _inlet_temperatures(value: Any) -> tuple[float, ...]:
    if isinstance(value, str):
        return (to_si(value, "temperature"),)
    if isinstance(value, list | tuple) and value:
        return tuple(to_si(v, "temperature") for v in value)
    raise InputError("expected an inlet temperature such as '420 degC' or a list, one per bed")


InletTemperatures = Annotated[
    tuple[float, ...],
    BeforeValidator(_inlet_temperatures),
    WithJsonSchema(
        {
            "anyOf": [
                _quantity_schema("temperature", "420 degC"),
                {
                    "type": "array",
                    "items": _quantity_schema("temperature", "420 degC"),
                    "minItems": 1,
                },
            ]
        }
    ),
]


class Staging(_Model):
    """Adiabatic beds with interstage cooling back to a chosen inlet temperature."""

    inlet_temperature: InletTemperatures = Field(
        description="inlet temperature of each bed (the last value repeats)"
    )
    pressure: Pressure = Field(description="converter pressure (absolute)")
    beds: int | None = Field(None, ge=1, le=20, description="a fixed number of beds")
    target_conversion: Fraction | None = Field(
        None, description="stop at the first bed whose cumulative conversion reaches this"
    )
    max_beds: int = Field(12, ge=1, le=20, description="most beds tried for a target")
    approach_to_equilibrium: TemperatureDifference = Field(
        "0 K",
        validate_default=True,
        description="each bed stops at the equilibrium of its outlet T plus this difference",
    )

    @model_validator(mode="after")
    def _check(self) -> Staging:
        if (self.beds is None) == (self.target_conversion is None):
            raise InputError("give exactly one of 'beds' and 'target_conversion'")
        return self


class Output(_Model):
    """What ``eqconv run`` writes and the units shown on screen and in plots."""

    write_csv: bool = Field(True, description="write tables as CSV files")
    write_json: bool = Field(True, description="write the sweep and the results as JSON files")
    write_plots: bool = Field(True, description="write PNG plots (needs matplotlib)")
    temperature_unit: Literal["K", "degC"] = Field("degC", description="unit shown for T")
    pressure_unit: Literal["bar", "MPa", "atm", "kPa", "psia"] = Field(
        "bar", description="unit shown for P"
    )


class Case(_Model):
    """One screening study, as written in a TOML case file."""

    title: str = Field(min_length=1, description="one-line title")
    description: str = Field("", description="what the study is for")
    data: Literal["default", "janaf"] = Field(
        "default", description="data source of built-in species: ranked sources or NIST-JANAF"
    )
    gas: Literal["ideal", "peng-robinson", "srk"] = Field(
        "ideal", description="gas model: ideal gas or fugacities from a cubic equation of state"
    )
    reactions: tuple[str, ...] = Field(
        min_length=1, description="reaction equations, e.g. 'N2 + 3 H2 = 2 NH3'"
    )
    conversion_of: str | None = Field(
        None, description="feed species whose conversion is reported (default: first reactant)"
    )
    species: tuple[UserSpecies, ...] = Field((), description="user species (optional)")
    feed: Feed
    grid: Grid | None = Field(None, description="T × P grid of the operating-window sweep")
    targets: Targets | None = None
    staging: Staging | None = None
    output: Output = Field(Output.model_validate({}), description="files written and units shown")

    @model_validator(mode="after")
    def _check(self) -> Case:
        if self.conversion_of is not None and self.conversion_of not in self.feed.components:
            raise InputError(
                f"conversion_of = {self.conversion_of!r} is not a feed component; expected one "
                f"of {sorted(self.feed.components)}"
            )
        keys = [s.key for s in self.species]
        if len(set(keys)) != len(keys):
            raise InputError(f"user species keys must be unique; got {keys}")
        if self.targets is not None:
            t = self.targets
            if (t.temperature_limit or t.pressure_limit) and self.grid is None:
                raise InputError("targets with temperature_limit or pressure_limit need [grid]")
            if t.feed_ratio is not None and self.feed.parameter is None:
                raise InputError("targets.feed_ratio needs a swept [feed.parameter]")
        if self.grid is None and self.staging is None:
            raise InputError("a case needs [grid], [staging] or both: nothing to compute")
        return self
