"""``python manage.py size``, run as the shop would run it: in a subprocess."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from circuits.sizing import CAUTION

ROOT = Path(__file__).resolve().parents[2]


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "manage.py", "size", *args],
        cwd=ROOT,
        capture_output=True,
        text=True,
        encoding="utf-8",
        timeout=120,
        check=False,
    )


def test_json_output_recommends_and_evaluates() -> None:
    # 12 V, 20 A, 10 ft one way: 12 AWG is the smallest within 10 % drop (see
    # test_sizing_recommendation); the evaluated 10 AWG carries 60 A at 105 °C
    # (33 CFR 183.425 Table 5).
    done = run("--volts", "12", "--amps", "20", "--length", "10 ft", "--size", "10", "--json")
    assert done.returncode == 0, done.stderr
    data = json.loads(done.stdout)
    assert data["recommended_size"] == "12 AWG"
    assert data["size"] == "10 AWG"
    assert data["ampacity_a"] == 60
    # NEC Chapter 9 Table 8: 10 AWG 1.24 ohm/kft at 75 °C, x 339.5/309.5 at 105 °C.
    assert data["resistance_ohm_per_m"] == pytest.approx(1.24 / 304.8 * 339.5 / 309.5)
    hand_v = 20 * 1.24 / 304.8 * 339.5 / 309.5 * 2 * 10 * 0.3048
    assert data["voltage_drop_v"] == pytest.approx(hand_v)
    assert data["voltage_drop_pct"] == pytest.approx(100 * hand_v / 12)
    assert data["max_protection_a"] == 60 and data["min_protection_a"] == 20
    assert isinstance(data["findings"], list)


def test_json_findings_have_code_severity_message_and_source() -> None:
    done = run("--volts", "12", "--amps", "400", "--length", "1 m", "--size", "4", "--json")
    assert done.returncode == 1, done.stderr  # a blocking finding: see the exit-status tests
    findings = json.loads(done.stdout)["findings"]
    aught = next(f for f in findings if f["code"] == "SIZE_NOTATION_AUGHT")
    assert aught["severity"] == "blocking" and "4/0" in aught["message"]
    assert all(set(f) == {"code", "severity", "message", "source"} for f in findings)


def test_readable_summary_ends_with_the_caution() -> None:
    done = run("--volts", "24", "--amps", "30", "--length", "3 m", "--critical", "--tinned")
    assert done.returncode == 0, done.stderr
    assert "Recommended:" in done.stdout
    assert done.stdout.strip().splitlines()[-1] == CAUTION


def test_all_options_are_accepted_together() -> None:
    done = run(
        "--volts", "120", "--amps", "16", "--length", "120 in", "--size", "12",
        "--insulation", "90", "--engine-space", "--bundled", "4", "--parallel", "1",
        "--drop", "5", "--continuous", "--protection", "20", "--temp", "60", "--ac", "--json",
    )  # fmt: skip
    # Blocking, so exit status 1: four bundled in an engine space leave 12 AWG below the
    # 20 A that 125 % of a 16 A continuous load asks (NEC 2023 Table 310.16, 210.19(A)).
    assert done.returncode == 1, done.stderr
    data = json.loads(done.stdout)
    assert data["size"] == "12 AWG" and data["drop_limit_pct"] == 5
    assert data["conductor_temp_c"] == 60


@pytest.mark.parametrize(
    ("args", "fragment"),
    [
        (["--amps", "0", "--length", "10 ft"], "current must be greater than zero"),
        (["--amps", "-5", "--length", "10 ft"], "current must be greater than zero"),
        (["--amps", "20", "--length", "0 m"], "length must be greater than zero"),
        (["--amps", "20", "--length", "-3 m"], "length must be greater than zero"),
        (["--amps", "20", "--length", "10 ft", "--size", "5"], "Accepted forms"),
        (["--amps", "20", "--length", "10 ft", "--insulation", "70"], "insulation rating 70"),
        (["--amps", "20", "--length", "10 kg"], "unit we do not read"),
        (["--amps", "20", "--length", "10"], "no unit"),
        (["--amps", "20", "--length", "10 ft", "--bundled", "0"], "at least 1"),
    ],
)
def test_bad_input_exits_2_with_one_line_and_no_traceback(args: list[str], fragment: str) -> None:
    done = run("--volts", "12", *args)
    assert done.returncode == 2
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and fragment in lines[0]
    assert "Traceback" not in done.stderr
    assert done.stdout == ""


@pytest.mark.parametrize(
    ("args", "fragment"),
    [
        (["--volts", "1e308", "--amps", "20", "--length", "10 ft"], "exponent beyond e±6"),
        (["--volts", "2000", "--amps", "20", "--length", "10 ft"], "between 1 V and 1000 V"),
        (["--volts", "12", "--amps", "20", "--length", "10 parsecs"], "unit we do not read"),
        (["--volts", "12", "--amps", "20", "--length", "1e-300 m"], "exponent beyond e±6"),
        (["--volts", "12", "--amps", "20", "--length", "0.001 m"], "between 1 cm and 500 m"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--bundled", "1e30"],
         "exponent beyond e±6"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--bundled", "500"],
         "at most 100"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--parallel", "2.5"],
         "whole number"),
        (["--volts", "12", "--amps", "-5", "--length", "10 ft"], "greater than zero"),
        (["--volts", "12", "--amps", "20000", "--length", "10 ft"], "between 0.01 A and 10 kA"),
        (["--volts", "nan", "--amps", "20", "--length", "10 ft"], "not a finite number"),
        (["--volts", "12", "--amps", "inf", "--length", "10 ft"], "not a finite number"),
        (["--volts", "12", "--amps", "²", "--length", "10 ft"], "not a digit we read"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--drop", "250"],
         "between 0 % and 100 %"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--temp", "1e6"],
         "between -50 °C and 250 °C"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--protection", "1e308"],
         "exponent beyond e±6"),
        (["--volts", "12", "--amps", "20", "--length", "10 ft", "--size", "1" * 5000],
         "at most 40"),
    ],
)  # fmt: skip
def test_size_refuses_absurd_values(args: list[str], fragment: str) -> None:
    done = run(*args)
    assert done.returncode == 2, done.stdout
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and fragment in lines[0], done.stderr
    assert done.stdout == ""


@pytest.mark.parametrize(
    "args",
    [
        ["--volts", "12", "--amps", "20"],  # --length missing
        ["--volts", "12", "--amps", "20", "--length", "3 m", "--bogus"],
        ["--volts", "12", "--amps", "20", "--length", "3 m", "--drop", "5", "--critical"],
        [],
    ],
)
def test_size_argument_error_is_one_line(args: list[str]) -> None:
    done = run(*args)
    assert done.returncode == 2
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert "usage:" not in done.stderr and "--help" in lines[0]
    assert done.stdout == ""


@pytest.mark.parametrize("length", ["10 (", "10 m/0", "10 'ft'", "10 m**(9**9**9)", "10 m²"])
def test_size_bad_unit_text_exits_2_without_traceback(length: str) -> None:
    done = run("--volts", "12", "--amps", "20", "--length", length)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and length in lines[0]


def test_size_reads_units_and_unicode_digits_like_the_form() -> None:
    typed = run("--volts", "12 V", "--amps", "٢٠ A", "--length", "3,048 m", "--json")
    plain = run("--volts", "12", "--amps", "20", "--length", "3.048 m", "--json")
    assert typed.returncode == 0, typed.stderr
    assert json.loads(typed.stdout) == json.loads(plain.stdout)


@pytest.mark.parametrize(
    "args",
    [
        ["--volts", "12", "--amps", "20", "--length", "10 m\nx"],
        ["--volts", "12", "--amps", "20", "--length", "3 m", "--bogus\nline", "x\ry"],
    ],
)
def test_a_newline_in_an_argument_keeps_the_error_on_one_line(args: list[str]) -> None:
    done = run(*args)
    assert done.returncode == 2
    assert len(done.stderr.strip().splitlines()) == 1, done.stderr
    assert "\\n" in done.stderr or "\\r" in done.stderr


# Exit status: 0 clean, 1 at least one blocking finding, 2 bad input (documented in --help).


def test_exit_status_is_0_when_nothing_blocks() -> None:
    # 10 AWG at 20 A over 10 ft at 12 V: 60 A ampacity (33 CFR 183.425 Table 5) and about
    # 2.7 % drop (NEC Chapter 9 Table 8): nothing blocking.
    done = run("--volts", "12", "--amps", "20", "--length", "10 ft", "--size", "10", "--json")
    assert done.returncode == 0, done.stderr
    assert all(f["severity"] != "blocking" for f in json.loads(done.stdout)["findings"])


def test_exit_status_is_1_when_a_finding_blocks_and_the_report_is_still_printed() -> None:
    # 400 A on a bare "4": 4 AWG carries far less than 400 A (33 CFR 183.425 Table 5), and
    # only 4/0 would: the notation rule blocks.
    done = run("--volts", "12", "--amps", "400", "--length", "1 m", "--size", "4")
    assert done.returncode == 1
    assert "[blocking]" in done.stdout and done.stdout.strip().splitlines()[-1] == CAUTION
    assert done.stderr == ""


def test_exit_status_is_2_for_bad_input_with_one_line_on_stderr() -> None:
    done = run("--volts", "12", "--amps", "twenty", "--length", "10 ft")
    assert done.returncode == 2
    assert len(done.stderr.strip().splitlines()) == 1 and done.stdout == ""


def test_help_documents_the_exit_status() -> None:
    done = run("--help")
    assert done.returncode == 0
    text = " ".join(done.stdout.split())
    assert "Exit status: 0 when no finding is blocking, 1 when at least one finding" in text
