"""Data report: every value a calculation used, its source and its valid range.

Examples
--------
>>> from eqconv import Reaction
>>> rep = data_report([Reaction("CO + H2O = CO2 + H2", data="janaf")])
>>> rep.rows[0]["species"], rep.rows[0]["quantity"]
('CO', 'ΔfH°(298.15 K)')
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .errors import InputError
from .reaction import Reaction
from .species import Species

__all__ = ["DataReport", "data_report"]

_COLUMNS = ("species", "CAS", "data", "quantity", "value", "unit", "source", "valid range")


@dataclass(frozen=True)
class DataReport:
    """Table of the data behind a calculation (one row per species and quantity)."""

    rows: tuple[dict[str, Any], ...]
    notes: tuple[str, ...] = field(default=())

    def __str__(self) -> str:
        return self.to_text()

    def to_text(self) -> str:
        """Plain-text table for printing."""
        widths = {c: max(len(c), *(len(str(r[c])) for r in self.rows)) for c in _COLUMNS}
        line = "  ".join(c.ljust(widths[c]) for c in _COLUMNS)
        out = [line, "-" * len(line)]
        out += ["  ".join(str(r[c]).ljust(widths[c]) for c in _COLUMNS) for r in self.rows]
        out += list(self.notes)
        return "\n".join(out)

    def to_csv(self, path: str | Path | None = None, overwrite: bool = False) -> str:
        """Write the table as CSV to `path` (never overwriting unless asked); return the text."""
        buf = io.StringIO()
        writer = csv.DictWriter(buf, fieldnames=list(_COLUMNS))
        writer.writeheader()
        writer.writerows(self.rows)
        text = buf.getvalue()
        if path is not None:
            _write(Path(path), text, overwrite)
        return text

    def to_json(self, path: str | Path | None = None, overwrite: bool = False) -> str:
        """Write the table as JSON to `path` (never overwriting unless asked); return the text."""
        text = json.dumps(
            {"rows": list(self.rows), "notes": list(self.notes)}, indent=2, ensure_ascii=False
        )
        if path is not None:
            _write(Path(path), text, overwrite)
        return text

    def to_dataframe(self) -> Any:
        """The table as a :class:`pandas.DataFrame` (needs pandas)."""
        import pandas as pd

        return pd.DataFrame(list(self.rows), columns=list(_COLUMNS))


def _write(path: Path, text: str, overwrite: bool) -> None:
    if path.exists() and not overwrite:
        raise InputError(f"{path} exists; pass overwrite=True to replace it")
    path.write_text(text, encoding="utf-8")


def _species_rows(sp: Species) -> list[dict[str, Any]]:
    lo, hi = sp.T_range
    base = {"species": sp.key, "CAS": sp.cas, "data": sp.data}
    return [
        {
            **base,
            "quantity": "ΔfH°(298.15 K)",
            "value": f"{sp.hf298 / 1e3:.3f}",
            "unit": "kJ/mol",
            "source": sp.sources.get("hf298", ""),
            "valid range": "",
        },
        {
            **base,
            "quantity": "S°(298.15 K, 1 bar)",
            "value": f"{sp.s298:.3f}",
            "unit": "J/(mol K)",
            "source": sp.sources.get("s298", ""),
            "valid range": "",
        },
        {
            **base,
            "quantity": "Cp°(298.15 K)",
            "value": f"{float(sp.cp_model.cp(298.15)):.3f}",
            "unit": "J/(mol K)",
            "source": sp.sources.get("cp", sp.cp_model.method),
            "valid range": f"{lo:g}–{hi:g} K",
        },
    ]


def data_report(items: Iterable[Reaction | Species], notes: Iterable[str] = ()) -> DataReport:
    """Collect the data of every species in `items` (reactions or species), once each.

    Parameters
    ----------
    items : iterable of Reaction or Species
    notes : iterable of str
        Extra lines appended to the printed table (e.g. interaction-parameter notes).

    Returns
    -------
    DataReport
    """
    seen: dict[int, Species] = {}
    for item in items:
        species = item.species if isinstance(item, Reaction) else (item,)
        for sp in species:
            if not isinstance(sp, Species):
                raise InputError(f"data_report takes Reactions or Species; got {type(sp)}")
            seen.setdefault(id(sp), sp)
    rows: list[dict[str, Any]] = []
    for sp in seen.values():
        rows += _species_rows(sp)
    return DataReport(rows=tuple(rows), notes=tuple(notes))
