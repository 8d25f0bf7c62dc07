"""Conductor catalogue: sizes, cross-sections and DC resistance of stranded copper.

Sizes
    AWG 18 through 4/0, 250-500 kcmil (large AC feeders) and the metric flexible
    sizes 0.75-120 mm2.

Cross-section
    AWG from the ASTM B258 diameter law, d = 0.127 mm x 92**((36 - n) / 39), with
    n = 1 - m for m/0 sizes (4/0 -> n = -3), and A = pi/4 d**2. kcmil from the
    definition 1 cmil = area of a circle 0.001 in across. Metric: the nominal area.

Resistance (per conductor, DC, stranded copper, plain or tinned)
    AWG and kcmil: NEC Chapter 9 Table 8, stranded, uncoated and coated, ohm per
    1000 ft at 75 C. Table 8 gives coated values only up to 4/0 in the reference we
    hold, so tinned kcmil resistance is the plain value times the largest
    coated/uncoated ratio of 1/0-4/0 (an estimate, flagged by ``resistance_estimated``).
    Metric: IEC 60228 class 5 (flexible) maximum resistance, ohm per km at 20 C.

Temperature law
    R2 = R1 (234.5 + T2) / (234.5 + T1): resistance of copper is linear in
    temperature with an inferred zero-resistance temperature of -234.5 C (annealed
    copper, 100 % IACS, alpha20 = 0.00393 /C). Referenced to 75 C this is the NEC
    Table 8 form R2 = R1 (1 + 0.00323 (T2 - 75)), and referenced to 20 C it is the
    FAA AC 43.13-1B form L2 = 254.5 L1 / (234.5 + T2). IEC 60228's own k_t factors
    (250 / (230 + t)) differ from it by under 0.3 % over 10-100 C.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = [
    "COPPER_INFERRED_ZERO_C",
    "ConductorSize",
    "awg",
    "catalogue",
    "catalogue_by_label",
    "kcmil",
    "mm2",
    "resistance_estimated",
    "resistance_ohm_per_m",
    "temperature_factor",
]

COPPER_INFERRED_ZERO_C = 234.5
_FEET_PER_METRE = 1.0 / 0.3048
_MM2_PER_CMIL = math.pi / 4.0 * (0.0254**2)  # (0.001 in)^2 * pi/4, in mm^2


@dataclass(frozen=True, order=True)
class ConductorSize:
    """One conductor size. Instances order (and compare) by cross-section.

    ``value`` is the ASTM gauge number n for AWG (4 AWG -> 4, 1/0 -> 0, 4/0 -> -3),
    the kcmil figure for kcmil sizes and the nominal mm2 for metric sizes.
    ``written_bare`` records that the size was parsed from a bare number such as
    ``"4"`` (so the 4 vs 4/0 guard can ask); it takes no part in equality.
    """

    area_mm2: float
    kind: str  # "awg", "kcmil" or "mm2"
    value: float
    label: str
    written_bare: bool = field(default=False, compare=False, repr=False)

    @property
    def aught(self) -> int:
        """m for an m/0 AWG size (4/0 -> 4), else 0."""
        if self.kind == "awg" and self.value <= 0:
            return int(1 - self.value)
        return 0

    @property
    def gauge(self) -> int | None:
        """The plain AWG number for 18-1 AWG, else None."""
        if self.kind == "awg" and self.value >= 1:
            return int(self.value)
        return None

    @property
    def area_cmil(self) -> float:
        return self.area_mm2 / _MM2_PER_CMIL

    def __str__(self) -> str:
        return self.label


def _awg_label(n: int) -> str:
    return f"{n} AWG" if n >= 1 else f"{1 - n}/0 AWG"


def _awg_area_mm2(n: int) -> float:
    diameter_mm = 0.127 * 92.0 ** ((36 - n) / 39.0)
    return math.pi / 4.0 * diameter_mm**2


def _mm2_label(nominal: float) -> str:
    text = f"{nominal:g}"
    return f"{text} mm²"


# ASTM gauge numbers in the catalogue, thinnest first (1/0 -> 0 ... 4/0 -> -3).
AWG_NUMBERS: tuple[int, ...] = (18, 16, 14, 12, 10, 8, 6, 4, 3, 2, 1, 0, -1, -2, -3)
KCMIL_VALUES: tuple[int, ...] = (250, 300, 350, 400, 500)
MM2_VALUES: tuple[float, ...] = (
    0.75, 1.0, 1.5, 2.5, 4.0, 6.0, 10.0, 16.0, 25.0, 35.0, 50.0, 70.0, 95.0, 120.0,
)  # fmt: skip

# NEC Chapter 9 Table 8, stranded copper, ohm per 1000 ft at 75 C: (uncoated, coated).
_NEC8_OHM_PER_KFT: dict[int, tuple[float, float]] = {
    18: (7.95, 8.45),
    16: (4.99, 5.29),
    14: (3.14, 3.26),
    12: (1.98, 2.05),
    10: (1.24, 1.29),
    8: (0.778, 0.809),
    6: (0.491, 0.510),
    4: (0.308, 0.321),
    3: (0.245, 0.254),
    2: (0.194, 0.201),
    1: (0.154, 0.160),
    0: (0.122, 0.127),
    -1: (0.0967, 0.101),
    -2: (0.0766, 0.0797),
    -3: (0.0608, 0.0626),
}
# NEC Chapter 9 Table 8, uncoated copper, ohm per 1000 ft at 75 C (kcmil rows).
_NEC8_KCMIL_OHM_PER_KFT: dict[int, float] = {
    250: 0.0515,
    300: 0.0429,
    350: 0.0367,
    400: 0.0321,
    500: 0.0258,
}
# Tinned kcmil estimate: the largest coated/uncoated ratio among 1/0-4/0 (2/0, 1.044),
# the larger ratio being the conservative one for voltage drop.
_TINNED_KCMIL_RATIO = max(
    _NEC8_OHM_PER_KFT[n][1] / _NEC8_OHM_PER_KFT[n][0] for n in (0, -1, -2, -3)
)
# IEC 60228 class 5 flexible copper, maximum ohm per km at 20 C: (plain, tinned).
_IEC60228_CLASS5_OHM_PER_KM: dict[float, tuple[float, float]] = {
    0.75: (26.0, 26.7),
    1.0: (19.5, 20.0),
    1.5: (13.3, 13.7),
    2.5: (7.98, 8.21),
    4.0: (4.95, 5.09),
    6.0: (3.30, 3.39),
    10.0: (1.91, 1.95),
    16.0: (1.21, 1.24),
    25.0: (0.780, 0.795),
    35.0: (0.554, 0.565),
    50.0: (0.386, 0.393),
    70.0: (0.272, 0.277),
    95.0: (0.206, 0.210),
    120.0: (0.161, 0.164),
}


def _build() -> tuple[tuple[ConductorSize, ...], dict[str, tuple[float, float, float]]]:
    """Build the sorted catalogue and, per label, (plain ohm/m, tinned ohm/m, ref temp C)."""
    sizes: list[ConductorSize] = []
    resistance: dict[str, tuple[float, float, float]] = {}
    for n in AWG_NUMBERS:
        size = ConductorSize(_awg_area_mm2(n), "awg", float(n), _awg_label(n))
        plain, coated = _NEC8_OHM_PER_KFT[n]
        resistance[size.label] = (
            plain / 1000 * _FEET_PER_METRE,
            coated / 1000 * _FEET_PER_METRE,
            75.0,
        )
        sizes.append(size)
    for k in KCMIL_VALUES:
        size = ConductorSize(k * 1000 * _MM2_PER_CMIL, "kcmil", float(k), f"{k} kcmil")
        plain = _NEC8_KCMIL_OHM_PER_KFT[k] / 1000 * _FEET_PER_METRE
        resistance[size.label] = (plain, plain * _TINNED_KCMIL_RATIO, 75.0)
        sizes.append(size)
    for a in MM2_VALUES:
        size = ConductorSize(a, "mm2", a, _mm2_label(a))
        plain, tinned = _IEC60228_CLASS5_OHM_PER_KM[a]
        resistance[size.label] = (plain / 1000, tinned / 1000, 20.0)
        sizes.append(size)
    sizes.sort()
    return tuple(sizes), resistance


_CATALOGUE, _RESISTANCE = _build()
_BY_LABEL: dict[str, ConductorSize] = {s.label: s for s in _CATALOGUE}


def catalogue(kind: str | None = None) -> tuple[ConductorSize, ...]:
    """All sizes in ascending cross-section, or only those of one kind
    ("awg", "kcmil", "mm2")."""
    if kind is None:
        return _CATALOGUE
    return tuple(s for s in _CATALOGUE if s.kind == kind)


def catalogue_by_label() -> dict[str, ConductorSize]:
    """Map from trade label ("4/0 AWG", "35 mm²") to size."""
    return dict(_BY_LABEL)


def awg(text: str) -> ConductorSize:
    """The AWG size written as ``"4"``, ``"4/0"``; a shorthand for code and tests."""
    n = 1 - int(text.split("/")[0]) if "/" in text else int(text)
    return _BY_LABEL[_awg_label(n)]


def kcmil(value: int) -> ConductorSize:
    return _BY_LABEL[f"{value} kcmil"]


def mm2(value: float) -> ConductorSize:
    return _BY_LABEL[_mm2_label(value)]


def temperature_factor(from_c: float, to_c: float) -> float:
    """Ratio R(to_c) / R(from_c) for copper: (234.5 + to_c) / (234.5 + from_c)."""
    return (COPPER_INFERRED_ZERO_C + to_c) / (COPPER_INFERRED_ZERO_C + from_c)


def reference_resistance(size: ConductorSize, tinned: bool = False) -> tuple[float, float]:
    """(ohm per metre, reference temperature C) as published for this size."""
    plain, coated, ref_c = _RESISTANCE[size.label]
    return (coated if tinned else plain), ref_c


def resistance_ohm_per_m(size: ConductorSize, temp_c: float, tinned: bool = False) -> float:
    """DC resistance of one stranded copper conductor, ohm per metre, at ``temp_c``."""
    r_ref, ref_c = reference_resistance(size, tinned)
    return r_ref * temperature_factor(ref_c, temp_c)


def resistance_estimated(size: ConductorSize, tinned: bool) -> bool:
    """True where the resistance is not a published value (tinned kcmil)."""
    return tinned and size.kind == "kcmil"
