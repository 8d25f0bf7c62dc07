"""Create the shop's signing key and self-signed certificate, or import its PKCS#12 file.

    python manage.py signing_setup                      # a new key for the shop's name
    python manage.py signing_setup --demo               # the same, marked as a demo key
    python manage.py signing_setup --import shop.p12 --password-file p12-password.txt
    python manage.py signing_setup --replace            # a new key; old records still verify

The key stays on the server, in settings.SIGNING_DIR (env SIGNING_DIR; default
var/signing, outside the media store), mode 0600 in a 0700 directory. An existing key is
never overwritten without --replace; a replaced certificate is kept so records signed
with it still verify."""

from __future__ import annotations

from pathlib import Path

from django.core.management.base import BaseCommand, CommandError

from shop.management.one_line import OneLineArgumentErrors
from shop.models import ShopProfile
from wiring import signing


class Command(OneLineArgumentErrors, BaseCommand):
    help = "Create (or import) the shop's key and certificate for signing wiring records."

    def add_arguments(self, parser) -> None:
        parser.add_argument("--import", dest="import_file", metavar="FILE.p12")
        parser.add_argument("--password-file", metavar="FILE", help="Password of the PKCS#12.")
        parser.add_argument("--replace", action="store_true", help="Replace an existing key.")
        parser.add_argument("--demo", action="store_true", help="Mark the key as a demo key.")
        parser.add_argument("--shop-name", help="Name on the certificate (default: the shop's).")

    def handle(
        self,
        *args,
        import_file=None,
        password_file=None,
        replace=False,
        demo=False,
        shop_name=None,
        **options,
    ) -> None:
        try:
            if import_file:
                if demo:
                    raise CommandError("--demo makes a new key; it cannot mark an imported one.")
                credentials = signing.import_pkcs12(
                    _read(import_file, "PKCS#12 file"),
                    _password(password_file),
                    replace=replace,
                )
            else:
                name = shop_name or ShopProfile.load().name
                credentials = signing.create_key(shop_name=name, demo=demo, replace=replace)
        except signing.SigningError as error:
            raise CommandError(str(error)) from None
        self.stdout.write(
            f"Signing key ready in {signing.signing_dir()}: {credentials.subject}"
            f", certificate SHA-256 {credentials.fingerprint}"
        )


def _read(name: str, what: str) -> bytes:
    try:
        return Path(name).read_bytes()
    except OSError as error:
        raise CommandError(f"Cannot read the {what} {name}: {error.strerror}") from None


def _password(name: str | None) -> bytes | None:
    if not name:
        return None
    # The file's one line; a trailing newline from an editor is not part of the password.
    return _read(name, "password file").rstrip(b"\r\n") or None
