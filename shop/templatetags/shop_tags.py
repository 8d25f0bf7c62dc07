from __future__ import annotations

from django import template

register = template.Library()


@register.filter
def person(user) -> str:
    """A staff member's full name, else the username, else a dash."""
    if user is None:
        return "—"
    return user.get_full_name() or user.username
