"""The shape of the text the signing pages take (the services decide everything else):
Django's CharField refuses NUL characters, which PostgreSQL cannot store, with a message
beside the field before any service is called. Trimming, lengths and the rules are the
services' (inspections.services.signing, .approval, .heat)."""

from __future__ import annotations

from django import forms


class ReceiptForm(forms.Form):
    printed_name = forms.CharField(required=False, strip=False)


class NoteForm(forms.Form):
    note = forms.CharField(required=False, strip=False)


class ReasonForm(forms.Form):
    reason = forms.CharField(required=False, strip=False)


def shape_errors(form: forms.Form) -> dict[str, list[str]]:
    """The form's errors as the pages show service errors: field -> messages."""
    return {field: list(messages) for field, messages in form.errors.items()}
