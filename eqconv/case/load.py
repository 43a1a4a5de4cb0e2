"""Read a TOML case file, validate it, and export the JSON Schema of case files.

Every problem becomes a :class:`~eqconv.errors.CaseFileError` whose message names the file,
the key path (``grid.temperature.start``), the value found and what was expected, on one
line. The JSON Schema is generated from the models (:func:`case_schema`), so the shipped copy
``data/case.schema.json`` is checked against it by the test suite and cannot drift.

Examples
--------
>>> case = parse_case('''
... title = "Invented shift converter"
... reactions = ["CO + H2O = CO2 + H2"]
... [feed]
... components = { CO = 1, H2O = 3 }
... [grid]
... temperature = "250 degC"
... pressure = "30 bar"
... ''')
>>> case.grid.temperature, case.grid.pressure
((523.15,), (3000000.0,))
>>> parse_case('title = "x"\\nreactions = []')  # doctest: +ELLIPSIS
Traceback (most recent call last):
...
eqconv.errors.CaseFileError: case file <text>: reactions = []: expected ...
"""

from __future__ import annotations

import json
import tomllib
import types
import typing
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError
from pydantic_core import ErrorDetails

from ..errors import CaseFileError, InputError
from .model import Case

__all__ = ["case_schema", "format_validation_error", "load_case", "parse_case", "write_schema"]

#: ``$id`` of the schema (a name, not a place to fetch from).
SCHEMA_ID = "urn:eqconv:case-file:1"


def _short(value: Any, limit: int = 60) -> str:
    text = repr(value)
    return text if len(text) <= limit else text[: limit - 4] + "...}"


def _model_of(annotation: Any) -> list[type[BaseModel]]:
    """Models reachable from one annotation (through Optional, unions, tuples, dicts)."""
    origin = typing.get_origin(annotation)
    if origin is typing.Annotated:
        return _model_of(typing.get_args(annotation)[0])
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return [annotation]
    if origin in (typing.Union, types.UnionType, tuple, list, dict):
        out: list[type[BaseModel]] = []
        for arg in typing.get_args(annotation):
            out += _model_of(arg)
        return out
    return []


def _path_and_keys(loc: Sequence[int | str]) -> tuple[str, list[str]]:
    """Readable key path for a pydantic `loc`, and the keys allowed at its last table.

    Discriminator tags that pydantic inserts into `loc` (``feed.parameter.H2_to_N2...``) and
    validator-function labels are dropped from the path.
    """
    models: list[type[BaseModel]] = [Case]
    parts: list[str] = []
    allowed: list[str] = sorted(Case.model_fields)
    for item in loc:
        if isinstance(item, int):
            parts.append(f"[{item}]")
            continue
        names = [m for m in models if item in m.model_fields]
        tagged = [m for m in models if "kind" in m.model_fields and _tag(m) == item]
        if names:
            field = names[0].model_fields[item]
            parts.append(f".{item}" if parts else item)
            models = _model_of(field.annotation)
            allowed = sorted({k for m in models for k in m.model_fields})
        elif tagged:
            models = tagged
            allowed = sorted(tagged[0].model_fields)
        elif item.startswith(("function-", "tagged-union", "union")) or item in (
            "list[...]",
            "tuple[...]",
            "dict[str,...]",
        ):
            continue
        else:  # a key of a free mapping (a species name) or an unknown key
            parts.append(f".{item}" if parts else item)
            models = []
    return "".join(parts) or "(top level)", allowed


def _tag(model: type[BaseModel]) -> str | None:
    ann = model.model_fields["kind"].annotation
    args = typing.get_args(ann)
    return str(args[0]) if typing.get_origin(ann) is typing.Literal and args else None


def _one(err: ErrorDetails) -> str:
    path, allowed = _path_and_keys(err["loc"])
    kind = err["type"]
    value = err.get("input")
    msg = err["msg"]
    if kind == "missing":
        return f"{path}: required key is missing"
    if kind == "extra_forbidden":
        return f"{path}: unknown key (value {_short(value)}); expected one of: {', '.join(allowed)}"
    if kind == "union_tag_invalid":
        tags = err.get("ctx", {}).get("expected_tags", "")
        return f"{path}.kind = {err.get('ctx', {}).get('tag')!r}: expected one of {tags}"
    if kind == "union_tag_not_found":
        return f"{path}: the key 'kind' is missing; it names the parameter kind"
    if kind == "value_error":  # our own message, which states what was expected
        msg = msg.removeprefix("Value error, ")
        return f"{path}: {msg}" if isinstance(value, dict) else f"{path} = {_short(value)}: {msg}"
    first = (msg[:1].lower() + msg[1:]).removeprefix("input should be ")
    return f"{path} = {_short(value)}: expected {first}"


def format_validation_error(exc: ValidationError, source: str) -> str:
    """One-line message for the first problem of `exc` (and how many more there are)."""
    errors = exc.errors(include_url=False)
    text = f"case file {source}: {_one(errors[0])}"
    if len(errors) > 1:
        text += f" (and {len(errors) - 1} more problem{'s' if len(errors) > 2 else ''})"
    return text


def parse_case(text: str, source: str = "<text>") -> Case:
    """Validate a case given as TOML text.

    Parameters
    ----------
    text : str
        The TOML document.
    source : str
        Name used in messages (the file name).

    Returns
    -------
    Case
        Frozen, validated, every quantity in SI units.

    Raises
    ------
    CaseFileError
        TOML syntax errors (with line and column), unknown or missing keys, bad values; the
        message names the key path, the value and what was expected.
    """
    try:
        raw = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseFileError(f"case file {source}: not valid TOML: {exc}") from None
    try:
        return Case.model_validate(raw)
    except ValidationError as exc:
        raise CaseFileError(format_validation_error(exc, source)) from None
    except InputError as exc:  # pragma: no cover - pydantic wraps validator errors
        raise CaseFileError(f"case file {source}: {exc}") from None


def load_case(path: str | Path) -> Case:
    """Read and validate a TOML case file (see :func:`parse_case`).

    Raises
    ------
    CaseFileError
        If the file cannot be read or is not a valid case.
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise CaseFileError(f"case file {p} does not exist") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CaseFileError(f"case file {p} cannot be read: {exc}") from None
    return parse_case(text, source=str(p))


def case_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of case files, as the TOML is written (with units)."""
    from . import CAUTION

    schema = Case.model_json_schema(mode="validation")
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": SCHEMA_ID,
        **schema,
        "title": "eqconv case file",
        "description": f"{schema.get('description', '')} {CAUTION}".strip(),
    }


def schema_text() -> str:
    """:func:`case_schema` as the JSON text shipped in ``data/case.schema.json``."""
    return json.dumps(case_schema(), indent=2, ensure_ascii=False, sort_keys=True) + "\n"


def write_schema(path: str | Path, *, overwrite: bool = False) -> Path:
    """Write :func:`schema_text` to `path` (never overwriting unless asked).

    Raises
    ------
    InputError
        If `path` exists and `overwrite` is False.
    """
    p = Path(path)
    if p.exists() and not overwrite:
        raise InputError(f"{p} exists; pass overwrite=True to replace it")
    p.write_text(schema_text(), encoding="utf-8")
    return p
