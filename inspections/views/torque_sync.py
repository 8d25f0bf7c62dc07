"""The offline queue's endpoint: readings kept on a tablet arrive here as JSON, one
answer per reading. A resend of a key already stored answers "stored" again (the service
and the unique key store it once); a reading the service refuses answers "refused" with
its messages, so the page drops it from the queue and shows why.

Request:  {"readings": [{"key": str, "termination": int, "stage": int (Stage.Kind),
           "value": str, "unit": "N*m"|"lbf*in"|"lbf*ft"|"kgf*cm", "wrench": int|null,
           "found_loose": bool, "note": str}]}   at most MAX_READINGS
Response: {"results": [{"key", "status": "stored"|"refused", "record": int|null,
           "result": "ok"|"low"|"high"|null, "message": str, "errors": {field: [str]}}]}
Anything malformed: 400 {"error": "..."}; nothing of that request is stored.
"""

from __future__ import annotations

import json

from django.core.exceptions import PermissionDenied, ValidationError
from django.http import Http404, HttpRequest, JsonResponse

from circuits.models import Termination
from inspections import services
from inspections.models import Stage, TorqueRecord, TorqueWrench
from inspections.views import torque_rows as rows
from inspections.views.torque_rows import result_words
from shop.views.access import _get_job_for_user

RECORD_PERM = "inspections.add_torquerecord"
MAX_READINGS = 50
# 64-bit signed integers: larger ids cannot name a row and overflow the database.
MAX_ID = 2**63 - 1
RESULT_CODES = {
    TorqueRecord.Result.WITHIN: "ok",
    TorqueRecord.Result.LOW: "low",
    TorqueRecord.Result.HIGH: "high",
}


UNSTORABLE = "This text contains a character that cannot be stored; type it again."


class Malformed(Exception):
    pass


def _is_id(value: object) -> bool:
    return isinstance(value, int) and not isinstance(value, bool) and 0 < value <= MAX_ID


def _reading(item: object, index: int) -> dict:
    """One reading of the request, its types checked (what it says is the service's)."""
    where = f"reading {index + 1}"
    if not isinstance(item, dict):
        raise Malformed(f"{where} is not an object.")
    expected = {"key": str, "value": str, "unit": str, "note": str, "found_loose": bool}
    for name, kind in expected.items():
        if name in ("note", "found_loose") and name not in item:
            continue
        if not isinstance(item.get(name), kind):
            raise Malformed(f"{where}: '{name}' must be a {kind.__name__}.")
    for name in ("termination", "stage"):
        if not _is_id(item.get(name)):
            raise Malformed(f"{where}: '{name}' must be a whole number.")
    wrench = item.get("wrench")
    if wrench is not None and not _is_id(wrench):
        raise Malformed(f"{where}: 'wrench' must be a whole number or null.")
    return item


def _parse(request: HttpRequest) -> list[dict]:
    if request.content_type != "application/json":
        raise Malformed("Send the readings as application/json.")
    try:
        body = json.loads(request.body.decode("utf-8"))
    except (UnicodeDecodeError, ValueError, RecursionError):
        # RecursionError: arrays nested thousands deep exhaust the decoder's stack.
        raise Malformed("The request is not valid JSON.") from None
    if not isinstance(body, dict) or not isinstance(body.get("readings"), list):
        raise Malformed('The request must be {"readings": [...]}.')
    readings = body["readings"]
    if len(readings) > MAX_READINGS:
        raise Malformed(f"Send at most {MAX_READINGS} readings at a time (got {len(readings)}).")
    return [_reading(item, index) for index, item in enumerate(readings)]


def _refused(key: str, errors: dict[str, list[str]]) -> dict:
    return {
        "key": key,
        "status": "refused",
        "record": None,
        "result": None,
        "message": " ".join(m for messages in errors.values() for m in messages),
        "errors": errors,
    }


def _store(job, reading: dict, user) -> dict:
    key = reading["key"]
    nul = rows.nul_errors(reading, ("key", "value", "unit", "note"))
    # JSON may escape a lone UTF-16 surrogate ("\ud800"), which no database can store.
    nul.update(
        (name, [UNSTORABLE])
        for name in ("key", "value", "unit", "note")
        if isinstance(reading.get(name), str)
        and not reading[name].isascii()
        and any("\ud800" <= ch <= "\udfff" for ch in reading[name])
    )
    if nul:
        return _refused(key, nul)
    termination = (
        Termination.objects.select_related("circuit")
        .filter(pk=reading["termination"], circuit__job=job)
        .first()
    )
    if termination is None:
        return _refused(
            key, {"termination": [f"Job {job.number} has no termination {reading['termination']}."]}
        )
    stage = services.stage_for(job, reading["stage"])
    if stage is None or stage.kind not in (Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE):
        return _refused(
            key, {"stage": ["Torque readings are taken at first install and at retorque."]}
        )
    wrench = (
        TorqueWrench.objects.filter(pk=reading["wrench"]).first()
        if reading.get("wrench") is not None
        else None
    )
    try:
        record = services.torque_record_create(
            termination=termination,
            stage=stage,
            value=reading["value"],
            unit=reading["unit"],
            wrench=wrench,
            technician=user,
            found_loose=reading.get("found_loose", False),
            note=reading.get("note", ""),
            client_key=key,
        )
    except ValidationError as exc:
        errors = exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}
        return _refused(key, errors)
    return {
        "key": key,
        "status": "stored",
        "record": record.pk,
        "result": RESULT_CODES[record.result],
        "message": f"{record.termination}: {result_words(record)}",
        "errors": {},
    }


def torque_sync_response(request: HttpRequest, number: str) -> JsonResponse:
    """Answer the queue (the view in torque.py applies login and POST-only)."""
    try:
        job = _get_job_for_user(request.user, number, perm=RECORD_PERM, write=True)
    except PermissionDenied as exc:
        message = str(exc) or "You may not record torque readings on this job."
        return JsonResponse({"error": message}, status=403)
    except Http404:
        return JsonResponse({"error": f"No job {number}."}, status=404)
    try:
        readings = _parse(request)
    except Malformed as exc:
        return JsonResponse({"error": str(exc)}, status=400)
    return JsonResponse({"results": [_store(job, r, request.user) for r in readings]})
