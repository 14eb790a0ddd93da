"""Lot structures: the numbered frame and its physical addresses.

Two kinds of structure, one interface:

* :class:`RegularLot` -- a flat count N (one level, ``unit``) or nested
  regular containers, outermost first (``pallet=18,layer=4,carton=9,unit=24``).
  Numbering is mixed radix, so nothing is materialized: lots up to
  :data:`MAX_LOT_SIZE` units cost the same as small ones.
* :class:`ManifestLot` -- irregular containers from a manifest, with or
  without unit serials. Numbering uses cumulative counts, so a lookup is a
  bisection over the containers.

Units are numbered 1..N, outermost level first: all units of pallet 1 before
pallet 2, within a pallet layer 1 before layer 2, and so on. Every container
at every level is therefore a contiguous block of unit numbers, which is what
the draws and the walking-order pick list rely on.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import re
from bisect import bisect_right
from dataclasses import dataclass, field
from functools import cached_property
from itertools import accumulate, chain
from typing import Iterable, Mapping, Sequence

from inspector.frame.errors import FrameError

#: The largest lot the frame accepts. Far beyond any physical lot; it keeps
#: every count and offset well inside 64-bit integers.
MAX_LOT_SIZE = 10**12

_NAME = re.compile(r"^[A-Za-z][A-Za-z0-9_-]*$")
_DIGITS = re.compile(r"^[0-9]+$")


# --- addresses ----------------------------------------------------------------


@dataclass(frozen=True, kw_only=True)
class Address:
    """Where one unit sits: ``path`` holds (level name, label) pairs,
    outermost first, the last pair being the unit's position in its
    container; ``serial`` is the unit's serial when the manifest lists one.

    ``str(address)`` gives the form people read and type back, e.g.
    ``pallet 3 / layer 2 / carton 7 / unit 14``.
    """

    unit: int
    path: tuple[tuple[str, str], ...]
    serial: str | None = None

    def __str__(self) -> str:
        return " / ".join(f"{name} {label}" for name, label in self.path)

    @property
    def container(self) -> str:
        """The container directly holding the unit (``""`` for a flat lot)."""
        return " / ".join(f"{name} {label}" for name, label in self.path[:-1])


@dataclass(frozen=True)
class _Blocks:
    """The containers at one level as contiguous blocks of unit numbers.

    Regular levels have ``equal`` set (every block the same size) and no
    lists; manifest levels carry cumulative ``ends`` (exclusive, 0-based).
    """

    count: int
    equal: int | None = None
    ends: tuple[int, ...] | None = None

    def size(self, h: int) -> int:
        if self.equal is not None:
            return self.equal
        return self.ends[h] - (self.ends[h - 1] if h else 0)

    def start(self, h: int) -> int:
        """0-based offset of the block's first unit."""
        if self.equal is not None:
            return h * self.equal
        return self.ends[h - 1] if h else 0

    def find(self, offset: int) -> int:
        """The block holding 0-based unit offset ``offset``: O(log count)."""
        if self.equal is not None:
            return offset // self.equal
        return bisect_right(self.ends, offset)

    def sizes(self) -> list[int]:
        if self.equal is not None:
            return [self.equal] * self.count
        return [b - a for a, b in zip((0,) + self.ends[:-1], self.ends)]


class LotStructure:
    """Common interface of :class:`RegularLot` and :class:`ManifestLot`.

    Attributes every structure has: ``size`` (N), ``form`` (``"flat"``,
    ``"nested"`` or ``"manifest"``), ``level_names`` (outermost first, the
    unit level last) and ``container_levels`` (all but the unit level).
    """

    size: int
    form: str
    level_names: tuple[str, ...]

    @property
    def container_levels(self) -> tuple[str, ...]:
        return self.level_names[:-1]

    # -- addresses ---------------------------------------------------------

    def address_of(self, unit: int) -> Address:  # pragma: no cover - abstract
        """The address of unit number ``unit`` (1..N)."""
        raise NotImplementedError

    def addresses(self, units: Iterable[int]) -> list[Address]:
        """Addresses of several units, in the order given."""
        return [self.address_of(u) for u in units]

    def unit_at(self, where: int | str) -> int:  # pragma: no cover - abstract
        """The unit number at an address string, serial or number."""
        raise NotImplementedError

    def check_unit(self, unit: int, *, field: str = "unit") -> int:
        """``unit`` itself when it is a unit number of this lot, else FrameError."""
        if isinstance(unit, bool) or not isinstance(unit, int):
            raise FrameError(field, f"{field}: expected a unit number, got {unit!r}")
        if not 1 <= unit <= self.size:
            raise FrameError(field, f"{field}: unit {unit} is outside this lot's units 1..{self.size}")
        return unit

    # -- containers at a level (used by the draws and the pick list) -------

    def resolve_level(self, level: str | None, *, default: str = "inner", field: str = "by") -> str:
        """The container level called ``level`` (case-insensitive).

        Without a name: ``default="inner"`` gives the level just above the
        units, ``"outer"`` the outermost level. A flat lot has no container
        level, so any request for one is refused.
        """
        levels = self.container_levels
        if not levels:
            raise FrameError(
                field,
                f"{field}: this lot is a flat count with no containers; give a structure "
                "or manifest to draw by container",
            )
        if level is None:
            return levels[-1] if default == "inner" else levels[0]
        for name in levels:
            if name.lower() == str(level).strip().lower():
                return name
        if str(level).strip().lower() == self.level_names[-1].lower():
            raise FrameError(
                field,
                f"{field}: {level!r} is the unit level; expected a container level "
                f"({', '.join(levels)})",
            )
        raise FrameError(
            field, f"{field}: {level!r} is not a container level of this lot ({', '.join(levels)})"
        )

    def _blocks(self, level: str) -> _Blocks:  # pragma: no cover - abstract
        raise NotImplementedError

    def container_label(self, level: str, index: int) -> str:  # pragma: no cover - abstract
        """The address of container ``index`` (0-based) at ``level``."""
        raise NotImplementedError

    # -- description -------------------------------------------------------

    def to_dict(self) -> dict:  # pragma: no cover - abstract
        """A JSON-ready description that :func:`structure_from_dict` reads back."""
        raise NotImplementedError

    def to_text(self) -> str:
        """A text form :func:`structure_from_text` reads back: the structure
        spec for regular lots, compact JSON for manifests."""
        return json.dumps(self.to_dict(), separators=(",", ":"), ensure_ascii=False)

    def describe(self) -> str:  # pragma: no cover - abstract
        """One short line for people."""
        raise NotImplementedError

    @cached_property
    def fingerprint(self) -> str:
        """``sha256:<hex>`` of the canonical description: two structures with
        the same fingerprint number and address every unit the same way."""
        canonical = json.dumps(self.to_dict(), sort_keys=True, separators=(",", ":"), ensure_ascii=False)
        return "sha256:" + hashlib.sha256(canonical.encode("utf-8")).hexdigest()


# --- regular lots ---------------------------------------------------------------


@dataclass(frozen=True, kw_only=True, eq=True)
class RegularLot(LotStructure):
    """A flat count (one level) or nested regular containers.

    ``levels`` holds (name, count) pairs outermost first; the last pair is
    the unit level (how many units each innermost container holds, or the
    whole lot for a flat count).
    """

    levels: tuple[tuple[str, int], ...]

    def __post_init__(self):
        levels = tuple((str(name), count) for name, count in self.levels)
        if not levels:
            raise FrameError("structure", "structure: expected at least one level, got none")
        seen: dict[str, str] = {}
        size = 1
        for name, count in levels:
            if not _NAME.match(name):
                raise FrameError(
                    "structure",
                    f"structure: level name {name!r} must start with a letter and hold only "
                    "letters, digits, '-' or '_'",
                )
            if name.lower() in seen:
                raise FrameError("structure", f"structure: level name {name!r} appears twice")
            seen[name.lower()] = name
            if isinstance(count, bool) or not isinstance(count, int) or count < 1:
                raise FrameError(
                    "structure", f"structure: level {name!r}: expected a count of at least 1, got {count!r}"
                )
            size *= count
            if size > MAX_LOT_SIZE:
                raise FrameError(
                    "structure", f"structure: the lot would hold more than {MAX_LOT_SIZE} units"
                )
        object.__setattr__(self, "levels", levels)

    @property
    def form(self) -> str:
        return "flat" if len(self.levels) == 1 else "nested"

    @cached_property
    def size(self) -> int:
        n = 1
        for _, count in self.levels:
            n *= count
        return n

    @cached_property
    def level_names(self) -> tuple[str, ...]:
        return tuple(name for name, _ in self.levels)

    @property
    def spec(self) -> str:
        """The structure spec, e.g. ``pallet=18,layer=4,carton=9,unit=24``."""
        return ",".join(f"{name}={count}" for name, count in self.levels)

    def address_of(self, unit: int) -> Address:
        return self.addresses((unit,))[0]

    def addresses(self, units: Iterable[int]) -> list[Address]:
        # The hot path of a pick list: one divmod per level and unit, names
        # and radices looked up once.
        names = self.level_names
        radices = tuple(count for _, count in reversed(self.levels))
        size = self.size
        out = []
        for unit in units:
            if isinstance(unit, bool) or not isinstance(unit, int) or not 1 <= unit <= size:
                self.check_unit(unit)
            rest = unit - 1
            labels = []
            for count in radices:
                rest, pos = divmod(rest, count)
                labels.append(str(pos + 1))
            labels.reverse()
            out.append(Address(unit=unit, path=tuple(zip(names, labels))))
        return out

    def unit_at(self, where: int | str) -> int:
        """The unit number at ``where``: a unit number (int or digits), or an
        address such as ``pallet 3 / layer 2 / carton 7 / unit 14`` (level
        names optional and case-insensitive: ``3/2/7/14`` works too)."""
        if isinstance(where, int):  # bool included: check_unit refuses it
            return self.check_unit(where)
        text = str(where).strip()
        if _DIGITS.match(text):
            return self.check_unit(int(text))
        parts = [p.strip() for p in text.split("/")]
        if len(parts) != len(self.levels):
            raise FrameError(
                "unit",
                f"unit: expected an address with {len(self.levels)} parts "
                f"({' / '.join(f'{n} <number>' for n in self.level_names)}), got {text!r}",
            )
        number = 0
        for part, (name, count) in zip(parts, self.levels):
            words = part.split()
            if len(words) == 2 and words[0].lower() == name.lower():
                value = words[1]
            elif len(words) == 1:
                value = words[0]
            else:
                raise FrameError("unit", f"unit: expected '{name} <number>' in the address, got {part!r}")
            if not _DIGITS.match(value) or not 1 <= int(value) <= count:
                raise FrameError(
                    "unit", f"unit: {name} must be a number from 1 to {count}, got {value!r} in {text!r}"
                )
            number = number * count + int(value) - 1
        return number + 1

    def _level_index(self, level: str) -> int:
        names = [n.lower() for n in self.level_names[:-1]]
        return names.index(level.lower())

    def _blocks(self, level: str) -> _Blocks:
        i = self._level_index(level)
        count = 1
        for _, c in self.levels[: i + 1]:
            count *= c
        return _Blocks(count=count, equal=self.size // count)

    def container_label(self, level: str, index: int) -> str:
        i = self._level_index(level)
        labels = []
        rest = index
        for name, count in reversed(self.levels[: i + 1]):
            rest, pos = divmod(rest, count)
            labels.append(f"{name} {pos + 1}")
        return " / ".join(reversed(labels))

    def to_dict(self) -> dict:
        return {"form": self.form, "levels": [[name, count] for name, count in self.levels]}

    def to_text(self) -> str:
        return self.spec

    def describe(self) -> str:
        if self.form == "flat":
            return f"{self.size} units, numbered 1..{self.size}"
        return f"{self.spec} ({self.size} units)"


# --- manifest lots ----------------------------------------------------------------


@dataclass(frozen=True, kw_only=True, eq=True)
class ManifestLot(LotStructure):
    """Irregular containers from a manifest.

    ``containers`` are the labels in numbering order, ``counts`` their unit
    counts, and ``serials`` (optional) every unit's serial in unit-number
    order. The one container level is named ``container``.
    """

    containers: tuple[str, ...]
    counts: tuple[int, ...]
    serials: tuple[str, ...] | None = None
    _ends: tuple[int, ...] = field(default=(), init=False, repr=False, compare=False)

    def __post_init__(self):
        containers = tuple(self.containers)
        counts = tuple(self.counts)
        if not containers:
            raise FrameError("manifest", "manifest: expected at least one container, got none")
        if len(containers) != len(counts):
            raise FrameError(
                "manifest",
                f"manifest: {len(containers)} container labels but {len(counts)} unit counts",
            )
        index: dict[str, int] = {}
        for label, count in zip(containers, counts):
            if not isinstance(label, str) or not label.strip() or label != label.strip():
                raise FrameError(
                    "manifest", f"manifest: container label must be non-empty text without outer spaces, got {label!r}"
                )
            if label in index:
                raise FrameError("manifest", f"manifest: container {label!r} is listed twice")
            index[label] = len(index)
            if isinstance(count, bool) or not isinstance(count, int) or count < 1:
                raise FrameError(
                    "manifest", f"manifest: container {label!r}: expected at least 1 unit, got {count!r}"
                )
        ends = tuple(accumulate(counts))
        if ends[-1] > MAX_LOT_SIZE:
            raise FrameError("manifest", f"manifest: the lot would hold more than {MAX_LOT_SIZE} units")
        if self.serials is not None:
            serials = tuple(self.serials)
            if len(serials) != ends[-1]:
                raise FrameError(
                    "manifest", f"manifest: {len(serials)} serials for {ends[-1]} units"
                )
            # Bulk checks first (a manifest may list 10^5..10^6 serials); the
            # offending value is looked for only when a check fails.
            bad = [x for x in serials if not isinstance(x, str) or not x or x != x.strip()]
            if bad:
                raise FrameError(
                    "manifest", f"manifest: serial must be non-empty text without outer spaces, got {bad[0]!r}"
                )
            if len(set(serials)) != len(serials):
                seen: set[str] = set()
                for x in serials:
                    if x in seen:
                        raise FrameError("manifest", f"manifest: serial {x!r} is listed twice")
                    seen.add(x)
            object.__setattr__(self, "serials", serials)
        object.__setattr__(self, "containers", containers)
        object.__setattr__(self, "counts", counts)
        object.__setattr__(self, "_ends", ends)

    form = "manifest"
    level_names = ("container", "unit")

    @property
    def size(self) -> int:
        return self._ends[-1]

    @cached_property
    def _container_index(self) -> dict[str, int]:
        return {label: i for i, label in enumerate(self.containers)}

    @cached_property
    def _serial_index(self) -> dict[str, int]:
        return {s: i + 1 for i, s in enumerate(self.serials or ())}

    def address_of(self, unit: int) -> Address:
        offset = self.check_unit(unit) - 1
        h = bisect_right(self._ends, offset)
        start = self._ends[h - 1] if h else 0
        return Address(
            unit=unit,
            path=(("container", self.containers[h]), ("unit", str(offset - start + 1))),
            serial=self.serials[offset] if self.serials is not None else None,
        )

    def unit_at(self, where: int | str) -> int:
        """The unit number at ``where``: a serial (tried first), an address
        such as ``container P-07 / unit 3``, or a unit number."""
        if isinstance(where, int):  # bool included: check_unit refuses it
            return self.check_unit(where)
        text = str(where).strip()
        if text in self._serial_index:
            return self._serial_index[text]
        m = re.match(r"^container\s+(.+?)\s*/\s*unit\s+([0-9]+)$", text, re.IGNORECASE)
        if m:
            label, pos = m.group(1), int(m.group(2))
            if label not in self._container_index:
                raise FrameError("unit", f"unit: no container {label!r} in this manifest")
            h = self._container_index[label]
            if not 1 <= pos <= self.counts[h]:
                raise FrameError(
                    "unit", f"unit: container {label!r} holds units 1..{self.counts[h]}, got unit {pos}"
                )
            return (self._ends[h - 1] if h else 0) + pos
        if _DIGITS.match(text):
            return self.check_unit(int(text))
        what = "serial, address" if self.serials is not None else "address"
        raise FrameError(
            "unit", f"unit: expected a {what} ('container <label> / unit <n>') or unit number, got {text!r}"
        )

    def _blocks(self, level: str) -> _Blocks:
        return _Blocks(count=len(self.containers), ends=self._ends)

    def container_label(self, level: str, index: int) -> str:
        return f"container {self.containers[index]}"

    def to_dict(self) -> dict:
        out: dict = {"form": "manifest", "containers": list(self.containers), "counts": list(self.counts)}
        if self.serials is not None:
            out["serials"] = list(self.serials)
        return out

    def describe(self) -> str:
        kind = "unit manifest with serials" if self.serials is not None else "container manifest"
        return f"{kind}: {len(self.containers)} containers, {self.size} units"


# --- building structures ---------------------------------------------------------------


def _check_declared(structure: LotStructure, lot_size: int | None) -> LotStructure:
    if lot_size is not None:
        if isinstance(lot_size, bool) or not isinstance(lot_size, int) or lot_size < 1:
            raise FrameError("lot_size", f"lot_size: expected a whole number of at least 1, got {lot_size!r}")
        if lot_size != structure.size:
            raise FrameError(
                "lot_size",
                f"lot_size: the {structure.form} structure holds {structure.size} units "
                f"but the declared lot size is {lot_size}",
            )
    return structure


def flat_lot(size: int) -> RegularLot:
    """A lot known only by its count: units 1..size, level ``unit``."""
    if isinstance(size, bool) or not isinstance(size, int) or size < 1:
        raise FrameError("lot_size", f"lot_size: expected a whole number of at least 1, got {size!r}")
    if size > MAX_LOT_SIZE:
        raise FrameError("lot_size", f"lot_size: at most {MAX_LOT_SIZE} units, got {size}")
    return RegularLot(levels=(("unit", size),))


def parse_structure(spec: str | int, *, lot_size: int | None = None) -> RegularLot:
    """A regular lot from its spec.

    ``spec`` is either a count (``"5000"``: a flat lot) or ``name=count``
    pairs outermost first, the last pair being the units per innermost
    container: ``"pallet=18,layer=4,carton=9,unit=24"``. With ``lot_size``
    the total must equal it (the declared quantity on the delivery note).
    """
    if isinstance(spec, int) and not isinstance(spec, bool):
        return _check_declared(flat_lot(spec), lot_size)
    text = str(spec).strip()
    if not text:
        raise FrameError("structure", "structure: expected 'name=count,...' or a count, got ''")
    if _DIGITS.match(text.replace("_", "")):
        return _check_declared(flat_lot(int(text.replace("_", ""))), lot_size)
    levels = []
    for part in text.split(","):
        name, eq, count = part.partition("=")
        name, count = name.strip(), count.strip().replace("_", "")
        if not eq or not name or not _DIGITS.match(count):
            raise FrameError(
                "structure",
                f"structure: expected 'name=count' pairs separated by commas "
                f"(e.g. pallet=18,carton=36,unit=24), got {part.strip()!r} in {text!r}",
            )
        levels.append((name, int(count)))
    return _check_declared(RegularLot(levels=tuple(levels)), lot_size)


def manifest_rows(text: str) -> tuple[str, list[tuple[int, str, str]]]:
    """Split manifest CSV text into its form and rows.

    Returns ``("containers", [(line, container, units), ...])`` or
    ``("serials", [(line, serial, container), ...])``; ``line`` is the row's
    line number for messages. The header names the form: ``container,units``
    or ``serial,container`` (any column order, case-insensitive; other
    columns are ignored). Blank rows are skipped.
    """
    if text.startswith("\ufeff"):
        text = text[1:]
    reader = csv.reader(io.StringIO(text), strict=True)
    header = None
    try:
        for row in reader:
            if any(cell.strip() for cell in row):
                header = [cell.strip().lower() for cell in row]
                break
        if header is None:
            raise FrameError("manifest", "manifest: the file is empty")
        if "serial" in header and "container" in header and "units" not in header:
            form, keys = "serials", ("serial", "container")
        elif "container" in header and "units" in header and "serial" not in header:
            form, keys = "containers", ("container", "units")
        else:
            raise FrameError(
                "manifest",
                "manifest: expected a header 'container,units' (one row per container) or "
                f"'serial,container' (one row per unit), got {','.join(header)!r}",
            )
        for key in keys:
            if header.count(key) > 1:
                raise FrameError("manifest", f"manifest: column {key!r} appears twice in the header")
        i, j = header.index(keys[0]), header.index(keys[1])
        need = max(i, j) + 1
        rows = []
        for row in reader:
            if len(row) >= need:
                a, b = row[i].strip(), row[j].strip()
                if a or b or "".join(row).strip():
                    rows.append((reader.line_num, a, b))
            elif "".join(row).strip():
                raise FrameError(
                    "manifest",
                    f"manifest line {reader.line_num}: expected {len(header)} columns, got {len(row)} "
                    f"({','.join(row)!r})",
                )
    except csv.Error as exc:
        raise FrameError("manifest", f"manifest line {reader.line_num}: malformed CSV ({exc})") from None
    if not rows:
        raise FrameError("manifest", "manifest: no rows after the header")
    return form, rows


def manifest_from_csv_text(text: str, *, lot_size: int | None = None) -> ManifestLot:
    """A manifest lot from CSV text (the caller reads the file).

    Container rows (``container,units``) are numbered in row order. Unit rows
    (``serial,container``) are numbered container by container, containers
    in order of first appearance and units within a container in row order;
    for a manifest already grouped by container that is simply row order.
    With ``lot_size`` the total must equal it.
    """
    form, rows = manifest_rows(text)
    if form == "containers":
        labels, counts, where = [], [], {}
        for line, label, units in rows:
            if not label:
                raise FrameError("manifest", f"manifest line {line}: container: expected a label, got ''")
            if label in where:
                raise FrameError(
                    "manifest", f"manifest line {line}: container {label!r} is already listed on line {where[label]}"
                )
            where[label] = line
            digits = units.replace("_", "")
            if not _DIGITS.match(digits) or int(digits) < 1:
                raise FrameError(
                    "manifest",
                    f"manifest line {line}: units: expected a whole number of at least 1, got {units!r}",
                )
            labels.append(label)
            counts.append(int(digits))
        lot = ManifestLot(containers=tuple(labels), counts=tuple(counts))
    else:
        for line, serial, label in rows:
            if not serial:
                raise FrameError("manifest", f"manifest line {line}: serial: expected a serial, got ''")
            if not label:
                raise FrameError("manifest", f"manifest line {line}: container: expected a label, got ''")
        if len({serial for _, serial, _ in rows}) != len(rows):
            seen: dict[str, int] = {}
            for line, serial, _ in rows:
                if serial in seen:
                    raise FrameError(
                        "manifest", f"manifest line {line}: serial {serial!r} is already listed on line {seen[serial]}"
                    )
                seen[serial] = line
        groups: dict[str, list[str]] = {}
        for _, serial, label in rows:
            members = groups.get(label)
            if members is None:
                groups[label] = members = []
            members.append(serial)
        serials = tuple(chain.from_iterable(groups.values()))
        lot = ManifestLot(
            containers=tuple(groups),
            counts=tuple(len(members) for members in groups.values()),
            serials=serials,
        )
    _check_declared(lot, lot_size)
    return lot


def structure_from_dict(data: Mapping) -> LotStructure:
    """Read back :meth:`LotStructure.to_dict` (validated like any input)."""
    if not isinstance(data, Mapping):
        raise FrameError("structure", f"structure: expected a mapping, got {type(data).__name__}")
    form = data.get("form")
    try:
        if form in ("flat", "nested"):
            levels = tuple((str(name), count) for name, count in data["levels"])
            lot = RegularLot(levels=levels)
            if lot.form != form:
                raise FrameError("structure", f"structure: form {form!r} does not match {len(levels)} levels")
            return lot
        if form == "manifest":
            serials = data.get("serials")
            return ManifestLot(
                containers=tuple(data["containers"]),
                counts=tuple(data["counts"]),
                serials=None if serials is None else tuple(serials),
            )
    except (KeyError, TypeError, ValueError) as exc:
        if isinstance(exc, FrameError):
            raise
        raise FrameError("structure", f"structure: malformed {form} description ({exc!r})") from None
    raise FrameError("structure", f"structure: expected form 'flat', 'nested' or 'manifest', got {form!r}")


def structure_from_text(text: str) -> LotStructure:
    """Read back :meth:`LotStructure.to_text`: a spec, or JSON."""
    text = str(text).strip()
    if text.startswith("{"):
        try:
            data = json.loads(text)
        except json.JSONDecodeError as exc:
            raise FrameError("structure", f"structure: malformed JSON ({exc.msg} at {exc.pos})") from None
        return structure_from_dict(data)
    return parse_structure(text)


def blocks_of(structure: LotStructure, level: str) -> _Blocks:
    """Containers at ``level`` as contiguous blocks (internal to the draws)."""
    return structure._blocks(level)


def sizes_at(structure: LotStructure, level: str) -> Sequence[int]:
    """Unit counts of the containers at ``level`` in numbering order.

    Materializes one number per container: meant for manifests and modest
    regular levels (tests, reports), not for a level of 10^8 cartons.
    """
    return blocks_of(structure, level).sizes()
