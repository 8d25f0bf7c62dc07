"""The walking order of a job's devices: the order they sit in the vehicle, which the
torque work list follows so a technician reads one device after the next.

Not evidence and not a change of any stage's state, so no audit event (no AuditEvent kind
fits, and the order says nothing about the work done). It is part of the job's system,
so it is refused while the job is locked by approval, like every other write to it."""

from __future__ import annotations

from django.core.exceptions import ValidationError
from django.db import transaction

from circuits.models import Device
from inspections.services.common import Errors, add_error, raise_if, require_perm
from inspections.services.status import check_unlocked

ORDER_PERM = "circuits.change_device"


def devices_in_walking_order(job) -> list[Device]:
    """The job's devices as they sit in the vehicle; equal places (a new device is 0)
    fall back to the name, so a job nobody has ordered reads alphabetically."""
    return list(Device.objects.filter(job=job).order_by("walking_order", "name", "pk"))


def device_order_set(*, job, order: list[int], by) -> list[Device]:
    """Put the job's devices in `order` (device ids, first to last). `order` must name
    every device of the job exactly once: a stale page that missed a new device, or an id
    of another job's device, is refused rather than guessed at."""
    require_perm(by, ORDER_PERM, "Only those who edit a job's devices change their order.")
    errors: Errors = {}
    try:
        wanted = [int(pk) for pk in order]
    except (TypeError, ValueError):
        raise ValidationError({"order": "The order must list device ids."}) from None
    with transaction.atomic():
        check_unlocked(job, errors)
        devices = {device.pk: device for device in Device.objects.filter(job=job)}
        if len(wanted) != len(set(wanted)) or set(wanted) != set(devices):
            add_error(
                errors,
                "order",
                "The devices of this job changed while the list was open; reload it and"
                " move them again.",
            )
        raise_if(errors)
        changed = []
        for place, pk in enumerate(wanted, start=1):
            device = devices[pk]
            if device.walking_order != place:
                device.walking_order = place
                changed.append(device)
        Device.objects.bulk_update(changed, ["walking_order"])
    return devices_in_walking_order(job)


def device_move(*, job, device: int, direction: str, by) -> list[Device]:
    """Move one device a place up (towards the front) or down the walking order, judged
    on the order as stored now (two people moving devices at once each move from what
    the other left)."""
    require_perm(by, ORDER_PERM, "Only those who edit a job's devices change their order.")
    errors: Errors = {}
    if direction not in ("up", "down"):
        add_error(errors, "move", "Choose to move the device up or down.")
    with transaction.atomic():
        order = [d.pk for d in devices_in_walking_order(job)]
        try:
            pk = int(device)
        except (TypeError, ValueError):
            pk = None
        if pk not in order:
            add_error(errors, "device", "Choose a device of this job to move.")
        raise_if(errors)
        at = order.index(pk)
        to = at - 1 if direction == "up" else at + 1
        if 0 <= to < len(order):
            order[at], order[to] = order[to], order[at]
        return device_order_set(job=job, order=order, by=by)


__all__ = ["device_move", "device_order_set", "devices_in_walking_order"]
