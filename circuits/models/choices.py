"""The choices and small helpers the electrical-system models share: mountings,
polarities, studs, torque units, conductor colours and how a conductor is re-marked."""

from __future__ import annotations

from django.db import models

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


def format_length(metres: float | None, unit: str) -> str:
    """A stored length shown back in the unit it was entered in: "10 ft", "3.5 m"."""
    if metres is None:
        return ""
    value = metres / FOOT_M if unit == "ft" else metres
    return f"{round(value, 2):g} {unit}"


INSULATION_RATINGS = [(t, f"{t} °C") for t in (60, 75, 80, 90, 105, 125, 200)]


class Mounting(models.TextChoices):
    CHASSIS = "chassis", "Chassis"
    ENGINE = "engine", "Engine"
    BODY = "body", "Body / wall"
    BATTERY_BOX = "battery_box", "Battery box"
    # An external supply (pedestal, generator, building socket) stands off the vehicle.
    OFF_VEHICLE = "off_vehicle", "Off the vehicle"


class Polarity(models.TextChoices):
    POSITIVE = "pos", "DC positive"
    NEGATIVE = "neg", "DC negative"
    LINE = "line", "AC line"
    NEUTRAL = "neutral", "AC neutral"
    EARTH = "earth", "Earth / bonding"


class StudSize(models.TextChoices):
    M4 = "M4", "M4"
    M5 = "M5", "M5"
    M6 = "M6", "M6"
    M8 = "M8", "M8"
    M10 = "M10", "M10"
    M12 = "M12", "M12"
    IN_1_4 = "1/4in", '1/4"'
    IN_5_16 = "5/16in", '5/16"'
    IN_3_8 = "3/8in", '3/8"'
    IN_1_2 = "1/2in", '1/2"'
    SCREW = "screw", "Screw terminal"
    OTHER = "other", "Other"


class TerminationKind(models.TextChoices):
    LUG_ON_STUD = "lug", "Crimped lug on stud"
    SET_SCREW = "set_screw", "Set-screw"
    CLAMP = "clamp", "Clamp"
    FERRULE = "ferrule", "Ferrule"


class TorqueUnit(models.TextChoices):
    NM = "N*m", "N·m"
    LBF_IN = "lbf*in", "lbf·in"
    LBF_FT = "lbf*ft", "lbf·ft"
    KGF_CM = "kgf*cm", "kgf·cm"


class Colour(models.TextChoices):
    """An insulation colour, or bare (no insulation: a bare earth conductor, a braided
    bonding strap)."""

    RED = "red", "Red"
    BLACK = "black", "Black"
    YELLOW = "yellow", "Yellow"
    WHITE = "white", "White"
    BLUE = "blue", "Blue"
    BROWN = "brown", "Brown"
    GREEN = "green", "Green"
    GREEN_YELLOW = "green_yellow", "Green-yellow"
    GREY = "grey", "Grey"
    ORANGE = "orange", "Orange"
    BARE = "bare", "Bare (no insulation)"
    OTHER = "other", "Other"


# A marking is a colour laid over the conductor at its ends; "bare" is no marking colour.
MARKING_COLOURS = [(v, label) for v, label in Colour.choices if v != Colour.BARE]


class ProtectionType(models.TextChoices):
    NONE = "none", "None"
    FUSE = "fuse", "Fuse"
    BREAKER = "breaker", "Circuit breaker"


class MarkingMethod(models.TextChoices):
    TAPE = "tape", "Tape"
    HEAT_SHRINK = "heat_shrink", "Heat-shrink sleeve"
    PRINTED_BAND = "printed_band", "Printed band"


class MarkingEnds(models.TextChoices):
    FROM = "from", "From end"
    TO = "to", "To end"
    BOTH = "both", "Both ends"
