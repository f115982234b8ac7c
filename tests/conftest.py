"""Shared fixtures, and the guard that keeps the whole suite off the network."""

from __future__ import annotations

import os
import socket
from pathlib import Path
from typing import NoReturn

import pytest

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "demo_meetings"
PROFILES = ROOT / "speaker_profiles"
EVALDATA = ROOT.parent / "shared" / "evaldata"

# AMI and ICSI dev meetings (CC BY 4.0; Carletta et al. 2005; Janin et al. 2003),
# copied into ../shared/evaldata with their PROVENANCE.md.
AMI_MEETINGS = ("ES2002a", "ES2004a", "ES2004b", "ES2004c", "ES2004d", "IS1003b", "TS3004c",
                "TS3011c")
ICSI_MEETINGS = ("Bed003", "Bmr023", "Bro019")


def _is_loopback(address: object) -> bool:
    if isinstance(address, tuple) and address:
        host = str(address[0])
        return host in ("localhost", "::1") or host.startswith("127.")
    return isinstance(address, (str, bytes))  # AF_UNIX paths stay on the machine


@pytest.fixture(autouse=True)
def no_network(monkeypatch: pytest.MonkeyPatch) -> None:
    """Fail any test that opens a connection beyond loopback (the tool never sends data)."""
    real_connect = socket.socket.connect
    real_connect_ex = socket.socket.connect_ex

    def guard(self: socket.socket, address: object) -> object:
        if not _is_loopback(address):
            raise AssertionError(f"network access attempted during a test: {address!r}")
        return real_connect(self, address)  # type: ignore[arg-type]

    def guard_ex(self: socket.socket, address: object) -> object:
        if not _is_loopback(address):
            raise AssertionError(f"network access attempted during a test: {address!r}")
        return real_connect_ex(self, address)  # type: ignore[arg-type]

    def no_lookup(host: object, *args: object, **kwargs: object) -> object:
        if str(host) not in ("localhost", "127.0.0.1", "::1", "None"):
            raise AssertionError(f"name lookup attempted during a test: {host!r}")
        return real_getaddrinfo(host, *args, **kwargs)  # type: ignore[arg-type]

    real_getaddrinfo = socket.getaddrinfo
    monkeypatch.setattr(socket.socket, "connect", guard)
    monkeypatch.setattr(socket.socket, "connect_ex", guard_ex)
    monkeypatch.setattr(socket, "getaddrinfo", no_lookup)


def unavailable(reason: str) -> NoReturn:
    """Skip a test whose tool or package is missing here; in CI, where it must exist, fail."""
    if os.environ.get("CI"):
        pytest.fail(f"CI must provide this: {reason}")
    pytest.skip(reason)


@pytest.fixture(scope="session")
def evaldata() -> Path:
    """Return ../shared/evaldata; in CI its absence is a failure, elsewhere a skip."""
    if not EVALDATA.is_dir():
        if os.environ.get("CI"):
            pytest.fail(f"outside check data missing: {EVALDATA}")
        pytest.skip(f"outside check data not found at {EVALDATA}")
    return EVALDATA
