"""The clinic CA and server certificate, checked by Python's ssl in real handshakes."""

import datetime as dt
import hashlib
import ipaddress
import os
import ssl
import sys

import pytest
from cryptography import x509
from cryptography.x509.oid import ExtendedKeyUsageOID

from clinic_app import tls

NOW = dt.datetime(2026, 12, 2, 14, 0, tzinfo=dt.UTC)
# OpenSSL checks validity against the real clock, so certificates used in a handshake are issued
# at the real time; the content checks use the fixed NOW.
REAL_NOW = dt.datetime.now(dt.UTC).replace(microsecond=0)  # certificates keep whole seconds
posix_only = pytest.mark.skipif(sys.platform == "win32", reason="POSIX permission bits")


@pytest.fixture
def instance(tmp_path):
    tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya Hill", REAL_NOW)
    return tmp_path


def _load(path):
    return x509.load_pem_x509_certificate(path.read_bytes())


def _ext(cert, cls):
    return cert.extensions.get_extension_for_class(cls)


def _rogue_leaf(paths, ips, names, tmp_path):
    """A certificate the clinic CA signs outside its constraints, as a stolen key could."""
    ca_cert, ca_key = tls.load_ca(paths)
    cert, key = tls._make_server(
        ca_cert, ca_key, [ipaddress.ip_address(i) for i in ips], names, REAL_NOW
    )
    rogue = tls.TLSPaths(
        paths.ca_cert, paths.ca_key, tmp_path / "rogue.crt", tmp_path / "rogue.key"
    )
    tls._write_server(rogue, cert, key)
    return rogue


def test_it_verifies_a_handshake_for_the_given_ip_with_the_ca_as_only_anchor(
    instance, tls_server, handshake
):
    paths = tls.TLSPaths.for_instance(instance)
    with tls_server("127.0.0.1", paths.server_cert, paths.server_key) as port:
        assert handshake("127.0.0.1", port, paths.ca_cert, "127.0.0.1") == b"ok"


def test_it_fails_verification_for_another_ip(instance, tls_server, handshake):
    paths = tls.TLSPaths.for_instance(instance)
    # The whole of 127.0.0.0/8 is on Linux's loopback interface, so 127.0.0.2 needs no setup.
    with tls_server("127.0.0.2", paths.server_cert, paths.server_key) as port:
        with pytest.raises(ssl.SSLCertVerificationError, match="IP address mismatch"):
            handshake("127.0.0.2", port, paths.ca_cert, "127.0.0.2")


def test_it_fails_verification_for_a_name(instance, tls_server, handshake):
    paths = tls.TLSPaths.for_instance(instance)
    with tls_server("127.0.0.1", paths.server_cert, paths.server_key) as port:
        with pytest.raises(ssl.SSLCertVerificationError, match="Hostname mismatch"):
            handshake("127.0.0.1", port, paths.ca_cert, "clinic.test")


def test_it_fails_without_the_clinic_ca_as_trust_anchor(instance, tmp_path, tls_server, handshake):
    other = tmp_path / "other"
    tls.init_ca_and_server(other, ["127.0.0.1"], [], "Other Clinic", REAL_NOW)
    paths = tls.TLSPaths.for_instance(instance)
    with tls_server("127.0.0.1", paths.server_cert, paths.server_key) as port:
        with pytest.raises(ssl.SSLCertVerificationError, match="unable to get local issuer"):
            handshake("127.0.0.1", port, tls.TLSPaths.for_instance(other).ca_cert, "127.0.0.1")


def test_it_verifies_a_given_dns_name(tmp_path, tls_server, handshake):
    paths = tls.init_ca_and_server(tmp_path, ["127.0.0.1"], ["desk.clinic.test"], "Mbeya", REAL_NOW)
    with tls_server("127.0.0.1", paths.server_cert, paths.server_key) as port:
        assert handshake("127.0.0.1", port, paths.ca_cert, "desk.clinic.test") == b"ok"
        assert handshake("127.0.0.1", port, paths.ca_cert, "127.0.0.1") == b"ok"


@pytest.mark.parametrize(
    "ips, names",
    [
        pytest.param(["127.0.0.1", "127.0.0.2"], [], id="another-ipv4-address"),
        pytest.param(["127.0.0.1", "::1"], [], id="any-ipv6-address"),
        pytest.param(["127.0.0.1"], ["bank.example"], id="any-name-when-none-given"),
    ],
)
def test_the_name_constraints_stop_a_leaf_the_ca_signs_outside_them(
    instance, tmp_path, tls_server, handshake, ips, names
):
    paths = tls.TLSPaths.for_instance(instance)
    rogue = _rogue_leaf(paths, ips, names, tmp_path)
    with tls_server("127.0.0.1", rogue.server_cert, rogue.server_key) as port:
        with pytest.raises(ssl.SSLCertVerificationError, match="subtree violation"):
            handshake("127.0.0.1", port, paths.ca_cert, "127.0.0.1")


def test_the_name_constraints_stop_another_name_when_names_are_given(
    tmp_path, tls_server, handshake
):
    paths = tls.init_ca_and_server(tmp_path / "i", ["127.0.0.1"], ["desk.lan"], "Mbeya", REAL_NOW)
    rogue = _rogue_leaf(paths, ["127.0.0.1"], ["desk.lan", "bank.example"], tmp_path)
    with tls_server("127.0.0.1", rogue.server_cert, rogue.server_key) as port:
        with pytest.raises(ssl.SSLCertVerificationError, match="subtree violation"):
            handshake("127.0.0.1", port, paths.ca_cert, "desk.lan")


def test_the_ca_is_a_named_constrained_p256_root_valid_ten_years(tmp_path):
    paths = tls.init_ca_and_server(
        tmp_path, ["192.168.1.10", "10.0.0.5"], ["desk.lan"], "Mbeya Hill", NOW
    )
    ca = _load(paths.ca_cert)
    common_names = ca.subject.get_attributes_for_oid(x509.NameOID.COMMON_NAME)
    assert [a.value for a in common_names] == ["Mbeya Hill Local CA"]
    assert ca.issuer == ca.subject
    assert ca.public_key().curve.name == "secp256r1"
    basic = _ext(ca, x509.BasicConstraints)
    assert basic.critical and basic.value.ca and basic.value.path_length == 0
    usage = _ext(ca, x509.KeyUsage)
    assert usage.critical and usage.value.key_cert_sign and usage.value.crl_sign
    assert not usage.value.digital_signature
    constraints = _ext(ca, x509.NameConstraints)
    assert constraints.critical
    assert set(constraints.value.permitted_subtrees) == {
        x509.IPAddress(ipaddress.ip_network("192.168.1.10/32")),
        x509.IPAddress(ipaddress.ip_network("10.0.0.5/32")),
        x509.DNSName("desk.lan"),
    }
    assert constraints.value.excluded_subtrees == [x509.IPAddress(ipaddress.ip_network("::/0"))]
    assert ca.not_valid_after_utc == NOW.replace(year=2036)


def test_the_ca_permits_only_the_unresolvable_invalid_name_when_none_given(instance):
    ca = _load(tls.TLSPaths.for_instance(instance).ca_cert)
    permitted = _ext(ca, x509.NameConstraints).value.permitted_subtrees
    assert [g for g in permitted if isinstance(g, x509.DNSName)] == [x509.DNSName("invalid")]


def test_the_server_certificate_is_a_server_auth_leaf_of_at_most_825_days(tmp_path):
    # 825 days: Apple's limit for TLS server certificates (platform.md §1.4, support.apple.com/en-us/103769)
    paths = tls.init_ca_and_server(tmp_path, ["192.168.1.10"], ["desk.lan"], "Mbeya", NOW)
    leaf = _load(paths.server_cert)
    assert leaf.issuer == _load(paths.ca_cert).subject
    assert leaf.public_key().curve.name == "secp256r1"
    assert (leaf.not_valid_after_utc - leaf.not_valid_before_utc) <= dt.timedelta(days=825)
    assert leaf.not_valid_before_utc <= NOW < leaf.not_valid_after_utc
    assert _ext(leaf, x509.ExtendedKeyUsage).value == x509.ExtendedKeyUsage(
        [ExtendedKeyUsageOID.SERVER_AUTH]
    )
    assert not _ext(leaf, x509.BasicConstraints).value.ca
    san = _ext(leaf, x509.SubjectAlternativeName).value
    assert san.get_values_for_type(x509.IPAddress) == [ipaddress.ip_address("192.168.1.10")]
    assert san.get_values_for_type(x509.DNSName) == ["desk.lan"]


@posix_only
def test_private_keys_are_owner_only_and_the_ca_key_is_kept_apart(instance):
    paths = tls.TLSPaths.for_instance(instance)
    assert paths.ca_key.parent != paths.server_cert.parent
    assert os.stat(paths.ca_key).st_mode & 0o777 == 0o600
    assert os.stat(paths.ca_key.parent).st_mode & 0o777 == 0o700
    assert os.stat(paths.server_key).st_mode & 0o777 == 0o600
    assert b"PRIVATE KEY" not in paths.ca_cert.read_bytes()


def test_renew_keeps_the_ca_and_issues_a_fresh_leaf(tmp_path, tls_server, handshake):
    issued = REAL_NOW - dt.timedelta(days=700)
    paths = tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya Hill", issued)
    ca_before, ca_key_before = paths.ca_cert.read_bytes(), paths.ca_key.read_bytes()
    old_leaf = _load(paths.server_cert)
    assert tls.days_until_expiry(paths.server_cert, REAL_NOW) == tls.SERVER_VALID_DAYS - 701
    tls.renew_server(tmp_path, REAL_NOW)
    assert paths.ca_cert.read_bytes() == ca_before
    assert paths.ca_key.read_bytes() == ca_key_before
    new_leaf = _load(paths.server_cert)
    assert new_leaf.serial_number != old_leaf.serial_number
    assert new_leaf.public_key() != old_leaf.public_key()
    assert tls.days_until_expiry(paths.server_cert, REAL_NOW) == tls.SERVER_VALID_DAYS - 1
    assert tls.server_addresses(paths.server_cert)[0] == [ipaddress.ip_address("127.0.0.1")]
    with tls_server("127.0.0.1", paths.server_cert, paths.server_key) as port:
        assert handshake("127.0.0.1", port, paths.ca_cert, "127.0.0.1") == b"ok"


def test_renew_refuses_an_address_outside_the_ca_constraints(instance):
    with pytest.raises(tls.TLSError, match="does not cover 192.168.1.10"):
        tls.renew_server(instance, REAL_NOW, ips=["192.168.1.10"])


def test_init_refuses_to_replace_an_existing_ca(instance):
    with pytest.raises(tls.TLSError, match="already exists"):
        tls.init_ca_and_server(instance, ["127.0.0.1"], [], "Mbeya", NOW)


def test_init_refuses_a_bad_address():
    with pytest.raises(tls.TLSError, match="Not an IP address"):
        tls.parse_ips(["192.168.1"])


def test_days_until_expiry_counts_down_and_goes_negative(tmp_path):
    cert = tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya", NOW).server_cert
    assert tls.days_until_expiry(cert, NOW) == tls.SERVER_VALID_DAYS - 1
    assert tls.days_until_expiry(cert, NOW + dt.timedelta(days=798, hours=1)) == 0
    assert tls.days_until_expiry(cert, NOW + dt.timedelta(days=900)) < 0


def test_the_fingerprint_is_the_sha256_of_the_der_certificate(instance):
    ca_path = tls.TLSPaths.for_instance(instance).ca_cert
    expected = hashlib.sha256(tls.ca_der(ca_path)).hexdigest().upper()
    fingerprint = tls.ca_fingerprint_sha256(ca_path)
    assert fingerprint.replace(":", "") == expected
    assert len(fingerprint.split(":")) == 32
