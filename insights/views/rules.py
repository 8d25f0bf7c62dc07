"""Shop rules: the list (leads and office), making one (leads; prefilled from a
loosening row) and retiring one (leads, after a confirmation)."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.views.decorators.http import require_http_methods

from insights.forms import ShopRuleForm
from insights.models import ShopRule
from insights.services import shop_rule_create, shop_rule_retire
from shop.views.access import require_perm

VIEW_PERM = "insights.view_insights"
MANAGE_PERM = "insights.manage_shop_rules"


def _add_errors(form, error: ValidationError) -> None:
    for field, problems in error.message_dict.items():
        form.add_error(field if field in form.fields else None, problems)


def _prefill(request: HttpRequest) -> dict:
    return {name: request.GET[name] for name in ShopRuleForm.base_fields if name in request.GET}


@login_required
@require_http_methods(["GET", "POST"])
def shop_rules(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, VIEW_PERM)
    may_manage = request.user.has_perm(MANAGE_PERM)
    form = None
    if request.method == "POST":
        require_perm(request.user, MANAGE_PERM)
        form = ShopRuleForm(request.POST)
        if form.is_valid():
            try:
                rule = shop_rule_create(by=request.user, **form.cleaned_data)
            except ValidationError as error:
                _add_errors(form, error)
            else:
                messages.success(request, f"Shop rule made: {rule.text}.")
                return redirect("shop_rules")
    elif may_manage:
        prefill = _prefill(request)
        # A prefilled form is shown as given, unchecked until it is sent.
        form = ShopRuleForm(initial=prefill) if prefill else ShopRuleForm()
    rules = ShopRule.objects.select_related("created_by", "retired_by")
    return render(
        request,
        "insights/rules.html",
        {
            "form": form,
            "active": [r for r in rules if r.active],
            "retired": [r for r in rules if not r.active],
            "prefilled": bool(request.method == "GET" and _prefill(request)),
        },
    )


@login_required
@require_http_methods(["GET", "POST"])
def shop_rule_retire_view(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, MANAGE_PERM)
    rule = get_object_or_404(ShopRule, pk=pk)
    error = ""
    if request.method == "POST" and request.POST.get("confirm") == "retire":
        try:
            shop_rule_retire(rule=rule, by=request.user)
        except ValidationError as problem:
            error = " ".join(problem.messages)
        else:
            messages.success(request, f"Shop rule retired: {rule.text}.")
            return redirect("shop_rules")
    return render(request, "insights/rule_retire.html", {"rule": rule, "error": error})


urlpatterns = [
    path("insights/rules/", shop_rules, name="shop_rules"),
    path("insights/rules/<int:pk>/retire/", shop_rule_retire_view, name="shop_rule_retire"),
]
