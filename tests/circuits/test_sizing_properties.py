"""Properties of the engine that must hold for every circuit (hypothesis)."""

from __future__ import annotations

import dataclasses

from hypothesis import given, settings
from hypothesis import strategies as st

from circuits.sizing import (
    CODES,
    SEVERITY_ORDER,
    CircuitInput,
    ConductorSize,
    catalogue,
    evaluate,
    format_size,
    parse_size,
    recommend,
)
from circuits.sizing.protection import STANDARD_RATINGS_A

# No deadline: the properties are about answers, not timing.
PROPERTY = settings(max_examples=150, deadline=None)
# A blocking finding that no conductor can cure: the given fuse is below the load.
SIZE_INDEPENDENT = {"PROTECTION_BELOW_LOAD"}


@st.composite
def circuits(draw: st.DrawFn) -> CircuitInput:
    ac = draw(st.booleans())
    return CircuitInput(
        system_voltage_v=draw(st.sampled_from((120.0, 230.0) if ac else (12.0, 24.0, 48.0))),
        current_a=draw(st.floats(0.5, 600.0)),
        length_m=draw(st.floats(0.2, 40.0)),
        insulation_c=draw(st.sampled_from((60, 75, 80, 90, 105, 125, 200))),
        engine_space=draw(st.booleans()),
        bundled=draw(st.integers(1, 30)),
        parallel=draw(st.integers(1, 3)),
        critical=draw(st.booleans()),
        continuous=draw(st.booleans()),
        protection_a=draw(st.none() | st.sampled_from(STANDARD_RATINGS_A[:40])),
        tinned=draw(st.booleans()),
        ac=ac,
        sheathed=draw(st.booleans()),
        metric=draw(st.booleans()),
        ambient_c=draw(st.none() | st.floats(-10.0, 50.0)),
    )


def rank(size: ConductorSize | None) -> float:
    """Position by cross-section; no size at all ranks above every size."""
    return float("inf") if size is None else size.area_mm2


@PROPERTY
@given(circuits(), st.floats(1.0, 5.0))
def test_longer_run_never_gets_a_smaller_recommendation(inp: CircuitInput, k: float) -> None:
    longer = dataclasses.replace(inp, length_m=inp.length_m * k)
    assert rank(recommend(longer).size) >= rank(recommend(inp).size)


@PROPERTY
@given(circuits(), st.floats(1.0, 5.0))
def test_larger_current_never_gets_a_smaller_recommendation(inp: CircuitInput, k: float) -> None:
    larger = dataclasses.replace(inp, current_a=inp.current_a * k)
    assert rank(recommend(larger).size) >= rank(recommend(inp).size)


@PROPERTY
@given(circuits())
def test_every_recommendation_satisfies_every_constraint_it_claims(inp: CircuitInput) -> None:
    rec = recommend(inp)
    if rec.size is None:
        assert any(f.code == "NO_SIZE_FITS" and f.blocking for f in rec.findings)
        return
    result = evaluate(dataclasses.replace(inp, size=rec.size))
    factor = 1.25 if inp.continuous else 1.0
    assert result.ampacity_a >= inp.current_a * factor - 1e-9
    assert result.voltage_drop_pct <= inp.effective_drop_limit_pct + 1e-9
    if inp.protection_a is None:
        assert result.standard_ratings
        assert all(result.min_protection_a <= r <= result.max_protection_a
                   for r in result.standard_ratings)  # fmt: skip
    else:
        assert inp.protection_a <= result.max_protection_a + 1e-9
    blocking = {f.code for f in result.findings if f.blocking}
    assert blocking <= SIZE_INDEPENDENT
    assert "DROP_OVER_LIMIT" not in {f.code for f in result.findings}


@PROPERTY
@given(circuits())
def test_every_smaller_size_was_rightly_ruled_out(inp: CircuitInput) -> None:
    rec = recommend(inp)
    for size, reasons in rec.rejected:
        assert reasons
        assert rec.size is None or size < rec.size
        result = evaluate(dataclasses.replace(inp, size=size))
        codes = {f.code for f in result.findings if f.blocking} - SIZE_INDEPENDENT
        assert codes or any(f.code == "DROP_OVER_LIMIT" for f in result.findings)


@PROPERTY
@given(circuits(), st.sampled_from(catalogue()), st.booleans())
def test_every_finding_has_a_known_code_a_severity_and_a_source(
    inp: CircuitInput, size: ConductorSize, bare: bool
) -> None:
    text = str(size.gauge) if bare and size.gauge is not None else size.label
    result = evaluate(dataclasses.replace(inp, size=size, size_text=text))
    for finding in (*result.findings, *recommend(inp).findings):
        assert finding.code in CODES
        assert finding.severity in SEVERITY_ORDER
        assert finding.message and finding.source


@given(st.sampled_from(catalogue()))
def test_parsing_a_printed_size_gives_it_back(size: ConductorSize) -> None:
    assert parse_size(format_size(size)) == size


def spellings(size: ConductorSize) -> list[str]:
    """Other ways people write the size (trade notation, common practice)."""
    if size.kind == "mm2":
        n = f"{size.value:g}"
        return [f"{n}mm2", f"{n} sq mm", f"{n} mm^2", f"{n} MM²"]
    if size.kind == "kcmil":
        return [f"{size.value:g} MCM", f"{size.value:g}kcmil"]
    if size.aught:
        m = size.aught
        word = ("one", "two", "three", "four")[m - 1]
        return [f"{m}/0", f"{m}-0", "0" * m, f"{word} aught", f"{m} ought", f"#{m}/0 AWG"]
    g = size.gauge
    return [f"#{g}", f"{g} ga", f"{g}AWG", f"{g} gauge", str(g)]


@given(st.sampled_from(catalogue()), st.data())
def test_every_spelling_of_a_size_round_trips(size: ConductorSize, data: st.DataObject) -> None:
    text = data.draw(st.sampled_from(spellings(size)))
    parsed = parse_size(text)
    assert parsed == size
    assert parse_size(format_size(parsed)) == size
