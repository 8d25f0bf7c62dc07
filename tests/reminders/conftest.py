from __future__ import annotations

import pytest

from tests.inspections.factories import make_wrench


@pytest.fixture
def wrench(db):
    return make_wrench()
