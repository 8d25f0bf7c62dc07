"""Permission-matrix rows of wiring/views/owner.py (see tests/test_permission_matrix.py).

The office (and superusers) manage owners' links; an empty POST makes, sends or revokes
nothing (the form answers with its errors, the revoke step asks for confirmation). The
owner's page opens for anyone holding the token, signed in or not, and takes no POST; the
matrix's job has no issued revision, so revision 1 is 404."""

from __future__ import annotations

import datetime

from wiring.models import OwnerLink, token_hash

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
ROWS: dict[str, tuple[str, str]] = {
    "owner_links": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
    "owner_link_revoke": ("login 405 405 405 405 405", "login 403 403 403 200 200"),
    "owner_link_send": ("login 405 405 405 405 405", "login 403 403 403 200 200"),
    "owner_record": ("200 200 200 200 200 200", "405 405 405 405 405 405"),
    "owner_record_pdf": ("404 404 404 404 404 404", "405 405 405 405 405 405"),
}

TOKEN = "matrix-owner-token-0123456789abcdefghijklmnop"


def _link(world) -> OwnerLink:
    link = OwnerLink.objects.filter(token_sha256=token_hash(TOKEN)).first()
    return link or OwnerLink.objects.create(
        job=world.job,
        token_sha256=token_hash(TOKEN),
        expires_on=datetime.date.today() + datetime.timedelta(days=30),
        created_by=world.users["office"],
    )


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.users, ...)."""
    link = _link(world)
    if name == "owner_record":
        return {"token": TOKEN}
    if name == "owner_record_pdf":
        return {"token": TOKEN, "revision": 1}
    if name in ("owner_link_revoke", "owner_link_send"):
        return {"number": world.job.number, "pk": link.pk}
    return {"number": world.job.number}
