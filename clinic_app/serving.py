"""Checks run before the server starts, and the cheroot server itself (plain or TLS).

Why the address check binds a socket: the operating system's own ``bind()`` is the authority on
which addresses belong to this machine. Binding to an address that no interface holds fails with
EADDRNOTAVAIL on Linux ("Cannot assign requested address") and WSAEADDRNOTAVAIL (10049, "The
requested address is not valid in its context") on Windows. That is exactly the check the real
server's ``bind()`` will make, with no parsing of ``ip``/``ipconfig`` output (whose wording is
localised on Windows) and no extra package. Port 0 lets the kernel pick a free port, so the probe
never collides with a port in use, and nothing is left listening. The one exception is a Linux
box configured with ``net.ipv4.ip_nonlocal_bind=1`` (rare on a clinic laptop), where any address
binds; the real server would then start and simply never receive traffic.
"""

from __future__ import annotations

import datetime as dt
import errno
import ipaddress
import socket
import threading
from pathlib import Path

from clinic_app import tls

# 10049: WSAEADDRNOTAVAIL on Windows; EAFNOSUPPORT: a machine without IPv6 has no IPv6 address.
_NOT_LOCAL = {errno.EADDRNOTAVAIL, errno.EAFNOSUPPORT, 10049}


def cert_dir(app) -> Path:
    """The folder holding ``tls/`` and ``ca-private/``: config CERT_DIR, else the instance."""
    return Path(app.config.get("CERT_DIR") or app.instance_path)


def backup_dir(app) -> Path:
    """The folder of the daily backups: config BACKUP_DIR, else ``<instance>/backups``."""
    return Path(app.config.get("BACKUP_DIR") or Path(app.instance_path) / "backups")


class ServeError(Exception):
    """The server must not start; the message tells the operator why and what to do."""


def address_is_local(ip: str) -> bool:
    """True when ``ip`` is assigned to one of this machine's network interfaces."""
    address = ipaddress.ip_address(ip)
    family = socket.AF_INET6 if address.version == 6 else socket.AF_INET
    try:
        with socket.socket(family, socket.SOCK_STREAM) as probe:
            probe.bind((str(address), 0))
    except OSError as exc:
        if exc.errno in _NOT_LOCAL or getattr(exc, "winerror", None) in _NOT_LOCAL:
            return False
        raise
    return True


def require_local_address(host: str) -> str:
    """Refuse (ServeError) a host that is not one fixed IP address held by this machine."""
    try:
        address = ipaddress.ip_address(host)
    except ValueError:
        raise ServeError(
            f"HOST is {host!r}. Set it to the laptop's fixed IP address (for example "
            "192.168.1.10): phones reach the app by that address, and it is part of the "
            "app's origin."
        ) from None
    if address.is_unspecified:
        raise ServeError(
            f"HOST is {host}, which means every interface. Set it to the laptop's fixed IP "
            "address, the one the certificate and the phones use."
        )
    if not address_is_local(str(address)):
        raise ServeError(
            f"This computer has no network interface with the address {address}. Phones look "
            "for the app at that fixed address: check that the laptop is connected to the clinic "
            "Wi-Fi and that its address is still reserved (or set statically), then start again."
        )
    return str(address)


def require_certificate_for(host: str, instance_dir: str, now: dt.datetime) -> tls.TLSPaths:
    """Refuse (ServeError) to serve HTTPS without a valid server certificate for ``host``."""
    paths = tls.TLSPaths.for_instance(instance_dir)
    if not paths.server_cert.exists() or not paths.server_key.exists():
        raise ServeError(
            "There is no server certificate yet. Run "
            f"'flask --app clinic_app tls init --ip {host}' first."
        )
    ips, _names = tls.server_addresses(paths.server_cert)
    if ipaddress.ip_address(host) not in ips:
        covered = ", ".join(str(ip) for ip in ips)
        raise ServeError(
            f"The server certificate is for {covered}, not {host}; phones would refuse it. "
            "Serve on the certificate's address, or issue a certificate for this one."
        )
    if tls.days_until_expiry(paths.server_cert, now) < 0:
        raise ServeError(
            "The server certificate has expired. Run 'flask --app clinic_app tls renew'."
        )
    return paths


def make_server(app, host: str, port: int, *, threads: int = 8, paths: tls.TLSPaths | None = None):
    """A threaded cheroot WSGI server; HTTPS with cheroot's builtin TLS adapter when ``paths``."""
    from cheroot import wsgi

    server = wsgi.Server((host, port), app, numthreads=threads)
    if paths is not None:
        from cheroot.ssl.builtin import BuiltinSSLAdapter

        server.ssl_adapter = BuiltinSSLAdapter(str(paths.server_cert), str(paths.server_key))
    return server


def origin(host: str, port: int, scheme: str = "https") -> str:
    """The origin phones use, e.g. ``https://192.168.1.10:8443`` (IPv6 in brackets)."""
    shown = f"[{host}]" if ":" in host else host
    return f"{scheme}://{shown}:{port}"


# The plain-HTTP server answers only these paths: the enrolment page, its certificate download
# and the static files it uses. Everything else would be the app without TLS.
ENROL_PREFIXES = ("/enrol/", "/static/")


def enrol_only(app):
    """Wrap a WSGI app so that only the enrolment paths reach it; the rest redirect there."""

    def wsgi(environ, start_response):
        path = environ.get("PATH_INFO", "")
        if path == "/enrol" or path.startswith(ENROL_PREFIXES):
            return app(environ, start_response)
        start_response(
            "302 Found",
            [("Location", "/enrol"), ("Content-Length", "0"), ("Cache-Control", "no-store")],
        )
        return [b""]

    return wsgi


def daily_backup_loop(db_path, backup_dir, now, stop, log, interval: float = 3600) -> None:
    """Take the daily backup when due, then check again every ``interval`` seconds until
    ``stop`` is set. A failed backup is reported and retried; it never stops the server."""
    import sqlite3

    from clinic_app.storage.backup import BackupError, maybe_daily_backup

    while True:
        try:
            made = maybe_daily_backup(db_path, backup_dir, now())
            if made is not None:
                log(f"Daily backup written to {made}")
        except (BackupError, sqlite3.Error, OSError) as exc:
            log(f"Daily backup failed: {exc}")
        if stop.wait(interval):
            return


def start_daily_backups(app, log) -> threading.Event:
    """Run ``daily_backup_loop`` for ``app`` in a daemon thread (both ways of serving do).

    The first check runs at once, so a server started after a day without one takes its backup
    straight away. Set the returned event to stop the loop.
    """
    from clinic_app import clock

    stop = threading.Event()
    threading.Thread(
        target=daily_backup_loop, daemon=True, name="daily-backup",
        args=(app.config["DATABASE"], backup_dir(app), app.config.get("CLOCK") or clock.system_now,
              stop, log),
    ).start()
    return stop
