"""Jobs the wiring-record tests render: a known approved job with one connection found
loose at retorque and one temperature reading, an empty job, and names in several
scripts. Invented people and vehicles only."""

from __future__ import annotations

import io

from django.core.files.uploadedfile import SimpleUploadedFile
from PIL import Image

from circuits.models import Termination
from inspections.models import Stage
from inspections.services import job_approve, thermal_reading_create, thermal_waive
from tests.factories import make_job, make_owner, make_vehicle
from tests.inspections.factories import (
    PASSWORD,
    log_soaked_run,
    make_spec_circuit,
    make_wrench,
    mark_all,
    new_key,
    read,
    read_all,
    sign,
    signature,
    through_install,
)

# A 12 V DC branch of 4 AWG (the size the tests look for), 40 A over 3 m, 50 A fuse.
KNOWN_CIRCUIT = {
    "tag": "D-01",
    "name": "Galley feed",
    "conductor_size": "4 AWG",
    "design_current_a": 40,
    "protection_a": 50,
    "length_m": 3.0,
}
# Invented VINs whose check digit is right (49 CFR 565.15, the position-9 check digit).
KNOWN_VIN = "3TSTV4NX5RB100427"
OTHER_VIN = "5BNCH7WX1SB200381"
LOOSE_VALUE = "9.7"  # N·m at retorque, the connection found loose and brought back to spec
HOT_C = "31.5"  # °C after the run, ambient 20 °C (log_soaked_run): probable deficiency
WAIVER_REASON = "Re-made and re-torqued; lug face cleaned, within spec on re-read."


def photo_upload(name: str = "lug.jpg") -> SimpleUploadedFile:
    image = Image.new("RGB", (64, 48), (120, 120, 120))
    buffer = io.BytesIO()
    image.save(buffer, format="JPEG")
    return SimpleUploadedFile(name, buffer.getvalue(), content_type="image/jpeg")


def known_job(*, technician, lead, owner_name: str = "Ilse Marrow", approve: bool = True):
    """An approved job: one circuit (D-01, 4 AWG), read at both passes; its first end
    found loose at retorque (read again at 9.7 N·m), a temperature of 31.5 °C taken on
    it after the run (waived by the lead); every checklist item passed; signed and
    approved by the lead."""
    vehicle = make_vehicle(
        make_owner(name=owner_name), make="Northway", model="Tern 6", identification=KNOWN_VIN
    )
    job = make_job(vehicle, lead=lead)
    wrench = make_wrench(code="TW-07")
    circuit = make_spec_circuit(job, **KNOWN_CIRCUIT)
    through_install(job, technician=technician, wrench=wrench)
    run = log_soaked_run(job, technician)
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    ends = list(Termination.objects.filter(circuit=circuit).order_by("pk"))
    read(
        ends[0],
        retorque,
        LOOSE_VALUE,
        technician=technician,
        wrench=wrench,
        found_loose=True,
        note="Turned a quarter before the click",
        photo=photo_upload(),
    )
    for end in ends[1:]:
        read(end, retorque, "10", technician=technician, wrench=wrench)
    hot = thermal_reading_create(
        run=run, termination=ends[0], temperature_c=HOT_C, by=technician, client_key=new_key()
    )
    thermal_waive(reading=hot, lead=lead, reason=WAIVER_REASON)
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    if approve:
        job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    job.refresh_from_db()
    return job


def empty_job():
    """A job with no devices and no circuits yet."""
    return make_job(make_vehicle(make_owner(name="Odile Fenwick")))


__all__ = ["empty_job", "known_job", "read_all", "photo_upload"]
