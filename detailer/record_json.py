"""The build record as JSON-ready data: plain dicts, lists, str, int, float, bool and None.

Floats are rounded by the unit suffix of their field name, so a record reads the same on every
machine and a re-run writes the same bytes. Used by the record file
(:mod:`detailer.io.json_writer`) and by the report, which quotes the record's values.
"""

from __future__ import annotations

__all__ = ["record_to_jsonable"]

import dataclasses
import enum
import functools
import math
from collections.abc import Mapping
from typing import TYPE_CHECKING, Any, Final

import numpy as np

from detailer.layout import Check

if TYPE_CHECKING:
    from detailer.record_types import ProjectRecord

# Decimal places by the unit suffix of a field name; dimensionless floats get _DEFAULT_DP.
_DP_BY_SUFFIX: Final[tuple[tuple[str, int], ...]] = (
    ("_mm2_per_m", 1),
    ("_mm2", 1),
    ("_kg_per_m", 4),
    ("_mm", 1),
    ("_kg", 3),
    ("_knm_per_m", 3),
    ("_knm", 3),
    ("_kn_per_m2", 3),
    ("_kn_per_m3", 3),
    ("_kn_per_m", 3),
    ("_kn", 3),
    ("_mpa", 3),
)
_DEFAULT_DP: Final = 4
_OBJECT_FIELDS: Final = frozenset({"dims_mm"})  # (name, value) pairs written as a JSON object


@functools.cache
def _decimals(field_name: str) -> int:
    for suffix, dp in _DP_BY_SUFFIX:
        if field_name.endswith(suffix):
            return dp
    return _DEFAULT_DP


def _number(value: float, dp: int) -> float | int | None:
    x = float(value)
    if not math.isfinite(x):
        return None
    r = round(x, dp) + 0.0  # + 0.0 turns -0.0 into 0.0
    if dp <= 1 and r == int(r):
        return int(r)  # whole mm written as integers
    return r


@functools.cache
def _field_names(cls: type) -> tuple[str, ...] | None:
    """The field names of a dataclass type, None for any other type (cached per type)."""
    if dataclasses.is_dataclass(cls):
        return tuple(f.name for f in dataclasses.fields(cls))
    return None


def _convert(value: Any, name: str) -> Any:
    kind = type(value)  # exact types first: most of a record is plain floats and strings
    if kind is float:
        return _number(value, _decimals(name))
    if kind is str or kind is int or kind is bool or value is None:
        return value
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, enum.Enum):
        return _convert(value.value, name)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return _number(value, _decimals(name))
    if value is None or isinstance(value, str):
        return value
    names = _field_names(type(value))
    if names is not None:
        out = {n: _convert(getattr(value, n), n) for n in names}
        if isinstance(value, Check):  # a property, wanted in the record
            out["utilisation"] = _number(value.utilisation, _DEFAULT_DP)
        return out
    if name in _OBJECT_FIELDS:
        return {str(k): _convert(v, name) for k, v in value}
    if isinstance(value, Mapping):
        return {str(k): _convert(v, name) for k, v in value.items()}
    if isinstance(value, (tuple, list, np.ndarray)):
        return [_convert(v, name) for v in value]
    raise TypeError(f"cannot put {type(value).__name__} ({name}) in the record")


def record_to_jsonable(record: ProjectRecord) -> dict[str, Any]:
    """Plain dicts, lists, str, int, float, bool and None; keys in field order.

    Floats are rounded by the unit suffix of their field name (mm to 0.1 mm, whole mm as
    integers; mm2/m to 0.1; kN, kNm, MPa, kN/m2 to 0.001; kg to 0.001; other numbers to
    0.0001); infinite values become null.
    """
    return _convert(record, "")
