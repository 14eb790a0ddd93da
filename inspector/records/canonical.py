"""Canonical JSON and the hashes of the audit chain.

Canonical form: keys sorted, no insignificant white space, UTF-8, and only
``str``, ``int``, ``None`` (and lists/dicts of them) inside -- no floats, so
the text is the same on every machine and Python version.

A content row is hashed without its NULL columns. A later migration that adds
a nullable column therefore leaves the hashes of older rows valid, while a
hand edit that sets or clears a value still changes the hash.
"""

from __future__ import annotations

import hashlib
import json
from typing import Any, Mapping

GENESIS = "0" * 64


def canonical_json(value: Any) -> str:
    """``value`` as canonical JSON text (see the module docstring)."""
    _check(value, "value")
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)


def _check(value: Any, where: str) -> None:
    if value is None or isinstance(value, str):
        return
    if isinstance(value, bool) or isinstance(value, float):
        raise TypeError(f"{where}: canonical content holds only text, whole numbers and null, got {value!r}")
    if isinstance(value, int):
        return
    if isinstance(value, Mapping):
        for key, item in value.items():
            if not isinstance(key, str):
                raise TypeError(f"{where}: keys must be text, got {key!r}")
            _check(item, f"{where}.{key}")
        return
    if isinstance(value, (list, tuple)):
        for k, item in enumerate(value):
            _check(item, f"{where}[{k}]")
        return
    raise TypeError(f"{where}: cannot hash a {type(value).__name__}")


def sha256_hex(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def content_hash(table: str, row: Mapping[str, Any]) -> str:
    """Hash of one content row as stored (NULL columns left out)."""
    present = {key: value for key, value in row.items() if value is not None}
    return sha256_hex(canonical_json({"table": table, "row": present}))


def entry_hash(*, seq: int, table: str, lot_id: str | None, content: str, prev: str) -> str:
    """Hash of a chain entry: its place, its table, its lot, its content hash
    and the previous entry's hash."""
    return sha256_hex(
        canonical_json({"seq": seq, "table": table, "lot": lot_id, "content": content, "prev": prev})
    )
