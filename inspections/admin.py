"""The inspections records in the Django admin. Evidence (torque records, thermal
readings and their waivers, checklist marks, sign-offs, audit events) is read-only for
everyone, superusers included: the models and the database refuse changes anyway, and the
admin should not offer them. Stages and runs are read-only too: they change through the
services, which check the gates and write the audit trail. Torque wrenches are edited
here by the office and superusers, and so is the shop's own checklist (by whoever holds
inspections.manage_checklist) until it has its own pages."""

from __future__ import annotations

from django.contrib import admin

from inspections.models import (
    AuditEvent,
    ChecklistMark,
    HeatCycleRun,
    PriorReading,
    PriorRecord,
    ShopChecklistItem,
    SignOff,
    Stage,
    ThermalReading,
    ThermalWaiver,
    TorqueRecord,
    TorqueWrench,
    WrenchCalibration,
)


class ReadOnlyAdmin(admin.ModelAdmin):
    def has_add_permission(self, request, obj=None) -> bool:
        return False

    def has_change_permission(self, request, obj=None) -> bool:
        return False

    def has_delete_permission(self, request, obj=None) -> bool:
        return False


@admin.register(TorqueWrench)
class TorqueWrenchAdmin(admin.ModelAdmin):
    list_display = ["code", "description", "range_display", "calibration_due", "in_service"]
    list_filter = ["in_service", "unit"]
    search_fields = ["code", "description"]

    def has_delete_permission(self, request, obj=None) -> bool:
        # A wrench with readings is PROTECTed; one without may go (superuser only).
        return request.user.is_superuser


@admin.register(Stage)
class StageAdmin(ReadOnlyAdmin):
    list_display = ["job", "kind", "state", "opened_at", "updated_at"]
    list_filter = ["kind", "state"]
    search_fields = ["job__number"]


@admin.register(TorqueRecord)
class TorqueRecordAdmin(ReadOnlyAdmin):
    list_display = [
        "termination",
        "stage",
        "value_display",
        "result",
        "found_loose",
        "wrench",
        "technician",
        "recorded_at",
        "supersedes",
    ]
    list_filter = ["result", "found_loose", "stage__kind"]
    search_fields = ["termination__circuit__tag", "termination__circuit__job__number"]
    list_select_related = ["termination__circuit", "stage__job", "wrench", "technician"]


@admin.register(HeatCycleRun)
class HeatCycleRunAdmin(ReadOnlyAdmin):
    list_display = ["job", "started_at", "ended_at", "peak_current_a", "ambient_c", "logged_by"]
    search_fields = ["job__number"]


@admin.register(ThermalReading)
class ThermalReadingAdmin(ReadOnlyAdmin):
    list_display = ["termination", "run", "temperature_c", "taken_by", "taken_at"]
    search_fields = ["termination__circuit__tag", "run__job__number"]


@admin.register(AuditEvent)
class AuditEventAdmin(ReadOnlyAdmin):
    list_display = ["at", "job", "kind", "actor", "summary"]
    list_filter = ["kind"]
    search_fields = ["job__number", "summary"]


@admin.register(ThermalWaiver)
class ThermalWaiverAdmin(ReadOnlyAdmin):
    list_display = ["reading", "lead", "waived_at", "reason"]
    search_fields = ["reading__run__job__number", "reason"]


@admin.register(WrenchCalibration)
class WrenchCalibrationAdmin(ReadOnlyAdmin):
    list_display = ["wrench", "calibrated_on", "due_on", "done_by", "as_found_error_pct"]
    search_fields = ["wrench__code", "certificate", "done_by"]


@admin.register(PriorRecord)
class PriorRecordAdmin(ReadOnlyAdmin):
    list_display = ["job", "source", "job_number", "shop_name", "approved_at"]
    search_fields = ["job__number", "job_number", "shop_name"]


@admin.register(PriorReading)
class PriorReadingAdmin(ReadOnlyAdmin):
    list_display = ["record", "label", "pass_name", "value", "unit", "result", "found_loose"]
    search_fields = ["record__job__number", "label"]


@admin.register(ChecklistMark)
class ChecklistMarkAdmin(ReadOnlyAdmin):
    list_display = ["item_text", "stage", "result", "marked_by", "marked_at"]
    list_filter = ["result", "stage__kind"]
    search_fields = ["item_text", "stage__job__number"]
    list_select_related = ["stage__job", "marked_by"]


@admin.register(SignOff)
class SignOffAdmin(ReadOnlyAdmin):
    list_display = ["job", "kind", "printed_name", "role", "meaning", "signed_at"]
    list_filter = ["kind", "role"]
    search_fields = ["job__number", "printed_name"]
    # The drawn signature is binary; the record page shows the hash and the content.
    exclude = ["signature_png"]


@admin.register(ShopChecklistItem)
class ShopChecklistItemAdmin(admin.ModelAdmin):
    list_display = ["text", "stage_kind", "order", "active"]
    list_filter = ["stage_kind", "active"]
    search_fields = ["text"]

    def _manages(self, request) -> bool:
        return request.user.has_perm("inspections.manage_checklist")

    def has_add_permission(self, request) -> bool:
        return self._manages(request)

    def has_change_permission(self, request, obj=None) -> bool:
        return self._manages(request)

    def has_delete_permission(self, request, obj=None) -> bool:
        # Marks PROTECT the items they were given against; retire an item instead.
        return request.user.is_superuser

    def has_view_permission(self, request, obj=None) -> bool:
        return self._manages(request) or super().has_view_permission(request, obj)
