"""The Django admin: a superuser's tool. Office users reach it (is_staff) to read records
and edit the shop profile; every page whose save would skip the services, and the user
and group pages, are read-only or closed for anyone but a superuser. Staff accounts are
managed in the app (shop/views/staff.py)."""

from __future__ import annotations

from django.contrib import admin
from django.contrib.auth import get_user_model
from django.contrib.auth.admin import GroupAdmin, UserAdmin
from django.contrib.auth.models import Group

from shop.models import Job, JobSequence, Owner, ShopProfile, Vehicle
from shop.security import security_log

admin.site.site_header = "Ampwright administration"


def _is_superuser(request) -> bool:
    user = request.user
    return bool(user.is_active and user.is_superuser)


class SuperuserWritesOnly:
    """Admin mixin (ModelAdmin or inline): anyone with the view permission reads, only a
    superuser adds, changes or deletes. For records whose writes belong to a service
    (terminations follow their circuit, waivers follow a renamed tag, job numbers)."""

    def has_add_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_change_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_delete_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)


class SuperuserOnly:
    """Admin mixin: the page does not exist for anyone but a superuser (users, groups: an
    office user must not grant itself superuser or set another person's password)."""

    def has_module_permission(self, request) -> bool:
        return _is_superuser(request)

    def has_view_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_add_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_change_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_delete_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)


class LoggedDeletes:
    """Admin mixin: deletions go to the security log with who, when and what."""

    def delete_model(self, request, obj) -> None:
        security_log("delete", request=request, record=obj._meta.model_name, name=str(obj))
        super().delete_model(request, obj)

    def delete_queryset(self, request, queryset) -> None:
        for obj in queryset:
            security_log("delete", request=request, record=obj._meta.model_name, name=str(obj))
        super().delete_queryset(request, queryset)


User = get_user_model()
admin.site.unregister(User)
admin.site.unregister(Group)


@admin.register(User)
class StaffUserAdmin(SuperuserOnly, UserAdmin):
    pass


@admin.register(Group)
class RoleGroupAdmin(SuperuserOnly, GroupAdmin):
    pass


# The profile, owners and vehicles save through the same model validation as the app's
# own forms (owner_edit and vehicle_edit call form.save() too), so their admin pages keep
# the ordinary permissions; their deletes are logged, and a vehicle or owner with jobs is
# protected (PROTECT) anyway.
@admin.register(ShopProfile)
class ShopProfileAdmin(admin.ModelAdmin):
    list_display = ["name", "job_prefix", "soak_minutes", "default_torque_tolerance_pct"]


@admin.register(Owner)
class OwnerAdmin(LoggedDeletes, admin.ModelAdmin):
    list_display = ["name", "email", "phone"]
    search_fields = ["name", "email", "phone"]


@admin.register(Vehicle)
class VehicleAdmin(LoggedDeletes, admin.ModelAdmin):
    list_display = ["__str__", "kind", "owner", "identification", "dc_voltage", "ac_system"]
    list_filter = ["kind", "dc_voltage", "ac_system"]
    search_fields = ["make", "model", "identification", "owner__name"]
    autocomplete_fields = ["owner"]


@admin.register(Job)
class JobAdmin(LoggedDeletes, admin.ModelAdmin):
    """Read-only for all but a superuser: a change here would skip shop.services.job_update
    (and let anyone be named lead or technician). The office deletes a job here; the
    admin's confirmation lists what goes with it and refuses while the job has records
    the office may not delete (its devices and circuits)."""

    list_display = ["number", "title", "vehicle", "lead", "status", "booked_in_on"]
    list_filter = ["status"]
    search_fields = ["number", "title", "vehicle__owner__name", "vehicle__identification"]
    readonly_fields = ["number", "created_at", "updated_at"]
    filter_horizontal = ["technicians"]

    def has_add_permission(self, request) -> bool:
        # Jobs get their number from the job_create service; the app's own page creates them.
        return False

    def has_change_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)


@admin.register(JobSequence)
class JobSequenceAdmin(admin.ModelAdmin):
    list_display = ["prefix", "year", "last"]
    readonly_fields = ["prefix", "year", "last"]

    def has_add_permission(self, request) -> bool:
        return False

    def has_change_permission(self, request, obj=None) -> bool:
        return _is_superuser(request)

    def has_delete_permission(self, request, obj=None) -> bool:
        return False
