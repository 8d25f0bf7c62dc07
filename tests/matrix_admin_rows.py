"""The permission matrix's rows for the Django admin (tests/test_permission_matrix.py):
what office staff and superusers may do per model, and the admin's own pages. Outcomes
are written as in the matrix (a status code, "admin", "login" or "302"), one per persona:
anon tech stranger lead office super."""

from __future__ import annotations

# The admin: only office staff and superusers get past its sign-in. What office staff may
# do there, per model ("view", "add", "change", "delete"); superusers may do all that the
# model admin allows at all (SUPER_ADMIN). Evidence and the electrical system are
# read-only there (their writes go through the services); staff accounts are managed in
# the app, so the office has nothing to do with users and groups.
OFFICE_ADMIN = {
    "auth.user": "",
    "auth.group": "",
    "axes.accessattempt": "",
    "axes.accessfailurelog": "",
    "axes.accesslog": "",
    "shop.shopprofile": "view change",
    "shop.owner": "view add change delete",
    "shop.vehicle": "view add change delete",
    "shop.job": "view delete",  # only a job with nothing in it can go
    "shop.jobsequence": "",
    "circuits.device": "view",
    "circuits.terminal": "view",
    "circuits.circuit": "view",
    "circuits.termination": "view",
    "circuits.torquedefault": "view",
    "circuits.waiver": "view",
    "inspections.torquewrench": "view add change",
    "inspections.stage": "view",
    "inspections.torquerecord": "view",
    "inspections.heatcyclerun": "view",
    "inspections.thermalreading": "view",
    "inspections.auditevent": "view",
    "inspections.checklistmark": "view",
    "inspections.shopchecklistitem": "view add change",
    "inspections.signoff": "view",
    "inspections.thermalwaiver": "view",
    "inspections.wrenchcalibration": "",
    "inspections.priorrecord": "",
    "inspections.priorreading": "",
    "wiring.recordrevision": "view",
    "wiring.ownerlink": "view",
    "wiring.ownerlinkvisit": "view",
}
SUPER_ADMIN = {
    **dict.fromkeys(OFFICE_ADMIN, "view add change delete"),
    "shop.job": "view change delete",  # jobs are created by the app (their number)
    "shop.jobsequence": "view change",  # the counter only moves forward
    "axes.accessattempt": "view change delete",
    "axes.accessfailurelog": "view change delete",
    "axes.accesslog": "view change delete",
    "inspections.stage": "view",
    "inspections.torquerecord": "view",
    "inspections.heatcyclerun": "view",
    "inspections.thermalreading": "view",
    "inspections.auditevent": "view",
    "inspections.checklistmark": "view",
    "inspections.signoff": "view",
    "inspections.thermalwaiver": "view",
    "inspections.wrenchcalibration": "view",
    "inspections.priorrecord": "view",
    "inspections.priorreading": "view",
    "wiring.recordrevision": "view",
    "wiring.ownerlink": "view",
    "wiring.ownerlinkvisit": "view",
}
# Models whose admin shows every field read-only, so an empty POST saves nothing.
EVERY_FIELD_READ_ONLY = {"shop.jobsequence"}
# Admin pages that are not about one model.
ADMIN_SITE = {
    "admin:index": ("admin admin admin admin 200 200", "admin admin admin admin 200 200"),
    "admin:login": ("200 200 200 200 302 302", "200 200 200 200 200 200"),
    "admin:logout": ("302 302 302 302 405 405", "302 302 302 302 login login"),
    "admin:password_change": (
        "admin admin admin admin 200 200",
        "admin admin admin admin 200 200",
    ),
    "admin:password_change_done": (
        "admin admin admin admin 200 200",
        "admin admin admin admin 405 405",
    ),
    "admin:autocomplete": ("admin admin admin admin 403 403", "admin admin admin admin 405 405"),
    "admin:jsi18n": ("admin admin admin admin 200 200", "admin admin admin admin 405 405"),
    "admin:view_on_site": ("admin admin admin admin 302 302", "admin admin admin admin 302 302"),
    "admin:<catch-all>": ("admin admin admin admin 404 404", "admin admin admin admin 404 404"),
    "admin:<record-address>": (
        "admin admin admin admin 302 302",
        "admin admin admin admin 302 302",
    ),
}
ADMIN_APPS = {
    "auth": "admin admin admin admin 404 200",
    "axes": "admin admin admin admin 404 200",
    "shop": "admin admin admin admin 200 200",
    "circuits": "admin admin admin admin 200 200",
    "inspections": "admin admin admin admin 200 200",
    "wiring": "admin admin admin admin 200 200",
}
