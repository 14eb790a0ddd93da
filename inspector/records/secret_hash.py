"""People's secrets, kept only as a salted slow hash.

scrypt from the standard library (``hashlib.scrypt``); the parameters and the
salt are stored beside the hash so that they can be raised later without
invalidating existing secrets. PBKDF2-HMAC-SHA256 is also understood when
checking, for stores whose OpenSSL lacks scrypt.
"""

from __future__ import annotations

import hashlib
import hmac
import json
import os

MIN_LENGTH = 8

# n = 2**14, r = 8 costs 16 MiB and some tens of milliseconds per check:
# cheap for one signature, expensive for guessing. (Common practice; the
# scrypt paper's interactive-login figure.)
SCRYPT_PARAMS = {"n": 2**14, "r": 8, "p": 1, "dklen": 32}
PBKDF2_ITERATIONS = 600_000


def validate_secret(secret: str) -> None:
    """Refuse secrets that are empty or too short to resist guessing."""
    if not isinstance(secret, str):
        raise ValueError("secret: expected text")
    if len(secret) < MIN_LENGTH:
        raise ValueError(f"secret: expected at least {MIN_LENGTH} characters, got {len(secret)}")


def hash_secret(secret: str, *, salt: bytes | None = None) -> tuple[str, str]:
    """Return ``(kdf, digest)``: the KDF description as JSON and the hex digest."""
    validate_secret(secret)
    salt = os.urandom(16) if salt is None else salt
    if hasattr(hashlib, "scrypt"):
        kdf = {"algorithm": "scrypt", **SCRYPT_PARAMS, "salt": salt.hex()}
    else:  # pragma: no cover - OpenSSL builds without scrypt
        kdf = {"algorithm": "pbkdf2_sha256", "iterations": PBKDF2_ITERATIONS, "dklen": 32, "salt": salt.hex()}
    return json.dumps(kdf, sort_keys=True), _derive(secret, kdf).hex()


def check_secret(secret: str, kdf_json: str, digest_hex: str) -> bool:
    """True when ``secret`` matches; the comparison takes constant time."""
    kdf = json.loads(kdf_json)
    try:
        candidate = _derive(secret, kdf)
        expected = bytes.fromhex(digest_hex)
    except (ValueError, TypeError):
        return False
    return hmac.compare_digest(candidate, expected)


def burn_time() -> None:
    """Spend as long as one check, so an unknown name answers no faster than a
    known name with a wrong secret."""
    _derive("x" * MIN_LENGTH, {"algorithm": "scrypt", **SCRYPT_PARAMS, "salt": "00" * 16})


def _derive(secret: str, kdf: dict) -> bytes:
    data = secret.encode("utf-8")
    salt = bytes.fromhex(kdf["salt"])
    if kdf["algorithm"] == "scrypt":
        return hashlib.scrypt(
            data, salt=salt, n=kdf["n"], r=kdf["r"], p=kdf["p"], dklen=kdf["dklen"],
            maxmem=256 * kdf["n"] * kdf["r"] + (1 << 20),
        )
    if kdf["algorithm"] == "pbkdf2_sha256":
        return hashlib.pbkdf2_hmac("sha256", data, salt, kdf["iterations"], kdf["dklen"])
    raise ValueError(f"secret: unknown key derivation {kdf['algorithm']!r}")
