"""Argon2id password hashing with parameters from the config (cheap ones in tests)."""

from __future__ import annotations

from argon2 import PasswordHasher
from argon2.exceptions import InvalidHashError, VerificationError
from flask import current_app


def _hasher() -> PasswordHasher:
    cfg = current_app.config
    return PasswordHasher(time_cost=int(cfg["ARGON2_TIME_COST"]),
                          memory_cost=int(cfg["ARGON2_MEMORY_COST"]),
                          parallelism=int(cfg["ARGON2_PARALLELISM"]))


def hash_password(password: str) -> str:
    return _hasher().hash(password)


def verify_password(password_hash: str, password: str) -> bool:
    try:
        return _hasher().verify(password_hash, password)
    except (VerificationError, InvalidHashError):
        return False


# A hash to verify against when the username is unknown, so both paths cost the same.
_DUMMY: dict[str, str] = {}


def verify_unknown_user(password: str) -> bool:
    key = str(current_app.config["ARGON2_MEMORY_COST"])
    if key not in _DUMMY:
        _DUMMY[key] = hash_password("not-a-real-password")
    verify_password(_DUMMY[key], password)
    return False
