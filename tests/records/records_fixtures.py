"""Helpers for the record-store tests: a fixed clock, a store holding at least
one row in every content table, and a plain connection for hand edits.

Invented scenario: Harrowgate Preserves ships apricot jam in 370 g jars, lot
HP-2611-07 of 18 pallets x 4 layers x 9 cartons x 24 jars.
"""

from __future__ import annotations

import sqlite3
from datetime import datetime, timedelta, timezone
from pathlib import Path

from inspector.records import CONTENT_TABLES

INES_SECRET = "kestrel-marmalade-0417"
TOMASZ_SECRET = "quince-ledger-9931"
LOT = "HP-2611-07"
OTHER_LOT = "HP-2611-08"
LOT_SIZE = 18 * 4 * 9 * 24


class SteppingClock:
    """A clock that starts at a fixed time and moves one second per reading."""

    def __init__(self, start: datetime | None = None) -> None:
        self.now = start or datetime(2025, 3, 4, 9, 15, tzinfo=timezone(timedelta(hours=1)))

    def __call__(self) -> datetime:
        current = self.now
        self.now += timedelta(seconds=1)
        return current


def populate(store) -> dict[str, int]:
    """Record one or more rows in every content table; return, per table, the
    id of one row in it (for the tamper tests)."""
    ids: dict[str, int] = {}
    with store.transaction() as tx:
        ids["suppliers"] = supplier = tx.add_supplier("Harrowgate Preserves")
        ids["products"] = product = tx.add_product("apricot jam 370 g jar")
        ids["people"] = ines = tx.add_person("Ines Marlowe", "inspector", INES_SECRET)
        tomasz = tx.add_person("Tomasz Quayle", "approver", TOMASZ_SECRET)
    for lot in (LOT, OTHER_LOT):
        with store.transaction() as tx:
            lot_row = tx.add_lot(
                lot_id=lot, supplier_id=supplier, product_id=product, quantity=LOT_SIZE,
                received_on="2025-03-04", reference="PO 55120", structure_spec="18x4x9x24",
                structure={"levels": [["pallet", 18], ["layer", 4], ["carton", 9], ["jar", 24]]},
                critical=True, notes="reefer trailer, seal intact",
            )
            tx.add_event(lot_id=lot, kind="state", from_state=None, to_state="registered")
        with store.transaction() as tx:
            plan = tx.add_plan(lot_id=lot, defect_class="major", chosen_by="typed", sample_size=5,
                               accept=0, reject=1, details={"pa_at_aql": "0.95"})
            draw = tx.add_draw(lot_id=lot, method="simple", seed="20250304", algorithm="fixed-for-tests",
                               units=[17, 402, 3318, 9001, 15000], details={})
            sub = tx.add_substitute(lot_id=lot, draw_id=draw, unit=402, substitute=777,
                                    reason="jar broken in transit")
            tx.add_event(lot_id=lot, kind="state", from_state="registered", to_state="drawn")
        with store.transaction() as tx:
            first = tx.add_result(lot_id=lot, unit=17, defect_class="major", outcome="pass", by_person=ines,
                                  entered_as="P01-L1-C01-J17")
            tx.add_result(lot_id=lot, unit=777, defect_class="major", outcome="pass", by_person=ines,
                          note="lid slightly dented, seal fine")
            tx.add_result(lot_id=lot, unit=17, defect_class="major", outcome="fail", by_person=ines,
                          defect="underfilled", corrects=first, reason="weighed again: 352 g")
        with store.transaction() as tx:
            decision = tx.add_decision(lot_id=lot, decision="reject", curtailed=True,
                                       evidence={"major": {"found": 1, "reject": 1}})
            disposition = tx.add_disposition(lot_id=lot, disposition="hold", reason="awaiting buyer",
                                             by_person=tomasz)
            attempt = tx.add_failed_attempt(lot_id=lot, action="release", name_given="Tomasz Quayle",
                                            person_id=tomasz, problem="wrong secret")
            signature = tx.add_signature(lot_id=lot, person_id=tomasz, printed_name="Tomasz Quayle",
                                         meaning="released by", record_hash=tx.record_hash(lot))
            action = tx.add_corrective_action(supplier_id=supplier, lot_id=lot,
                                              description="supplier to recalibrate filler 3")
            event = tx.add_event(lot_id=lot, kind="state", from_state="drawn", to_state="on hold",
                                 by_person=tomasz)
        if lot == LOT:
            ids.update(lots=lot_row, plans=plan, draws=draw, substitutes=sub, results=first,
                       decisions=decision, dispositions=disposition, failed_attempts=attempt,
                       signatures=signature, corrective_actions=action, events=event)
    assert set(ids) == set(CONTENT_TABLES), "populate() must cover every content table"
    return ids


def raw(path: Path) -> sqlite3.Connection:
    """A plain sqlite3 connection, as someone editing the file by hand would use."""
    return sqlite3.connect(path, isolation_level=None)
