"""Who may do what with the inspections records: technicians and leads record readings,
runs and temperatures, mark checklists and sign stages; leads alone review (approve or
send back), reopen and waive hot connections; the office keeps the wrenches and the
shop's checklist and signs nothing; everyone reads everything; nobody changes or deletes
evidence."""

from __future__ import annotations

import pytest

pytestmark = pytest.mark.django_db

RECORD = ["add_torquerecord", "add_heatcyclerun", "add_thermalreading"]
VIEW = [
    "view_stage",
    "view_torquewrench",
    "view_torquerecord",
    "view_heatcyclerun",
    "view_thermalreading",
    "view_auditevent",
    "view_checklistmark",
    "view_shopchecklistitem",
    "view_signoff",
    "view_thermalwaiver",
]
WORK = ["add_checklistmark", "sign_stage"]
REVIEW = ["approve_job", "reopen_job", "waive_thermal"]
NEVER = [
    "change_torquerecord",
    "delete_torquerecord",
    "change_thermalreading",
    "delete_thermalreading",
    "add_auditevent",
    "change_auditevent",
    "delete_auditevent",
    "change_checklistmark",
    "delete_checklistmark",
    "add_signoff",
    "change_signoff",
    "delete_signoff",
    "add_thermalwaiver",
    "change_thermalwaiver",
    "delete_thermalwaiver",
]


def _perms(user, codenames):
    return {codename for codename in codenames if user.has_perm(f"inspections.{codename}")}


def test_technicians_and_leads_record_and_the_office_does_not(technician, lead, office):
    assert _perms(technician, RECORD) == set(RECORD)
    assert _perms(lead, RECORD) == set(RECORD)
    assert _perms(office, RECORD) == set()


def test_the_office_keeps_the_wrenches_and_technicians_do_not(technician, lead, office):
    wrench = ["add_torquewrench", "change_torquewrench"]
    assert _perms(office, wrench) == set(wrench)
    assert _perms(technician, wrench) == set()
    assert _perms(lead, wrench) == set()


def test_everyone_reads_every_inspections_record(technician, lead, office):
    for user in (technician, lead, office):
        assert _perms(user, VIEW) == set(VIEW)


def test_no_role_may_change_or_delete_evidence(technician, lead, office):
    for user in (technician, lead, office):
        assert _perms(user, NEVER) == set()


def test_technicians_and_leads_mark_and_sign_and_the_office_does_not(technician, lead, office):
    assert _perms(technician, WORK) == set(WORK)
    assert _perms(lead, WORK) == set(WORK)
    assert _perms(office, WORK) == set()


def test_only_leads_approve_reopen_and_waive(technician, lead, office):
    assert _perms(lead, REVIEW) == set(REVIEW)
    assert _perms(technician, REVIEW) == set()
    assert _perms(office, REVIEW) == set()


def test_only_the_office_keeps_the_shops_checklist(technician, lead, office):
    assert _perms(office, ["manage_checklist"]) == {"manage_checklist"}
    assert _perms(technician, ["manage_checklist"]) == set()
    assert _perms(lead, ["manage_checklist"]) == set()
