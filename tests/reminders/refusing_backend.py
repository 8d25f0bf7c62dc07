"""A mail backend that refuses every message, as an SMTP server does when it rejects the
recipient (Django's own backend interface; nothing of ours is replaced)."""

from __future__ import annotations

import smtplib

from django.core.mail.backends.base import BaseEmailBackend


class RefusingBackend(BaseEmailBackend):
    def send_messages(self, email_messages):
        raise smtplib.SMTPRecipientsRefused(
            {m.to[0]: (550, b"mailbox unavailable") for m in email_messages}
        )
