"""The lead's review: the queue, one job's review page, thermal waivers and the timeline."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def review_queue(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def job_review(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def thermal_waive(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def job_timeline(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("review/", review_queue, name="review_queue"),
    path("jobs/<str:number>/review/", job_review, name="job_review"),
    path("jobs/<str:number>/thermal/<int:pk>/waive/", thermal_waive, name="thermal_waive"),
    path("jobs/<str:number>/timeline/", job_timeline, name="job_timeline"),
]
