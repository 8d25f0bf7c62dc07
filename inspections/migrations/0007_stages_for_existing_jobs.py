"""Give every existing job its four stages, as inspections.services.stages_ensure does for a
new one: first install open (opened now), heat-cycle run, retorque and handover not
started. A job that had no stage at all then stands in its first install, so its status
becomes "First install" (what inspections.services.job_status_for derives from those
stages): a status set by hand before stages existed rested on no record. A job that had
some stages already keeps its status (the services set it when they moved them).

Reversing is a no-op: the stages may carry readings and sign-offs by then, and removing
empty ones would only make the jobs lose their place in the work.

Frozen logic (historical models only), so later changes to the services cannot change
what this migration did.
"""

from django.db import migrations
from django.utils import timezone

FIRST_INSTALL, HEAT_CYCLE, RETORQUE, HANDOVER = 1, 2, 3, 4
KINDS = (FIRST_INSTALL, HEAT_CYCLE, RETORQUE, HANDOVER)


def give_stages(apps, schema_editor):
    Job = apps.get_model("shop", "Job")
    Stage = apps.get_model("inspections", "Stage")
    now = timezone.now()
    had = set(Stage.objects.values_list("job_id", flat=True).distinct())
    for job_id in Job.objects.values_list("pk", flat=True).iterator():
        present = set(Stage.objects.filter(job_id=job_id).values_list("kind", flat=True))
        Stage.objects.bulk_create(
            [
                Stage(
                    job_id=job_id,
                    kind=kind,
                    state="open" if kind == FIRST_INSTALL else "not_started",
                    opened_at=now if kind == FIRST_INSTALL else None,
                )
                for kind in KINDS
                if kind not in present
            ],
            ignore_conflicts=True,
        )
        if job_id not in had:
            Job.objects.filter(pk=job_id).exclude(status="install").update(status="install")


class Migration(migrations.Migration):
    dependencies = [
        ("inspections", "0006_gate_roles"),
        ("shop", "0003_role_review"),
    ]

    operations = [migrations.RunPython(give_stages, migrations.RunPython.noop)]
