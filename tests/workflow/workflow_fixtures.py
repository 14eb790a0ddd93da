"""Helpers for the workflow tests: the invented Harrowgate Preserves scenario
on a real store in a temporary directory.

Lot HP-2611-07: apricot jam in 370 g jars, 18 pallets x 4 layers x 9 cartons
x 24 jars = 15 552 jars. Inspector Ines Marlowe, approver Tomasz Quayle.
"""

from __future__ import annotations

import sqlite3
from datetime import datetime, timedelta, timezone

from inspector.services import build_services

LOT = "HP-2611-07"
SIZE = 18 * 4 * 9 * 24
STRUCTURE = "pallet=18,layer=4,carton=9,jar=24"
SUPPLIER = "Harrowgate Preserves"
PRODUCT = "apricot jam 370 g jar"
INSPECTOR = "Ines Marlowe"
SECOND_INSPECTOR = "Oskar Penhallow"
APPROVER = "Tomasz Quayle"
SECRETS = {INSPECTOR: "kestrel-marmalade-0417", SECOND_INSPECTOR: "harbour-lantern-2210",
           APPROVER: "quince-ledger-9931"}
SEED = 20250304


class SteppingClock:
    """Starts at a fixed time (UTC+01:00) and moves one second per reading."""

    def __init__(self) -> None:
        self.now = datetime(2025, 3, 4, 9, 15, tzinfo=timezone(timedelta(hours=1)))

    def __call__(self) -> datetime:
        current = self.now
        self.now += timedelta(seconds=1)
        return current


def make_services(path, clock=None):
    services = build_services(str(path), environ={}, clock=clock or SteppingClock())
    return services


def add_people(wf) -> None:
    wf.add_person(name=INSPECTOR, role="inspector", secret=SECRETS[INSPECTOR])
    wf.add_person(name=SECOND_INSPECTOR, role="inspector", secret=SECRETS[SECOND_INSPECTOR])
    wf.add_person(name=APPROVER, role="approver", secret=SECRETS[APPROVER])


def register(wf, lot_id=LOT, critical=True, **extra):
    return wf.register_lot(lot_id=lot_id, supplier=SUPPLIER, product=PRODUCT, size=SIZE,
                           structure=STRUCTURE, reference="PO 55120", critical=critical, **extra)


def drawn_lot(wf, *, sample=13, accept=1, lot_id=LOT):
    """Register, plan (typed n, c) and draw; return the sample units."""
    register(wf, lot_id=lot_id)
    wf.plan(lot_id, sample=sample, accept=accept)
    return wf.draw(lot_id, seed=SEED)["units"]


def entry_count(path) -> int:
    conn = sqlite3.connect(path)
    try:
        return conn.execute("SELECT count(*) FROM entries").fetchone()[0]
    finally:
        conn.close()


class refused:
    """Context manager: the block must raise WorkflowError matching ``match``
    and leave the store exactly as it was (no entry added)."""

    def __init__(self, db, match: str, *, written: int = 0) -> None:
        self.db, self.match, self.written = db, match, written

    def __enter__(self):
        self.before = entry_count(self.db)
        return self

    def __exit__(self, kind, exc, tb):
        import re

        from inspector.workflow import WorkflowError

        assert kind is not None, f"expected a refusal matching {self.match!r}, nothing was refused"
        assert issubclass(kind, WorkflowError), f"expected WorkflowError, got {kind.__name__}: {exc}"
        assert re.search(self.match, str(exc)), f"{str(exc)!r} does not match {self.match!r}"
        assert "\n" not in str(exc)
        assert entry_count(self.db) == self.before + self.written
        self.message = str(exc)
        return True
