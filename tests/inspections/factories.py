"""Small factories for the inspections tests: a wrench, a circuit whose ends carry a torque
spec, the job's stages, and a reading with sensible defaults.

    make_wrench(**fields) -> TorqueWrench          (2–50 N·m, calibrated for 6 months)
    make_spec_circuit(job, spec=10, unit="N*m", **fields) -> Circuit
        two busbars whose + and - terminals carry the device manual's torque; the
        circuit's four terminations take it at the shop's default tolerance (10 %)
    stages_by_kind(job) -> {Stage.Kind: Stage}
    open_stage(stage) -> Stage                      (as if the stage before were signed)
    read(termination, stage, value, **kw) -> TorqueRecord   (torque_record_create)
    log_soaked_run(job, by) -> HeatCycleRun   a run that ended longer ago than the soak
                                              (signs the heat-cycle stage, opens retorque)
    signature_png() -> bytes, signature() -> str   a tiny real PNG with a stroke, and its
                                              data URL as the signing pad sends it
    read_all(stage, technician, wrench, value="10") -> None   every termination read
    mark_all(stage, by, result="pass") -> None    every hand-marked checklist item marked
    sign(stage, user, **kw) -> SignOff              stage_sign with the user's own password
    through_install(job, technician, wrench) -> SignOff    read, marked and signed
    through_retorque(job, technician, wrench) -> SignOff   run logged, soaked, re-read, signed
    approved(job, technician, lead, wrench) -> SignOff     all of that and the lead's approval
"""

from __future__ import annotations

import base64
import datetime
import io
import itertools
import uuid
from decimal import Decimal

from django.utils import timezone
from PIL import Image, ImageDraw

from circuits.models import Termination
from inspections.models import Stage, TorqueWrench
from inspections.services import (
    checklist_item_mark,
    checklist_items_for,
    heat_cycle_log,
    job_approve,
    stage_sign,
    stages_ensure,
    torque_record_create,
)
from shop.models import ShopProfile
from tests.circuits.factories import make_circuit, make_device, make_terminal

_seq = itertools.count(1)


def make_wrench(**fields) -> TorqueWrench:
    fields.setdefault("code", f"TW-{next(_seq):02d}")
    fields.setdefault("description", "Click wrench")
    fields.setdefault("range_min", Decimal("2"))
    fields.setdefault("range_max", Decimal("50"))
    fields.setdefault("unit", "N*m")
    fields.setdefault("calibration_due", timezone.localdate() + datetime.timedelta(days=180))
    wrench = TorqueWrench(**fields)
    wrench.full_clean()
    wrench.save()
    return wrench


def make_spec_circuit(job, *, spec=Decimal("10"), unit: str = "N*m", **fields):
    devices = []
    for _ in range(2):
        device = make_device(job, name=f"Bus {next(_seq)}", kind="busbar")
        for name, polarity in (("+", "pos"), ("-", "neg")):
            make_terminal(
                device,
                name=name,
                polarity=polarity,
                manual_torque_value=Decimal(str(spec)),
                manual_torque_unit=unit,
            )
        devices.append(device)
    return make_circuit(job, *devices, **fields)


def stages_by_kind(job) -> dict[int, Stage]:
    return {stage.kind: stage for stage in stages_ensure(job=job)}


def latest_stage(job, kind: int) -> Stage:
    """The stage as stored now."""
    return Stage.objects.select_related("job").get(job=job, kind=kind)


def open_stage(stage: Stage) -> Stage:
    """Open a stage directly: the signing gates that open stages come in a later part of
    the issue; these tests are about what happens inside an open stage."""
    stage.state = Stage.State.OPEN
    stage.opened_at = timezone.now()
    stage.save()
    return stage


def new_key() -> str:
    return str(uuid.uuid4())


def read(termination, stage, value, *, technician, wrench, unit: str = "N*m", **kwargs):
    kwargs.setdefault("client_key", new_key())
    return torque_record_create(
        termination=termination,
        stage=stage,
        value=value,
        unit=unit,
        wrench=wrench,
        technician=technician,
        **kwargs,
    )


def log_soaked_run(job, by, *, minutes_ago: int | None = None):
    """Log a heat-cycle run that ended `minutes_ago` (default: the soak and five minutes
    more), the heat-cycle stage open; logging it signs that stage and opens the retorque."""
    stage = Stage.objects.get(job=job, kind=Stage.Kind.HEAT_CYCLE)
    if not stage.accepts_work:
        open_stage(stage)
    if minutes_ago is None:
        minutes_ago = ShopProfile.load().soak_minutes + 5
    end = timezone.now() - datetime.timedelta(minutes=minutes_ago)
    return heat_cycle_log(
        job=job,
        start=end - datetime.timedelta(hours=1),
        end=end,
        peak_current_a="150",
        ambient_c="20",
        by=by,
    )


def signature_png(width: int = 64, height: int = 24) -> bytes:
    """A tiny real PNG: a transparent pad with one dark stroke across it."""
    image = Image.new("RGBA", (width, height), (0, 0, 0, 0))
    ImageDraw.Draw(image).line(
        [(2, height - 4), (width // 2, 3), (width - 3, height - 6)], fill=(0, 0, 0, 255), width=2
    )
    buffer = io.BytesIO()
    image.save(buffer, format="PNG")
    return buffer.getvalue()


def signature(**size) -> str:
    return "data:image/png;base64," + base64.b64encode(signature_png(**size)).decode("ascii")


def read_all(stage, *, technician, wrench, value="10", **kwargs) -> None:
    for termination in Termination.objects.filter(circuit__job=stage.job_id).order_by("pk"):
        read(termination, stage, value, technician=technician, wrench=wrench, **kwargs)


def mark_all(stage, *, by, result: str = "pass", note: str = "") -> None:
    for item in checklist_items_for(stage=stage):
        if not item.derived:
            checklist_item_mark(
                stage=stage,
                item_key=item.key,
                result=result,
                note=note,
                by=by,
                client_key=new_key(),
            )


PASSWORD = "pw-for-tests-only"  # tests.factories.make_user's


def sign(stage, user, **kwargs):
    kwargs.setdefault("password", PASSWORD)
    kwargs.setdefault("signature_png", signature())
    return stage_sign(stage=stage, user=user, **kwargs)


def through_install(job, *, technician, wrench):
    """The first install done right: every end read within tolerance, every item passed,
    signed by an assigned technician. Gives the job a circuit when it has none."""
    if not Termination.objects.filter(circuit__job=job).exists():
        make_spec_circuit(job)
    job.technicians.add(technician)
    install = stages_by_kind(job)[Stage.Kind.FIRST_INSTALL]
    read_all(install, technician=technician, wrench=wrench)
    mark_all(install, by=technician)
    return sign(install, technician)


def through_retorque(job, *, technician, wrench):
    log_soaked_run(job, technician)
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    mark_all(retorque, by=technician)
    return sign(retorque, technician)


def approved(job, *, technician, lead, wrench):
    through_install(job, technician=technician, wrench=wrench)
    through_retorque(job, technician=technician, wrench=wrench)
    return job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
