"""Pydantic v2 schema of the project file: the shape and types of every key.

Strict: numbers must be numbers (no text, no booleans, no NaN or infinity), text must be text,
unknown keys are errors. Relations between values (spans against support widths, cover
against thickness, load positions against segment lengths) are checked afterwards in
``detailer.project``, which also turns errors into one-line messages.
"""

from __future__ import annotations

__all__ = ["FileIn", "StripIn", "fields_at", "unportable_name"]

import datetime as _dt
import typing
from typing import Annotated, Any, Literal

from pydantic import AfterValidator, BaseModel, BeforeValidator, ConfigDict, Field
from pydantic_core import PydanticCustomError

from detailer.model import DEFAULT_CODE_ID


class _In(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, strict=True, allow_inf_nan=False)


def _int_to_text(v: Any) -> Any:
    # Ids and revisions such as 2 or 101 are natural to type unquoted.
    if isinstance(v, int) and not isinstance(v, bool):
        return str(v)
    return v


def _date_to_text(v: Any) -> Any:
    # YAML reads an unquoted 2025-03-14 as a date; keep the ISO text so reruns are identical.
    if isinstance(v, _dt.datetime):
        raise PydanticCustomError("date_only", "give a date without a time of day")
    if isinstance(v, _dt.date):
        return v.isoformat()
    return v


def _check_iso_date(v: str) -> str:
    try:
        ok = len(v) == 10 and _dt.date.fromisoformat(v).isoformat() == v
    except ValueError:
        ok = False
    if not ok:
        raise PydanticCustomError(
            "iso_date", "must be a date written YYYY-MM-DD (got {got!r})", {"got": v}
        )
    return v


def _upper(v: Any) -> Any:
    return v.strip().upper() if isinstance(v, str) else v


def _scalar_to_list(v: Any) -> Any:
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return [v]
    return v


def _end_form(v: Any) -> Any:
    # "pinned" | "monolithic" | {cantilever_mm: 1500}
    if isinstance(v, str):
        return {"kind": v.strip().lower()}
    if isinstance(v, dict) and "kind" not in v:
        return {**v, "kind": "cantilever"}
    return v


Id = Annotated[
    str,
    BeforeValidator(_int_to_text),
    Field(min_length=1, max_length=40, pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]*$"),
]
Text = Annotated[str, BeforeValidator(_int_to_text), Field(max_length=200)]
IsoDate = Annotated[str, BeforeValidator(_date_to_text), AfterValidator(_check_iso_date)]
PositiveMm = Annotated[float, Field(gt=0)]
NonNegativeMm = Annotated[float, Field(ge=0)]
Load = Annotated[float, Field(ge=0)]
Category = Annotated[Literal["A", "B", "C", "D", "E", "F", "G", "H"], BeforeValidator(_upper)]
Letter = Annotated[str, BeforeValidator(_upper)]


class ProjectInfoIn(_In):
    id: Id
    title: Annotated[str, Field(min_length=1, max_length=200)]
    revision: Annotated[Text, Field(min_length=1, max_length=10)]
    date: IsoDate
    drawing: Text = ""


class DesignIn(_In):
    code: Literal["EN1992-1-1+UKNA"] = DEFAULT_CODE_ID
    combination: Literal["6.10", "6.10a/b"] = "6.10a/b"
    arrangements: Literal["uk-simplified", "all-subsets"] = "uk-simplified"
    redistribution_percent: Annotated[float, Field(ge=0, le=30)] | None = None
    redistribution_delta: Annotated[float, Field(ge=0.7, le=1.0)] | None = None
    support_reduction: bool = False
    moments_at_faces: bool = True


class MaterialsIn(_In):
    concrete: str
    f_yk: Annotated[float, Field(ge=400, le=600)] = 500.0  # EN 1992-1-1 3.2.2(3)P
    bar_type: Annotated[Literal["H", "A", "B", "C"], BeforeValidator(_upper)] = "H"
    ductility_class: Annotated[Literal["A", "B", "C"], BeforeValidator(_upper)] = "B"
    exposure: Letter = "XC1"
    density_kn_per_m3: Annotated[float, Field(ge=20, le=30)] = 25.0


class ReinforcementIn(_In):
    diameters_mm: Annotated[list[int], Field(min_length=1)] = [10, 12, 16, 20]
    spacings_mm: Annotated[list[Annotated[int, Field(ge=50, le=450)]], Field(min_length=1)] = list(
        range(100, 301, 25)
    )
    stock_length_mm: Annotated[float, Field(ge=1000, le=18000)] = 12000.0
    curtailment: Literal["envelope", "simplified"] = "envelope"
    max_aggregate_mm: Annotated[float, Field(ge=4, le=40)] = 20.0


class CoverIn(_In):
    top_mm: PositiveMm
    bottom_mm: PositiveMm
    side_mm: PositiveMm


class EndIn(_In):
    kind: Literal["pinned", "monolithic", "cantilever"]
    cantilever_mm: PositiveMm | None = None


class WhereIn(_In):
    span: Annotated[int, Field(ge=1)] | None = None
    cantilever: Literal["left", "right"] | None = None


class OverrideIn(WhereIn):
    g_k_kn_per_m2: Load | None = None
    q_k_kn_per_m2: Load | None = None


class PartialIn(WhereIn):
    from_mm: NonNegativeMm
    to_mm: PositiveMm
    g_k_kn_per_m2: Load = 0.0
    q_k_kn_per_m2: Load = 0.0
    description: Text = ""


class LineIn(WhereIn):
    x_mm: NonNegativeMm
    g_k_kn_per_m: Load = 0.0
    q_k_kn_per_m: Load = 0.0
    description: Text = ""


class LoadsIn(_In):
    category: Category
    g_k_kn_per_m2: Load
    q_k_kn_per_m2: Load
    overrides: list[OverrideIn] = []
    partial: list[PartialIn] = []
    line: list[LineIn] = []


class FixedBarsIn(_In):
    """Bars the engineer fixes for one zone (zone ids as printed by ``slabwright check``)."""

    zone: Annotated[str, Field(min_length=1, max_length=40)]
    diameter_mm: Annotated[int, Field(ge=6, le=50)]
    spacing_mm: Annotated[int, Field(ge=50, le=450)]


class StripIn(_In):
    id: Id
    description: Text = ""
    thickness_mm: Annotated[float, Field(ge=50, le=2000)]
    cover: CoverIn
    panel_width_mm: Annotated[float, Field(ge=100)]
    spans_mm: list[PositiveMm] | None = None
    supports_mm: Annotated[list[float], Field(min_length=1)] | None = None
    support_widths_mm: Annotated[list[NonNegativeMm], BeforeValidator(_scalar_to_list)]
    support_labels: list[Annotated[Id, Field(max_length=8)]] | None = None
    left_end: Annotated[EndIn, BeforeValidator(_end_form)]
    right_end: Annotated[EndIn, BeforeValidator(_end_form)]
    loads: LoadsIn
    members: Annotated[int, Field(ge=1, le=1000)] = 1
    fixed_bars: list[FixedBarsIn] = []


class FileIn(_In):
    project: ProjectInfoIn
    design: DesignIn = DesignIn()
    materials: MaterialsIn
    reinforcement: ReinforcementIn = ReinforcementIn()
    strips: Annotated[list[StripIn], Field(min_length=1)]


#: Names Windows reserves for devices: no folder or file may be called so (with any extension).
_RESERVED_NAMES = frozenset(
    ["CON", "PRN", "AUX", "NUL"] + [f"{p}{n}" for p in ("COM", "LPT") for n in range(1, 10)]
)


def unportable_name(name: str) -> tuple[str, str] | None:
    """(what is wrong, fix) when an id that passes ``Id`` cannot name a folder everywhere."""
    if name.split(".")[0].upper() in _RESERVED_NAMES:
        return (
            f"'{name}' is a device name on Windows and cannot name the output folder",
            f"choose another id, e.g. {name.split('.')[0]}-1",
        )
    if name.endswith("."):
        return f"'{name}' ends with '.', which Windows drops from folder names", "remove the '.'"
    return None


def _model_in(annotation: Any) -> type[BaseModel] | None:
    """The schema model inside an annotation such as ``list[Annotated[StripIn, ...]] | None``."""
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation
    for arg in typing.get_args(annotation):
        found = _model_in(arg)
        if found is not None:
            return found
    return None


def fields_at(path: tuple[str | int, ...]) -> tuple[str, ...]:
    """Keys allowed in the mapping at ``path`` of the file (empty if unknown)."""
    model: type[BaseModel] | None = FileIn
    for part in path:
        if model is None:
            return ()
        if isinstance(part, int):
            continue  # list index: same model as the list's items
        info = model.model_fields.get(part)
        model = _model_in(info.annotation) if info is not None else None
    if model is None:
        return ()
    keys = tuple(model.model_fields)
    return ("defaults", *keys) if model is FileIn else keys
