"""Permission-matrix rows of insights/views/rules.py (see tests/test_permission_matrix.py).

Leads and office read the rules; leads alone make and retire them. An empty POST makes
nothing (the form answers with its errors) and retires nothing (the confirmation asks
again)."""

from __future__ import annotations

ROWS: dict[str, tuple[str, str]] = {
    "shop_rules": ("login 403 403 200 200 200", "login 403 403 200 403 200"),
    "shop_rule_retire": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    if name != "shop_rule_retire":
        return {}
    from insights.services import shop_rule_create

    rule = shop_rule_create(
        stage_kind=3,
        device_kind="charge_controller",
        text="Second retorque of the set-screws",
        by=world.users["lead"],
    )
    return {"pk": rule.pk}
