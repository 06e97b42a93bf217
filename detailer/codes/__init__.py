"""Design codes: pure clause functions behind one small interface.

``detailer.codes.base`` defines the :class:`DesignCode` protocol and the frozen value types
the pipeline exchanges with a code; ``detailer.codes.ec2_uk`` implements it for
EN 1992-1-1:2004 with the UK National Annex. A code object is created by the caller and
passed down explicitly (:func:`design_code` builds one by name).
"""

from __future__ import annotations

from detailer.codes.base import (
    AnchorageCase,
    AnchorageResult,
    BarShape,
    BondCondition,
    CompressionSteelRequired,
    ConcreteSteel,
    CoverCheck,
    CoverRequirement,
    CrackLimits,
    DesignCode,
    DesignCodeError,
    FlexureResult,
    LapResult,
    Layer,
    OutsideCodeScope,
    RedistributionLimits,
    SlabDetailingRules,
    SpanDepthResult,
    SpanType,
)
from detailer.codes.ec2_uk import EC2UK

__all__ = [
    "CODE_NAMES",
    "EC2UK",
    "AnchorageCase",
    "AnchorageResult",
    "BarShape",
    "BondCondition",
    "CompressionSteelRequired",
    "ConcreteSteel",
    "CoverCheck",
    "CoverRequirement",
    "CrackLimits",
    "DesignCode",
    "DesignCodeError",
    "FlexureResult",
    "LapResult",
    "Layer",
    "OutsideCodeScope",
    "RedistributionLimits",
    "SlabDetailingRules",
    "SpanDepthResult",
    "SpanType",
    "design_code",
]

# Names a project file may use for its design code.
CODE_NAMES: tuple[str, ...] = ("EC2-UK",)


def design_code(name: str) -> DesignCode:
    """Build the design-code object named in a project file ('EC2-UK').

    EN 1992-1-1:2004, 1.1.2 + UK NA.
    """
    key = name.strip().upper().replace("_", "-").replace(" ", "")
    if key in ("EC2-UK", "EN1992-1-1+UKNA", "EC2"):
        return EC2UK()
    raise DesignCodeError(f"design code {name!r} is not available; use one of {CODE_NAMES}")
