"""The form that withdraws a waiver: the confirmation and an optional reason.

(The waive/renew form is circuits.forms.WaiverForm.)
"""

from __future__ import annotations

from django import forms

MAX_WITHDRAWAL_REASON = 1000


class WaiverWithdrawForm(forms.Form):
    # Posted by the confirmation's own button only: an empty POST withdraws nothing and
    # the question is asked (again).
    confirm = forms.BooleanField(required=False, widget=forms.HiddenInput)
    reason = forms.CharField(
        label="Why (optional)",
        required=False,
        max_length=MAX_WITHDRAWAL_REASON,
        widget=forms.Textarea(attrs={"rows": 2}),
        error_messages={
            "max_length": f"Keep the reason to {MAX_WITHDRAWAL_REASON} characters or fewer."
        },
    )

    @property
    def confirmed(self) -> bool:
        return self.is_valid() and bool(self.cleaned_data["confirm"])
