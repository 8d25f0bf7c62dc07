"""The input of one sizing: a circuit described in plain SI floats."""

from __future__ import annotations

import math
from dataclasses import dataclass

from .ampacity import CFR_INSULATION_C, DC_MAX_AMBIENT_C, NEC_COLUMNS_C, NEC_MAX_AMBIENT_C
from .catalogue import ConductorSize
from .drop import default_drop_limit_pct
from .errors import SizingError

__all__ = ["CircuitInput"]

_MIN_TEMP_C = -50.0
_MAX_TEMP_C = 250.0
_MAX_PARALLEL = 20


def _positive(name: str, value: float, unit: str) -> None:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise SizingError(f"{name} must be a number, not {value!r}")
    if not math.isfinite(value) or value <= 0.0:
        raise SizingError(f"{name} must be greater than zero (got {value:g} {unit})")


def _count(name: str, value: int, upper: int | None = None) -> None:
    if isinstance(value, bool) or not isinstance(value, int):
        raise SizingError(f"{name} must be a whole number, not {value!r}")
    if value < 1:
        raise SizingError(f"{name} must be at least 1 (got {value})")
    if upper is not None and value > upper:
        raise SizingError(f"{name} must be at most {upper} (got {value})")


@dataclass(frozen=True)
class CircuitInput:
    """One circuit to size.

    ``length_m`` is the one-way run; the engine doubles it for the return conductor.
    ``size`` is the conductor to evaluate (None: recommend one) and ``size_text`` the
    size as the person wrote it, for the 4 vs 4/0 guard. ``ac=True`` marks an AC
    branch circuit or shore supply, rated by NEC Table 310.16; otherwise the
    vehicle and boat table (33 CFR 183.425 Table 5) applies. ``conductor_temp_c``
    None means the insulation rating (see ``drop``). ``drop_limit_pct`` None means
    3 % for critical loads, else 10 %. ``ambient_c`` None means 30 C.
    ``termination_c`` is the temperature rating of AC terminations (NEC 110.14(C)).
    ``sheathed`` marks a conductor inside a sheath (smaller minimum size).
    ``metric`` asks for a recommendation among the metric sizes.
    """

    system_voltage_v: float
    current_a: float
    length_m: float
    size: ConductorSize | None = None
    size_text: str | None = None
    insulation_c: int = 105
    engine_space: bool = False
    bundled: int = 1
    parallel: int = 1
    critical: bool = False
    drop_limit_pct: float | None = None
    continuous: bool = False
    protection_a: float | None = None
    conductor_temp_c: float | None = None
    tinned: bool = False
    ac: bool = False
    ambient_c: float | None = None
    termination_c: int = 75
    sheathed: bool = False
    metric: bool = False

    def __post_init__(self) -> None:
        _positive("the system voltage", self.system_voltage_v, "V")
        _positive("the current", self.current_a, "A")
        _positive("the length", self.length_m, "m")
        if self.size is not None and not isinstance(self.size, ConductorSize):
            raise SizingError(f"size must be a ConductorSize, not {self.size!r}")
        if self.insulation_c not in CFR_INSULATION_C or isinstance(self.insulation_c, bool):
            accepted = ", ".join(str(t) for t in CFR_INSULATION_C)
            raise SizingError(
                f"unsupported insulation rating {self.insulation_c!r} °C; use one of {accepted}"
            )
        if self.termination_c not in NEC_COLUMNS_C:
            raise SizingError(
                f"unsupported termination rating {self.termination_c!r} °C; use 60, 75 or 90"
            )
        # Store the ratings as int so that 105.0 and 105 print and compare alike.
        object.__setattr__(self, "insulation_c", int(self.insulation_c))
        object.__setattr__(self, "termination_c", int(self.termination_c))
        _count("the number of bundled conductors", self.bundled)
        _count("the number of parallel conductors", self.parallel, _MAX_PARALLEL)
        if self.drop_limit_pct is not None:
            _positive("the voltage-drop limit", self.drop_limit_pct, "%")
            if self.drop_limit_pct > 100.0:
                raise SizingError(
                    f"the voltage-drop limit must be at most 100 % (got {self.drop_limit_pct:g} %)"
                )
        if self.protection_a is not None:
            _positive("the protection rating", self.protection_a, "A")
        if self.conductor_temp_c is not None:
            self._check_temperature("the conductor temperature", self.conductor_temp_c, _MAX_TEMP_C)
        if self.ambient_c is not None:
            top = NEC_MAX_AMBIENT_C if self.ac else DC_MAX_AMBIENT_C
            self._check_temperature("the ambient temperature", self.ambient_c, top)

    @staticmethod
    def _check_temperature(name: str, value: float, top: float) -> None:
        if (
            isinstance(value, bool)
            or not isinstance(value, (int, float))
            or not math.isfinite(value)
        ):
            raise SizingError(f"{name} must be a number, not {value!r}")
        if not _MIN_TEMP_C <= value <= top:
            raise SizingError(
                f"{name} {value:g} °C is outside {_MIN_TEMP_C:g} to {top:g} °C, "
                "the range with published correction values"
            )

    @property
    def effective_drop_limit_pct(self) -> float:
        if self.drop_limit_pct is not None:
            return float(self.drop_limit_pct)
        return default_drop_limit_pct(self.critical)

    @property
    def effective_conductor_temp_c(self) -> float:
        if self.conductor_temp_c is not None:
            return float(self.conductor_temp_c)
        return float(self.insulation_c)
