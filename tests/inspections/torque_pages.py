"""What the torque page tests share: the NIST SP 811 factors, a signed-in client and
the offline queue's request."""

from __future__ import annotations

import json
import uuid

from django.urls import reverse

from inspections.models import Stage

# Conversion factors, NIST SP 811 (2008), Appendix B.9 (torque / moment of force):
LBF_IN_NM = 0.1129848  # 1 lbf·in = 1.129 848 E-01 N·m
LBF_FT_NM = 1.355818  # 1 lbf·ft = 1.355 818 E+00 N·m
KGF_CM_NM = 0.0980665  # 1 kgf·cm = 9.806 65 E-02 N·m (kgf exact: 9.806 65 N, NIST SP 811 B.9)


def signed_in(client, user):
    client.force_login(user)
    return client


def sync(client, job, readings, **headers):
    return client.post(
        reverse("torque_sync", args=[job.number]),
        data=json.dumps({"readings": readings}),
        content_type="application/json",
        **headers,
    )


def payload(termination, wrench, **fields):
    return {
        "key": fields.pop("key", str(uuid.uuid4())),
        "termination": termination.pk,
        "stage": int(Stage.Kind.FIRST_INSTALL),
        "value": "10",
        "unit": "N*m",
        "wrench": wrench.pk if wrench else None,
        "found_loose": False,
        "note": "",
        **fields,
    }
