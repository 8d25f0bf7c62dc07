"""Torque readings on the tablet: the work list, the entry, corrections, the offline queue's endpoint, the label scan and the walking order."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def stage_work(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def torque_entry(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def torque_correct(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def torque_sync(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def label_scan(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def walking_order(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("jobs/<str:number>/work/", stage_work, name="stage_work"),
    path("jobs/<str:number>/terminations/<int:pk>/torque/", torque_entry, name="torque_entry"),
    path("jobs/<str:number>/readings/<int:pk>/correct/", torque_correct, name="torque_correct"),
    path("jobs/<str:number>/readings/sync/", torque_sync, name="torque_sync"),
    path("scan/<int:pk>/<str:end>/", label_scan, name="label_scan"),
    path("jobs/<str:number>/walking-order/", walking_order, name="walking_order"),
]
