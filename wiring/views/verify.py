"""The public verify page: anyone (no sign-in) uploads a PDF and reads whether it is a
wiring record issued by this shop, for which job and revision, when, and whether it has
changed since (wiring.verify.verify_pdf). CSRF stays on; the upload is refused above
wiring.verify.MAX_BYTES before it is read. Nothing is stored."""

from __future__ import annotations

from django import forms
from django.http import HttpRequest, HttpResponse
from django.shortcuts import render
from django.urls import path
from django.views.decorators.http import require_http_methods

from shop.models import ShopProfile
from wiring.verify import MAX_BYTES, too_large, verify_pdf


class VerifyForm(forms.Form):
    file = forms.FileField(
        label="The record's PDF",
        help_text=f"The PDF file as you received it (at most {MAX_BYTES // (1024 * 1024)} MB).",
        widget=forms.ClearableFileInput(attrs={"accept": ".pdf,application/pdf"}),
        error_messages={
            "required": "Choose the PDF file to check.",
            "empty": "The file is empty: there is nothing to check.",
            "invalid": "Choose the PDF file to check.",
        },
    )


@require_http_methods(["GET", "POST"])
def record_verify(request: HttpRequest) -> HttpResponse:
    verdict = None
    status = 200
    if request.method == "POST":
        form = VerifyForm(request.POST, request.FILES)
        if form.is_valid():
            upload = form.cleaned_data["file"]
            if upload.size > MAX_BYTES:
                verdict = too_large()
            else:
                verdict = verify_pdf(upload.read(MAX_BYTES + 1))
    else:
        form = VerifyForm()
    context = {
        "form": form,
        "verdict": verdict,
        "asked_job": str(request.GET.get("job", ""))[:24],
        "asked_revision": str(request.GET.get("revision", ""))[:6],
        "shop_name": ShopProfile.load().name,
    }
    response = render(request, "wiring/verify.html", context, status=status)
    response["Cache-Control"] = "no-store"
    return response


urlpatterns = [path("verify/", record_verify, name="record_verify")]
