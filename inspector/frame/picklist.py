"""The pick list: drawn units in walking order, container by container."""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass
from typing import Sequence

from inspector.frame.draws import Draw
from inspector.frame.errors import FrameError
from inspector.frame.structure import Address, LotStructure


@dataclass(frozen=True, kw_only=True)
class PickLine:
    """One unit to pull; ``times`` > 1 only in a with-replacement draw;
    ``replaces``/``reason`` when the unit is a substitute."""

    unit: int
    address: Address
    times: int = 1
    replaces: int | None = None
    reason: str | None = None


@dataclass(frozen=True, kw_only=True)
class PickStop:
    """One container to visit (``"lot"`` for a flat lot) and its units."""

    container: str
    lines: tuple[PickLine, ...]

    @property
    def count(self) -> int:
        """Units to pull here (a repeated unit counts each time it is checked)."""
        return sum(line.times for line in self.lines)


@dataclass(frozen=True, kw_only=True)
class PickList:
    """Stops in walking order; ``note`` is the draw's caution, if any."""

    stops: tuple[PickStop, ...]
    note: str | None = None

    @property
    def total(self) -> int:
        return sum(stop.count for stop in self.stops)

    @property
    def units(self) -> tuple[int, ...]:
        return tuple(line.unit for stop in self.stops for line in stop.lines)


def pick_list(structure: LotStructure, units: Draw | Sequence[int]) -> PickList:
    """The units (or a draw's units to inspect, substitutes applied) grouped
    by the container directly holding them, in numbering order.

    Numbering runs outermost level first, so ascending unit numbers already
    visit pallet by pallet, layer by layer, carton by carton: one walk of the
    load.
    """
    note = None
    replaced_by: dict[int, tuple[int, str]] = {}
    if isinstance(units, Draw):
        if structure.fingerprint != units.frame:
            raise FrameError("structure", "structure: this is not the lot structure the draw was made on")
        note = units.note
        for s in units.substitutions:
            replaced_by[s.substitute] = (s.replaced, s.reason)
        wanted = units.final_units
    else:
        wanted = tuple(units)
    counts = Counter(structure.check_unit(u, field="units") for u in wanted)
    stops: list[PickStop] = []
    current: str | None = None
    lines: list[PickLine] = []
    for unit in sorted(counts):
        address = structure.address_of(unit)
        container = address.container or "lot"
        if container != current and lines:
            stops.append(PickStop(container=current, lines=tuple(lines)))
            lines = []
        current = container
        replaces, reason = replaced_by.get(unit, (None, None))
        lines.append(PickLine(unit=unit, address=address, times=counts[unit], replaces=replaces, reason=reason))
    if lines:
        stops.append(PickStop(container=current, lines=tuple(lines)))
    return PickList(stops=tuple(stops), note=note)
