"""Code-letter sampling plans from the public attribute-sampling tables.

MIL-STD-105E (10 May 1989, public release) and ANSI/ASQ Z1.4 print the same
tables. This module holds, as plain data:

* Table I: the sample-size code letter for a lot size and an inspection level
  (special S-1..S-4, general I, II, III);
* the sample size of each code letter;
* Table II-A (single sampling, normal inspection);
* Table II-B (single sampling, tightened inspection), partly; see below;

and resolves a lookup (lot size, AQL, level, severity) to a plan, following
the table's arrows as the standard's footnote says: ``v`` means "use the
first sampling plan below the arrow", ``^`` "use the first sampling plan
above the arrow", and the sample size used is that plan's own, not the code
letter's. When that sample size reaches the lot size, every unit is
inspected.

Provenance
----------
Every cell carries where it comes from (``../shared/reference-values.md``
section 5 is the project's record of the sources):

* Table I and the letter -> sample size list: confirmed, every cell
  ("AQL Sampling Chart", pdfcoffee.com; tpub SB 740-91-01 Table 2-3 for S-2
  and S-3; nibs.org AC-TABLE.ASC Table 1-A for level II).
* Table II-A, AQL 0.65 to 15, code letters A to Q: confirmed cell by cell
  from nibs.org AC-TABLE.ASC Table 1-A (a table "developed from MIL-STD-105E
  Table I and Table II-A"; it prints Re, and Ac = Re - 1). Cells L/1.5,
  L/2.5, L/4.0 are also confirmed by worked lookups (cgfinspections.com,
  apparelscience.com) and F/0.65, J/0.65, N/0.65 by Birolini, *Reliability
  Engineering* (2007) section 7.1, Fig. 7.4.
* Table II-A elsewhere: **inferred**. Each row's ordered list of Ac/Re plans
  is confirmed (the "Tablas" copy, scribd 563507790, and the pdfcoffee
  chart); the column each plan sits in comes from the one-column-per-row
  diagonal that holds throughout the confirmed window. Row R at AQL 0.010
  and 0.015 is unverified against a scan.
* Table II-B, AQL 0.65 to 15, code letters A to L: confirmed from nibs.org
  AC-TABLE.ASC Table 1-B (Re printed, Ac = Re - 1).
* Table II-B elsewhere: **inferred** by the pattern the reference states
  (the tightened 0/1 sits one column right of the normal 0/1; two ``v``
  cells between 0/1 and 1/2; Ac runs 0, 1, 2, 3, 5, 8, 12, 18), with
  ``v`` before each row's first plan and, in rows F to R, ``^`` after 18/19
  as in rows K and L of the confirmed window. Cells the pattern cannot
  settle from confirmed facts are **not given** and a lookup that needs one
  is refused with the reason:

  - row A beyond AQL 15 (the pattern would put 0/1 at A/10, where the
    confirmed table shows an arrow, so the row's later plans cannot be
    placed);
  - rows B to E beyond 18/19 (the continuation 27/28, 41/42 is recalled,
    not confirmed);
  - R/0.010 (the pattern gives 0/1, but an extra row S used only at AQL
    0.010 is recalled for this table, which would contradict it; the S row
    itself is recalled only and is not reproduced).

The reduced table (II-C) is not reproduced: none of its cells is confirmed.

Two cells of II-A lead off the table: A at AQL 10 (``^`` with no row above)
and R at AQL 0.015 (``v`` with no row below). The same happens in II-B at
R/0.015 and R/0.025. Lookups reaching them are refused, not guessed.

AQLs are matched by their exact decimal value, so ``"1"``, ``"1.0"`` and
``"1.00"`` all mean the table's 1.0 column.
"""

from __future__ import annotations

import numbers
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation
from fractions import Fraction
from typing import Union

__all__ = [
    "AQLS",
    "LETTERS",
    "LEVELS",
    "SEVERITIES",
    "SAMPLE_SIZES",
    "CONFIRMED",
    "INFERRED",
    "TableError",
    "Plan",
    "Arrow",
    "NotGiven",
    "Cell",
    "TablePlan",
    "parse_aql",
    "aql_fraction",
    "code_letter",
    "sample_size",
    "table_cell",
    "tightened_pattern_cell",
    "lookup_plan",
]

# --- sources, as named in the reference-values file ------------------------

SRC_TABLE_I = (
    "MIL-STD-105E Table I via the pdfcoffee 'AQL Sampling Chart' "
    "(also zh.scribd.com/document/339359187)"
)
SRC_TABLE_I_TPUB = "tpub SB 740-91-01 Table 2-3 (levels S-2, S-3)"
SRC_TABLE_I_NIBS = "nibs.org AC-TABLE.ASC Table 1-A (level II)"
SRC_LETTERS = "MIL-STD-105E Table II-A sample-size column via the Tablas copy (scribd 563507790), pdfcoffee chart and nibs.org AC-TABLE.ASC"
SRC_NIBS_A = "nibs.org AC-TABLE.ASC Table 1-A (developed from MIL-STD-105E Tables I and II-A; Re printed, Ac = Re - 1)"
SRC_NIBS_B = "nibs.org AC-TABLE.ASC Table 1-B (single tightened; Re printed, Ac = Re - 1)"
SRC_ROW_LISTS = "MIL-STD-105E Table II-A row plan lists via the Tablas copy (scribd 563507790) and the pdfcoffee chart"
SRC_WORKED_L = "worked level II lookups for lots of 5000 and 10000 (cgfinspections.com, apparelscience.com)"
SRC_BIROLINI = "Birolini, Reliability Engineering (2007) section 7.1, Fig. 7.4 (IEC 60410 plans)"
SRC_DIAGONAL = "column position inferred from the one-column-per-row diagonal of the confirmed window (structure only)"
SRC_TIGHT_PATTERN = (
    "inferred from the tightened pattern: 0/1 one column right of normal, two arrows "
    "before 1/2, Ac 0, 1, 2, 3, 5, 8, 12, 18; arrows before the first plan and, in rows "
    "F to R, '^' after 18/19 as in rows K and L of nibs.org Table 1-B"
)

CONFIRMED = "confirmed"
INFERRED = "inferred"

# --- the tables' axes --------------------------------------------------------

#: The 26 AQL columns of Tables II-A and II-B, written as in the header.
AQLS: tuple[str, ...] = (
    "0.010", "0.015", "0.025", "0.040", "0.065", "0.10", "0.15", "0.25", "0.40",
    "0.65", "1.0", "1.5", "2.5", "4.0", "6.5", "10", "15", "25", "40", "65",
    "100", "150", "250", "400", "650", "1000",
)
_AQL_DECIMALS = tuple(Decimal(a) for a in AQLS)

#: Sample-size code letters in table order (the tables skip I and O).
LETTERS = "ABCDEFGHJKLMNPQR"

#: Code letter -> sample size (MIL-STD-105E Table II-A; confirmed).
SAMPLE_SIZES: dict[str, int] = dict(
    zip(LETTERS, (2, 3, 5, 8, 13, 20, 32, 50, 80, 125, 200, 315, 500, 800, 1250, 2000))
)

#: Inspection levels of Table I, in its column order.
LEVELS: tuple[str, ...] = ("S-1", "S-2", "S-3", "S-4", "I", "II", "III")

#: Severities with a table here. Reduced inspection has no table (see module doc).
SEVERITIES: tuple[str, ...] = ("normal", "tightened")

# Table I (MIL-STD-105E), confirmed every cell: lot-size range, then the
# letter for S-1 S-2 S-3 S-4 I II III. ``None`` = "and over".
_TABLE_I: tuple[tuple[int, int | None, str], ...] = (
    (2, 8, "AAAAAAB"),
    (9, 15, "AAAAABC"),
    (16, 25, "AABBBCD"),
    (26, 50, "ABBCCDE"),
    (51, 90, "BBCCCEF"),
    (91, 150, "BBCDDFG"),
    (151, 280, "BCDEEGH"),
    (281, 500, "BCDEFHJ"),
    (501, 1200, "CCEFGJK"),
    (1201, 3200, "CDEGHKL"),
    (3201, 10000, "CDFGJLM"),
    (10001, 35000, "CDFHKMN"),
    (35001, 150000, "DEGJLNP"),
    (150001, 500000, "DEGJMPQ"),
    (500001, None, "DEHKNQR"),
)

# Table II-A (single sampling, normal), as laid out in the reference-values
# file: one row per code letter, 26 cells in AQL order. Ac/Re, or an arrow.
_TABLE_II_A_TEXT = """
A | v v v v v v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 30/31
B | v v v v v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 30/31 44/45
C | v v v v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 30/31 44/45 ^
D | v v v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 30/31 44/45 ^ ^
E | v v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 30/31 44/45 ^ ^ ^
F | v v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^
G | v v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^
H | v v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^
J | v v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^
K | v v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
L | v v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
M | v v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
N | v v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
P | v 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
Q | 0/1 ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
R | ^ v 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^ ^
"""

# Table II-B (single sampling, tightened), the confirmed window only: nibs.org
# Table 1-B, code letters A to L, AQL 0.65 to 15.
_TABLE_II_B_WINDOW_AQLS = ("0.65", "1.0", "1.5", "2.5", "4.0", "6.5", "10", "15")
_TABLE_II_B_WINDOW_TEXT = """
A | v v v v v v v v
B | v v v v v 0/1 v v
C | v v v v 0/1 v v 1/2
D | v v v 0/1 v v 1/2 2/3
E | v v 0/1 v v 1/2 2/3 3/4
F | v 0/1 v v 1/2 2/3 3/4 5/6
G | 0/1 v v 1/2 2/3 3/4 5/6 8/9
H | v v 1/2 2/3 3/4 5/6 8/9 12/13
J | v 1/2 2/3 3/4 5/6 8/9 12/13 18/19
K | 1/2 2/3 3/4 5/6 8/9 12/13 18/19 ^
L | 2/3 3/4 5/6 8/9 12/13 18/19 ^ ^
"""

# The tightened plans in row order, as far as they are confirmed.
TIGHTENED_ROW_SEQUENCE: tuple[str, ...] = (
    "0/1", "v", "v", "1/2", "2/3", "3/4", "5/6", "8/9", "12/13", "18/19",
)

# Columns 0.65 .. 15 are the confirmed window of both tables.
_WINDOW_COLS = range(AQLS.index("0.65"), AQLS.index("15") + 1)


class TableError(ValueError):
    """A lookup the tables cannot answer: names the field and the value."""

    def __init__(self, field: str, value, message: str):
        super().__init__(message)
        self.field = field
        self.value = value


# --- cells -----------------------------------------------------------------


@dataclass(frozen=True, kw_only=True)
class Plan:
    """A cell holding a plan: accept on ``ac`` or fewer, reject on ``re`` or more."""

    ac: int
    re: int

    def __str__(self) -> str:
        return f"{self.ac}/{self.re}"


@dataclass(frozen=True, kw_only=True)
class Arrow:
    """A cell holding an arrow: ``"down"`` (v) or ``"up"`` (^)."""

    direction: str

    def __str__(self) -> str:
        return "v" if self.direction == "down" else "^"


@dataclass(frozen=True, kw_only=True)
class NotGiven:
    """A cell this module does not reproduce, with the reason."""

    reason: str

    def __str__(self) -> str:
        return "-"


@dataclass(frozen=True, kw_only=True)
class Cell:
    """One cell of Table II-A or II-B with its provenance."""

    severity: str
    letter: str
    aql: str
    content: Union[Plan, Arrow, NotGiven]
    status: str  # CONFIRMED or INFERRED ("" for NotGiven)
    sources: tuple[str, ...]

    @property
    def label(self) -> str:
        """The cell's name as people say it, e.g. ``L/1.5``."""
        return f"{self.letter}/{self.aql}"


def _parse_token(token: str) -> Union[Plan, Arrow]:
    if token == "v":
        return Arrow(direction="down")
    if token == "^":
        return Arrow(direction="up")
    ac, re = token.split("/")
    return Plan(ac=int(ac), re=int(re))


def _parse_grid(text: str, ncols: int) -> dict[str, tuple[Union[Plan, Arrow], ...]]:
    rows = {}
    for line in text.strip().splitlines():
        letter, cells = line.split("|")
        tokens = cells.split()
        if len(tokens) != ncols:  # a typo in the data must not pass silently
            raise AssertionError(f"row {letter.strip()} has {len(tokens)} cells, expected {ncols}")
        rows[letter.strip()] = tuple(_parse_token(t) for t in tokens)
    return rows


def _normal_cell(letter: str, col: int, content) -> Cell:
    aql = AQLS[col]
    in_window = col in _WINDOW_COLS and letter != "R"
    if in_window:
        sources = [SRC_NIBS_A]
        if isinstance(content, Plan):
            sources.append(SRC_ROW_LISTS)
        if letter == "L" and aql in ("1.5", "2.5", "4.0"):
            sources.append(SRC_WORKED_L)
        if letter in "FJN" and aql == "0.65":
            sources.append(SRC_BIROLINI)
        return Cell(severity="normal", letter=letter, aql=aql, content=content,
                    status=CONFIRMED, sources=tuple(sources))
    if isinstance(content, Plan):
        sources = (SRC_ROW_LISTS + " (the plan's place in its row)", SRC_DIAGONAL)
    else:
        sources = ("arrow " + SRC_DIAGONAL,)
    if letter == "R" and aql in ("0.010", "0.015"):
        sources += ("unverified against a scan of the standard",)
    return Cell(severity="normal", letter=letter, aql=aql, content=content,
                status=INFERRED, sources=sources)


def _build_normal() -> dict[tuple[str, int], Cell]:
    grid = _parse_grid(_TABLE_II_A_TEXT, len(AQLS))
    return {
        (letter, col): _normal_cell(letter, col, content)
        for letter, row in grid.items()
        for col, content in enumerate(row)
    }


def tightened_pattern_cell(letter: str, col: int) -> Union[Plan, Arrow, NotGiven]:
    """The tightened cell the stated pattern gives (before the confirmed window
    overrides it). Public so the tests can check the pattern against the
    confirmed nibs cells."""
    r = LETTERS.index(letter)
    # Normal 0/1 sits at column 14 - r (A at 6.5, Q at 0.010); tightened one
    # column to the right.
    start = 15 - r
    k = col - start
    if k < 0:
        return Arrow(direction="down")
    if k < len(TIGHTENED_ROW_SEQUENCE):
        return _parse_token(TIGHTENED_ROW_SEQUENCE[k])
    if r >= LETTERS.index("F"):
        return Arrow(direction="up")
    return NotGiven(
        reason=(
            f"the tightened table's plans after 18/19 in row {letter} (27/28, 41/42) "
            "are recalled, not confirmed"
        )
    )


def _build_tightened() -> dict[tuple[str, int], Cell]:
    window = _parse_grid(_TABLE_II_B_WINDOW_TEXT, len(_TABLE_II_B_WINDOW_AQLS))
    first = AQLS.index(_TABLE_II_B_WINDOW_AQLS[0])
    cells = {}
    for letter in LETTERS:
        for col, aql in enumerate(AQLS):
            if letter in window and col in _WINDOW_COLS:
                content = window[letter][col - first]
                sources = (SRC_NIBS_B,)
                status = CONFIRMED
            elif letter == "A" and col > _WINDOW_COLS[-1]:
                content = NotGiven(
                    reason=(
                        "row A of the tightened table beyond AQL 15 is not confirmed, and the "
                        "pattern cannot place it (it would put 0/1 at A/10, where the "
                        "confirmed table shows an arrow)"
                    )
                )
                status, sources = "", ()
            elif letter == "R" and aql == "0.010":
                content = NotGiven(
                    reason=(
                        "R/0.010 of the tightened table is not confirmed: the pattern gives "
                        "0/1 there, but the table is recalled to have an extra row S used "
                        "only at AQL 0.010, which contradicts it"
                    )
                )
                status, sources = "", ()
            else:
                content = tightened_pattern_cell(letter, col)
                if isinstance(content, NotGiven):
                    status, sources = "", ()
                else:
                    status, sources = INFERRED, (SRC_TIGHT_PATTERN,)
            cells[(letter, col)] = Cell(
                severity="tightened", letter=letter, aql=aql, content=content,
                status=status, sources=sources,
            )
    return cells


_CELLS = {"normal": _build_normal(), "tightened": _build_tightened()}


# --- parsing and the small lookups -------------------------------------------


def _aql_list() -> str:
    return ", ".join(AQLS)


def parse_aql(value) -> str:
    """The table's AQL column for ``value``, written as in the table header.

    ``value`` is the AQL as the trade writes it, in percent: text such as
    ``"0.65"``, ``"1"``, ``"1.0"``; an int, Decimal or Fraction; a float is
    read through its shortest decimal form (``0.65`` -> ``"0.65"``).
    Raises TableError naming the AQL and listing the table's AQLs when the
    value is not one of them.
    """
    try:
        if isinstance(value, Fraction):
            exact = value
        elif isinstance(value, float):
            exact = Fraction(Decimal(repr(value)))
        else:
            exact = Fraction(Decimal(str(value).strip()))
    except (InvalidOperation, ValueError, TypeError, ArithmeticError):
        raise TableError(
            "aql", value, f"AQL must be a number in percent, got {value!r}; the table's AQLs are {_aql_list()}"
        ) from None
    for text, dec in zip(AQLS, _AQL_DECIMALS):
        if Fraction(dec) == exact:
            return text
    raise TableError(
        "aql", value, f"AQL {value} is not a column of the table; the table's AQLs are {_aql_list()}"
    )


def aql_fraction(aql) -> Fraction:
    """The AQL as an exact fraction of one (``"0.65"`` -> 13/2000)."""
    return Fraction(Decimal(parse_aql(aql))) / 100


def _check_level(level: str) -> str:
    if level not in LEVELS:
        raise TableError("level", level, f"inspection level must be one of {', '.join(LEVELS)}, got {level!r}")
    return level


def _check_severity(severity: str) -> str:
    if severity not in SEVERITIES:
        extra = " (reduced inspection has no table here)" if severity == "reduced" else ""
        raise TableError(
            "severity", severity,
            f"severity must be one of {', '.join(SEVERITIES)}, got {severity!r}{extra}",
        )
    return severity


def _check_lot_size(lot_size) -> int:
    if isinstance(lot_size, bool) or not isinstance(lot_size, numbers.Integral):
        raise TableError("lot_size", lot_size, f"lot size must be a whole number, got {lot_size!r}")
    lot_size = int(lot_size)  # numpy integers from stored data become plain ints
    if lot_size < 2:
        raise TableError("lot_size", lot_size, f"lot size must be at least 2 (Table I starts at 2), got {lot_size}")
    return lot_size


def code_letter(lot_size: int, level: str = "II") -> str:
    """Table I: the sample-size code letter for a lot size and inspection level.

    Levels are ``S-1`` .. ``S-4`` (special) and ``I``, ``II``, ``III``
    (general; II is the usual one). Lot sizes start at 2.
    """
    _check_lot_size(lot_size)
    column = LEVELS.index(_check_level(level))
    for low, high, letters in _TABLE_I:
        if lot_size >= low and (high is None or lot_size <= high):
            return letters[column]
    raise AssertionError("Table I covers every lot size from 2")  # pragma: no cover


def sample_size(letter: str) -> int:
    """The sample size of a code letter (A 2, B 3, ... R 2000)."""
    try:
        return SAMPLE_SIZES[letter]
    except KeyError:
        raise TableError("code_letter", letter, f"code letter must be one of {', '.join(LETTERS)}, got {letter!r}") from None


def table_cell(letter: str, aql, severity: str = "normal") -> Cell:
    """The raw cell of Table II-A (normal) or II-B (tightened), with provenance."""
    sample_size(letter)
    col = AQLS.index(parse_aql(aql))
    return _CELLS[_check_severity(severity)][(letter, col)]


# --- the lookup ------------------------------------------------------------


@dataclass(frozen=True, kw_only=True)
class TablePlan:
    """A single-sampling plan looked up in the tables.

    ``code_letter`` is Table I's letter for the lot; ``plan_letter`` the row
    whose plan is used after following arrows (its sample size is used).
    With ``full_inspection`` every unit is inspected and ``sample_size`` is
    the lot size; ``table_sample_size`` keeps the plan's own sample size.
    ``provenance`` is ``"confirmed"`` only when every cell consulted is
    confirmed from a source; ``sources`` names them. ``notes`` are plain
    sentences: each arrow followed, full inspection, the provenance.
    """

    lot_size: int
    aql: str
    level: str
    severity: str
    code_letter: str
    plan_letter: str
    sample_size: int
    table_sample_size: int
    acceptance_number: int
    rejection_number: int
    full_inspection: bool
    provenance: str
    sources: tuple[str, ...]
    notes: tuple[str, ...]


_TABLE_NAME = {"normal": "Table II-A (normal)", "tightened": "Table II-B (tightened)"}


def _off_table(cell: Cell, reason: str) -> TableError:
    return TableError(
        "aql", cell.aql,
        f"AQL {cell.aql} at code letter {cell.letter} ({cell.severity} inspection): {reason}; "
        "the table gives no plan here, so none is guessed (choose another AQL or level, "
        "or design a plan from its risks)",
    )


def _follow(cells: dict, start: Cell) -> tuple[Cell, list[Cell]]:
    """Follow the arrow in ``start`` to the first plan; returns (plan cell, cells visited)."""
    visited = [start]
    content = start.content
    if isinstance(content, NotGiven):
        raise _off_table(start, content.reason)
    if isinstance(content, Plan):
        return start, visited
    step = 1 if content.direction == "down" else -1
    col = AQLS.index(start.aql)
    r = LETTERS.index(start.letter) + step
    while 0 <= r < len(LETTERS):
        cell = cells[(LETTERS[r], col)]
        visited.append(cell)
        if isinstance(cell.content, Plan):
            return cell, visited
        if isinstance(cell.content, NotGiven):
            raise _off_table(
                start,
                f"its arrow leads to {cell.label}, which is not given here ({cell.content.reason})",
            )
        r += step
    where = "below the last row" if step == 1 else "above the first row"
    raise _off_table(start, f"the arrow '{content}' points {where} of {_TABLE_NAME[start.severity]}")


def lookup_plan(*, lot_size: int, aql, level: str = "II", severity: str = "normal") -> TablePlan:
    """Look up the single-sampling plan for a lot.

    Table I gives the code letter for ``lot_size`` at ``level``; Table II-A
    (``severity="normal"``) or II-B (``"tightened"``) gives the cell at
    ``aql``. An arrow is followed to the first plan below (``v``) or above
    (``^``) in the same AQL column, and that plan's sample size is used
    together with its Ac/Re. When that sample size is at least the lot size,
    every unit is inspected (``full_inspection``; ``sample_size`` is then
    the lot size).

    Raises TableError (a ValueError naming the field) for a lot size below 2,
    an unknown level or severity, an AQL that is not a column of the table,
    and a cell whose arrow leads off the table or to a cell not given here.

    Notes
    -----
    The arrow rule is the standard's footnote to Tables II-A/B: "Use first
    sampling plan below arrow. If sample size equals, or exceeds, lot or
    batch size, do 100 percent inspection" and "Use first sampling plan
    above arrow" (MIL-STD-105E, paraphrased; legend confirmed in the Tablas
    and pdfcoffee copies).
    """
    lot_size = _check_lot_size(lot_size)
    level = _check_level(level)
    severity = _check_severity(severity)
    aql_text = parse_aql(aql)
    letter = code_letter(lot_size, level)
    cells = _CELLS[severity]
    start = cells[(letter, AQLS.index(aql_text))]
    plan_cell, visited = _follow(cells, start)
    plan = plan_cell.content
    table_n = SAMPLE_SIZES[plan_cell.letter]
    full = table_n >= lot_size

    table = _TABLE_NAME[severity]
    notes = [f"Lot size {lot_size} at inspection level {level} gives code letter {letter} (Table I, sample size {SAMPLE_SIZES[letter]})."]
    if plan_cell is not start:
        way = "down" if start.content.direction == "down" else "up"
        notes.append(
            f"{table} has an arrow at {start.label} pointing {way}; the first plan {'below' if way == 'down' else 'above'} "
            f"it is {plan} at code letter {plan_cell.letter}, so that plan's sample size {table_n} is used with Ac {plan.ac}, Re {plan.re}."
        )
    if full:
        notes.append(
            f"The plan's sample size {table_n} reaches the lot size {lot_size}: inspect every unit (100 %); "
            f"the plan's Ac {plan.ac} and Re {plan.re} still decide the lot."
        )
    status = CONFIRMED if all(c.status == CONFIRMED for c in visited) else INFERRED
    sources: list[str] = [SRC_TABLE_I]
    for c in visited:
        for s in c.sources:
            if s not in sources:
                sources.append(s)
    # A long arrow walk is named by its ends ("F/0.010 down to Q/0.010").
    if len(visited) > 2:
        labels = f"{visited[0].label} {'down' if start.content.direction == 'down' else 'up'} to {visited[-1].label}"
    else:
        labels = " and ".join(c.label for c in visited)
    if status == CONFIRMED:
        notes.append(f"{table} cell{'s' if len(visited) > 1 else ''} {labels}: confirmed from a published source.")
    else:
        n_inferred = sum(c.status != CONFIRMED for c in visited)
        which = "inferred" if n_inferred == len(visited) else f"{n_inferred} of {len(visited)} inferred"
        notes.append(
            f"{table} cell{'s' if len(visited) > 1 else ''} {labels}: {which} from the table's pattern, "
            "not confirmed from a published source; check against the standard before relying on it."
        )
    return TablePlan(
        lot_size=lot_size,
        aql=aql_text,
        level=level,
        severity=severity,
        code_letter=letter,
        plan_letter=plan_cell.letter,
        sample_size=lot_size if full else table_n,
        table_sample_size=table_n,
        acceptance_number=plan.ac,
        rejection_number=plan.re,
        full_inspection=full,
        provenance=status,
        sources=tuple(sources),
        notes=tuple(notes),
    )
