"""What the whole-system rules and the system report share: a finding placed in the job's
system (`SystemFinding`), one circuit's sizing (`CircuitSizing`) and how a circuit is sized
(`size_one`). The rules (circuits.rules) build on these; the report (circuits.system) runs
the rules; nothing here imports either, so the imports run one way: sizing <- findings <-
rules <- system.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

from circuits.models import Circuit, Waiver
from circuits.sizing import (
    SEVERITY_ORDER,
    CircuitInput,
    Finding,
    Report,
    SizeNotationError,
    SizingError,
    parse_size,
    size_circuit,
)
from circuits.waiver_facts import NEW as NEW_CIRCUIT
from circuits.waiver_facts import describe_changes, fact_names, finding_facts
from circuits.waiver_facts import facts_hash as hash_of_facts

SYSTEM_SUBJECT = "system"


@dataclass
class SystemFinding:
    """A finding placed in the system: what it is about (`subject`: a circuit tag, a device
    name or "system"), the circuits it names, the facts it rests on now, and the waiver in
    force for it, if any (which covers it only if granted on those same facts)."""

    code: str
    severity: str
    message: str
    source: str
    subject: str
    circuits: tuple[str, ...] = ()
    waiver: Waiver | None = None
    facts: dict | None = None
    facts_hash: str = ""
    # For the change text: "circuit:<id>"/"device:<id>" -> tag or name.
    fact_names: Mapping[str, str] = field(default_factory=dict, repr=False, compare=False)

    def record_facts(self, facts: dict, names: Mapping[str, str]) -> None:
        self.facts = facts
        self.facts_hash = hash_of_facts(facts)
        self.fact_names = names

    @property
    def waived(self) -> bool:
        """Covered by a waiver in force that was granted on the facts as they are now."""
        return (
            self.waiver is not None
            and self.facts is not None
            and self.waiver.covers(self.facts_hash)
        )

    @property
    def lapsed_waiver(self) -> Waiver | None:
        """The waiver in force for this finding when it no longer covers it: granted on
        other facts, or before waivers recorded theirs. None for a finding about a circuit
        not saved (a preview built from a half-filled form has no id to compare by): it is
        simply open."""
        if (self.facts or {}).get("subject") == NEW_CIRCUIT:
            return None
        if self.waiver is not None and self.waiver.is_active and not self.waived:
            return self.waiver
        return None

    @property
    def lapse_changes(self) -> list[str]:
        """What changed since the lapsed waiver was granted, each in plain words."""
        lapsed = self.lapsed_waiver
        if lapsed is None or not lapsed.has_facts:
            return []
        changes = describe_changes(lapsed.facts, self.facts or {}, names=self.fact_names)
        return changes or ["the facts it was granted on have changed"]

    @property
    def lapse_note(self) -> str:
        """'waived for an earlier version of this circuit: length 0.3 m → 0.9 m; ...'."""
        lapsed = self.lapsed_waiver
        if lapsed is None:
            return ""
        if not lapsed.has_facts:
            return (
                "waived before waivers recorded the facts they were granted on; renew it "
                "to confirm it still applies"
            )
        if (self.facts or {}).get("subject") is not None:
            what = "this circuit"
        else:
            what = "the circuits it names" if self.circuits else "the system"
        return f"waived for an earlier version of {what}: {'; '.join(self.lapse_changes)}"

    @property
    def open_blocking(self) -> bool:
        return self.severity == "blocking" and not self.waived

    @property
    def rank(self) -> tuple[int, int]:
        # Waived findings sort after open ones of the same severity.
        return (SEVERITY_ORDER[self.severity], 1 if self.waived else 0)

    @classmethod
    def from_finding(cls, finding: Finding, *, subject: str, circuits: Iterable[str] = ()):
        return cls(
            code=finding.code,
            severity=finding.severity,
            message=finding.message,
            source=finding.source,
            subject=subject,
            circuits=tuple(circuits),
        )


@dataclass
class CircuitSizing:
    """One circuit and what the sizing engine says of it (or why it could not size it)."""

    circuit: Circuit
    report: Report | None
    error: str | None = None
    findings: list[SystemFinding] = field(default_factory=list)

    @property
    def worst(self) -> SystemFinding | None:
        return min(self.findings, key=lambda f: f.rank, default=None)


def circuit_input(circuit: Circuit) -> CircuitInput:
    """The sizing engine's input for a circuit. Raises SizingError/SizeNotationError."""
    size_text = circuit.conductor_size
    size = parse_size(size_text) if size_text else None
    return CircuitInput(
        system_voltage_v=float(circuit.nominal_voltage),
        current_a=float(circuit.design_current_a),
        length_m=float(circuit.length_m),
        size=size,
        size_text=size_text or None,
        insulation_c=int(circuit.insulation_c),
        engine_space=circuit.engine_space,
        bundled=int(circuit.bundled),
        parallel=int(circuit.parallel),
        critical=circuit.critical,
        continuous=circuit.continuous,
        # The protection's one home: a protection device's rating, or the circuit's own.
        protection_a=float(rating) if (rating := circuit.protection.rating_a) is not None else None,
        tinned=circuit.tinned,
        ac=circuit.is_ac,
    )


def size_one(circuit: Circuit) -> CircuitSizing:
    try:
        report = size_circuit(circuit_input(circuit))
    except (SizingError, SizeNotationError) as exc:
        return CircuitSizing(circuit=circuit, report=None, error=str(exc))
    sizing = CircuitSizing(circuit=circuit, report=report)
    sizing.findings = [
        SystemFinding.from_finding(f, subject=circuit.tag, circuits=[circuit.tag])
        for f in report.findings
    ]
    # The engine's findings rest on this circuit alone, so their facts are complete here
    # (the editor's sizing-only preview matches waivers to them without a whole report).
    by_tag, names = {circuit.tag: circuit}, fact_names([circuit], [])
    for f in sizing.findings:
        f.record_facts(finding_facts(f, by_tag, []), names)
    return sizing
