"""The circuit schedule as CSV: download it, or upload one to create and update circuits.

Importing needs circuits.add_circuit and the job assignment; updating circuits that
already exist by import is a lead's (shop.import_circuit_updates): for anyone else an
existing tag is refused on its row and the file is not imported."""

from __future__ import annotations

import re

from django import forms
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import render
from django.urls import path
from django.views.decorators.http import require_GET, require_http_methods

from circuits.csv_io import (
    COLUMN_HELP,
    REQUIRED,
    CsvFileError,
    ImportResult,
    circuits_from_csv,
    circuits_to_csv,
    read_upload,
)
from circuits.services import check_unlocked
from circuits.views.access import _get_job_for_user
from shop.security import security_log

UPDATE_BY_IMPORT_PERM = "shop.import_circuit_updates"

MAX_UPLOAD_BYTES = 2 * 1024 * 1024


class CsvUploadForm(forms.Form):
    file = forms.FileField(
        label="CSV file",
        help_text="UTF-8 CSV with a header row; the columns are listed below.",
        widget=forms.ClearableFileInput(attrs={"accept": ".csv,text/csv"}),
    )

    def clean_file(self) -> str:
        upload = self.cleaned_data["file"]
        if upload.size > MAX_UPLOAD_BYTES:
            raise forms.ValidationError("The file is larger than 2 MB; split it and try again.")
        try:
            return read_upload(upload.read())
        except CsvFileError as exc:
            raise forms.ValidationError(str(exc)) from exc


def _filename(job, suffix: str) -> str:
    return re.sub(r"[^A-Za-z0-9._-]", "_", job.number) + suffix


@login_required
@require_GET
def circuit_csv_export(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.view_circuit")
    # A byte-order mark lets spreadsheet programs read "mm²" and "×" as UTF-8.
    response = HttpResponse("\ufeff" + circuits_to_csv(job), content_type="text/csv; charset=utf-8")
    response["Content-Disposition"] = f'attachment; filename="{_filename(job, "-circuits.csv")}"'
    return response


@login_required
@require_http_methods(["GET", "POST"])
def circuit_csv_import(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_circuit", write=True)
    posted = request.method == "POST"
    form = CsvUploadForm(request.POST, request.FILES) if posted else CsvUploadForm()
    result: ImportResult | None = None
    may_update = request.user.has_perm(UPDATE_BY_IMPORT_PERM)
    if posted and form.is_valid():
        try:
            # Said once above the form, not on every row the file would have written.
            check_unlocked(job)
        except ValidationError as exc:
            form.add_error(None, exc)
    if posted and form.is_valid():
        result = circuits_from_csv(job=job, text=form.cleaned_data["file"], allow_update=may_update)
        security_log(
            "import",
            request=request,
            job=job.number,
            ok=result.ok,
            created=len(result.created),
            updated=len(result.updated),
            errors=len(result.errors),
        )
    context = {
        "job": job,
        "form": form,
        "result": result,
        "columns": COLUMN_HELP,
        "required": REQUIRED,
        "may_update": may_update,
    }
    template = "circuits/csv_import.html"
    if request.htmx and posted:
        template += "#import-region"
    return render(request, template, context)


urlpatterns = [
    path("jobs/<str:number>/circuits.csv", circuit_csv_export, name="circuit_csv_export"),
    path("jobs/<str:number>/circuits/import/", circuit_csv_import, name="circuit_csv_import"),
]
