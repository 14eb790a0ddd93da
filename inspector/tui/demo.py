"""The demo lot offered on an empty store, set in an invented scenario.

A cold store receives apricot jam in 370 g jars from Harrowgate Preserves
(an invented supplier): lot HP-2611-07, 18 pallets x 4 layers x 9 cartons x
24 jars = 15,552 jars, food, so every result is advisory. Two invented
people work the lot: Ines Marlowe inspects, Tomasz Quayle approves.

Everything goes through the workflow, exactly as a user's own lot would.
The demo secrets are printed on the screen that offers the demo: they only
protect a demonstration store.
"""

from __future__ import annotations

from dataclasses import dataclass

DEMO_LOT = "HP-2611-07"
DEMO_SUPPLIER = "Harrowgate Preserves"
DEMO_PRODUCT = "apricot jam 370 g jar"
DEMO_STRUCTURE = "pallet=18,layer=4,carton=9,jar=24"
DEMO_SIZE = 18 * 4 * 9 * 24
DEMO_REFERENCE = "PO 55-0193"
DEMO_INSPECTOR = "Ines Marlowe"
DEMO_INSPECTOR_SECRET = "bench-apricot-07"
DEMO_APPROVER = "Tomasz Quayle"
DEMO_APPROVER_SECRET = "release-apricot-07"


@dataclass(frozen=True, kw_only=True)
class DemoLoaded:
    lot_id: str
    people_added: tuple[str, ...]


def demo_people_missing(workflow) -> list[tuple[str, str, str]]:
    """(name, role, secret) of the demo people not yet in the store."""
    have = {p["name"] for p in workflow.people()}
    wanted = [(DEMO_INSPECTOR, "inspector", DEMO_INSPECTOR_SECRET), (DEMO_APPROVER, "approver", DEMO_APPROVER_SECRET)]
    return [w for w in wanted if w[0] not in have]


def add_demo_people(workflow) -> tuple[str, ...]:
    """Register the demo people that are missing, through the workflow."""
    added = []
    for name, role, secret in demo_people_missing(workflow):
        workflow.add_person(name=name, role=role, secret=secret)
        added.append(name)
    return tuple(added)


def demo_lot_fields(lot_id: str = DEMO_LOT) -> dict:
    """The demo lot as the registration form's fields (text, as typed)."""
    return {"id": lot_id, "supplier": DEMO_SUPPLIER, "product": DEMO_PRODUCT, "size": str(DEMO_SIZE),
            "structure": DEMO_STRUCTURE, "reference": DEMO_REFERENCE,
            "notes": "demo lot: an invented delivery to show the whole flow", "critical": True}


def load_demo(workflow, *, lot_id: str = DEMO_LOT) -> DemoLoaded:
    """Register the demo people (when missing) and the demo lot, through the
    workflow. The lot is left registered: planning, drawing and the bench
    are the user's to walk. (The lots screen instead opens the registration
    form filled in with :func:`demo_lot_fields`, so the user registers it.)"""
    added = add_demo_people(workflow)
    fields = demo_lot_fields(lot_id)
    workflow.register_lot(lot_id=lot_id, supplier=fields["supplier"], product=fields["product"], size=DEMO_SIZE,
                          structure=fields["structure"], reference=fields["reference"], critical=True,
                          notes=fields["notes"])
    return DemoLoaded(lot_id=lot_id, people_added=added)


DEMO_OFFER = (
    "The store is empty.\n\n"
    f"Press [b]d[/b] for a demo lot: {DEMO_LOT}, {DEMO_PRODUCT} from {DEMO_SUPPLIER} (invented), "
    "18 pallets × 4 layers × 9 cartons × 24 jars, flagged as food. It registers two invented "
    f"people, {DEMO_INSPECTOR} (inspector) and {DEMO_APPROVER} (approver, secret "
    f"[b]{DEMO_APPROVER_SECRET}[/b]), then opens the new-lot form filled in: ctrl+s registers it.\n\n"
    "Press [b]n[/b] to register a lot of your own, [b]u[/b] to add people."
)
