"""Office pages: torque wrenches and the shop's own checklist items.

Everyone who reads the inspections records reads both lists (a technician checks a
wrench's due date before picking it up); the office adds and changes wrenches and keeps
the shop's checklist. Writes go through inspections.services (wrench_save,
shop_checklist_item_save)."""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path, reverse
from django.utils import timezone
from django.views.decorators.http import require_GET, require_http_methods

from inspections import services
from inspections.forms_checks import ShopChecklistItemForm, WrenchForm, merge_errors
from inspections.models import ShopChecklistItem, Stage, TorqueRecord, TorqueWrench
from inspections.services.wrenches import wrench_save
from shop.views.access import require_perm

WRENCH_VIEW = "inspections.view_torquewrench"
WRENCH_ADD = "inspections.add_torquewrench"
WRENCH_CHANGE = "inspections.change_torquewrench"
ITEMS_VIEW = "inspections.view_shopchecklistitem"
ITEMS_MANAGE = "inspections.manage_checklist"
# A wrench due within this many days is flagged on the list (common practice: time to
# book the calibration before the wrench is refused).
DUE_SOON_DAYS = 30


def _plural_days(days: int) -> str:
    return f"{days} day{'' if days == 1 else 's'}"


@dataclass(frozen=True)
class WrenchRow:
    wrench: TorqueWrench
    days: int  # days until due (negative: overdue)

    @property
    def level(self) -> str:
        if not self.wrench.in_service:
            return "retired"
        if self.days < 0:
            return "overdue"
        return "soon" if self.days <= DUE_SOON_DAYS else "ok"

    @property
    def words(self) -> str:
        """ "calibration overdue by 12 days", "due in 9 days", "due today"."""
        if self.days < 0:
            return f"calibration overdue by {_plural_days(-self.days)}"
        if self.days == 0:
            return "due today (usable through today)"
        if self.days <= DUE_SOON_DAYS:
            return f"due in {_plural_days(self.days)}"
        return "calibrated"


def wrench_rows(on: datetime.date | None = None) -> list[WrenchRow]:
    on = on or timezone.localdate()
    return [
        WrenchRow(wrench, (wrench.calibration_due - on).days)
        for wrench in TorqueWrench.objects.order_by("-in_service", "code")
    ]


@login_required
@require_GET
def wrench_list(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, WRENCH_VIEW)
    rows = wrench_rows()
    context = {
        "rows": rows,
        "overdue": sum(1 for r in rows if r.level == "overdue"),
        "soon": sum(1 for r in rows if r.level == "soon"),
        "due_soon_days": DUE_SOON_DAYS,
    }
    return render(request, "inspections/wrench_list.html", context)


def _errors(exc: ValidationError) -> dict[str, list[str]]:
    return exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}


def _wrench_form(request: HttpRequest, wrench: TorqueWrench | None) -> HttpResponse:
    if request.method == "POST":
        form = WrenchForm(request.POST)
    elif wrench is not None:
        form = WrenchForm(
            initial={
                "code": wrench.code,
                "description": wrench.description,
                "range_min": f"{wrench.range_min.normalize():f}",
                "range_max": f"{wrench.range_max.normalize():f}",
                "unit": wrench.unit,
                "calibration_due": wrench.calibration_due,
                "in_service": wrench.in_service,
                "notes": wrench.notes,
            }
        )
    else:
        form = WrenchForm(initial={"in_service": True})
    if request.method == "POST" and form.is_valid():
        data = form.cleaned_data
        try:
            saved = wrench_save(wrench=wrench, by=request.user, **data)
        except ValidationError as exc:
            merge_errors(form, _errors(exc))
        else:
            messages.success(request, f"Wrench {saved.code} saved.")
            return redirect("wrench_list")
    used = wrench is not None and TorqueRecord.objects.filter(wrench=wrench).exists()
    context = {"form": form, "wrench": wrench, "used": used}
    return render(request, "inspections/wrench_form.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def wrench_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, WRENCH_ADD)
    return _wrench_form(request, None)


@login_required
@require_http_methods(["GET", "POST"])
def wrench_edit(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, WRENCH_CHANGE)
    return _wrench_form(request, get_object_or_404(TorqueWrench, pk=pk))


# --- the shop's own checklist -------------------------------------------------------------


@login_required
@require_GET
def shop_checklist(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, ITEMS_VIEW)
    items = list(ShopChecklistItem.objects.order_by("stage_kind", "order", "pk"))
    stages = [
        (kind, label, [item for item in items if item.stage_kind == kind])
        for kind, label in Stage.Kind.choices
    ]
    return render(request, "inspections/shop_checklist.html", {"stages": stages})


def _item_form(request: HttpRequest, item: ShopChecklistItem | None) -> HttpResponse:
    if request.method == "POST":
        form = ShopChecklistItemForm(request.POST)
    elif item is not None:
        form = ShopChecklistItemForm(
            initial={
                "stage_kind": item.stage_kind,
                "text": item.text,
                "order": item.order,
                "active": item.active,
            }
        )
    else:
        wanted = request.GET.get("stage", "")
        stage = int(wanted) if wanted in {str(k) for k in Stage.Kind.values} else None
        form = ShopChecklistItemForm(initial={"stage_kind": stage, "active": True})
    if request.method == "POST" and form.is_valid():
        data = form.cleaned_data
        try:
            saved = services.shop_checklist_item_save(
                by=request.user,
                item=item,
                stage_kind=data["stage_kind"],
                text=data["text"],
                order=data["order"],
                # A new item is in use; unticking it is how an existing one is retired.
                active=data["active"] if item is not None else True,
            )
        except ValidationError as exc:
            merge_errors(form, _errors(exc))
        else:
            state = "" if saved.active else " (retired)"
            messages.success(request, f"Checklist item saved{state}: {saved.text}")
            return redirect(f"{reverse('shop_checklist')}#stage-{saved.stage_kind}")
    if item is None:
        del form.fields["active"]
    marks = item.marks.count() if item is not None else 0
    return render(
        request,
        "inspections/shop_checklist_form.html",
        {"form": form, "item": item, "marks": marks},
    )


@login_required
@require_http_methods(["GET", "POST"])
def shop_checklist_item_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, ITEMS_MANAGE)
    return _item_form(request, None)


@login_required
@require_http_methods(["GET", "POST"])
def shop_checklist_item_edit(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, ITEMS_MANAGE)
    return _item_form(request, get_object_or_404(ShopChecklistItem, pk=pk))


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
