"""Slack: a run between bodies that move against each other needs a service loop.

An engine rocks on its mounts; a body on its own mounts or a flexible subframe moves
against the chassis. Without slack where a run crosses between them, every movement pulls
on the lugs and works them loose. A technician confirms the loop on the circuit
(service_loop_confirmed) and the finding goes.

* SLACK_SERVICE_LOOP (warning): one end on the engine, the other on anything else
  (chassis, body, battery box).
* SLACK_BODY_CHASSIS (note): chassis at one end, body or battery box at the other. In a
  unibody van these do not move against each other, in a truck with a box body on a
  subframe they do; the note asks the technician to leave slack where needed and confirm.
A battery box and the body it stands in are taken as one body (no finding). A run to a
device off the vehicle (an external supply: the shore cord) is a flexible cord plugged in
at both ends, not a fixed run between bodies (no finding).

Source: common practice; ABYC E-11 conductor support and strain relief (from memory).
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.models import Mounting

from .common import NOTE, WARNING, finding

SOURCE = "common practice: service loop between moving bodies; ABYC E-11 support (from memory)"


def _ends(c) -> str:
    return (
        f"{c.from_device} ({c.from_device.get_mounting_display().lower()}) to "
        f"{c.to_device} ({c.to_device.get_mounting_display().lower()})"
    )


def slack(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    for c in circuits:
        if c.service_loop_confirmed:
            continue
        pair = {c.from_device.mounting, c.to_device.mounting}
        if len(pair) < 2 or Mounting.OFF_VEHICLE in pair:
            continue
        if Mounting.ENGINE in pair:
            out.append(
                finding(
                    "SLACK_SERVICE_LOOP",
                    WARNING,
                    f"{c.tag} runs from {_ends(c)}: the engine moves on its mounts, so leave a "
                    "service loop where the run leaves the engine, support it either side, "
                    "and confirm the loop on this circuit.",
                    SOURCE,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
        elif Mounting.CHASSIS in pair:
            out.append(
                finding(
                    "SLACK_BODY_CHASSIS",
                    NOTE,
                    f"{c.tag} runs from {_ends(c)}: if the body sits on its own mounts or a "
                    "flexible subframe, leave a service loop where the run crosses over; "
                    "confirm the loop (or that the two do not move) on this circuit.",
                    SOURCE,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
    return out
