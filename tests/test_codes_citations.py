"""Every public clause function in ``detailer.codes`` cites its clause in one fixed format.

The format (house style, see the project rules): one docstring line

    <standard>, <reference>[, <reference> ...][ + UK NA].

where <standard> is e.g. ``EN 1992-1-1:2004`` or ``EN 1990:2002`` and each <reference> is a
clause ``9.3.1.1(3)``, an equation ``Eq. (8.3)``, a table ``Table 7.2N``, a figure
``Fig. 8.2`` or an annex ``Annex C``. ``+ UK NA`` marks values set by the UK National Annex.
Walked: module-level public functions of every module under ``detailer/codes`` and the
public methods (not properties) of the classes implementing the DesignCode protocol.
"""

from __future__ import annotations

import importlib
import inspect
import pkgutil
import re
from collections.abc import Callable, Iterator

import pytest

import detailer.codes
from detailer.codes.base import DesignCode

STANDARDS = (
    "EN 1992-1-1:2004",
    "EN 1990:2002",
    "BS 8666:2005",
    "BS 8500-1:2015",
    "BS 4449:2005",
    "ACI 318-19",
)
_STD = "|".join(re.escape(s) for s in STANDARDS)
_REF = (
    r"(?:Eq\. \(\d+\.\d+(?:\.?[a-z]+|N)?(?:/[a-z]+)?\)"  # Eq. (8.3), Eq. (6.2.a), Eq. (7.16a)
    r"|Table (?:NA\.)?[A-Z]*\d+(?:\.\d+)*[A-Z]?(?:\([A-Z]\))?"  # Table 7.2N, Table A1.2(B)
    r"|Fig\. \d+(?:\.\d+)*"  # Fig. 8.2
    r"|Annex [A-Z]+"  # Annex C
    r"|[A-Z]*\d+(?:\.\d+)*(?:\(\d+\))*P?)"  # 9.3.1.1(3), 4.4.1.3(1)P, A1.3.1(1)
)
CITATION = re.compile(rf"^(?:{_STD}), {_REF}(?:, {_REF})*(?: \+ UK NA)?\.$")
STARTS_LIKE_CITATION = re.compile(rf"^(?:{_STD})\b")


def _modules() -> Iterator[object]:
    yield detailer.codes
    for info in pkgutil.walk_packages(detailer.codes.__path__, prefix="detailer.codes."):
        yield importlib.import_module(info.name)


def _protocol_methods() -> set[str]:
    return {n for n in vars(DesignCode) if not n.startswith("_")}


def _public_callables() -> list[tuple[str, Callable[..., object]]]:
    found: dict[str, Callable[..., object]] = {}
    wanted = _protocol_methods()
    for mod in _modules():
        for name, obj in vars(mod).items():
            if name.startswith("_") or getattr(obj, "__module__", None) != mod.__name__:
                continue
            if inspect.isfunction(obj):
                found[f"{mod.__name__}.{name}"] = obj
            elif inspect.isclass(obj) and obj is not DesignCode and wanted <= set(dir(obj)):
                for meth_name, meth in vars(obj).items():
                    if meth_name.startswith("_"):
                        continue
                    # properties (the code's name) are not clause functions
                    if inspect.isfunction(meth):
                        found[f"{mod.__name__}.{name}.{meth_name}"] = meth
    return sorted(found.items())


PUBLIC = _public_callables()


def _citation_lines(func: Callable[..., object]) -> list[str]:
    doc = inspect.getdoc(func) or ""
    return [ln.strip() for ln in doc.splitlines() if STARTS_LIKE_CITATION.match(ln.strip())]


def test_walk_finds_the_clause_layer() -> None:
    # Guards against a walk that silently finds nothing (which would make the checks vacuous).
    names = {n for n, _ in PUBLIC}
    assert len(PUBLIC) >= 60
    assert "detailer.codes.ec2_uk.anchorage.l_b_rqd" in names
    assert "detailer.codes.ec2_uk.EC2UK.flexure" in names


@pytest.mark.parametrize(("qualname", "func"), PUBLIC, ids=[n for n, _ in PUBLIC])
def test_one_citation_line_in_the_fixed_format(qualname: str, func: Callable[..., object]) -> None:
    lines = _citation_lines(func)
    assert len(lines) == 1, f"{qualname}: expected one citation line, found {lines!r}"
    assert CITATION.match(lines[0]), f"{qualname}: citation {lines[0]!r} not in the fixed format"


@pytest.mark.parametrize(
    "line",
    [
        "EN 1992-1-1:2004, Eq. (8.3).",
        "EN 1992-1-1:2004, 9.3.1.1(3).",
        "EN 1992-1-1:2004, Eq. (6.2.a), Eq. (6.2.b), 3.1.2(2)P + UK NA.",
        "EN 1992-1-1:2004, Table 7.2N.",
        "EN 1992-1-1:2004, Eq. (7.16a), Eq. (7.16b).",
        "EN 1990:2002, Table A1.1.",
        "BS 8666:2005, Table 2.",
    ],
)
def test_format_accepts(line: str) -> None:
    assert CITATION.match(line)


@pytest.mark.parametrize(
    "line",
    [
        "EN 1992-1-1 (2005), Eq. (6.2)",  # other edition style, no full stop
        "EN 1992-1-1: 2004, Table 3.1.",  # space after the colon
        "EN 1992-1-1:2004, Eq. (8.3)",  # no full stop
        "EN 1992-1-1:2004 Eq. (8.3).",  # no comma
        "EN 1992-1-1:2004, Equation 8.3.",  # spelled out
        "EN 1992-1-1:2004, Eq. (8.3) + UK NA",  # no full stop after the NA mark
    ],
)
def test_format_rejects(line: str) -> None:
    assert not CITATION.match(line)
