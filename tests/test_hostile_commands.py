"""Random and hostile argument lists to the shop's commands (import_record, verify_record,
render_record, signing_setup, backup, restore, send_reminders), and hostile record.json
inside a PDF given to import_record: a refusal exits non-zero with one line on stderr,
never a traceback (the founders' rule on bad input, for a command).

Every command runs in this process in a scratch folder of its own; paths the arguments
name are kept inside it (no leading "/", no ".."), and the signing key is the test's."""

from __future__ import annotations

import contextlib
import io
import json
import sys

import pypdf
import pytest
from django.core.management import load_command_class
from django.core.management.base import CommandError
from hypothesis import given
from hypothesis import strategies as st

from tests.hostile_web import FUZZ, hostile_values

pytestmark = pytest.mark.django_db

COMMANDS = {
    "import_record": ("wiring", ["--return-visit"]),
    "verify_record": ("wiring", []),
    "render_record": ("wiring", ["-o", "--output", "--base-url"]),
    "signing_setup": ("wiring", ["--import", "--password-file", "--demo", "--shop-name"]),
    "backup": ("shop", ["--include-signing-key"]),
    "restore": ("shop", ["--check"]),
    "send_reminders": ("reminders", ["--days", "--dry-run"]),
}
EXTRA_FLAGS = ["--help-me", "-x", "--", "--verbosity", "--settings"]


def run(name: str, argv: list[str]) -> tuple[int, str]:
    """(exit status, everything written to stderr) of `manage.py name *argv`."""
    app, _flags = COMMANDS[name]
    out, err = io.StringIO(), io.StringIO()
    command = load_command_class(app, name)
    command.stdout._out, command.stderr._out = out, err
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(out):
        try:
            # BaseCommand.run_from_argv less its closing of every database connection at
            # the end, which would end the test's transaction.
            command._called_from_command_line = True
            parser = command.create_parser("manage.py", name)
            options = vars(parser.parse_args(argv))
            try:
                command.execute(*options.pop("args", ()), **options)
            except CommandError as error:
                command.stderr.write(f"{error.__class__.__name__}: {error}")
                sys.exit(error.returncode)
        except SystemExit as exc:
            code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
            return code, err.getvalue()
    return 0, err.getvalue()


def _kept_inside(value: str) -> str:
    """A path argument that stays inside the scratch folder. NUL goes too: an argument
    list from a shell cannot carry one (argv entries are C strings)."""
    value = value.replace("\x00", "")
    return value.lstrip("/").replace("..", "_").replace("~", "_") if value else value


def _assert_one_line_refusal(name: str, argv: list[str], status: int, stderr: str) -> None:
    assert "Traceback" not in stderr, (name, argv, stderr[-400:])
    if status != 0:
        lines = [line for line in stderr.splitlines() if line.strip()]
        assert len(lines) == 1, (name, argv, stderr[-400:])


@pytest.fixture
def scratch(tmp_path, monkeypatch, settings):
    monkeypatch.chdir(tmp_path)
    settings.SIGNING_DIR = tmp_path / "signing"
    settings.SIGNING_TIMESTAMP_URL = ""
    settings.EMAIL_BACKEND = "django.core.mail.backends.locmem.EmailBackend"
    (tmp_path / "random.pdf").write_bytes(bytes(range(256)) * 8)
    (tmp_path / "fake.pdf").write_bytes(b"%PDF-1.7\n not really")
    (tmp_path / "empty.pdf").write_bytes(b"")
    (tmp_path / "folder").mkdir()
    return tmp_path


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_no_argument_list_gives_a_traceback(name, scratch):
    """Any argument list: exit 0, or non-zero with one line on stderr; never a traceback.
    restore is never given --force here: a hostile list must not replace the test database."""
    flags = COMMANDS[name][1] + EXTRA_FLAGS
    files = ["random.pdf", "fake.pdf", "empty.pdf", "folder", "missing.pdf"]
    argument = st.one_of(st.sampled_from(flags), st.sampled_from(files), hostile_values)

    @FUZZ
    @given(argv=st.lists(argument.map(_kept_inside), max_size=6))
    def one(argv: list[str]) -> None:
        if name == "backup" and not argv:
            argv = ["folder"]
        status, stderr = run(name, argv)
        _assert_one_line_refusal(name, argv, status, stderr)

    one()


# --- import_record: a real record PDF whose record.json is made hostile -------------


def _record_pdf(record: object, schedule: str = "tag,from,to\n", raw: bytes | None = None):
    writer = pypdf.PdfWriter()
    writer.add_blank_page(width=200, height=200)
    writer.add_attachment("record.json", raw if raw is not None else json.dumps(record).encode())
    writer.add_attachment("schedule.csv", schedule.encode())
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def _base_record() -> dict:
    from wiring.render.data import SCHEMA, SCHEMA_VERSION

    return {
        "schema": SCHEMA,
        "schema_version": SCHEMA_VERSION,
        "shop": {"name": "Another Test Shop"},
        "job": {"number": "OTHER-2026-0001", "title": "Galley rework"},
        "owner": {"name": "Test Owner", "email": "owner@test.example"},
        "vehicle": {"kind": "van", "make": "Testmake", "model": "Tern", "year": 2020},
        "devices": [{"name": "Busbar", "kind": "busbar", "terminals": [{"name": "+"}]}],
        "circuits": [],
        "terminations": [{"circuit": "D-01", "end": "from", "polarity": "pos"}],
    }


PATHS = [
    ("shop",),
    ("job",),
    ("job", "title"),
    ("owner", "name"),
    ("owner", "email"),
    ("vehicle", "kind"),
    ("vehicle", "year"),
    ("vehicle", "identification"),
    ("vehicle", "dc_voltage"),
    ("devices",),
    ("devices", 0, "name"),
    ("devices", 0, "kind"),
    ("devices", 0, "terminals"),
    ("terminations",),
    ("terminations", 0, "circuit"),
]
json_values = st.one_of(
    hostile_values,
    st.integers(min_value=-(2**70), max_value=2**70),
    st.floats(allow_nan=False),
    st.booleans(),
    st.none(),
    st.lists(st.integers(), max_size=2),
    st.dictionaries(st.text(max_size=3), st.integers(), max_size=2),
)


def _set(record: dict, path: tuple, value) -> dict:
    target = record
    for step in path[:-1]:
        target = target[step]
    target[path[-1]] = value
    return record


@pytest.mark.parametrize("path", PATHS, ids=lambda p: ".".join(map(str, p)))
def test_import_record_refuses_a_hostile_record_in_one_line(path, scratch):
    @FUZZ
    @given(value=json_values, return_visit=st.booleans())
    def one(value, return_visit: bool) -> None:
        (scratch / "hostile.pdf").write_bytes(_record_pdf(_set(_base_record(), path, value)))
        argv = ["hostile.pdf"] + (["--return-visit"] if return_visit else [])
        status, stderr = run("import_record", argv)
        _assert_one_line_refusal("import_record", argv, status, stderr)

    one()


@pytest.mark.parametrize(
    "raw",
    [b"[" * 100_000, b'{"schema": ' + b"[" * 50_000 + b"]" * 50_000 + b"}", b"\xff\xfe", b""],
    ids=["nested", "nested-inside", "not-utf8", "empty"],
)
def test_import_record_refuses_unreadable_json_in_one_line(raw, scratch):
    (scratch / "hostile.pdf").write_bytes(_record_pdf(None, raw=raw))
    status, stderr = run("import_record", ["hostile.pdf"])
    assert status == 1
    _assert_one_line_refusal("import_record", ["hostile.pdf"], status, stderr)


# --- restore --check: a backup folder whose manifest is hostile ---------------------


def _manifest() -> dict:
    import hashlib

    from shop.backup.common import FORMAT, FORMAT_VERSION, SQLITE_FILE

    return {
        "format": FORMAT,
        "format_version": FORMAT_VERSION,
        "database": {"vendor": "sqlite", "file": SQLITE_FILE},
        "applied_migrations": {"shop": ["0001_initial"]},
        "counts": {"jobs": 1},
        "created_at": "2026-01-01T00:00:00+00:00",
        "signing_key_included": False,
        "files": [{"path": SQLITE_FILE, "size": 4, "sha256": hashlib.sha256(b"data").hexdigest()}],
    }


MANIFEST_PATHS = [
    ("format_version",),
    ("database",),
    ("database", "vendor"),
    ("database", "file"),
    ("applied_migrations",),
    ("counts",),
    ("files",),
    ("files", 0),
    ("files", 0, "path"),
    ("files", 0, "size"),
    ("files", 0, "sha256"),
]


@pytest.mark.parametrize("path", MANIFEST_PATHS, ids=lambda p: ".".join(map(str, p)))
def test_restore_check_refuses_a_hostile_manifest_in_one_line(path, scratch):
    """--check only reads: a manifest with any value anywhere is refused in one line."""
    from shop.backup.common import MANIFEST, SQLITE_FILE

    folder = scratch / "backup"
    folder.mkdir()
    (folder / SQLITE_FILE).write_bytes(b"data")

    @FUZZ
    @given(value=json_values)
    def one(value) -> None:
        (folder / MANIFEST).write_text(json.dumps(_set(_manifest(), path, value)))
        status, stderr = run("restore", ["backup", "--check"])
        _assert_one_line_refusal("restore", ["backup", "--check"], status, stderr)

    one()


@pytest.mark.parametrize(
    "raw", [b"[" * 100_000, b"\xff\xfe", b"", b"{" * 10], ids=["nested", "utf16", "empty", "open"]
)
def test_restore_check_refuses_an_unreadable_manifest_in_one_line(raw, scratch):
    from shop.backup.common import MANIFEST

    folder = scratch / "backup"
    folder.mkdir()
    (folder / MANIFEST).write_bytes(raw)
    status, stderr = run("restore", ["backup", "--check"])
    assert status != 0
    _assert_one_line_refusal("restore", ["backup", "--check"], status, stderr)


LINE_BREAKS = ["a\nb.pdf", "a\rb", "a\x1eb", "a\u2028b", "a\x0bb\x0cc"]


@pytest.mark.parametrize("text", LINE_BREAKS, ids=repr)
@pytest.mark.parametrize(
    "name,argv",
    [
        ("import_record", ["{}"]),
        ("verify_record", ["{}"]),
        ("render_record", ["{}", "-o", "out.pdf"]),
        ("render_record", ["NO-SUCH-JOB", "-o", "{}"]),
        ("signing_setup", ["--import", "{}"]),
        ("signing_setup", ["--import", "random.pdf", "--password-file", "{}"]),
        ("backup", ["folder/{}/x"]),
        ("restore", ["{}", "--check"]),
        ("send_reminders", ["--days", "{}"]),
    ],
)
def test_a_name_with_a_line_break_still_gives_one_line(name, argv, text, scratch):
    """Names a shell can pass (file names, job numbers) may hold line breaks; the refusal
    that repeats them is still one line."""
    argv = [a.replace("{}", text) for a in argv]
    status, stderr = run(name, argv)
    _assert_one_line_refusal(name, argv, status, stderr)
