"""Demo: the calibration history of the demo wrenches (inspections.demo makes them),
written through wrench_calibration_record like the office's page. Each wrench gets the
calibration that set its current due date and the one a year before; one was found
beyond tolerance and adjusted. Invented laboratories and certificates. Idempotent: a
wrench that already has a calibration is left alone."""

from __future__ import annotations

import datetime
from decimal import Decimal

from django.utils import timezone

from inspections.models import TorqueWrench, WrenchCalibration
from inspections.services.calibration import wrench_calibration_record

YEAR = datetime.timedelta(days=365)
LAB = "Quarry Lane calibration lab"
BENCH = "Shop test bench, checked by the lead"
# code -> (as-found error % of the older calibration, of the newer; adjusted at the newer)
HISTORY: dict[str, tuple[str | None, str | None, bool]] = {
    "TD-21": ("1.2", "-0.8", False),
    "TW-22": ("-2.1", "4.8", True),
    "TW-23": ("0.6", "1.9", False),
    "TW-24": ("-3.0", "-2.4", False),
}


def load(*, office) -> None:
    today = timezone.localdate()
    for code, (older, newer, adjusted) in HISTORY.items():
        wrench = TorqueWrench.objects.filter(code=code).first()
        if wrench is None or WrenchCalibration.objects.filter(wrench=wrench).exists():
            continue
        due = wrench.calibration_due
        done = min(due - YEAR, today)
        for number, (calibrated_on, due_on, error, fixed, by) in enumerate(
            [
                (done - YEAR, done, older, False, BENCH if code == "TD-21" else LAB),
                (done, due, newer, adjusted, LAB),
            ],
            start=1,
        ):
            wrench_calibration_record(
                wrench=wrench,
                calibrated_on=calibrated_on,
                due_on=due_on,
                done_by=by,
                certificate=f"QL-{calibrated_on:%y%m}-{code}-{number}",
                as_found_error_pct=Decimal(error) if error is not None else None,
                adjusted=fixed,
                notes="Found high; adjusted and re-tested within tolerance." if fixed else "",
                by=office,
            )
