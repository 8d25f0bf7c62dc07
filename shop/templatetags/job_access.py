"""`{% job_access job as access %}`: whether the signed-in user may write this job
(assigned, or a lead or office) and whether it is locked by approval, so pages hide the
buttons of writes that would be refused (shop.views.access.JobAccess)."""

from __future__ import annotations

from django import template

from shop.views.access import JobAccess
from shop.views.access import job_access as access_for

register = template.Library()


@register.simple_tag(takes_context=True)
def job_access(context, job) -> JobAccess:
    request = context.get("request")
    user = getattr(request, "user", None) or context.get("user")
    return access_for(user, job, request)
