"""Free text on evidence (notes, reasons) is refused beside its field when it holds a NUL
character, which PostgreSQL cannot store: a message, never a failed write."""

from __future__ import annotations

import pytest
from django.core.exceptions import ValidationError

from inspections.models import TorqueRecord
from tests.inspections.factories import read


def test_a_note_holding_a_nul_character_is_refused_beside_the_note(
    install, termination, technician, wrench
):
    with pytest.raises(ValidationError) as refused:
        read(termination, install, "10", technician=technician, wrench=wrench, note="ok\x00")
    assert "NUL" in " ".join(refused.value.message_dict["note"])
    assert not TorqueRecord.objects.exists()


def test_the_same_note_without_it_is_stored(install, termination, technician, wrench):
    record = read(termination, install, "10", technician=technician, wrench=wrench, note="ok")
    assert record.note == "ok"
