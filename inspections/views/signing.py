"""Signing a stage, sending it back, approval, reopen and the owner's receipt."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def stage_sign(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def stage_send_back(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def job_approve(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def job_reopen(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def handover_receipt(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("jobs/<str:number>/stages/<int:kind>/sign/", stage_sign, name="stage_sign"),
    path("jobs/<str:number>/stages/<int:kind>/send-back/", stage_send_back, name="stage_send_back"),
    path("jobs/<str:number>/approve/", job_approve, name="job_approve"),
    path("jobs/<str:number>/reopen/", job_reopen, name="job_reopen"),
    path("jobs/<str:number>/receipt/", handover_receipt, name="handover_receipt"),
]
