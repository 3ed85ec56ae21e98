"""A tiny TLS server on a loopback address, to check certificates with a real handshake."""

import socket
import ssl
import threading
from contextlib import contextmanager

import pytest


@contextmanager
def _tls_server(host, cert_path, key_path):
    context = ssl.create_default_context(ssl.Purpose.CLIENT_AUTH)
    context.load_cert_chain(cert_path, key_path)
    listener = socket.create_server((host, 0))
    listener.settimeout(0.2)
    stop = threading.Event()

    def serve():
        while not stop.is_set():
            try:
                raw, _ = listener.accept()
            except TimeoutError:
                continue
            except OSError:
                return
            raw.settimeout(5)
            try:
                with context.wrap_socket(raw, server_side=True) as conn:
                    conn.sendall(b"ok")
            except (ssl.SSLError, OSError):
                pass  # the client refused our certificate: that is what some tests want

    thread = threading.Thread(target=serve, daemon=True)
    thread.start()
    try:
        yield listener.getsockname()[1]
    finally:
        stop.set()
        thread.join(5)
        listener.close()


def _handshake(host, port, ca_path, server_hostname):
    """Connect trusting only ``ca_path``; return what the server sent after the handshake."""
    context = ssl.create_default_context(cafile=str(ca_path))
    with socket.create_connection((host, port), timeout=5) as raw:
        with context.wrap_socket(raw, server_hostname=server_hostname) as conn:
            return conn.recv(2)


@pytest.fixture
def tls_server():
    return _tls_server


@pytest.fixture
def handshake():
    return _handshake
