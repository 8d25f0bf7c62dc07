"""The heat-cycle run and the thermal readings taken after it."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def heat_cycle_log(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def thermal_readings(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("jobs/<str:number>/heat-cycle/", heat_cycle_log, name="heat_cycle_log"),
    path("jobs/<str:number>/thermal/", thermal_readings, name="thermal_readings"),
]
