"""Office pages: torque wrenches and the shop's own checklist items."""

from __future__ import annotations

from django.http import Http404, HttpRequest, HttpResponse
from django.urls import path


def wrench_list(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def wrench_new(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def wrench_edit(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def shop_checklist(request: HttpRequest, **kwargs) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def shop_checklist_item_new(
    request: HttpRequest, **kwargs
) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


def shop_checklist_item_edit(
    request: HttpRequest, **kwargs
) -> HttpResponse:  # placeholder, being built
    raise Http404("Not built yet.")


urlpatterns = [
    path("wrenches/", wrench_list, name="wrench_list"),
    path("wrenches/new/", wrench_new, name="wrench_new"),
    path("wrenches/<int:pk>/edit/", wrench_edit, name="wrench_edit"),
    path("checklist-items/", shop_checklist, name="shop_checklist"),
    path("checklist-items/new/", shop_checklist_item_new, name="shop_checklist_item_new"),
    path(
        "checklist-items/<int:pk>/edit/", shop_checklist_item_edit, name="shop_checklist_item_edit"
    ),
]
