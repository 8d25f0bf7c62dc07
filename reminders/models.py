"""The log of re-check reminders sent: one row per job and due date, append-only.

The unique constraint on (job, due_on) is what makes `send_reminders` idempotent: the
row is inserted in the same transaction as the e-mail is handed to the mail server, so a
second run (or two runs at once) cannot insert it again and sends nothing; a new due date
(the job reopened and approved again, or the shop changed its re-check interval) is a new
row and a new e-mail. Rows are never changed or removed (inspections.models.base, and
the triggers of migration 0001): they are the shop's proof that the owner was told."""

from __future__ import annotations

from django.db import models
from django.utils import timezone

from inspections.models.base import AppendOnlyModel


class ReminderSent(AppendOnlyModel):
    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="reminders_sent")
    due_on = models.DateField(help_text="The re-check due date the reminder was about.")
    sent_to = models.EmailField(max_length=254)
    sent_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["-sent_at", "-pk"]
        verbose_name = "re-check reminder sent"
        verbose_name_plural = "re-check reminders sent"
        constraints = [
            models.UniqueConstraint(fields=["job", "due_on"], name="reminder_once_per_due_date")
        ]
        permissions = [("view_rechecks", "Can see the vehicles due for their re-check")]

    def __str__(self) -> str:
        return f"{self.job.number} due {self.due_on:%Y-%m-%d}: reminded {self.sent_to}"
