"""A return visit's re-check stage (kind 0, before first install) and the wrenches'
calibration history, append-only like the evidence: the same triggers as 0002 and 0005
(read 0002's docstring), for the new table only."""


import django.core.validators
import django.db.models.deletion
import django.utils.timezone
from django.conf import settings
from django.db import migrations, models


GUARDED = {"inspections_wrenchcalibration": "wrench calibrations are append-only"}
PG_FUNCTION = "inspections_refuse_change"


def install(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    for table, message in GUARDED.items():
        if vendor == "sqlite":
            for operation in ("UPDATE", "DELETE"):
                schema_editor.execute(
                    f'CREATE TRIGGER "{table}_no_{operation.lower()}" BEFORE {operation} '
                    f"ON \"{table}\" BEGIN SELECT RAISE(ABORT, '{message}: {operation} refused'); "
                    "END;",
                    None,
                )
        elif vendor == "postgresql":
            # The function is installed by 0002 (and re-created by 0005).
            schema_editor.execute(
                f'CREATE TRIGGER "{table}_append_only" BEFORE UPDATE OR DELETE ON "{table}" '
                f"FOR EACH ROW EXECUTE FUNCTION {PG_FUNCTION}('{message}');",
                None,
            )
        else:
            raise RuntimeError(f"No append-only guard is written for the {vendor} database.")


def remove(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    for table in GUARDED:
        if vendor == "sqlite":
            for operation in ("update", "delete"):
                schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_no_{operation}";', None)
        elif vendor == "postgresql":
            schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_append_only" ON "{table}";', None)


class Migration(migrations.Migration):

    dependencies = [
        ('inspections', '0007_stages_for_existing_jobs'),
        ('shop', '0005_job_kind_recheck_settings'),
        migrations.swappable_dependency(settings.AUTH_USER_MODEL),
    ]

    operations = [
        migrations.CreateModel(
            name='WrenchCalibration',
            fields=[
                ('id', models.BigAutoField(auto_created=True, primary_key=True, serialize=False, verbose_name='ID')),
                ('calibrated_on', models.DateField()),
                ('due_on', models.DateField(help_text='Next calibration due.')),
                ('done_by', models.CharField(help_text='Laboratory or person who calibrated the wrench.', max_length=120)),
                ('certificate', models.CharField(blank=True, help_text='Certificate number.', max_length=60)),
                ('as_found_error_pct', models.DecimalField(blank=True, decimal_places=1, help_text='Deviation found before any adjustment; blank when not stated.', max_digits=5, null=True, validators=[django.core.validators.MinValueValidator(-100), django.core.validators.MaxValueValidator(100)], verbose_name='as-found error (%)')),
                ('adjusted', models.BooleanField(default=False, help_text='Adjusted during calibration.')),
                ('notes', models.TextField(blank=True)),
                ('recorded_at', models.DateTimeField(default=django.utils.timezone.now, editable=False)),
            ],
            options={
                'ordering': ['wrench', '-calibrated_on', '-pk'],
            },
        ),
        migrations.RemoveConstraint(
            model_name='stage',
            name='stage_kind_known',
        ),
        migrations.AlterField(
            model_name='shopchecklistitem',
            name='stage_kind',
            field=models.PositiveSmallIntegerField(choices=[(0, 'Re-check'), (1, 'First install'), (2, 'Heat-cycle run'), (3, 'Retorque'), (4, 'Handover')], verbose_name='stage'),
        ),
        migrations.AlterField(
            model_name='stage',
            name='kind',
            field=models.PositiveSmallIntegerField(choices=[(0, 'Re-check'), (1, 'First install'), (2, 'Heat-cycle run'), (3, 'Retorque'), (4, 'Handover')]),
        ),
        migrations.AddConstraint(
            model_name='stage',
            constraint=models.CheckConstraint(condition=models.Q(('kind__gte', 0), ('kind__lte', 4)), name='stage_kind_known'),
        ),
        migrations.AddField(
            model_name='wrenchcalibration',
            name='recorded_by',
            field=models.ForeignKey(on_delete=django.db.models.deletion.PROTECT, related_name='+', to=settings.AUTH_USER_MODEL),
        ),
        migrations.AddField(
            model_name='wrenchcalibration',
            name='wrench',
            field=models.ForeignKey(on_delete=django.db.models.deletion.PROTECT, related_name='calibrations', to='inspections.torquewrench'),
        ),
        migrations.AddConstraint(
            model_name='wrenchcalibration',
            constraint=models.CheckConstraint(condition=models.Q(('due_on__gt', models.F('calibrated_on'))), name='wrench_calibration_due_after_done', violation_error_message='The next due date must come after the calibration.'),
        ),
        migrations.RunPython(install, remove),
    ]
