"""What the torque pages read: the stage that takes readings now, the job's terminations
grouped by device in walking order with each one's state at this stage, the next one to
read, the technician's remembered unit and wrench, and a result in plain words. Nothing
here writes."""

from __future__ import annotations

from dataclasses import dataclass, field

from django.utils import timezone

from circuits.models import Termination, TorqueUnit
from inspections import services
from inspections.models import PriorReading, Stage, TorqueRecord, TorqueWrench
from inspections.services.return_visit import last_readings
from inspections.services.walking import devices_in_walking_order
from inspections.units import format_number, format_torque, from_nm, nm_per_unit, to_nm
from shop.models import Job

TORQUE_KINDS = (Stage.Kind.RECHECK, Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE)
NUL_MESSAGE = "This text contains a character that cannot be stored (NUL); type it again."


def nul_errors(data, fields: tuple[str, ...]) -> dict[str, list[str]]:
    """A NUL in a text field would reach the database (PostgreSQL refuses it with an
    error); Django's form fields refuse it, and so do these pages, beside the field."""
    return {
        name: [NUL_MESSAGE]
        for name in fields
        if isinstance(data.get(name), str) and "\x00" in data.get(name)
    }


def torque_stage(job) -> Stage | None:
    """The stage that takes torque readings now: the retorque once it is open (its soak
    included), else the first install while it is open, sent back or reopened, else a
    return visit's re-check."""
    stages = {s.kind: s for s in Stage.objects.filter(job=job, kind__in=TORQUE_KINDS)}
    for kind in (Stage.Kind.RETORQUE, Stage.Kind.FIRST_INSTALL, Stage.Kind.RECHECK):
        stage = stages.get(kind)
        if stage is not None and stage.accepts_work:
            return stage
    return None


def shown_stage(job, wanted: object) -> Stage | None:
    """The torque stage a page shows: `wanted` (a Stage.Kind number from the address) when
    it names a torque stage, else the one taking readings now, else the latest begun."""
    try:
        kind = int(str(wanted)) if wanted not in (None, "") else None
    except ValueError:
        kind = None
    if kind in TORQUE_KINDS:
        return services.stage_for(job, kind)
    current = torque_stage(job)
    if current is not None:
        return current
    stages = Stage.objects.filter(job=job, kind__in=TORQUE_KINDS).order_by("-kind")
    begun = [s for s in stages if s.state != Stage.State.NOT_STARTED]
    return begun[0] if begun else stages.last()


def spec_text(termination: Termination) -> str:
    if termination.torque_value is None:
        return "No torque spec"
    return (
        f"{format_torque(termination.torque_value, termination.torque_unit)}"
        f" ±{format_number(termination.torque_tolerance_pct, 1)} %"
    )


def terminal_text(termination: Termination) -> str:
    terminal = termination.terminal.name if termination.terminal_id else "no terminal"
    return f"terminal {terminal} ({termination.get_polarity_display().lower()})"


@dataclass
class Row:
    termination: Termination
    reading: TorqueRecord | None
    found_loose: bool
    last: PriorReading | None = None  # a return visit: the last record's final reading
    as_found: bool = False  # the reading is a re-check's (as found)

    @property
    def state(self) -> str:
        """not_read, within, low, high or no_spec (the CSS class and the test hook)."""
        if self.reading is not None:
            return self.reading.result
        return "no_spec" if self.termination.torque_value is None else "not_read"

    @property
    def state_words(self) -> str:
        words = {
            "not_read": "Not read",
            "no_spec": "No spec: cannot be read",
            "within": "Within tolerance",
            "low": "Low",
            "high": "High",
        }[self.state]
        if self.reading is not None:
            words = f"{words}: {self.reading.value_display}"
        if self.loose_again:
            return f"{words} · found loose again"
        return f"{words} · found loose" if self.found_loose else words

    @property
    def loose_again(self) -> bool:
        """At a re-check: found loose again (turned before the click, or read below the
        spec's band as found), the most telling fact of a return visit."""
        return self.as_found and (
            self.found_loose
            or (self.reading is not None and self.reading.result == TorqueRecord.Result.LOW)
        )

    @property
    def last_words(self) -> str:
        """ "Last: 9.8 N·m at retorque, TW-02, 12 Mar 2026 · found loose" ("" if none)."""
        last = self.last
        if last is None:
            return ""
        day = f", {timezone.localtime(last.recorded_at):%d %b %Y}" if last.recorded_at else ""
        wrench = f", {last.wrench}" if last.wrench else ""
        loose = " · found loose then" if last.found_loose else ""
        value = format_torque(last.value, last.unit)
        return f"Last: {value} at {last.pass_name}{wrench}{day}{loose}"

    @property
    def spec(self) -> str:
        return spec_text(self.termination)

    @property
    def terminal(self) -> str:
        return terminal_text(self.termination)


@dataclass
class DeviceGroup:
    device: object
    rows: list[Row] = field(default_factory=list)


def work_groups(job, stage: Stage | None) -> list[DeviceGroup]:
    """The job's terminations grouped by the device they land on, devices in walking
    order, each termination with its current reading at `stage` (and, on a return visit,
    the last record's final reading of it)."""
    current = services.current_readings(stage) if stage is not None else {}
    last = last_readings(job) if job.kind == Job.Kind.RETURN_VISIT else {}
    as_found = stage is not None and stage.kind == Stage.Kind.RECHECK
    loose = set()
    if stage is not None:
        loose = set(
            TorqueRecord.objects.current()
            .filter(stage=stage, found_loose=True)
            .values_list("termination_id", flat=True)
        )
    groups = {d.pk: DeviceGroup(d) for d in devices_in_walking_order(job)}
    terminations = (
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit", "terminal")
        .order_by("circuit__tag", "end", "polarity", "conductor_index", "pk")
    )
    for termination in terminations:
        circuit = termination.circuit
        device_id = (
            circuit.from_device_id
            if termination.end == Termination.End.FROM
            else circuit.to_device_id
        )
        groups[device_id].rows.append(
            Row(
                termination,
                current.get(termination.pk),
                termination.pk in loose,
                last=last.get(termination.pk),
                as_found=as_found,
            )
        )
    return [group for group in groups.values() if group.rows]


def walking_terminations(job, stage: Stage | None) -> list[Row]:
    return [row for group in work_groups(job, stage) for row in group.rows]


def next_unread(job, stage: Stage, after: int | None) -> Termination | None:
    """The next termination without a reading at this stage, in walking order after the
    one with id `after` (then from the start again); None when every one with a spec is
    read."""
    rows = walking_terminations(job, stage)
    ids = [row.termination.pk for row in rows]
    start = ids.index(after) + 1 if after in ids else 0
    for row in rows[start:] + rows[:start]:
        if row.state == "not_read" and row.termination.pk != after:
            return row.termination
    return None


def last_record(user) -> TorqueRecord | None:
    """The user's latest reading anywhere: the unit and wrench they used last."""
    return (
        TorqueRecord.objects.filter(technician=user).order_by("-created_at", "-pk").first()
        if user.is_authenticated
        else None
    )


def default_unit(user, termination: Termination) -> str:
    latest = last_record(user)
    return latest.unit if latest is not None else termination.torque_unit


@dataclass(frozen=True)
class WrenchChoice:
    wrench: TorqueWrench
    label: str
    usable: bool


def wrench_choices(termination: Termination) -> list[WrenchChoice]:
    """Wrenches in service: calibrated ones whose range covers the spec first, then
    calibrated ones outside it, then overdue ones (labelled, so the refusal is no
    surprise)."""
    today = timezone.localdate()
    spec_nm = (
        to_nm(termination.torque_value, termination.torque_unit)
        if termination.torque_value is not None
        else None
    )
    choices = []
    for wrench in TorqueWrench.objects.filter(in_service=True).order_by("code"):
        low, high = wrench.range_nm()
        overdue = wrench.days_overdue(today) > 0
        covers = spec_nm is not None and low <= spec_nm <= high
        label = f"{wrench.code} ({wrench.range_display})"
        if overdue:
            label += " · calibration overdue"
        elif spec_nm is not None and not covers:
            label += " · spec outside its range"
        rank = 2 if overdue else (0 if covers else 1)
        choices.append((rank, WrenchChoice(wrench, label, rank == 0)))
    return [choice for _, choice in sorted(choices, key=lambda pair: pair[0])]


def default_wrench(user, choices: list[WrenchChoice]) -> int | None:
    """The wrench the user read with last, while it is still offered; else the first
    calibrated wrench that covers the spec."""
    latest = last_record(user)
    offered = [c.wrench.pk for c in choices]
    if latest is not None and latest.wrench_id in offered:
        return latest.wrench_id
    usable = [c.wrench.pk for c in choices if c.usable]
    return usable[0] if usable else None


@dataclass(frozen=True)
class UnitOption:
    code: str
    label: str
    nm_per_unit: float


def unit_options() -> list[UnitOption]:
    return [UnitOption(code, label, nm_per_unit(code)) for code, label in TorqueUnit.choices]


def spec_in_unit(termination: Termination, code: str) -> str:
    """The spec and its accepted band in `code`: "88.51 lbf·in (79.66–97.36)"."""
    if termination.torque_value is None:
        return ""
    spec_nm = to_nm(termination.torque_value, termination.torque_unit)
    band = spec_nm * float(termination.torque_tolerance_pct) / 100
    low, high = from_nm(spec_nm - band, code), from_nm(spec_nm + band, code)
    return (
        f"{format_torque(from_nm(spec_nm, code), code, 2)}"
        f" (accepted {format_number(low, 2)}–{format_number(high, 2)})"
    )


def result_words(record: TorqueRecord) -> str:
    """The result in words, in the unit entered: "Within tolerance", "Low by 2.5 N·m"."""
    value_in_unit = from_nm(record.value_nm, record.unit)
    spec_in = from_nm(record.spec_nm, record.unit)
    band = record.spec_nm * float(record.spec_tolerance_pct) / 100
    low = format_number(from_nm(record.spec_nm - band, record.unit), 2)
    high = format_number(from_nm(record.spec_nm + band, record.unit), 2)
    spec = f"spec {format_torque(spec_in, record.unit, 2)}, accepted {low}–{high}"
    if record.result == TorqueRecord.Result.LOW:
        by = format_torque(spec_in - value_in_unit, record.unit, 2)
        words = f"Low by {by}: {record.value_display} ({spec}). It stays open until read again."
    elif record.result == TorqueRecord.Result.HIGH:
        by = format_torque(value_in_unit - spec_in, record.unit, 2)
        words = f"High by {by}: {record.value_display} ({spec}). It stays open until read again."
    else:
        words = f"Within tolerance: {record.value_display} ({spec})."
    if record.found_loose:
        words += " Found loose."
    return words
