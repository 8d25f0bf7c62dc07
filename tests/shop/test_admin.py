"""Every model is in the Django admin, and office staff reach the admin."""

from __future__ import annotations

import pytest
from django.apps import apps
from django.contrib import admin
from django.urls import reverse

pytestmark = pytest.mark.django_db


@pytest.mark.parametrize("app_label", ["shop", "circuits", "inspections"])
def test_every_model_is_registered(app_label):
    for model in apps.get_app_config(app_label).get_models():
        assert admin.site.is_registered(model), model.__name__


def test_office_opens_the_admin_and_technician_does_not(office_client, technician_client):
    assert office_client.get(reverse("admin:shop_job_changelist")).status_code == 200
    assert technician_client.get(reverse("admin:index")).status_code == 302
