"""Permission-matrix rows of inspections/views/office.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

from inspections.models import ShopChecklistItem, Stage

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Everyone reads the wrenches and the shop's checklist; the office (and a superuser) keeps
# them. An empty POST saves nothing: the form answers with its errors (200).
ROWS: dict[str, tuple[str, str]] = {
    "wrench_list": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "wrench_new": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
    "wrench_edit": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
    "shop_checklist": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "shop_checklist_item_new": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
    "shop_checklist_item_edit": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    if name == "wrench_edit":
        return {"pk": world.reading.wrench.pk}
    if name == "shop_checklist_item_edit":
        # The world has no item of the shop's list; one is added inside this test's
        # transaction (rolled back after it).
        item, _ = ShopChecklistItem.objects.get_or_create(
            stage_kind=Stage.Kind.FIRST_INSTALL, text="Battery box vent clear", order=10
        )
        return {"pk": item.pk}
    return {}
