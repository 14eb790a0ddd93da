"""Errors raised by the record store.

Every message is one line that names what was wrong and the value that came,
so a front end can print it as is.
"""

from __future__ import annotations


class StoreError(Exception):
    """The record store refused an operation or could not be used."""


class StoreBusy(StoreError):
    """Another process held the store's write lock for longer than we wait."""


class SchemaTooNew(StoreError):
    """The file was written by a newer version of the tool."""


class PragmaNotInForce(StoreError):
    """A connection setting we rely on for durability did not take effect."""


class DuplicateEntry(StoreError):
    """A name or ID that must be unique is already recorded."""
