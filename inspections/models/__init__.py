"""The inspections records, one module per feature: stages, torque wrenches and records,
heat-cycle runs, thermal readings and their waivers, checklists, sign-offs, the audit
trail."""

from __future__ import annotations

from inspections.models.audit import AuditEvent
from inspections.models.base import AppendOnlyError, AppendOnlyModel, AppendOnlyQuerySet
from inspections.models.calibration import WrenchCalibration
from inspections.models.checklists import ChecklistMark, ShopChecklistItem
from inspections.models.heat import HeatCycleRun, ThermalReading, ThermalWaiver
from inspections.models.prior import PriorReading, PriorRecord
from inspections.models.signoffs import SignOff, canonical_json, content_hash
from inspections.models.stages import Stage
from inspections.models.torque import TorqueRecord, TorqueRecordQuerySet, TorqueWrench

__all__ = [
    "AppendOnlyError",
    "AppendOnlyModel",
    "AppendOnlyQuerySet",
    "AuditEvent",
    "ChecklistMark",
    "HeatCycleRun",
    "ShopChecklistItem",
    "PriorReading",
    "PriorRecord",
    "SignOff",
    "Stage",
    "ThermalReading",
    "ThermalWaiver",
    "TorqueRecord",
    "TorqueRecordQuerySet",
    "TorqueWrench",
    "WrenchCalibration",
    "canonical_json",
    "content_hash",
]
