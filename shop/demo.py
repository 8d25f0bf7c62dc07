"""Demo scenario: an invented conversion shop, its staff, owners, vehicles and jobs, and the
jobs' electrical systems (circuits.demo).

Everything here is made up for showing the app. Loading is idempotent: records are found
by stable keys (username, owner email, vehicle identification, job title per vehicle)
and only created when missing. The jobs' statuses follow their stages, which the demo's
inspections work (inspections.demo) moves: no status is set here.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.contrib.auth import get_user_model
from django.contrib.auth.models import Group
from django.db import transaction
from django.utils import timezone

from circuits import demo as circuits_demo
from inspections import demo as inspections_demo
from inspections import demo_history
from shop import roles
from shop.models import Job, Owner, ShopProfile, Vehicle
from shop.services import job_create
from wiring import demo as wiring_demo

SHOP = {
    "name": "Bramblefield Conversions",
    "address": "Unit 4, Old Tannery Yard\nBramblefield",
    "phone": "555-0140",
    "email": "workshop@bramblefield.example",
    "job_prefix": "BFC",
    "soak_minutes": 120,
}

# (username, first, last, role, password). Passwords are printed and listed in the README.
STAFF = [
    ("tessa", "Tessa", "Marlow", roles.TECHNICIAN, "tech-demo-pass"),
    ("ravi", "Ravi", "Lindqvist", roles.TECHNICIAN, "tech-demo-pass"),
    ("june", "June", "Okonkwo", roles.LEAD, "lead-demo-pass"),
    ("oscar", "Oscar", "Feld", roles.OFFICE, "office-demo-pass"),
]

OWNERS = [
    {
        "name": "Hallie Brennagh",
        "email": "hallie@owners.example",
        "phone": "555-0181",
        "address": "12 Quarry Lane\nEastwick Hollow",
    },
    {
        "name": "Tomasz Verhoeven",
        "email": "tomasz@owners.example",
        "phone": "555-0192",
        "address": "3 Harbour Steps\nPortmellin",
    },
    {
        "name": "Wren Castellane",
        "email": "wren@owners.example",
        "phone": "555-0163",
        "address": "5 Millrace Cottages\nUpper Sallow",
    },
    {
        "name": "Priya and Sol Ardent",
        "email": "ardents@owners.example",
        "phone": "555-0117",
        "address": "88 Long Furrow Road\nKettleby",
    },
]


@dataclass(frozen=True)
class DemoVehicle:
    owner_email: str
    kind: str
    make: str
    model: str
    year: int
    identification: str
    dc_voltage: int
    ac_system: str
    near_salt_water: bool = False
    notes: str = ""


VEHICLES = [
    DemoVehicle(
        "hallie@owners.example",
        "van",
        "Brindlecote",
        "Longbase 350",
        2022,
        "1BFVC12E3R0004217",
        12,
        "120_60",
        notes="High roof, sliding side door.",
    ),
    DemoVehicle(
        "tomasz@owners.example",
        "truck_camper",
        "Kestrelline",
        "Overland 6x6",
        2019,
        "5KWTR24X9S0000388",
        24,
        "none",
        notes="Expedition truck, box body on subframe.",
    ),
    DemoVehicle(
        "ardents@owners.example",
        "motorhome",
        "Tamsin Coach",
        "Meridian 8",
        2021,
        "4TWLR18C5P0019022",
        48,
        "230_50",
        notes="Rear-garage motorhome, 230 V AC.",
    ),
    DemoVehicle(
        "wren@owners.example",
        "van",
        "Tallowby",
        "Runabout 5",
        2020,
        demo_history.COMPACT_VIN,
        12,
        "none",
        notes="Compact camper van, 12 V only; back each year for its re-check.",
    ),
    DemoVehicle(
        "tomasz@owners.example",
        "boat",
        "Whitlow Marine",
        "Sloop 34",
        2016,
        "QKW12345D616",
        12,
        "120_60",
        near_salt_water=True,
        notes="Sailing boat, moored in salt water.",
    ),
]

# (vehicle identification, title, description, days ago booked, lead, technicians). The
# status is not set here: the stages drive it, and inspections.demo moves them.
JOBS = [
    (
        "1BFVC12E3R0004217",
        "Full electrical build: lithium bank, solar, inverter/charger",
        "Two paralleled 12 V lithium batteries, 400 W roof solar, alternator charging, "
        "shore inlet.",
        6,
        "june",
        ["tessa", "ravi"],
    ),
    (
        "5KWTR24X9S0000388",
        "24 V house system for the box body",
        "24 V bank in the rear locker, DC-DC charging from the truck's 24 V alternator.",
        21,
        "june",
        ["ravi"],
    ),
    (
        "4TWLR18C5P0019022",
        "48 V system with 230 V inverter/charger",
        "48 V bank, 5 kVA inverter/charger, 230 V shore supply and AC branch circuits.",
        1,
        "june",
        ["tessa"],
    ),
    (
        "QKW12345D616",
        "Replace house bank and rewire the DC panel",
        "Tinned conductors throughout; new DC panel and battery switch.",
        35,
        "june",
        ["tessa", "ravi"],
    ),
    (
        "1BFVC12E3R0004217",
        "Retrofit: add second solar string",
        "Customer return: extra 200 W panel on the roof rack.",
        120,
        "june",
        ["ravi"],
    ),
    # The shop's history (inspections.demo_history): approved over the past months.
    (
        demo_history.COMPACT_VIN,
        demo_history.COMPACT_BUILD,
        "House battery under the passenger seat, 200 W roof panel, fridge and lights.",
        396,
        "june",
        ["ravi"],
    ),
    *(
        (
            ident,
            demo_history.ADD_ON,
            "A second roof panel with its own controller.",
            days + 1,
            "june",
            ["ravi"],
        )  # fmt: skip
        for ident, _, days, _ in demo_history.ADD_ONS
    ),
]

DEMO_EMAILS = {o["email"] for o in OWNERS}
DEMO_IDENTIFICATIONS = {v.identification for v in VEHICLES}


def foreign_records() -> dict[str, int]:
    """Counts of records that the demo did not create (owners, vehicles, jobs)."""
    jobs_keys = {(ident, title) for ident, title, *_ in JOBS}
    # The compact van's return visit is booked by the demo's history from its approved job.
    jobs_keys.add((demo_history.COMPACT_VIN, demo_history.RETURN_TITLE))
    foreign_jobs = sum(
        1
        for ident, title in Job.objects.values_list("vehicle__identification", "title")
        if (ident, title) not in jobs_keys
    )
    counts = {
        "owners": Owner.objects.exclude(email__in=DEMO_EMAILS).count(),
        "vehicles": Vehicle.objects.exclude(identification__in=DEMO_IDENTIFICATIONS).count(),
        "jobs": foreign_jobs,
    }
    return {k: v for k, v in counts.items() if v}


def load() -> list[tuple[str, str, str]]:
    """Load the scenario; return (username, role, password) for the staff it describes."""
    with transaction.atomic():
        profile = ShopProfile.load()
        changed = [k for k, v in SHOP.items() if getattr(profile, k) != v]
        if changed:
            for key in changed:
                setattr(profile, key, SHOP[key])
            profile.save(update_fields=changed)

        User = get_user_model()
        users = {}
        for username, first, last, role, password in STAFF:
            user = User.objects.filter(username=username).first()
            if user is None:
                user = User.objects.create_user(
                    username=username,
                    password=password,
                    first_name=first,
                    last_name=last,
                    email=f"{username}@bramblefield.example",
                    is_staff=(role == roles.OFFICE),
                )
                user.groups.add(Group.objects.get(name=role))
            users[username] = user

        owners = {}
        for data in OWNERS:
            owner, _ = Owner.objects.get_or_create(email=data["email"], defaults=data)
            owners[owner.email] = owner

        vehicles = {}
        for v in VEHICLES:
            fields = {k: getattr(v, k) for k in v.__dataclass_fields__ if k != "owner_email"}
            vehicle = Vehicle.objects.filter(identification=v.identification).first()
            if vehicle is None:
                vehicle = Vehicle(owner=owners[v.owner_email], **fields)
                vehicle.full_clean()
                vehicle.save()
            vehicles[v.identification] = vehicle

        today = datetime.date.today()
        now = timezone.now()
        # Oldest booking first, so job numbers follow the order the work came in.
        for ident, title, description, days_ago, lead, techs in sorted(
            JOBS, key=lambda row: -row[3]
        ):
            vehicle = vehicles[ident]
            if Job.objects.filter(vehicle=vehicle, title=title).exists():
                continue
            job_create(
                vehicle=vehicle,
                title=title,
                description=description,
                lead=users[lead],
                booked_in_on=today - datetime.timedelta(days=days_ago),
                created_at=now - datetime.timedelta(days=days_ago),
                technicians=[users[t] for t in techs],
            )

        # Each demo job's electrical system, and the shop's default torque specs.
        circuits_demo.load(lead=users["june"])
        # The wrenches, and the work on each job up to the stage it is shown at.
        passwords = {username: pw for username, *_, pw in STAFF}
        inspections_demo.load(users=users, passwords=passwords)
        # Approved jobs over the past months and the compact van's return visit.
        demo_history.load(users=users, passwords=passwords)
        # The approved jobs' signed wiring records (a demo signing key made on first use).
        wiring_demo.load(jobs=Job.objects.filter(title__in=[row[1] for row in JOBS]))
    return [(username, role, password) for username, _, _, role, password in STAFF]
