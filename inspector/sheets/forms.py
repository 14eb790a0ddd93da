"""Sheet layouts as data: reading and checking the TOML files in ``forms/``.

A forms folder holds ``site.toml`` (the site header shared by every sheet)
and one file per sheet: ``pick.toml``, ``labels.toml``, ``bench.toml``,
``release.toml``. ``forms/README.md`` in the repository describes the
format. Every problem is reported as a :class:`FormError` naming the file
and the key (``section[2].columns[3].field``; sections and columns count
from 1, in file order).

Pure: reads files with :mod:`tomllib`, imports nothing of reportlab.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

SHEETS = ("pick", "labels", "bench", "release")
SHEET_TITLES = {
    "pick": "pick list",
    "labels": "sample labels",
    "bench": "bench log",
    "release": "lot release sheet",
}

#: The forms shipped with the package: ``inspector/sheets/forms`` is the
#: repository's top-level ``forms/`` (a link in a checkout, a copy once
#: installed).
DEFAULT_FORMS_DIR = (Path(__file__).resolve().parent / "forms").resolve()

# --- what each section kind may show ---------------------------------------
# kind -> allowed names for "columns" (tables) or "fields" (facts).

LOT_FIELDS = (
    "lot_id", "supplier", "product", "reference", "quantity", "received_on",
    "structure", "state", "notes", "registered_by",
)
DRAW_FIELDS = (
    "method", "algorithm", "seed", "sample_size", "lot_size", "level",
    "containers", "frame", "drawn", "note", "command", "substitutions",
)
DECISION_FIELDS = (
    "decision", "curtailed", "decided", "disposition", "disposition_reason", "disposition_by",
)
RECORD_FIELDS = ("record_hash",)

COLUMNS = {
    "walk": ("check", "unit", "container", "position", "address", "serial", "code", "times"),
    "containers": ("container", "count", "check"),
    "bench": ("unit", "address", "position", "serial", "outcome", "class", "defect", "note", "initials", "time"),
    "plans": (
        "class", "source", "sample_size", "acceptance", "rejection",
        "aql", "pa_at_aql", "rql", "pa_at_rql", "aoql",
    ),
    "tally": ("class", "sample_size", "acceptance", "rejection", "found", "result"),
    "outcomes": ("class", "inspected", "nonconforming", "acceptance", "rejection", "result"),
    "nonconforming": ("class", "unit", "address", "defect", "note", "by", "at"),
    "corrections": ("unit", "class", "was", "now", "reason", "by", "at"),
    "estimate": ("class", "found", "point", "interval", "upper_bound"),
    "signatures": ("name", "meaning", "at"),
}
FIELDS = {
    "lot": LOT_FIELDS,
    "draw": DRAW_FIELDS,
    "decision": DECISION_FIELDS,
    "record": RECORD_FIELDS,
}
# Extra keys a kind takes besides kind, caption, columns/fields.
OPTIONS = {
    "text": ("body",),
    "signoff": ("lines",),
    "oc_chart": ("height_mm",),
    "signatures": ("blank",),
}

#: Section kinds each sheet can show, and those it must show.
SHEET_KINDS = {
    "pick": ("lot", "caution", "draw", "walk", "containers", "text", "signoff"),
    "bench": ("lot", "caution", "plans", "bench", "tally", "text", "signoff"),
    "release": (
        "lot", "caution", "plans", "oc_chart", "draw", "outcomes", "nonconforming",
        "corrections", "decision", "estimate", "signatures", "record", "text", "signoff",
    ),
    "labels": (),
}
REQUIRED_KINDS = {
    "pick": ("walk",),
    "bench": ("bench",),
    "release": ("plans", "decision", "record"),
    "labels": (),
}
LABEL_LINES = ("lot_id", "unit", "address", "position", "serial", "product", "supplier", "code", "times")

PAGE_SIZES = ("A4", "letter")


class FormError(ValueError):
    """A form file that cannot be used: names the file and the key."""

    def __init__(self, path: Path | str, key: str, problem: str):
        self.path = str(path)
        self.key = key
        self.problem = problem
        super().__init__(f"{self.path}: {key}: {problem}" if key else f"{self.path}: {problem}")


# --- the parsed form ---------------------------------------------------------


@dataclass(frozen=True, kw_only=True)
class Site:
    organisation: str
    address: tuple[str, ...] = ()
    department: str | None = None
    phone: str | None = None


@dataclass(frozen=True, kw_only=True)
class Column:
    field: str
    caption: str
    width: float = 1.0
    align: str = "left"


@dataclass(frozen=True, kw_only=True)
class Field:
    field: str
    caption: str


@dataclass(frozen=True, kw_only=True)
class Section:
    kind: str
    caption: str
    columns: tuple[Column, ...] = ()
    fields: tuple[Field, ...] = ()
    body: str | None = None
    lines: tuple[str, ...] = ()
    blank: tuple[str, ...] = ()
    height_mm: float | None = None


@dataclass(frozen=True, kw_only=True)
class Page:
    size: str = "A4"
    orientation: str = "portrait"
    margin_mm: float = 14.0


@dataclass(frozen=True, kw_only=True)
class CodeSpec:
    bar_width_mm: float = 0.25
    height_mm: float = 8.0


@dataclass(frozen=True, kw_only=True)
class LabelSpec:
    columns: int
    rows: int
    label_width_mm: float
    label_height_mm: float
    left_mm: float
    top_mm: float
    column_gap_mm: float = 0.0
    row_gap_mm: float = 0.0
    lines: tuple[str, ...] = ("lot_id", "unit", "address", "code")
    outline: bool = True


@dataclass(frozen=True, kw_only=True)
class Form:
    """One sheet's layout: header, page, sections in order."""

    sheet: str
    path: Path
    title: str
    number: str
    revision: str
    issued: str | None
    site: Site
    page: Page
    code: CodeSpec
    sections: tuple[Section, ...] = ()
    labels: LabelSpec | None = None

    def section(self, kind: str) -> Section | None:
        return next((s for s in self.sections if s.kind == kind), None)


# --- reading ---------------------------------------------------------------


def _read(path: Path) -> dict:
    try:
        with open(path, "rb") as fh:
            return tomllib.load(fh)
    except FileNotFoundError:
        raise FormError(path, "", "form file not found") from None
    except tomllib.TOMLDecodeError as exc:
        raise FormError(path, "", f"not valid TOML ({exc})") from None
    except UnicodeDecodeError:
        raise FormError(path, "", "not UTF-8 text") from None
    except OSError as exc:
        raise FormError(path, "", f"cannot read ({exc.strerror or exc})") from None


class _Table:
    """A TOML table being checked: every read names its key path; keys
    nobody read are reported as unknown (typos must not pass silently)."""

    def __init__(self, path: Path, prefix: str, data: Any):
        if not isinstance(data, dict):
            raise FormError(path, prefix, f"expected a table, got {_kind(data)}")
        self.path, self.prefix, self.data, self.seen = path, prefix, data, set()

    def key(self, name: str) -> str:
        return f"{self.prefix}.{name}" if self.prefix else name

    def error(self, name: str, problem: str) -> FormError:
        return FormError(self.path, self.key(name), problem)

    def get(self, name: str, default=None):
        self.seen.add(name)
        return self.data.get(name, default)

    def missing(self, name: str, expected: str) -> FormError:
        import difflib

        near = difflib.get_close_matches(name, [k for k in self.data if k not in self.seen], n=1)
        hint = f"; is {near[0]!r} a misspelling?" if near else ""
        return self.error(name, f"missing (expected {expected}{hint})")

    def text(self, name: str, *, required: bool = True, default: str | None = None, empty_ok: bool = False):
        value = self.get(name)
        if value is None:
            if required:
                raise self.missing(name, "text")
            return default
        if not isinstance(value, str):
            raise self.error(name, f"expected text, got {_kind(value)} {value!r}")
        if not empty_ok and not value.strip():
            raise self.error(name, "expected text, got an empty string")
        return value

    def texts(self, name: str, *, allowed: tuple[str, ...] | None = None, default=()) -> tuple[str, ...]:
        value = self.get(name)
        if value is None:
            return tuple(default)
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            raise self.error(name, f"expected a list of text, got {value!r}")
        for i, v in enumerate(value, start=1):
            if allowed is not None and v not in allowed:
                raise FormError(
                    self.path, f"{self.key(name)}[{i}]", f"expected one of {', '.join(allowed)}, got {v!r}"
                )
        return tuple(value)

    def number(self, name: str, low: float, high: float, *, default=None, whole: bool = False):
        value = self.get(name)
        if value is None:
            if default is None:
                raise self.missing(name, f"a number from {low:g} to {high:g}")
            return default
        ok_type = isinstance(value, int) if whole else isinstance(value, (int, float))
        if isinstance(value, bool) or not ok_type or not math.isfinite(value) or not low <= value <= high:
            what = "a whole number" if whole else "a number"
            raise self.error(name, f"expected {what} from {low:g} to {high:g}, got {value!r}")
        return value

    def choice(self, name: str, allowed: tuple[str, ...], default: str) -> str:
        value = self.get(name, default)
        if value not in allowed:
            raise self.error(name, f"expected one of {', '.join(allowed)}, got {value!r}")
        return value

    def boolean(self, name: str, default: bool) -> bool:
        value = self.get(name, default)
        if not isinstance(value, bool):
            raise self.error(name, f"expected true or false, got {value!r}")
        return value

    def table(self, name: str, *, required: bool = False) -> "_Table | None":
        value = self.get(name)
        if value is None:
            if required:
                raise self.missing(name, "a table")
            return None
        return _Table(self.path, self.key(name), value)

    def done(self) -> None:
        unknown = sorted(set(self.data) - self.seen)
        if unknown:
            raise self.error(unknown[0], "unknown key" + (f" (known here: {', '.join(sorted(self.seen))})" if self.seen else ""))


def _kind(value) -> str:
    return {
        str: "text", bool: "true/false", int: "a number", float: "a number", list: "a list", dict: "a table"
    }.get(type(value), type(value).__name__)


def _site(table: _Table, base: Site | None) -> Site:
    organisation = table.text("organisation", required=base is None, default=base.organisation if base else None)
    address = table.texts("address", default=base.address if base else ())
    department = table.text("department", required=False, default=base.department if base else None)
    phone = table.text("phone", required=False, default=base.phone if base else None)
    table.done()
    return Site(organisation=organisation, address=address, department=department, phone=phone)


def load_site(forms_dir: Path) -> Site:
    """The shared site header, ``site.toml`` in ``forms_dir``."""
    path = Path(forms_dir) / "site.toml"
    root = _Table(path, "", _read(path))
    site = _site(root.table("site", required=True), None)
    root.done()
    return site


def _items(sec: _Table, key: str, allowed, kind: str):
    """Each entry of a section's ``columns`` or ``fields`` list as a checked
    table, with its ``field`` name (one of ``allowed``)."""
    raw = sec.get(key)
    if raw is None:
        raise sec.error(key, f"missing (a {kind} section lists its {key}; known: {', '.join(allowed)})")
    if not isinstance(raw, list) or not raw:
        raise sec.error(key, "expected a non-empty list of {field = ..., caption = ...} tables")
    for i, item in enumerate(raw, start=1):
        entry = _Table(sec.path, f"{sec.key(key)}[{i}]", item)
        name = entry.text("field")
        if name not in allowed:
            raise entry.error("field", f"expected one of {', '.join(allowed)}, got {name!r}")
        yield entry, name


def _columns(sec: _Table, kind: str) -> tuple[Column, ...]:
    out = []
    for col, name in _items(sec, "columns", COLUMNS[kind], kind):
        caption = col.text("caption", empty_ok=True)
        width = col.number("width", 0.1, 100, default=1.0)
        align = col.choice("align", ("left", "right", "centre"), "left")
        col.done()
        out.append(Column(field=name, caption=caption, width=float(width), align=align))
    return tuple(out)


def _fields(sec: _Table, kind: str) -> tuple[Field, ...]:
    out = []
    for f, name in _items(sec, "fields", FIELDS[kind], kind):
        caption = f.text("caption")
        f.done()
        out.append(Field(field=name, caption=caption))
    return tuple(out)


def _section(path: Path, sheet: str, index: int, data: Any) -> Section:
    sec = _Table(path, f"section[{index}]", data)
    kinds = SHEET_KINDS[sheet]
    kind = sec.text("kind")
    if kind not in kinds:
        raise sec.error("kind", f"expected one of {', '.join(kinds)} on the {SHEET_TITLES[sheet]}, got {kind!r}")
    caption = sec.text("caption", empty_ok=True)
    extra: dict[str, Any] = {}
    if kind in COLUMNS:
        extra["columns"] = _columns(sec, kind)
    if kind in FIELDS:
        extra["fields"] = _fields(sec, kind)
    for option in OPTIONS.get(kind, ()):
        if option == "body":
            extra["body"] = sec.text("body")
        elif option == "lines":
            extra["lines"] = sec.texts("lines", default=())
            if not extra["lines"]:
                raise sec.error("lines", "expected at least one line to sign, e.g. [\"Picked by\"]")
        elif option == "blank":
            extra["blank"] = sec.texts("blank", default=())
        elif option == "height_mm":
            extra["height_mm"] = float(sec.number("height_mm", 40, 200, default=70.0))
    sec.done()
    return Section(kind=kind, caption=caption, **extra)


def _labels(table: _Table) -> LabelSpec:
    spec = LabelSpec(
        columns=table.number("columns", 1, 10, whole=True),
        rows=table.number("rows", 1, 30, whole=True),
        label_width_mm=float(table.number("label_width_mm", 20, 200)),
        label_height_mm=float(table.number("label_height_mm", 10, 200)),
        left_mm=float(table.number("left_mm", 0, 100)),
        top_mm=float(table.number("top_mm", 0, 100)),
        column_gap_mm=float(table.number("column_gap_mm", 0, 50, default=0.0)),
        row_gap_mm=float(table.number("row_gap_mm", 0, 50, default=0.0)),
        lines=table.texts("lines", allowed=LABEL_LINES, default=("lot_id", "unit", "address", "code")),
        outline=table.boolean("outline", True),
    )
    if not spec.lines:
        raise table.error("lines", "expected at least one line per label")
    table.done()
    return spec


def load_form(sheet: str, forms_dir: str | Path | None = None) -> Form:
    """Read and check the layout of ``sheet`` (pick, labels, bench, release)
    from ``forms_dir`` (default: the forms shipped with the package).

    Raises FormError naming the file and the key for anything it cannot use.
    """
    if sheet not in SHEETS:
        raise ValueError(f"sheet: expected one of {', '.join(SHEETS)}, got {sheet!r}")
    folder = DEFAULT_FORMS_DIR if forms_dir is None else Path(forms_dir)
    if not folder.is_dir():
        raise FormError(folder, "", "not a folder of forms")
    site = load_site(folder)
    path = folder / f"{sheet}.toml"
    root = _Table(path, "", _read(path))

    head = root.table("form", required=True)
    title = head.text("title")
    number = head.text("number")
    revision = head.text("revision")
    issued = head.text("issued", required=False)
    head.done()

    site_override = root.table("site")
    if site_override is not None:
        site = _site(site_override, site)

    page = Page()
    pt = root.table("page")
    if pt is not None:
        page = Page(
            size=pt.choice("size", PAGE_SIZES, "A4"),
            orientation=pt.choice("orientation", ("portrait", "landscape"), "portrait"),
            margin_mm=float(pt.number("margin_mm", 5, 40, default=14.0)),
        )
        pt.done()

    code = CodeSpec()
    ct = root.table("code")
    if ct is not None:
        code = CodeSpec(
            bar_width_mm=float(ct.number("bar_width_mm", 0.15, 0.6, default=0.25)),
            height_mm=float(ct.number("height_mm", 4, 25, default=8.0)),
        )
        ct.done()

    labels = None
    sections: tuple[Section, ...] = ()
    if sheet == "labels":
        labels = _labels(root.table("labels", required=True))
    else:
        raw = root.get("section")
        if not isinstance(raw, list) or not raw:
            raise FormError(path, "section", "expected one or more [[section]] tables")
        sections = tuple(_section(path, sheet, i, item) for i, item in enumerate(raw, start=1))
        kinds = [s.kind for s in sections]
        for kind in REQUIRED_KINDS[sheet]:
            if kind not in kinds:
                raise FormError(path, "section", f"the {SHEET_TITLES[sheet]} needs a section of kind {kind!r}")
        for kind in set(kinds):
            if kind not in ("text", "signoff") and kinds.count(kind) > 1:
                where = [i for i, k in enumerate(kinds, start=1) if k == kind][1]
                raise FormError(path, f"section[{where}].kind", f"a second {kind!r} section (only one allowed)")
    root.done()
    return Form(
        sheet=sheet,
        path=path,
        title=title,
        number=number,
        revision=revision,
        issued=issued,
        site=site,
        page=page,
        code=code,
        sections=sections,
        labels=labels,
    )
