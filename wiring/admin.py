"""The signed records in the admin, read-only for everyone, superusers included: record
revisions and link visits are append-only (the models and the database refuse changes),
and owner links change only through their pages (wiring/views/owner.py), which show the
token once and log who revoked what. Office staff may look: revisions as anyone who reads
jobs, links and their visits as those who manage them (wiring.services.OWNER_LINKS_PERM).
A link's token hash is not shown: it is of no use to a reader."""

from __future__ import annotations

from django.contrib import admin

from wiring.models import OwnerLink, OwnerLinkVisit, RecordRevision
from wiring.services import OWNER_LINKS_PERM


class ReadOnlyAdmin(admin.ModelAdmin):
    view_perm = "shop.view_job"

    def has_module_permission(self, request) -> bool:
        return request.user.is_active and request.user.has_perm(self.view_perm)

    def has_view_permission(self, request, obj=None) -> bool:
        return request.user.is_active and request.user.has_perm(self.view_perm)

    def has_add_permission(self, request, obj=None) -> bool:
        return False

    def has_change_permission(self, request, obj=None) -> bool:
        return False

    def has_delete_permission(self, request, obj=None) -> bool:
        return False


@admin.register(RecordRevision)
class RecordRevisionAdmin(ReadOnlyAdmin):
    list_display = ["job", "number", "signed_at", "sha256", "demo_key"]
    list_filter = ["demo_key"]
    search_fields = ["job__number", "sha256"]


@admin.register(OwnerLink)
class OwnerLinkAdmin(ReadOnlyAdmin):
    view_perm = OWNER_LINKS_PERM
    list_display = ["job", "created_at", "expires_on", "revoked_at", "last_sent_at"]
    search_fields = ["job__number", "note"]
    exclude = ["token_sha256"]


@admin.register(OwnerLinkVisit)
class OwnerLinkVisitAdmin(ReadOnlyAdmin):
    view_perm = OWNER_LINKS_PERM
    list_display = ["link", "at", "outcome", "revision", "address"]
    list_filter = ["outcome"]
    search_fields = ["link__job__number", "address"]
