"""A small fixed data set for the insight tests, every figure of which is worked out by
hand in the tests (see the table below).

One job, one circuit C from a busbar (from end, crimped lugs on M8 studs) to a charge
controller (to end, set-screws), spec 10 N·m ±10 % on all four ends. Installed by
`installer` with wrench A, retorqued by `checker` with wrench B:

    end        install (A)            retorque (B), in order taken
    from pos   12 (high), corrected   10
               to 10
    from neg   10                     9.5
    to pos     10                     8.5 found loose (low), re-read 10
    to neg     10                     8 found loose (low)

Judged within ±10 % of 10 N·m: 9 to 11 N·m (inspections.services.torque.judge).
"""

from __future__ import annotations

from dataclasses import dataclass
from decimal import Decimal

from circuits.models import Device, Termination
from inspections.models import Stage, TorqueRecord, TorqueWrench
from inspections.services import torque_record_correct
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    log_soaked_run,
    make_wrench,
    new_key,
    open_stage,
    read,
    stages_by_kind,
)


@dataclass
class Data:
    job: object
    installer: object
    checker: object
    wrench_a: object
    wrench_b: object
    ends: dict[str, Termination]
    controller: Device


def _device(job, name: str, kind: str) -> Device:
    device = make_device(job, name=name, kind=kind)
    for terminal, polarity in (("+", "pos"), ("-", "neg")):
        make_terminal(
            device,
            name=terminal,
            polarity=polarity,
            manual_torque_value=Decimal("10"),
            manual_torque_unit="N*m",
        )
    return device


def build(job=None) -> Data:
    installer = make_user(roles.TECHNICIAN, first_name="Ira", last_name="Installer")
    checker = make_user(roles.TECHNICIAN, first_name="Cam", last_name="Checker")
    job = job or make_job()
    bus = _device(job, "Bus 1", Device.Kind.BUSBAR)
    controller = _device(job, "Solar controller", Device.Kind.CHARGE_CONTROLLER)
    circuit = make_circuit(job, bus, controller, tag="C-01", conductor_size="6 AWG")
    circuit.terminations.filter(end="from").update(kind="lug", stud_size="M8")
    circuit.terminations.filter(end="to").update(kind="set_screw", stud_size="screw")
    ends = {f"{t.end} {t.polarity}": t for t in circuit.terminations.all()}
    # A second job built in the same test reads with the same two wrenches.
    wrench_a = TorqueWrench.objects.filter(code="TW-A").first() or make_wrench(code="TW-A")
    wrench_b = TorqueWrench.objects.filter(code="TW-B").first() or make_wrench(code="TW-B")
    stages = stages_by_kind(job)
    install = open_stage(stages[Stage.Kind.FIRST_INSTALL])
    job.technicians.add(installer, checker)

    def at_install(end, value):
        return read(ends[end], install, value, technician=installer, wrench=wrench_a)

    typo = at_install("from pos", "12")
    torque_record_correct(
        record=typo,
        value="10",
        unit="N*m",
        wrench=wrench_a,
        technician=installer,
        reason="Typed 12 for 10.",
        client_key=new_key(),
    )
    for end in ("from neg", "to pos", "to neg"):
        at_install(end, "10")
    log_soaked_run(job, checker)
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)

    def at_retorque(end, value, loose=False):
        return read(
            ends[end], retorque, value, technician=checker, wrench=wrench_b, found_loose=loose
        )

    at_retorque("from pos", "10")
    at_retorque("from neg", "9.5")
    at_retorque("to pos", "8.5", loose=True)
    at_retorque("to pos", "10")
    at_retorque("to neg", "8", loose=True)
    assert TorqueRecord.objects.filter(stage__job=job).count() == 10
    return Data(job, installer, checker, wrench_a, wrench_b, ends, controller)
