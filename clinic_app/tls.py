"""The clinic's own certificate authority and the server certificate it signs.

Phones only run the offline app (service worker) from a secure origin, so each clinic gets a small
private root CA that is installed once per phone, and a server certificate for the laptop's fixed
address. Renewal re-issues the server certificate from the same CA, so phones need nothing new.

Files (under ``instance_dir``):

- ``tls/ca.crt``          the CA certificate (public; served on the enrolment page)
- ``tls/server.crt``      server certificate, ``tls/server.key`` its key (0600)
- ``ca-private/ca.key``   the CA key, kept apart in an owner-only folder (0700, file 0600) so it
  stays off the serving path and can be moved to removable media between renewals.

Name constraints: the CA may only vouch for the exact addresses given (an IPv4 /32 or IPv6 /128
each) and the given DNS names. The origin is fixed forever (all offline data on the phones is keyed
by it), so a wider subnet would buy nothing, while it would let a stolen CA key impersonate any
other machine on the clinic network (the router's admin page, a printer). An address family with no
address given is excluded entirely, and with no name given the only permitted DNS subtree is
``invalid`` (RFC 6761: never resolves), because a name form without a permitted subtree would
otherwise be unconstrained — and this root is trusted by the phone for all browsing.

Time is always a parameter (an aware ``datetime``); nothing here reads the clock.
"""

from __future__ import annotations

import datetime as dt
import ipaddress
import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import ec
from cryptography.x509.oid import ExtendedKeyUsageOID, NameOID

CA_VALID_YEARS = 10
# Apple refuses server certificates valid for more than 825 days, even under a user-installed
# root (support.apple.com/en-us/103769); stay well inside it, backdating included.
SERVER_VALID_DAYS = 800
# Phones in the field often run with a wrong clock; backdating "not before" by a day keeps a
# phone whose clock is a little behind from rejecting a freshly issued certificate.
BACKDATE = dt.timedelta(days=1)
NO_DNS_NAME = "invalid"

IpAddress = ipaddress.IPv4Address | ipaddress.IPv6Address


class TLSError(Exception):
    """A certificate operation was refused; the message is meant for the operator."""


@dataclass(frozen=True)
class TLSPaths:
    """Where the certificate files of one instance live."""

    ca_cert: Path
    ca_key: Path
    server_cert: Path
    server_key: Path

    @classmethod
    def for_instance(cls, instance_dir: str | os.PathLike[str]) -> TLSPaths:
        base = Path(instance_dir)
        return cls(
            ca_cert=base / "tls" / "ca.crt",
            ca_key=base / "ca-private" / "ca.key",
            server_cert=base / "tls" / "server.crt",
            server_key=base / "tls" / "server.key",
        )


def parse_ips(values: Iterable[str]) -> list[IpAddress]:
    """Parse IP address strings, refusing networks, duplicates and an empty list."""
    ips: list[IpAddress] = []
    for value in values:
        try:
            ip = ipaddress.ip_address(value.strip())
        except ValueError:
            raise TLSError(f"Not an IP address: {value!r}") from None
        if ip.is_unspecified:
            raise TLSError(f"{ip} is not a real address; give the laptop's fixed IP address.")
        if ip not in ips:
            ips.append(ip)
    if not ips:
        raise TLSError("Give at least one IP address (the laptop's fixed address).")
    return ips


def _clean_names(names: Iterable[str]) -> list[str]:
    cleaned: list[str] = []
    for name in names:
        name = name.strip().lower().rstrip(".")
        if not name or " " in name or "*" in name or name == NO_DNS_NAME:
            raise TLSError(f"Not a usable host name: {name!r}")
        if name not in cleaned:
            cleaned.append(name)
    return cleaned


def _name_constraints(ips: Sequence[IpAddress], names: Sequence[str]) -> x509.NameConstraints:
    permitted: list[x509.GeneralName] = [
        x509.IPAddress(ipaddress.ip_network(f"{ip}/{ip.max_prefixlen}")) for ip in ips
    ]
    permitted += [x509.DNSName(name) for name in names or [NO_DNS_NAME]]
    excluded: list[x509.GeneralName] = []
    if not any(ip.version == 4 for ip in ips):
        excluded.append(x509.IPAddress(ipaddress.ip_network("0.0.0.0/0")))
    if not any(ip.version == 6 for ip in ips):
        excluded.append(x509.IPAddress(ipaddress.ip_network("::/0")))
    return x509.NameConstraints(permitted_subtrees=permitted, excluded_subtrees=excluded or None)


def _add_years(when: dt.datetime, years: int) -> dt.datetime:
    try:
        return when.replace(year=when.year + years)
    except ValueError:  # 29 February into a non-leap year
        return when.replace(year=when.year + years, day=28)


def _require_aware(now: dt.datetime) -> None:
    if now.tzinfo is None:
        raise ValueError("now must be timezone-aware")


def _write_private(path: Path, data: bytes) -> None:
    """Write a key file created owner-only from the start (no window with wider permissions)."""
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(path.name + ".tmp")
    if tmp.exists():
        tmp.unlink()
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    with os.fdopen(fd, "wb") as handle:
        handle.write(data)
    os.replace(tmp, path)
    os.chmod(path, 0o600)  # Windows ignores all but the read-only bit; see docs/tls.md


def _write_public(path: Path, data: bytes) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(path.name + ".tmp")
    tmp.write_bytes(data)
    os.replace(tmp, path)


def _key_pem(key: ec.EllipticCurvePrivateKey) -> bytes:
    return key.private_bytes(
        serialization.Encoding.PEM,
        serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption(),
    )


def _key_usage(**allowed: bool) -> x509.KeyUsage:
    """A KeyUsage with only the ``allowed`` bits set."""
    bits = (
        "digital_signature",
        "content_commitment",
        "key_encipherment",
        "data_encipherment",
        "key_agreement",
        "key_cert_sign",
        "crl_sign",
        "encipher_only",
        "decipher_only",
    )
    return x509.KeyUsage(**{bit: allowed.get(bit, False) for bit in bits})


def _make_ca(
    clinic_name: str, ips: Sequence[IpAddress], names: Sequence[str], now: dt.datetime
) -> tuple[x509.Certificate, ec.EllipticCurvePrivateKey]:
    key = ec.generate_private_key(ec.SECP256R1())
    subject = x509.Name(
        [
            x509.NameAttribute(NameOID.COMMON_NAME, f"{clinic_name} Local CA"),
            x509.NameAttribute(NameOID.ORGANIZATION_NAME, clinic_name),
        ]
    )
    ski = x509.SubjectKeyIdentifier.from_public_key(key.public_key())
    cert = (
        x509.CertificateBuilder()
        .subject_name(subject)
        .issuer_name(subject)
        .public_key(key.public_key())
        .serial_number(x509.random_serial_number())
        .not_valid_before(now - BACKDATE)
        .not_valid_after(_add_years(now, CA_VALID_YEARS))
        .add_extension(x509.BasicConstraints(ca=True, path_length=0), critical=True)
        .add_extension(
            _key_usage(key_cert_sign=True, crl_sign=True),
            critical=True,
        )
        .add_extension(_name_constraints(ips, names), critical=True)
        .add_extension(ski, critical=False)
        .sign(key, hashes.SHA256())
    )
    return cert, key


def _make_server(
    ca_cert: x509.Certificate,
    ca_key: ec.EllipticCurvePrivateKey,
    ips: Sequence[IpAddress],
    names: Sequence[str],
    now: dt.datetime,
) -> tuple[x509.Certificate, ec.EllipticCurvePrivateKey]:
    key = ec.generate_private_key(ec.SECP256R1())
    # Browsers read only the SAN. The common name must not look like a host name: OpenSSL checks
    # such a CN against the CA's DNS constraints when the leaf has no DNS SAN, and an IP-like CN
    # ("192.168.1.10") would then break the "invalid"-only constraint. A space rules that out.
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, "Rehydration Desk server")])
    sans: list[x509.GeneralName] = [x509.IPAddress(ip) for ip in ips]
    sans += [x509.DNSName(name) for name in names]
    cert = (
        x509.CertificateBuilder()
        .subject_name(subject)
        .issuer_name(ca_cert.subject)
        .public_key(key.public_key())
        .serial_number(x509.random_serial_number())
        .not_valid_before(now - BACKDATE)
        .not_valid_after(now - BACKDATE + dt.timedelta(days=SERVER_VALID_DAYS))
        .add_extension(x509.BasicConstraints(ca=False, path_length=None), critical=True)
        .add_extension(
            _key_usage(digital_signature=True),
            critical=True,
        )
        .add_extension(x509.ExtendedKeyUsage([ExtendedKeyUsageOID.SERVER_AUTH]), critical=False)
        .add_extension(x509.SubjectAlternativeName(sans), critical=False)
        .add_extension(
            x509.AuthorityKeyIdentifier.from_issuer_public_key(ca_key.public_key()),
            critical=False,
        )
        .add_extension(x509.SubjectKeyIdentifier.from_public_key(key.public_key()), critical=False)
        .sign(ca_key, hashes.SHA256())
    )
    return cert, key


def _write_server(paths: TLSPaths, cert: x509.Certificate, key: ec.EllipticCurvePrivateKey) -> None:
    _write_private(paths.server_key, _key_pem(key))
    _write_public(paths.server_cert, cert.public_bytes(serialization.Encoding.PEM))


def init_ca_and_server(
    instance_dir: str | os.PathLike[str],
    ips: Iterable[str],
    names: Iterable[str],
    clinic_name: str,
    now: dt.datetime,
    *,
    force: bool = False,
) -> TLSPaths:
    """Create the clinic's root CA and a server certificate for ``ips`` and ``names``.

    Refuses to replace an existing CA unless ``force``: every enrolled phone trusts the old one
    and would have to be enrolled again.
    """
    _require_aware(now)
    ip_list = parse_ips(ips)
    name_list = _clean_names(names)
    clinic_name = clinic_name.strip() or "Clinic"
    paths = TLSPaths.for_instance(instance_dir)
    if not force and (paths.ca_cert.exists() or paths.ca_key.exists()):
        raise TLSError(
            f"A certificate authority already exists in {paths.ca_cert.parent}. Every enrolled "
            "phone trusts it; use 'tls renew' to re-issue the server certificate instead."
        )
    ca_cert, ca_key = _make_ca(clinic_name, ip_list, name_list, now)
    paths.ca_key.parent.mkdir(parents=True, exist_ok=True)
    os.chmod(paths.ca_key.parent, 0o700)
    _write_private(paths.ca_key, _key_pem(ca_key))
    _write_public(paths.ca_cert, ca_cert.public_bytes(serialization.Encoding.PEM))
    _write_server(paths, *_make_server(ca_cert, ca_key, ip_list, name_list, now))
    return paths


def _outside_constraints(
    constraints: x509.NameConstraints, ips: Sequence[IpAddress], names: Sequence[str]
) -> list[str]:
    """The addresses and names the CA's permitted subtrees do not cover."""
    permitted = constraints.permitted_subtrees or []
    nets = [g.value for g in permitted if isinstance(g, x509.IPAddress)]
    dns = [g.value for g in permitted if isinstance(g, x509.DNSName)]
    bad = [str(ip) for ip in ips if not any(ip in net for net in nets)]
    bad += [n for n in names if not any(n == d or n.endswith("." + d) for d in dns)]
    return bad


def load_ca(paths: TLSPaths) -> tuple[x509.Certificate, ec.EllipticCurvePrivateKey]:
    """Read the CA certificate and key, with an operator-readable error when missing."""
    if not paths.ca_cert.exists():
        raise TLSError("No certificate authority yet: run 'tls init --ip <laptop address>' first.")
    if not paths.ca_key.exists():
        raise TLSError(
            f"The CA key is not at {paths.ca_key}. Put it back (e.g. from the removable drive) "
            "to renew the server certificate."
        )
    ca_cert = x509.load_pem_x509_certificate(paths.ca_cert.read_bytes())
    ca_key = serialization.load_pem_private_key(paths.ca_key.read_bytes(), password=None)
    if not isinstance(ca_key, ec.EllipticCurvePrivateKey):
        raise TLSError("The CA key has an unexpected type.")
    return ca_cert, ca_key


def renew_server(
    instance_dir: str | os.PathLike[str],
    now: dt.datetime,
    ips: Iterable[str] | None = None,
    names: Iterable[str] | None = None,
) -> TLSPaths:
    """Re-issue the server certificate from the same CA (phones keep trusting it).

    Without ``ips``/``names`` the addresses of the current server certificate are kept. New
    addresses must lie inside the CA's name constraints, otherwise phones would reject them.
    """
    _require_aware(now)
    paths = TLSPaths.for_instance(instance_dir)
    ca_cert, ca_key = load_ca(paths)
    if ips is None or names is None:
        current = server_addresses(paths.server_cert)
        ip_list = parse_ips(ips) if ips is not None else current[0]
        name_list = _clean_names(names) if names is not None else current[1]
    else:
        ip_list, name_list = parse_ips(ips), _clean_names(names)
    constraints = ca_cert.extensions.get_extension_for_class(x509.NameConstraints).value
    outside = _outside_constraints(constraints, ip_list, name_list)
    if outside:
        raise TLSError(
            "The clinic's CA does not cover " + ", ".join(outside) + ". Phones would refuse it; "
            "a new address needs a new CA ('tls init --force') and every phone enrolled again."
        )
    _write_server(paths, *_make_server(ca_cert, ca_key, ip_list, name_list, now))
    return paths


def server_addresses(cert_path: str | os.PathLike[str]) -> tuple[list[IpAddress], list[str]]:
    """The IP addresses and DNS names a server certificate covers."""
    path = Path(cert_path)
    if not path.exists():
        raise TLSError(f"No server certificate at {path}: run 'tls init' first.")
    cert = x509.load_pem_x509_certificate(path.read_bytes())
    san = cert.extensions.get_extension_for_class(x509.SubjectAlternativeName).value
    return list(san.get_values_for_type(x509.IPAddress)), san.get_values_for_type(x509.DNSName)


def not_after(cert_path: str | os.PathLike[str]) -> dt.datetime:
    """The moment a certificate stops being valid (aware, UTC)."""
    cert = x509.load_pem_x509_certificate(Path(cert_path).read_bytes())
    return cert.not_valid_after_utc


def days_until_expiry(cert_path: str | os.PathLike[str], now: dt.datetime) -> int:
    """Whole days left before the certificate expires (negative once expired)."""
    _require_aware(now)
    return (not_after(cert_path) - now).days


def ca_fingerprint_sha256(ca_cert_path: str | os.PathLike[str]) -> str:
    """SHA-256 fingerprint of the CA certificate as colon-separated upper-case hex pairs."""
    cert = x509.load_pem_x509_certificate(Path(ca_cert_path).read_bytes())
    return cert.fingerprint(hashes.SHA256()).hex(":").upper()


def ca_der(ca_cert_path: str | os.PathLike[str]) -> bytes:
    """The CA certificate in DER form, the encoding every phone's installer accepts."""
    cert = x509.load_pem_x509_certificate(Path(ca_cert_path).read_bytes())
    return cert.public_bytes(serialization.Encoding.DER)
