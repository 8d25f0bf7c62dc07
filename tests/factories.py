"""Small factory helpers for tests: invented records, only what each test needs."""

from __future__ import annotations

import itertools

from django.contrib.auth import get_user_model
from django.contrib.auth.models import Group

from shop.models import Job, Owner, Vehicle
from shop.roles import sync_role_groups
from shop.services import job_create

_seq = itertools.count(1)


def make_user(role: str | None = None, **fields):
    n = next(_seq)
    fields.setdefault("username", f"{(role or 'user').lower()}{n}")
    user = get_user_model().objects.create_user(password="pw-for-tests-only", **fields)
    if role:
        if not Group.objects.filter(name=role).exists():
            sync_role_groups()  # a transactional test flushed the migration's groups
        user.groups.add(Group.objects.get(name=role))
    return user


def make_owner(**fields) -> Owner:
    n = next(_seq)
    fields.setdefault("name", f"Test Owner {n}")
    fields.setdefault("email", f"owner{n}@test.example")
    return Owner.objects.create(**fields)


def make_vehicle(owner: Owner | None = None, **fields) -> Vehicle:
    fields.setdefault("kind", Vehicle.Kind.VAN)
    fields.setdefault("make", "Testmake")
    fields.setdefault("model", f"Model {next(_seq)}")
    return Vehicle.objects.create(owner=owner or make_owner(), **fields)


def make_job(vehicle: Vehicle | None = None, **fields) -> Job:
    fields.setdefault("title", f"Test build {next(_seq)}")
    return job_create(vehicle=vehicle or make_vehicle(), **fields)
