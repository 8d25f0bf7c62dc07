"""Writes to the inspections records, each checking its gate and writing in one
transaction with its audit event, and the reads the gates and pages need. One module per
feature; import from here."""

from __future__ import annotations

from inspections.models import canonical_json, content_hash
from inspections.services.approval import handover_receive, job_approve, job_reopen
from inspections.services.checklists import (
    ChecklistItem,
    checklist_item_mark,
    checklist_items_for,
    shop_checklist_item_save,
)
from inspections.services.common import audit
from inspections.services.gates import (
    approval_blockers,
    install_blockers,
    retorque_blockers,
    stage_blockers,
)
from inspections.services.heat import heat_cycle_log, thermal_reading_create, thermal_waive
from inspections.services.queries import (
    ThermalResult,
    TorqueProgress,
    current_readings,
    latest_run,
    recheck_run,
    soak_ends_at,
    soak_remaining,
    thermal_blocking,
    thermal_results,
    thermal_unwaived,
    torque_progress,
)
from inspections.services.signing import send_back_note, stage_send_back, stage_sign
from inspections.services.signoffs import signoff_content, signoff_in_force, signoff_is_current
from inspections.services.stages import stage_for, stages_ensure
from inspections.services.status import (
    check_unlocked,
    job_is_locked,
    job_status_for,
    job_status_sync,
    lock_message,
)
from inspections.services.torque import judge, torque_record_correct, torque_record_create

__all__ = [
    "ChecklistItem",
    "ThermalResult",
    "TorqueProgress",
    "approval_blockers",
    "audit",
    "canonical_json",
    "check_unlocked",
    "checklist_item_mark",
    "checklist_items_for",
    "content_hash",
    "current_readings",
    "handover_receive",
    "heat_cycle_log",
    "install_blockers",
    "job_approve",
    "job_is_locked",
    "job_reopen",
    "job_status_for",
    "job_status_sync",
    "judge",
    "latest_run",
    "lock_message",
    "recheck_run",
    "retorque_blockers",
    "send_back_note",
    "shop_checklist_item_save",
    "signoff_content",
    "signoff_in_force",
    "signoff_is_current",
    "soak_ends_at",
    "soak_remaining",
    "stage_blockers",
    "stage_for",
    "stage_send_back",
    "stage_sign",
    "stages_ensure",
    "thermal_blocking",
    "thermal_reading_create",
    "thermal_results",
    "thermal_unwaived",
    "thermal_waive",
    "torque_progress",
    "torque_record_correct",
    "torque_record_create",
]
