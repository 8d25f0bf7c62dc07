"""Ampwright settings: one module, driven by the environment, with safe local defaults.

Documented variables (see README "Running for a real shop"):
SECRET_KEY, DEBUG, ALLOWED_HOSTS, CSRF_TRUSTED_ORIGINS, TIME_ZONE, DATABASE_URL,
SECURE_SSL_REDIRECT, SECURE_PROXY_SSL_HEADER, SECURE_HSTS_SECONDS, MEDIA_ROOT,
MEDIA_STORAGE_BACKEND / MEDIA_STORAGE_OPTIONS (JSON) for an S3-compatible store,
REVERSE_PROXY_COUNT, SESSION_IDLE_MINUTES, SIGN_IN_FAILURE_LIMIT, SIGN_IN_COOLOFF_MINUTES,
SIGNING_DIR, SIGNING_TIMESTAMP_URL, RECORD_RENDER_PROCESSES, RECORD_SPLIT_MIN_ENDS.
"""

from __future__ import annotations

import json
import os
import secrets
from datetime import timedelta
from pathlib import Path

import dj_database_url
from csp.constants import NONE, SELF

BASE_DIR = Path(__file__).resolve().parent.parent
VAR_DIR = Path(os.environ.get("AMPWRIGHT_VAR_DIR", BASE_DIR / "var"))


def env_bool(name: str, default: bool) -> bool:
    value = os.environ.get(name)
    if value is None or value == "":
        return default
    return value.strip().lower() in {"1", "true", "yes", "on"}


def env_list(name: str, default: str) -> list[str]:
    return [item.strip() for item in os.environ.get(name, default).split(",") if item.strip()]


def env_int(name: str, default: int, *, minimum: int) -> int:
    """A whole number from the environment; a typo stops the start-up with its name rather
    than silently running with no limit."""
    value = os.environ.get(name, "").strip()
    if not value:
        return default
    try:
        number = int(value)
    except ValueError:
        raise ValueError(f"{name} must be a whole number, not {value!r}") from None
    if number < minimum:
        raise ValueError(f"{name} must be at least {minimum}, not {number}")
    return number


def _local_secret_key() -> str:
    """Generate the key once into var/secret_key (ignored by git) so sessions survive restarts."""
    path = VAR_DIR / "secret_key"
    if path.exists():
        return path.read_text().strip()
    VAR_DIR.mkdir(parents=True, exist_ok=True)
    key = secrets.token_urlsafe(50)
    path.write_text(key)
    path.chmod(0o600)
    return key


SECRET_KEY = os.environ.get("SECRET_KEY") or _local_secret_key()
# Local default is the developer's machine; production sets DEBUG=0 (README).
DEBUG = env_bool("DEBUG", True)
ALLOWED_HOSTS = env_list("ALLOWED_HOSTS", "127.0.0.1,localhost,[::1]")
CSRF_TRUSTED_ORIGINS = env_list("CSRF_TRUSTED_ORIGINS", "")

INSTALLED_APPS = [
    "django.contrib.admin",
    "django.contrib.auth",
    "django.contrib.contenttypes",
    "django.contrib.sessions",
    "django.contrib.messages",
    "whitenoise.runserver_nostatic",
    "django.contrib.staticfiles",
    "django_htmx",
    "template_partials",
    "axes",
    "csp",
    "shop",
    "circuits",
    "inspections",
    "insights",
    "wiring",
    "reminders",
]

MIDDLEWARE = [
    # First, so everything after it (sign-in throttling, the security log) sees the
    # device's address rather than the reverse proxy's.
    "shop.middleware.ClientAddressMiddleware",
    # A NUL character in the path or query string is refused with 400 before any view
    # puts it into a query (PostgreSQL raises DataError on NUL).
    "shop.request_guard.RejectNulCharactersMiddleware",
    "django.middleware.security.SecurityMiddleware",
    "csp.middleware.CSPMiddleware",
    "shop.middleware.PermissionsPolicyMiddleware",
    "whitenoise.middleware.WhiteNoiseMiddleware",
    "django.contrib.sessions.middleware.SessionMiddleware",
    "django.middleware.common.CommonMiddleware",
    "django.middleware.csrf.CsrfViewMiddleware",
    "django.contrib.auth.middleware.AuthenticationMiddleware",
    "shop.middleware.SessionIdleTimeoutMiddleware",
    "shop.middleware.NoStoreForSignedInMiddleware",
    "django.contrib.messages.middleware.MessageMiddleware",
    "django.middleware.clickjacking.XFrameOptionsMiddleware",
    "django_htmx.middleware.HtmxMiddleware",
    "shop.middleware.HtmxSignInRedirectMiddleware",
    # Last, as django-axes asks: it turns a locked-out sign-in into the lock-out page.
    "axes.middleware.AxesMiddleware",
]

ROOT_URLCONF = "shop.urls"
WSGI_APPLICATION = "shop.wsgi.application"

TEMPLATES = [
    {
        "BACKEND": "django.template.backends.django.DjangoTemplates",
        "DIRS": [BASE_DIR / "templates"],
        "APP_DIRS": True,
        "OPTIONS": {
            "context_processors": [
                "django.template.context_processors.request",
                "django.contrib.auth.context_processors.auth",
                "django.contrib.messages.context_processors.messages",
                "shop.context_processors.shop_context",
            ],
        },
    },
]

# Database: SQLite in WAL mode unless DATABASE_URL names another server (PostgreSQL).
# IMMEDIATE transactions plus a 20 s busy timeout make concurrent tablet writes queue
# instead of failing with "database is locked"; keep transactions short (no ATOMIC_REQUESTS).
if os.environ.get("DATABASE_URL"):
    DATABASES = {"default": dj_database_url.parse(os.environ["DATABASE_URL"], conn_max_age=60)}
    DATABASES["default"]["CONN_HEALTH_CHECKS"] = True
else:
    VAR_DIR.mkdir(parents=True, exist_ok=True)
    DATABASES = {
        "default": {
            "ENGINE": "django.db.backends.sqlite3",
            "NAME": VAR_DIR / "ampwright.sqlite3",
            "OPTIONS": {
                "transaction_mode": "IMMEDIATE",
                "timeout": 20,
                "init_command": "PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL;",
            },
            # A file, not memory, so tests run on the same journal mode as the shop does
            # and the live server thread of the browser tests shares it; one file per
            # test process so two runs side by side never share a database.
            "TEST": {"NAME": VAR_DIR / f"test-ampwright-{os.getpid()}.sqlite3"},
            # Keep each worker's connection between requests (as for PostgreSQL above):
            # opening the file and running the PRAGMAs on every request cost more than
            # the reading the tablet sent.
            "CONN_MAX_AGE": 60,
            "CONN_HEALTH_CHECKS": True,
        }
    }

DEFAULT_AUTO_FIELD = "django.db.models.BigAutoField"

AUTH_PASSWORD_VALIDATORS = [
    {"NAME": "django.contrib.auth.password_validation.UserAttributeSimilarityValidator"},
    {"NAME": "django.contrib.auth.password_validation.MinimumLengthValidator"},
    {"NAME": "django.contrib.auth.password_validation.CommonPasswordValidator"},
    {"NAME": "django.contrib.auth.password_validation.NumericPasswordValidator"},
]

LOGIN_URL = "login"
LOGIN_REDIRECT_URL = "job_list"
LOGOUT_REDIRECT_URL = "login"

# Sign-in throttling (django-axes), on the app's sign-in and the admin's alike: after
# SIGN_IN_FAILURE_LIMIT wrong passwords for one username from one address, that username
# cannot sign in from that address for SIGN_IN_COOLOFF_MINUTES. Keyed on the pair so a
# colleague on the same tablet still signs in, and nobody elsewhere can lock a name out
# by guessing at it. `manage.py axes_reset_username NAME` lifts a lock early (README).
AUTHENTICATION_BACKENDS = [
    "axes.backends.AxesStandaloneBackend",  # first: it refuses locked pairs before any check
    "django.contrib.auth.backends.ModelBackend",
]
AXES_FAILURE_LIMIT = env_int("SIGN_IN_FAILURE_LIMIT", 5, minimum=1)
SIGN_IN_COOLOFF = timedelta(minutes=env_int("SIGN_IN_COOLOFF_MINUTES", 15, minimum=1))
AXES_COOLOFF_TIME = SIGN_IN_COOLOFF
AXES_LOCKOUT_PARAMETERS = [["username", "ip_address"]]
# Tries during a lock-out are refused without extending it, so the page's "15 minutes
# from the last failed try" holds and a locked person is not kept out by their own retries.
AXES_RESET_COOL_OFF_ON_FAILURE_DURING_LOCKOUT = False
AXES_RESET_ON_SUCCESS = True  # a few slips before a good sign-in do not count towards later
AXES_LOCKOUT_TEMPLATE = "registration/locked_out.html"
AXES_HTTP_RESPONSE_CODE = 429
# Successful sign-ins are not copied into axes' own table: the security log records what
# matters, and the table would only grow.
AXES_DISABLE_ACCESS_LOG = True
# ClientAddressMiddleware has already put the device's address in REMOTE_ADDR.
AXES_IPWARE_META_PRECEDENCE_ORDER = ("REMOTE_ADDR",)
# Number of reverse proxies in front of the app that append to X-Forwarded-For (README);
# 0 trusts no forwarded header at all.
REVERSE_PROXY_COUNT = env_int("REVERSE_PROXY_COUNT", 0, minimum=0)

# Sessions on shared tablets end after SESSION_IDLE_MINUTES without a request
# (SessionIdleTimeoutMiddleware keeps an active session's expiry moving).
SESSION_IDLE_MINUTES = env_int("SESSION_IDLE_MINUTES", 30, minimum=1)
SESSION_COOKIE_AGE = SESSION_IDLE_MINUTES * 60
SESSION_SAVE_EVERY_REQUEST = False  # one write a minute per session is enough (SQLite)

# Request size limits. Form posts (a circuit, a device with its terminals, a pasted
# waiver reason) stay far below 2.5 MB; uploaded files do not count towards it. The CSV
# import refuses files over 2 MB itself, and photos (next) go up to about 10 MB: files
# over FILE_UPLOAD_MAX_MEMORY_SIZE are streamed to a temporary file instead of held in
# memory. Django has no limit on a whole multipart body, so the reverse proxy's
# (README: 12 MB) is the one that stops a huge upload before it reaches a worker.
DATA_UPLOAD_MAX_MEMORY_SIZE = 2_621_440  # 2.5 MiB of non-file form data
FILE_UPLOAD_MAX_MEMORY_SIZE = 2_621_440  # larger files go to a temporary file
# The largest form, a device with its terminal formset (about 8 fields a terminal), stays
# under 500 fields even for a 60-stud busbar; 1,000 leaves room and still refuses a post
# built to make the parser hold hundreds of thousands of fields.
DATA_UPLOAD_MAX_NUMBER_FIELDS = 1000
DATA_UPLOAD_MAX_NUMBER_FILES = 20  # a handful of photos at once, never hundreds

# Content-Security-Policy (django-csp): nothing inline, nothing from elsewhere. Pages keep
# scripts and styles in static/; the diagram and QR codes are inline SVG styled by
# presentation attributes, which style-src does not govern.
CONTENT_SECURITY_POLICY = {
    "DIRECTIVES": {
        "default-src": [SELF],
        "script-src": [SELF],
        "style-src": [SELF],
        "img-src": [SELF],
        "font-src": [SELF],
        "connect-src": [SELF],
        "form-action": [SELF],
        "frame-ancestors": [NONE],
        "base-uri": [NONE],
        "object-src": [NONE],
    }
}
# Browser features the app does not use are off; the camera stays available to the app's
# own pages for job photos.
PERMISSIONS_POLICY = {
    "camera": ["self"],
    "microphone": [],
    "geolocation": [],
    "payment": [],
    "usb": [],
    "serial": [],
    "hid": [],
    "midi": [],
    "accelerometer": [],
    "gyroscope": [],
    "magnetometer": [],
    "display-capture": [],
    "xr-spatial-tracking": [],
    "browsing-topics": [],
}

LANGUAGE_CODE = "en"
TIME_ZONE = os.environ.get("TIME_ZONE", "UTC")
USE_I18N = True
USE_TZ = True

STATIC_URL = "static/"
STATICFILES_DIRS = [BASE_DIR / "static"]
STATIC_ROOT = Path(os.environ.get("STATIC_ROOT", VAR_DIR / "static"))
STATIC_ROOT.mkdir(parents=True, exist_ok=True)
MEDIA_URL = "media/"
MEDIA_ROOT = Path(os.environ.get("MEDIA_ROOT", VAR_DIR / "media"))

# Files (logos, photos, PDFs) go through the storage API; several app servers share an
# S3-compatible store by naming its backend and options here (README).
STORAGES = {
    "default": {
        "BACKEND": os.environ.get(
            "MEDIA_STORAGE_BACKEND", "django.core.files.storage.FileSystemStorage"
        ),
        "OPTIONS": json.loads(os.environ.get("MEDIA_STORAGE_OPTIONS", "{}")),
    },
    "staticfiles": {
        "BACKEND": (
            "django.contrib.staticfiles.storage.StaticFilesStorage"
            if DEBUG
            else "whitenoise.storage.CompressedManifestStaticFilesStorage"
        ),
    },
}
WHITENOISE_USE_FINDERS = DEBUG

# Production hardening: on whenever DEBUG is off, so `check --deploy` is clean.
if not DEBUG:
    SECURE_SSL_REDIRECT = env_bool("SECURE_SSL_REDIRECT", True)
    SECURE_HSTS_SECONDS = int(os.environ.get("SECURE_HSTS_SECONDS", "31536000"))
    SECURE_HSTS_INCLUDE_SUBDOMAINS = env_bool("SECURE_HSTS_INCLUDE_SUBDOMAINS", True)
    SECURE_HSTS_PRELOAD = env_bool("SECURE_HSTS_PRELOAD", False)
    SESSION_COOKIE_SECURE = True
    CSRF_COOKIE_SECURE = True
    if env_bool("SECURE_PROXY_SSL_HEADER", False):
        # Only behind a reverse proxy that sets this header itself.
        SECURE_PROXY_SSL_HEADER = ("HTTP_X_FORWARDED_PROTO", "https")
    SILENCED_SYSTEM_CHECKS = [] if SECURE_HSTS_PRELOAD else ["security.W021"]

# Password-set links for new staff go by e-mail; the console backend prints them (a shop
# with a mail server sets EMAIL_BACKEND=django.core.mail.backends.smtp.EmailBackend and
# Django's EMAIL_HOST/EMAIL_PORT/... variables).
EMAIL_BACKEND = os.environ.get("EMAIL_BACKEND", "django.core.mail.backends.console.EmailBackend")
EMAIL_HOST = os.environ.get("EMAIL_HOST", "localhost")
EMAIL_PORT = int(os.environ.get("EMAIL_PORT", "25"))
DEFAULT_FROM_EMAIL = os.environ.get("DEFAULT_FROM_EMAIL", "ampwright@localhost")

# The shop's signing key and certificate for the wiring record (manage.py signing_setup):
# outside MEDIA_ROOT so no media URL or storage backend can ever hand the key out; the
# directory is mode 0700 and the files 0600 (the app's user alone reads them).
SIGNING_DIR = Path(os.environ.get("SIGNING_DIR", VAR_DIR / "signing"))
# An RFC 3161 timestamp server; when set, each record's signature carries its timestamp
# token (PAdES B-T). Empty: the signature alone (PAdES B-B), nothing leaves the server.
SIGNING_TIMESTAMP_URL = os.environ.get("SIGNING_TIMESTAMP_URL", "").strip()

# A long wiring record is laid out in this many processes at once (wiring/render/split.py;
# at most 2 are used): from its torque log on in a worker, the rest here. 1 lays every record
# out in the app's own process. Only records of at least RECORD_SPLIT_MIN_ENDS conductor
# ends are split: for a short one, starting the worker costs more than it saves.
RECORD_RENDER_PROCESSES = env_int("RECORD_RENDER_PROCESSES", 2, minimum=1)
RECORD_SPLIT_MIN_ENDS = env_int("RECORD_SPLIT_MIN_ENDS", 200, minimum=1)

LOGGING = {
    "version": 1,
    "disable_existing_loggers": False,
    "formatters": {"security": {"format": "%(asctime)s security %(message)s"}},
    "handlers": {
        "console": {"class": "logging.StreamHandler"},
        "security_stdout": {
            "class": "logging.StreamHandler",
            "stream": "ext://sys.stdout",
            "formatter": "security",
        },
    },
    "root": {"handlers": ["console"], "level": os.environ.get("LOG_LEVEL", "WARNING")},
    # Sign-in failures, lock-outs, refusals, imports and deletions (shop.security).
    "loggers": {
        "security": {
            "handlers": ["security_stdout"],
            "level": os.environ.get("SECURITY_LOG_LEVEL", "INFO"),
            "propagate": False,
        },
        # django-axes logs each failure itself; the security logger already records them
        # (shop.signals), so only its errors are kept.
        "axes": {"level": "ERROR"},
    },
}
