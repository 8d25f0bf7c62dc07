"""Waivers record the facts they were granted on and keep their history.

New columns: the finding's message and facts (with their SHA-256) at the time of the
waiver; when it was superseded by a renewal (and the renewal's link back to it); who
withdrew it, when and why. One waiver per finding may be in force at a time (the old
unique constraint becomes conditional), so withdrawn and renewed rows stay as history.

Existing waivers are kept, every column as it was, and get no recorded facts (an empty
hash): they are shown as needing renewal and no longer cover their finding until a lead
renews them. Decided against computing their facts here from the circuits as they are
now: a waiver's facts come from the finding the rules raise (which circuits it names
depends on the rule), so this step would have to run the current rules on historical
models, and, worse, it would bless whatever changed between the grant and the upgrade,
the very defect this migration closes. Renewing is one short form per waiver on the
finding itself.
"""

import django.db.models.deletion
from django.conf import settings
from django.db import migrations, models


class Migration(migrations.Migration):
    dependencies = [
        ("circuits", "0002_roles"),
        migrations.swappable_dependency(settings.AUTH_USER_MODEL),
    ]

    operations = [
        migrations.AlterModelOptions(
            name="waiver",
            options={"ordering": ["created_at", "pk"]},
        ),
        migrations.RemoveConstraint(
            model_name="waiver",
            name="waiver_unique_per_finding",
        ),
        migrations.AddField(
            model_name="waiver",
            name="message",
            field=models.TextField(blank=True, help_text="The finding's words when it was waived."),
        ),
        migrations.AddField(
            model_name="waiver",
            name="facts",
            field=models.JSONField(blank=True, default=dict),
        ),
        migrations.AddField(
            model_name="waiver",
            name="facts_hash",
            field=models.CharField(
                blank=True, help_text="SHA-256 of the facts; empty: none recorded.", max_length=64
            ),
        ),
        migrations.AddField(
            model_name="waiver",
            name="renews",
            field=models.OneToOneField(
                blank=True,
                help_text="The lapsed waiver this one replaced.",
                null=True,
                on_delete=django.db.models.deletion.PROTECT,
                related_name="renewal",
                to="circuits.waiver",
            ),
        ),
        migrations.AddField(
            model_name="waiver",
            name="superseded_at",
            field=models.DateTimeField(blank=True, null=True),
        ),
        migrations.AddField(
            model_name="waiver",
            name="withdrawn_at",
            field=models.DateTimeField(blank=True, null=True),
        ),
        migrations.AddField(
            model_name="waiver",
            name="withdrawn_by",
            field=models.ForeignKey(
                blank=True,
                null=True,
                on_delete=django.db.models.deletion.PROTECT,
                related_name="+",
                to=settings.AUTH_USER_MODEL,
            ),
        ),
        migrations.AddField(
            model_name="waiver",
            name="withdrawal_reason",
            field=models.TextField(blank=True),
        ),
        migrations.AddConstraint(
            model_name="waiver",
            constraint=models.UniqueConstraint(
                condition=models.Q(("superseded_at__isnull", True), ("withdrawn_at__isnull", True)),
                fields=("job", "code", "subject"),
                name="waiver_one_in_force_per_finding",
                violation_error_message="This finding is already waived.",
            ),
        ),
        migrations.AddConstraint(
            model_name="waiver",
            constraint=models.CheckConstraint(
                condition=models.Q(
                    models.Q(("withdrawn_at__isnull", True), ("withdrawn_by__isnull", True)),
                    models.Q(("withdrawn_at__isnull", False), ("withdrawn_by__isnull", False)),
                    _connector="OR",
                ),
                name="waiver_withdrawn_by_whom_and_when",
            ),
        ),
    ]
