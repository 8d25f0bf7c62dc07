"""The walking order of a job's devices: the page that moves a device up or down (without
a script), the service behind it, who may change it, and the lock."""

from __future__ import annotations

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.urls import reverse

from circuits.models import Device
from inspections.services.walking import device_move, device_order_set, devices_in_walking_order
from shop import roles
from tests.circuits.factories import make_device
from tests.factories import make_job, make_user
from tests.inspections.factories import approved, make_wrench


@pytest.fixture
def job(db, technician):
    job = make_job()
    job.technicians.add(technician)
    return job


@pytest.fixture
def devices(job):
    # Alphabetical until someone orders them.
    return [
        make_device(job, name=name, kind="busbar") for name in ("Aft bus", "Bow bus", "Cab bus")
    ]


def _names(job) -> list[str]:
    return [d.name for d in devices_in_walking_order(job)]


def test_a_job_nobody_has_ordered_walks_its_devices_by_name(job, devices):
    assert _names(job) == ["Aft bus", "Bow bus", "Cab bus"]


def test_the_order_is_set_as_given_and_must_name_every_device_once(job, devices, technician):
    aft, bow, cab = devices
    device_order_set(job=job, order=[cab.pk, aft.pk, bow.pk], by=technician)
    assert _names(job) == ["Cab bus", "Aft bus", "Bow bus"]
    foreign = make_device(make_job(), name="Elsewhere")
    for order in ([cab.pk, aft.pk], [cab.pk, aft.pk, aft.pk], [cab.pk, aft.pk, foreign.pk]):
        with pytest.raises(ValidationError):
            device_order_set(job=job, order=order, by=technician)
    assert _names(job) == ["Cab bus", "Aft bus", "Bow bus"]  # nothing changed


def test_moving_a_device_swaps_it_with_its_neighbour(job, devices, technician):
    aft, bow, cab = devices
    device_move(job=job, device=cab.pk, direction="up", by=technician)
    assert _names(job) == ["Aft bus", "Cab bus", "Bow bus"]
    device_move(job=job, device=aft.pk, direction="up", by=technician)  # already first
    assert _names(job) == ["Aft bus", "Cab bus", "Bow bus"]
    with pytest.raises(ValidationError):
        device_move(job=job, device=aft.pk, direction="sideways", by=technician)


def test_only_those_who_edit_devices_reorder_them(job, devices):
    reader = make_user()  # signed in, no role
    with pytest.raises(PermissionDenied):
        device_move(job=job, device=devices[0].pk, direction="down", by=reader)


def test_the_page_moves_a_device_without_a_script(client, job, devices, technician):
    aft, bow, cab = devices
    client.force_login(technician)
    url = reverse("walking_order", args=[job.number])
    page = client.get(url)
    assert page.status_code == 200
    assert 'name="move" value="down"' in page.content.decode()
    response = client.post(url, {"device": str(aft.pk), "move": "down"})
    assert response.status_code == 302
    assert _names(job) == ["Bow bus", "Aft bus", "Cab bus"]
    assert Device.objects.get(pk=bow.pk).walking_order == 1


def test_the_page_with_htmx_answers_the_list_alone(client, job, devices, lead):
    client.force_login(lead)
    response = client.post(
        reverse("walking_order", args=[job.number]),
        {"device": str(devices[2].pk), "move": "up"},
        HTTP_HX_REQUEST="true",
    )
    assert response.status_code == 200
    html = response.content.decode()
    assert 'id="walking-order"' in html and "<html" not in html
    assert _names(job) == ["Aft bus", "Cab bus", "Bow bus"]


def test_bad_posts_say_why_and_change_nothing(client, job, devices, technician):
    client.force_login(technician)
    url = reverse("walking_order", args=[job.number])
    other = make_device(make_job(), name="Not here")
    for data in ({}, {"device": "abc", "move": "up"}, {"device": str(other.pk), "move": "up"}):
        response = client.post(url, data)
        assert response.status_code == 200
        assert "Choose a device of this job to move." in response.content.decode()
    assert _names(job) == ["Aft bus", "Bow bus", "Cab bus"]


def test_the_page_needs_sign_in_the_role_and_the_assignment(client, job, devices):
    url = reverse("walking_order", args=[job.number])
    assert "/login/" in client.get(url)["Location"]
    client.force_login(make_user())  # no role
    assert client.get(url).status_code == 403
    client.force_login(make_user(roles.TECHNICIAN))  # not on this job
    assert client.get(url).status_code == 403
    assert client.post(url, {"device": str(devices[0].pk), "move": "down"}).status_code == 403
    client.force_login(make_user(roles.OFFICE))  # the office edits any job's devices
    assert client.get(url).status_code == 200
    assert _names(job) == ["Aft bus", "Bow bus", "Cab bus"]


def test_a_locked_job_keeps_its_order(client, job, technician, lead):
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    before = _names(job)
    first = devices_in_walking_order(job)[0]
    client.force_login(technician)
    response = client.post(
        reverse("walking_order", args=[job.number]), {"device": str(first.pk), "move": "down"}
    )
    assert response.status_code == 200
    assert "approved" in response.content.decode().lower()
    assert _names(job) == before
