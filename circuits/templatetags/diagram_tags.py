"""Template tags for the electrical-system drawings."""

from __future__ import annotations

from django import template
from django.utils.safestring import mark_safe

from circuits.diagram import job_diagram_svg
from circuits.system import SystemReport

register = template.Library()


@register.simple_tag
def job_diagram(system: SystemReport, title: str = "") -> str:
    """The job's one-line diagram as inline SVG; circuits and devices link to their pages.

    Safe to mark: circuits.diagram escapes every piece of record data it writes.
    """
    svg = job_diagram_svg(system, link=lambda obj: obj.get_absolute_url(), title=title or None)
    return mark_safe(svg)
