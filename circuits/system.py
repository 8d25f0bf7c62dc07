"""A job's whole electrical system, evaluated: the sizing engine on every circuit plus the
whole-system rules (circuits.rules), with leads' waivers matched to the findings.

Nothing here is stored: call `job_system_report(job)` whenever a page needs findings.

Each finding carries the facts it rests on now (circuits.waiver_facts). A waiver in force
for its (code, subject) covers it only when the waiver was granted on the same facts;
otherwise the waiver has lapsed: the finding is open again (a blocking one blocks) and
says what changed, until a lead renews the waiver (circuits.services.waiver_create).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass

from circuits.findings import (
    SYSTEM_SUBJECT,
    CircuitSizing,
    SystemFinding,
    circuit_input,
    size_one,
)
from circuits.models import Circuit, Device, Waiver
from circuits.rules import RULES
from circuits.tags import natural_by_tag
from circuits.waiver_facts import fact_names, finding_facts

# Re-exported for the pages that take the shared types from the report's module.
__all__ = [
    "SYSTEM_SUBJECT",
    "CircuitSizing",
    "Rule",
    "SystemFinding",
    "SystemReport",
    "circuit_input",
    "job_system_report",
    "size_one",
    "system_report_from",
]


@dataclass
class SystemReport:
    devices: list[Device]
    circuits: list[CircuitSizing]
    system_findings: list[SystemFinding]

    def by_tag(self) -> dict[str, CircuitSizing]:
        return {c.circuit.tag: c for c in self.circuits}

    @property
    def all_findings(self) -> list[SystemFinding]:
        found = [f for c in self.circuits for f in c.findings] + self.system_findings
        return sorted(found, key=lambda f: f.rank)

    @property
    def open_blocking(self) -> list[SystemFinding]:
        return [f for f in self.all_findings if f.open_blocking]

    @property
    def lapsed(self) -> list[SystemFinding]:
        """Findings whose waiver has lapsed (open again until a lead renews it)."""
        return [f for f in self.all_findings if f.lapsed_waiver is not None]


# Whole-system rules: each takes (devices, circuits, vehicle, sizings) and returns
# SystemFindings; `sizings` maps circuit tag -> CircuitSizing so no rule re-sizes a circuit.
Rule = Callable[
    [list[Device], list[Circuit], object, Mapping[str, CircuitSizing]], list[SystemFinding]
]


def _rules() -> list[Rule]:
    return list(RULES)


def system_report_from(
    devices: list[Device],
    circuits: list[Circuit],
    vehicle,
    waivers: Iterable[Waiver] = (),
) -> SystemReport:
    """Evaluate a system given in memory: the sizing engine on each circuit, every rule
    across them, each finding's facts, and the waivers in force matched by (code, subject)
    (a waiver covers its finding only on the same facts: SystemFinding.waived).
    `job_system_report` feeds it from the database; a live preview can feed it an unsaved
    circuit in place of the stored one."""
    sizings = [size_one(c) for c in circuits]
    by_tag = {s.circuit.tag: s for s in sizings}
    system_findings: list[SystemFinding] = []
    for rule in _rules():
        system_findings.extend(rule(devices, circuits, vehicle, by_tag))
    circuits_by_tag = {c.tag: c for c in circuits}
    names = fact_names(circuits, devices)
    for finding in system_findings:
        finding.record_facts(finding_facts(finding, circuits_by_tag, devices, vehicle), names)
    # A rule finding about a single circuit is shown with that circuit too.
    for finding in system_findings:
        if finding.subject in by_tag:
            by_tag[finding.subject].findings.append(finding)
    by_key = {(w.code, w.subject): w for w in waivers if w.is_active}
    for finding in [f for s in sizings for f in s.findings] + system_findings:
        finding.fact_names = names
        finding.waiver = by_key.get((finding.code, finding.subject))
    for s in sizings:
        s.findings.sort(key=lambda f: f.rank)
    system_only = [f for f in system_findings if f.subject not in by_tag]
    system_only.sort(key=lambda f: f.rank)
    return SystemReport(devices=devices, circuits=sizings, system_findings=system_only)


def job_system_report(job, *, draft: Circuit | None = None) -> SystemReport:
    """The job's system as stored; with `draft`, an unsaved circuit takes the place of its
    stored self (or joins, when new), for a live preview."""
    devices = list(job.devices.prefetch_related("terminals"))
    circuits = natural_by_tag(job.circuits.for_schedule())
    if draft is not None:
        circuits = [c for c in circuits if c.pk != draft.pk] + [draft]
    waivers = list(job.waivers.active().select_related("lead", "renews__lead"))
    return system_report_from(devices, circuits, job.vehicle, waivers)
