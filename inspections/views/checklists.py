"""A stage's checklist and marking its items."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def stage_checklist(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def checklist_mark(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("jobs/<str:number>/stages/<int:kind>/checklist/", stage_checklist, name="stage_checklist"),
    path(
        "jobs/<str:number>/stages/<int:kind>/checklist/mark/", checklist_mark, name="checklist_mark"
    ),
]
