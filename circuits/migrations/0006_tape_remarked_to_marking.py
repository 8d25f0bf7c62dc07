"""Carry each ticked "tape re-marked" over to the new per-conductor re-marking fields,
before the tick goes (0007).

The tick said only that the circuit was re-marked with tape, not which conductor, in
what colour or at which ends, so this migration decides, and says so here:

* Which conductor: the earth of an earth-only or bonding circuit; the negative of a
  negative-only circuit; otherwise the positive / line conductor, the one most often
  re-marked (black cable taped red for a DC positive, a white conductor taped black for
  an AC line).
* Its colour: the colour the circuit recorded for that conductor. With one field people
  entered the colour they meant the conductor to be, which is the colour the tape shows;
  so what a person sees, and every colour finding, stays as it was. The insulation colour
  is left as recorded too (the true colour under the tape was never recorded: the
  schedule then reads e.g. "red, marked red with tape at both ends" until someone
  corrects the insulation colour). With no colour recorded, the marking's colour stays
  empty and the circuit form asks for it at the next edit.
* Its ends: both ends (the old finding asked for the tape to be visible at every end).

Going back, the tick is set on every circuit with any tape re-marking.
"""

from django.db import migrations


def _role(circuit) -> str:
    if circuit.conductors == "earth" or circuit.role == "bonding":
        return "earth"
    return "b" if circuit.conductors == "neg" else "a"


def forwards(apps, schema_editor):
    Circuit = apps.get_model("circuits", "Circuit")
    for circuit in Circuit.objects.filter(tape_remarked=True).iterator():
        role = _role(circuit)
        colour = circuit.colour_earth if role == "earth" else getattr(circuit, f"colour_{role}")
        if role == "earth" and not colour:
            colour = circuit.colour_a  # earth-only circuits entered in the first colour field
        setattr(circuit, f"marking_{role}_method", "tape")
        setattr(circuit, f"marking_{role}_colour", colour or "")
        setattr(circuit, f"marking_{role}_ends", "both")
        circuit.save(
            update_fields=[f"marking_{role}_method", f"marking_{role}_colour", f"marking_{role}_ends"]
        )


def backwards(apps, schema_editor):
    Circuit = apps.get_model("circuits", "Circuit")
    from django.db.models import Q

    taped = Q(marking_a_method="tape") | Q(marking_b_method="tape") | Q(marking_earth_method="tape")
    Circuit.objects.filter(taped).update(tape_remarked=True)


class Migration(migrations.Migration):
    dependencies = [("circuits", "0005_conductor_marking_external_supply")]

    operations = [migrations.RunPython(forwards, backwards)]
