from __future__ import annotations

from django.http import HttpRequest

from shop.roles import role_names


def shop_context(request: HttpRequest) -> dict:
    user = getattr(request, "user", None)
    return {"user_roles": role_names(user) if user is not None else []}
