"""Writes to a job's electrical system: circuits with their terminations, devices and
their terminals, termination specs, and waivers.

Every write here is refused while the job is approved (locked: inspections.services.
job_is_locked) with the lock's message, and none of them removes or moves a conductor end
that carries readings: the readings would no longer describe the connection they were
made on."""

from __future__ import annotations

from collections.abc import Iterable, Mapping

from django.core.exceptions import NON_FIELD_ERRORS, PermissionDenied, ValidationError
from django.db import IntegrityError, transaction
from django.db.models import ProtectedError
from django.utils import timezone

from circuits.models import Circuit, Device, Terminal, Termination, TorqueDefault, Waiver
from circuits.tags import tag_key
from inspections.models import ThermalReading, TorqueRecord
from inspections.services.status import job_is_locked, lock_message
from shop.models import ShopProfile

MIN_WAIVER_REASON = 15


def check_unlocked(job) -> None:
    """Refuse any write to an approved job's system, saying when it was approved and who
    may reopen it. Call inside the write's transaction."""
    job_id = getattr(job, "pk", job)
    if job_is_locked(job_id):
        raise refusal(lock_message(job_id))


def refusal(message: str) -> ValidationError:
    """A refusal about the record as a whole, keyed so that forms show it above their fields
    and the CSV import lists it on the row that asked (both read `message_dict`)."""
    return ValidationError({NON_FIELD_ERRORS: [message]})


def _with_readings(terminations) -> set[int]:
    """Ids of the terminations that carry torque or temperature readings."""
    ids = [t.pk for t in terminations if t.pk]
    if not ids:
        return set()
    torqued = TorqueRecord.objects.filter(termination_id__in=ids).values_list(
        "termination_id", flat=True
    )
    heated = ThermalReading.objects.filter(termination_id__in=ids).values_list(
        "termination_id", flat=True
    )
    return set(torqued) | set(heated)


def _expected_ends(circuit: Circuit) -> set[tuple[str, str, int]]:
    """(end, polarity, index) for every conductor end the circuit has: each conductor runs
    `parallel` times and has two ends."""
    return {
        (end, polarity, index)
        for polarity in circuit.polarities()
        for index in range(1, circuit.parallel + 1)
        for end in (Termination.End.FROM, Termination.End.TO)
    }


def _terminal_for(circuit: Circuit, end: str, polarity: str):
    """The device terminal an end lands on: the circuit's chosen terminal when its
    polarity matches, else the device's only terminal of that polarity."""
    device = circuit.from_device if end == Termination.End.FROM else circuit.to_device
    chosen = circuit.from_terminal if end == Termination.End.FROM else circuit.to_terminal
    if chosen is not None and chosen.polarity == polarity:
        return chosen
    matches = [t for t in device.terminals.all() if t.polarity == polarity]
    return matches[0] if len(matches) == 1 else None


def termination_spec_fill(termination: Termination) -> None:
    """Fill a termination's torque spec: the device manual's value wins, then the shop
    default for its stud size and kind; otherwise it stays 'not set'."""
    terminal = termination.terminal
    if terminal is not None and terminal.stud_size and not termination.stud_size:
        termination.stud_size = terminal.stud_size
    if terminal is not None and terminal.manual_torque_value is not None:
        termination.torque_value = terminal.manual_torque_value
        termination.torque_unit = terminal.manual_torque_unit
        termination.torque_tolerance_pct = ShopProfile.load().default_torque_tolerance_pct
        termination.torque_source = Termination.SpecSource.MANUAL
        termination.torque_source_note = f"{terminal.device.name} manual"
        return
    default = TorqueDefault.objects.filter(
        stud_size=termination.stud_size, kind=termination.kind
    ).first()
    if default is not None:
        termination.torque_value = default.value
        termination.torque_unit = default.unit
        termination.torque_tolerance_pct = default.tolerance_pct
        termination.torque_source = Termination.SpecSource.SHOP_DEFAULT
        termination.torque_source_note = default.source


def termination_update(*, termination: Termination, refill: bool = False) -> Termination:
    """Save a termination's kind, stud size and torque spec as edited (the form has put
    them on the instance); `refill` takes the spec afresh from the manual or the shop
    default. Refused while the job is locked. A spec change never rewrites a reading: each
    reading keeps a copy of the spec it was judged against."""
    with transaction.atomic():
        check_unlocked(termination.circuit.job_id)
        if refill:
            termination.torque_source = Termination.SpecSource.NONE
            termination.torque_source_note = ""
            termination_spec_fill(termination)
        termination.full_clean()
        termination.save()
    return termination


def _repoint(circuit: Circuit, termination: Termination, *, has_readings: bool = False) -> bool:
    """Move a kept end to the terminal it now lands on, when the circuit's device or chosen
    terminal changed; its torque spec described the old stud, so it is filled afresh.
    Returns True when the termination changed.

    An end that carries readings is not moved to another device or terminal (a
    ValidationError says which): its readings were made on the old stud. Giving such an
    end the terminal it had none of is allowed (nothing it was read on changes)."""
    end, polarity = termination.end, termination.polarity
    device = circuit.from_device if end == Termination.End.FROM else circuit.to_device
    chosen = circuit.from_terminal if end == Termination.End.FROM else circuit.to_terminal
    wanted = _terminal_for(circuit, end, polarity)
    current = termination.terminal
    stale = current is not None and current.device_id != device.pk
    unset = current is None and wanted is not None
    rechosen = (
        chosen is not None and chosen.polarity == polarity and termination.terminal_id != chosen.pk
    )
    if not (stale or unset or rechosen):
        return False
    if has_readings and current is not None and wanted != current:
        raise refusal(
            f"{termination} carries torque or temperature readings made on"
            f" {current.device.name}, terminal {current.name}; it cannot move to another"
            " device or terminal. Keep its device and terminal, or ask a lead."
        )
    termination.terminal = wanted
    termination.stud_size = ""
    termination.torque_value = None
    termination.torque_source = Termination.SpecSource.NONE
    termination.torque_source_note = ""
    termination_spec_fill(termination)
    return True


def terminations_sync(*, circuit: Circuit) -> list[Termination]:
    """Make the circuit's terminations match its conductors: create the missing ends (with
    their torque spec filled), remove ends the circuit no longer has, and move kept ends
    whose device or chosen terminal changed. Refused while the job is locked, and for a
    change that would remove or move ends carrying readings (nothing is saved)."""
    check_unlocked(circuit.job_id)
    expected = _expected_ends(circuit)
    existing = {
        (t.end, t.polarity, t.conductor_index): t
        for t in circuit.terminations.select_related("terminal")
    }
    surplus = [t.pk for key, t in existing.items() if key not in expected]
    if surplus:
        try:
            with transaction.atomic():
                Termination.objects.filter(pk__in=surplus).delete()
        except ProtectedError as exc:
            kept = sorted({str(obj) for obj in exc.protected_objects})[:3]
            raise refusal(
                "This change would remove conductor ends that already carry torque readings "
                f"({'; '.join(kept)}); keep the conductors and parallel count, or ask a lead."
            ) from exc
    read = _with_readings(existing.values())
    for key, termination in existing.items():
        if key in expected and _repoint(circuit, termination, has_readings=termination.pk in read):
            termination.full_clean()
            termination.save()
    created = []
    for end, polarity, index in sorted(expected - existing.keys()):
        termination = Termination(
            circuit=circuit,
            end=end,
            polarity=polarity,
            conductor_index=index,
            terminal=_terminal_for(circuit, end, polarity),
        )
        termination_spec_fill(termination)
        termination.full_clean()
        termination.save()
        created.append(termination)
    return created


def device_save(
    *,
    job,
    device: Device | None = None,
    fields: Mapping[str, object],
    terminals: Iterable[Mapping[str, object]] = (),
    remove_terminals: Iterable[int] = (),
) -> Device:
    """Create a device (`device` None) or update one, with its terminals, together or not
    at all. `fields` are the device's model fields; each of `terminals` holds a
    terminal's fields, with "id" for an existing terminal of this device (updated) or
    without (added); `remove_terminals` are ids of this device's terminals to remove.

    Refused while the job is locked, for a terminal id that is not this device's, and
    when a terminal to be removed has conductor ends with readings on it (they would lose
    the stud they were read on). Every record is validated (full_clean) before it is
    written; a ValidationError saves nothing."""
    with transaction.atomic():
        check_unlocked(job)
        if device is None:
            device = Device(job=job)
        else:
            device = Device.objects.select_for_update().get(pk=device.pk, job=job)
        for name, value in fields.items():
            setattr(device, name, value)
        device.full_clean()
        if device.pk and (not device.protects or device.protection_a is None):
            protected = sorted(device.protected_circuits.values_list("tag", flat=True), key=tag_key)
            if protected:
                raise ValidationError(
                    {
                        "protection_a": f"{device.name} is the protection of circuit"
                        f"{'s' if len(protected) > 1 else ''} {', '.join(protected)}; keep "
                        "it a fuse or breaker holder with a rating, or give those circuits "
                        "other protection first."
                    }
                )
        own = {t.pk: t for t in device.terminals.all()} if device.pk else {}
        removed_ids = set(remove_terminals)
        strangers = sorted(
            str(pk)
            for pk in removed_ids | {row["id"] for row in terminals if row.get("id")}
            if pk not in own
        )
        if strangers:
            raise refusal(
                f"Terminal ids {', '.join(strangers)} are not this device's; nothing was saved."
            )
        removed = [own[pk] for pk in removed_ids]
        if removed:
            landing = Termination.objects.filter(terminal__in=removed).select_related("terminal")
            read = _with_readings(landing)
            kept = sorted({t.terminal.name for t in landing if t.pk in read})
            if kept:
                raise refusal(
                    f"Terminal{'s' if len(kept) > 1 else ''} {', '.join(kept)} "
                    f"{'have' if len(kept) > 1 else 'has'} conductor ends with torque or "
                    "temperature readings; keep it. Nothing was saved."
                )
        device.save()
        for terminal in removed:
            terminal.delete()
        for row in terminals:
            values = {k: v for k, v in row.items() if k != "id"}
            terminal = own[row["id"]] if row.get("id") else Terminal(device=device)
            for name, value in values.items():
                setattr(terminal, name, value)
            terminal.full_clean()
            terminal.save()
    return device


def circuit_create(*, job, **fields) -> Circuit:
    with transaction.atomic():
        check_unlocked(job)
        circuit = Circuit(job=job, **fields)
        circuit.full_clean()
        circuit.save()
        terminations_sync(circuit=circuit)
    return circuit


def circuit_update(*, circuit: Circuit, **fields) -> Circuit:
    with transaction.atomic():
        check_unlocked(circuit.job_id)
        # Read the stored tag: a bound model form has already put the new one on the instance.
        old_tag = Circuit.objects.filter(pk=circuit.pk).values_list("tag", flat=True).get()
        for name, value in fields.items():
            setattr(circuit, name, value)
        circuit.full_clean()
        circuit.save()
        terminations_sync(circuit=circuit)
        if circuit.tag != old_tag:
            # Waivers name their finding's subject by tag; they follow the circuit.
            Waiver.objects.filter(job=circuit.job_id, subject=old_tag).update(subject=circuit.tag)
    return circuit


def waiver_create(*, job, code: str, subject: str, reason: str, lead) -> Waiver:
    """A lead accepts one current finding in writing, on the facts it rests on now (they
    are stored with the waiver: circuits.waiver_facts).

    When the finding's waiver in force has lapsed (granted on facts that have changed, or
    before waivers recorded facts), the new waiver renews it: the lapsed one is kept as
    history, marked superseded, and the new one points back at it (`renews`)."""
    from circuits.system import job_system_report

    if not lead.has_perm("circuits.add_waiver"):
        raise PermissionDenied("Only a lead can waive a finding.")
    reason = (reason or "").strip()
    if len(reason) < MIN_WAIVER_REASON:
        raise ValidationError(
            {"reason": f"Explain the waiver in at least {MIN_WAIVER_REASON} characters."}
        )
    with transaction.atomic():
        check_unlocked(job)
        report = job_system_report(job)
        finding = next(
            (f for f in report.all_findings if (f.code, f.subject) == (code, subject)), None
        )
        if finding is None:
            raise ValidationError("That finding is no longer raised; nothing to waive.")
        if finding.waived:
            raise ValidationError("This finding is already waived.")
        lapsed = finding.lapsed_waiver
        if lapsed is not None:
            # Only if it is still in force: two leads renewing at once renew it once.
            closed = (
                Waiver.objects.active().filter(pk=lapsed.pk).update(superseded_at=timezone.now())
            )
            if not closed:
                raise ValidationError("This finding is already waived.")
        try:
            with transaction.atomic():
                return Waiver.objects.create(
                    job=job,
                    code=code,
                    subject=subject,
                    reason=reason,
                    lead=lead,
                    message=finding.message,
                    facts=finding.facts,
                    facts_hash=finding.facts_hash,
                    renews=lapsed,
                )
        except IntegrityError:
            # Another lead's waiver landed first (one in force per finding).
            raise ValidationError("This finding is already waived.") from None


def waiver_withdraw(*, waiver: Waiver, user, reason: str = "") -> Waiver:
    """A lead takes a waiver back. The row stays, with who withdrew it, when and why; the
    finding is open again."""
    if not user.has_perm("circuits.delete_waiver"):
        raise PermissionDenied("Only a lead can withdraw a waiver.")
    with transaction.atomic():
        check_unlocked(waiver.job_id)
        withdrawn = (
            Waiver.objects.active()
            .filter(pk=waiver.pk)
            .update(
                withdrawn_at=timezone.now(),
                withdrawn_by=user,
                withdrawal_reason=(reason or "").strip(),
            )
        )
        if not withdrawn:
            raise ValidationError("This waiver is no longer in force; nothing to withdraw.")
    waiver.refresh_from_db()
    return waiver


# ---- removals: the confirmed deletes of the circuit and device pages ----


def circuit_delete(*, circuit: Circuit, user) -> int:
    """Delete a circuit and its terminations (with their torque specs). Returns how many
    terminations went with it. The view has checked the job assignment and the confirm."""
    if not user.has_perm("circuits.delete_circuit"):
        raise PermissionDenied("Removing a circuit is lead or office work; ask a lead.")
    with transaction.atomic():
        check_unlocked(circuit.job_id)
        count = Termination.objects.filter(circuit=circuit).count()
        # A waiver names its finding by tag: one left in force would pass to the next
        # circuit given this tag. It is withdrawn, and kept, with the deletion as reason.
        Waiver.objects.active().filter(job=circuit.job_id, subject=circuit.tag).update(
            withdrawn_at=timezone.now(),
            withdrawn_by=user,
            withdrawal_reason=f"Circuit {circuit.tag} was deleted.",
        )
        try:
            circuit.delete()  # its terminations go with it (CASCADE)
        except ProtectedError as exc:
            raise ValidationError(
                f"Circuit {circuit.tag} carries torque readings or other evidence; it cannot "
                "be deleted. Nothing was deleted."
            ) from exc
    return count


def device_delete(*, device, user) -> None:
    """Delete a device and its terminals, refused while any circuit uses it."""
    if not user.has_perm("circuits.delete_device"):
        raise PermissionDenied("Removing a device is lead or office work; ask a lead.")
    with transaction.atomic():
        check_unlocked(device.job_id)
        # Locked, so a circuit saved at the same moment cannot land on a deleted device.
        locked = Device.objects.select_for_update().get(pk=device.pk)
        in_use = device_circuit_tags(locked)
        if in_use:
            raise ValidationError(
                f"{locked.name} is used by circuit{'s' if len(in_use) > 1 else ''} "
                f"{', '.join(in_use)}; nothing was deleted."
            )
        try:
            locked.delete()
        except ProtectedError as exc:
            raise ValidationError(
                f"{locked.name} has terminals with torque readings or other evidence; it "
                "cannot be deleted. Nothing was deleted."
            ) from exc


def device_circuit_tags(device) -> list[str]:
    """Tags of the circuits that start or end at the device."""
    from django.db.models import Q

    tags = Circuit.objects.filter(Q(from_device=device) | Q(to_device=device))
    return sorted(tags.values_list("tag", flat=True), key=tag_key)
