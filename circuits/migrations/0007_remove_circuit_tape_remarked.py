from django.db import migrations


class Migration(migrations.Migration):
    dependencies = [("circuits", "0006_tape_remarked_to_marking")]

    operations = [migrations.RemoveField(model_name="circuit", name="tape_remarked")]
