"""Admin pages of the electrical system: read-only for everyone but a superuser. A save
here would skip circuits/services.py (no termination sync, no waiver following a renamed
tag, no job assignment check); the app's own pages are where these records change."""

from __future__ import annotations

from django.contrib import admin

from circuits.models import Circuit, Device, Terminal, Termination, TorqueDefault, Waiver
from shop.admin import SuperuserWritesOnly


class TerminalInline(SuperuserWritesOnly, admin.TabularInline):
    model = Terminal
    extra = 0


@admin.register(Device)
class DeviceAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = ["name", "job", "kind", "is_source", "mounting", "enclosure"]
    list_filter = ["kind", "mounting", "is_source"]
    search_fields = ["name", "job__number"]
    inlines = [TerminalInline]


class TerminationInline(SuperuserWritesOnly, admin.TabularInline):
    model = Termination
    extra = 0
    fields = [
        "end",
        "polarity",
        "conductor_index",
        "terminal",
        "kind",
        "stud_size",
        "torque_value",
        "torque_unit",
        "torque_tolerance_pct",
        "torque_source",
    ]


@admin.register(Circuit)
class CircuitAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = [
        "tag",
        "name",
        "job",
        "role",
        "conductor_size",
        "parallel",
        "design_current_a",
        "protection_a",
    ]
    list_filter = ["role", "construction", "insulation_c"]
    search_fields = ["tag", "name", "job__number"]
    inlines = [TerminationInline]


@admin.register(TorqueDefault)
class TorqueDefaultAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = ["stud_size", "kind", "value", "unit", "tolerance_pct", "source"]


@admin.register(Waiver)
class WaiverAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = ["job", "code", "subject", "lead", "created_at"]
    search_fields = ["job__number", "code", "subject"]
    readonly_fields = ["created_at"]


@admin.register(Terminal)
class TerminalAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = ["device", "name", "polarity", "stud_size"]
    search_fields = ["device__name", "device__job__number", "name"]


@admin.register(Termination)
class TerminationAdmin(SuperuserWritesOnly, admin.ModelAdmin):
    list_display = ["__str__", "kind", "stud_size", "torque_value", "torque_unit", "torque_source"]
    list_filter = ["kind", "torque_source"]
    search_fields = ["circuit__tag", "circuit__job__number"]
