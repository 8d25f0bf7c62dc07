from __future__ import annotations

from django.contrib import admin

from shop.models import Job, JobSequence, Owner, ShopProfile, Vehicle

admin.site.site_header = "Ampwright administration"


@admin.register(ShopProfile)
class ShopProfileAdmin(admin.ModelAdmin):
    list_display = ["name", "job_prefix", "soak_minutes", "default_torque_tolerance_pct"]


@admin.register(Owner)
class OwnerAdmin(admin.ModelAdmin):
    list_display = ["name", "email", "phone"]
    search_fields = ["name", "email", "phone"]


@admin.register(Vehicle)
class VehicleAdmin(admin.ModelAdmin):
    list_display = ["__str__", "kind", "owner", "identification", "dc_voltage", "ac_system"]
    list_filter = ["kind", "dc_voltage", "ac_system"]
    search_fields = ["make", "model", "identification", "owner__name"]
    autocomplete_fields = ["owner"]


@admin.register(Job)
class JobAdmin(admin.ModelAdmin):
    list_display = ["number", "title", "vehicle", "lead", "status", "booked_in_on"]
    list_filter = ["status"]
    search_fields = ["number", "title", "vehicle__owner__name", "vehicle__identification"]
    readonly_fields = ["number", "created_at", "updated_at"]
    filter_horizontal = ["technicians"]

    def has_add_permission(self, request) -> bool:
        # Jobs get their number from the job_create service; the app's own page creates them.
        return False


@admin.register(JobSequence)
class JobSequenceAdmin(admin.ModelAdmin):
    list_display = ["prefix", "year", "last"]
    readonly_fields = ["prefix", "year", "last"]

    def has_add_permission(self, request) -> bool:
        return False

    def has_delete_permission(self, request, obj=None) -> bool:
        return False
