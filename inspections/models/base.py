"""Append-only evidence: rows that, once written, are never changed or removed.

Torque records, thermal readings and audit events are what the shop shows an owner, an
insurer or a court. A mistake is put right by a new row (a correction that supersedes the
old one), never by editing. Three layers refuse a change, so no single slip loses history:

1. the model: ``save()`` on a stored row and ``delete()`` raise ``AppendOnlyError``;
2. the queryset: ``update()``, ``delete()`` (and so ``bulk_update``) raise it too;
3. the database: triggers installed by migration 0002_append_only_guards refuse UPDATE and
   DELETE from any path, raw SQL included.
"""

from __future__ import annotations

from django.db import models


class AppendOnlyError(Exception):
    """A change or removal of an append-only row was attempted (a programming error: the
    services never try; a correction is a new row)."""


def _refuse(model: type[models.Model], action: str) -> AppendOnlyError:
    plural = model._meta.verbose_name_plural
    return AppendOnlyError(
        f"{plural.capitalize()} are append-only: {action} is refused. "
        "Record a correction instead, which supersedes the row and keeps it."
    )


class AppendOnlyQuerySet(models.QuerySet):
    def update(self, **kwargs):
        raise _refuse(self.model, "update")

    def delete(self):
        raise _refuse(self.model, "delete")

    # The private paths behind save() and the deletion collector's fast delete. Nothing
    # should reach them (save() refuses first; parents PROTECT their evidence), but neither
    # may slip past the refusals above.
    def _update(self, values):
        raise _refuse(self.model, "update")

    def _raw_delete(self, using):
        raise _refuse(self.model, "delete")


class AppendOnlyModel(models.Model):
    objects = AppendOnlyQuerySet.as_manager()

    class Meta:
        abstract = True

    def save(self, *args, **kwargs) -> None:
        if not self._state.adding:
            raise _refuse(type(self), "changing a stored row")
        # An explicit insert: with a primary key already set, Django would try an UPDATE
        # first, which the database guard refuses with a less helpful error.
        kwargs["force_insert"] = True
        kwargs.pop("force_update", None)
        kwargs.pop("update_fields", None)
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        raise _refuse(type(self), "delete")
