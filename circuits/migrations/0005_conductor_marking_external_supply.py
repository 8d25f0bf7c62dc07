"""Per-conductor re-marking fields, "bare" as a colour, the external-supply device kind
(off the vehicle, with its supply voltage and own protection), a rating and type on
protection devices, and a circuit's protection device (one home for its protection)."""

import django.core.validators
import django.db.models.deletion
from django.db import migrations, models


class Migration(migrations.Migration):

    dependencies = [
        ('circuits', '0004_device_walking_order'),
    ]

    operations = [
        migrations.AddField(
            model_name='circuit',
            name='marking_a_colour',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('other', 'Other')], max_length=14, verbose_name='marking colour: positive / line'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_a_ends',
            field=models.CharField(blank=True, choices=[('from', 'From end'), ('to', 'To end'), ('both', 'Both ends')], max_length=4, verbose_name='marked at: positive / line'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_a_method',
            field=models.CharField(blank=True, choices=[('tape', 'Tape'), ('heat_shrink', 'Heat-shrink sleeve'), ('printed_band', 'Printed band')], max_length=14, verbose_name='re-marking: positive / line'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_b_colour',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('other', 'Other')], max_length=14, verbose_name='marking colour: negative / neutral'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_b_ends',
            field=models.CharField(blank=True, choices=[('from', 'From end'), ('to', 'To end'), ('both', 'Both ends')], max_length=4, verbose_name='marked at: negative / neutral'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_b_method',
            field=models.CharField(blank=True, choices=[('tape', 'Tape'), ('heat_shrink', 'Heat-shrink sleeve'), ('printed_band', 'Printed band')], max_length=14, verbose_name='re-marking: negative / neutral'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_earth_colour',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('other', 'Other')], max_length=14, verbose_name='marking colour: earth'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_earth_ends',
            field=models.CharField(blank=True, choices=[('from', 'From end'), ('to', 'To end'), ('both', 'Both ends')], max_length=4, verbose_name='marked at: earth'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='marking_earth_method',
            field=models.CharField(blank=True, choices=[('tape', 'Tape'), ('heat_shrink', 'Heat-shrink sleeve'), ('printed_band', 'Printed band')], max_length=14, verbose_name='re-marking: earth'),
        ),
        migrations.AddField(
            model_name='circuit',
            name='protection_device',
            field=models.ForeignKey(blank=True, help_text='The fuse or breaker holder (or external supply) at one end of this run whose fuse or breaker protects it.', null=True, on_delete=django.db.models.deletion.PROTECT, related_name='protected_circuits', to='circuits.device'),
        ),
        migrations.AddField(
            model_name='device',
            name='protection_a',
            field=models.DecimalField(blank=True, decimal_places=1, help_text='Fuse or breaker holder: the fuse or breaker fitted. External supply: the breaker it is protected by at its source.', max_digits=7, null=True, validators=[django.core.validators.MinValueValidator(0.1)], verbose_name='protection rating (A)'),
        ),
        migrations.AddField(
            model_name='device',
            name='protection_type',
            field=models.CharField(blank=True, choices=[('fuse', 'Fuse'), ('breaker', 'Circuit breaker')], max_length=10, verbose_name='fuse or breaker'),
        ),
        migrations.AddField(
            model_name='device',
            name='supply_voltage',
            field=models.DecimalField(blank=True, decimal_places=1, help_text='External supply: its nominal voltage, e.g. 120 or 230.', max_digits=5, null=True, validators=[django.core.validators.MinValueValidator(1)], verbose_name='supply voltage (V)'),
        ),
        migrations.AlterField(
            model_name='circuit',
            name='colour_a',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('bare', 'Bare (no insulation)'), ('other', 'Other')], max_length=14, verbose_name='colour: positive / line'),
        ),
        migrations.AlterField(
            model_name='circuit',
            name='colour_after_splice',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('bare', 'Bare (no insulation)'), ('other', 'Other')], help_text='Colour of the positive / line conductor beyond the splice.', max_length=14),
        ),
        migrations.AlterField(
            model_name='circuit',
            name='colour_b',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('bare', 'Bare (no insulation)'), ('other', 'Other')], max_length=14, verbose_name='colour: negative / neutral'),
        ),
        migrations.AlterField(
            model_name='circuit',
            name='colour_earth',
            field=models.CharField(blank=True, choices=[('red', 'Red'), ('black', 'Black'), ('yellow', 'Yellow'), ('white', 'White'), ('blue', 'Blue'), ('brown', 'Brown'), ('green', 'Green'), ('green_yellow', 'Green-yellow'), ('grey', 'Grey'), ('orange', 'Orange'), ('bare', 'Bare (no insulation)'), ('other', 'Other')], max_length=14, verbose_name='colour: earth'),
        ),
        migrations.AlterField(
            model_name='device',
            name='kind',
            field=models.CharField(choices=[('battery', 'Battery'), ('busbar', 'Busbar'), ('protection', 'Fuse or breaker holder'), ('inverter_charger', 'Inverter/charger'), ('charge_controller', 'Charge controller'), ('dc_dc_charger', 'DC-DC charger'), ('alternator', 'Alternator'), ('shore_inlet', 'Shore inlet'), ('ac_panel', 'AC panel'), ('dc_panel', 'DC panel'), ('load', 'Load'), ('external_supply', 'External supply (pedestal, generator, socket)'), ('other', 'Other')], max_length=20),
        ),
        migrations.AlterField(
            model_name='device',
            name='mounting',
            field=models.CharField(choices=[('chassis', 'Chassis'), ('engine', 'Engine'), ('body', 'Body / wall'), ('battery_box', 'Battery box'), ('off_vehicle', 'Off the vehicle')], default='body', max_length=20),
        ),
        migrations.AddConstraint(
            model_name='circuit',
            constraint=models.CheckConstraint(condition=models.Q(('protection_device__isnull', True), models.Q(('protection_a__isnull', True), ('protection_distance_m__isnull', True), ('protection_type', 'none')), _connector='OR'), name='circuit_protection_one_home', violation_error_message="A circuit's protection is either a protection device or its own in-line fuse or breaker, not both."),
        ),
    ]
