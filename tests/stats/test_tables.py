"""Code-letter tables: Table I, sample sizes, Tables II-A and II-B, arrows,
refusals, provenance, and the exact risks of a looked-up plan.

The expected values below are transcribed here a second time, in the layout
of ../shared/reference-values.md section 5, independently of the data in
inspector/stats/tables.py; each block names its source.
"""

from __future__ import annotations

import subprocess
import sys
from decimal import Decimal
from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from inspector.stats import tables
from inspector.stats.tables import (
    AQLS,
    CONFIRMED,
    INFERRED,
    LETTERS,
    NotGiven,
    Plan,
    TableError,
    code_letter,
    lookup_plan,
    parse_aql,
    sample_size,
    table_cell,
)

# --- Table I --------------------------------------------------------------
# Source: MIL-STD-105E Table I via the pdfcoffee "AQL Sampling Chart"
# (pdfcoffee.com/aql-sampling-chart-pdf-free.html, same document as
# zh.scribd.com/document/339359187); S-2/S-3 columns also tpub SB 740-91-01
# Table 2-3; level II column also nibs.org AC-TABLE.ASC Table 1-A.
TABLE_I = """
| lot size | S-1 | S-2 | S-3 | S-4 | I | II | III |
| 2–8 | A | A | A | A | A | A | B |
| 9–15 | A | A | A | A | A | B | C |
| 16–25 | A | A | B | B | B | C | D |
| 26–50 | A | B | B | C | C | D | E |
| 51–90 | B | B | C | C | C | E | F |
| 91–150 | B | B | C | D | D | F | G |
| 151–280 | B | C | D | E | E | G | H |
| 281–500 | B | C | D | E | F | H | J |
| 501–1200 | C | C | E | F | G | J | K |
| 1201–3200 | C | D | E | G | H | K | L |
| 3201–10000 | C | D | F | G | J | L | M |
| 10001–35000 | C | D | F | H | K | M | N |
| 35001–150000 | D | E | G | J | L | N | P |
| 150001–500000 | D | E | G | J | M | P | Q |
| 500001 and over | D | E | H | K | N | Q | R |
"""


def _table_i_cells():
    lines = [line.strip().strip("|") for line in TABLE_I.strip().splitlines()]
    levels = [h.strip() for h in lines[0].split("|")[1:]]
    cells = []
    for line in lines[1:]:
        parts = [p.strip() for p in line.split("|")]
        if parts[0].endswith("and over"):
            low, high = int(parts[0].split()[0]), None
        else:
            low, high = (int(x) for x in parts[0].split("–"))
        for lvl, letter in zip(levels, parts[1:]):
            cells.append((low, high, lvl, letter))
    return cells


TABLE_I_CELLS = _table_i_cells()


def test_table_i_transcription_has_every_cell():
    assert len(TABLE_I_CELLS) == 15 * 7


@pytest.mark.parametrize(
    "low,high,level,letter", TABLE_I_CELLS, ids=[f"{c[2]}-{c[0]}" for c in TABLE_I_CELLS]
)
def test_table_i_cell(low, high, level, letter):
    # Source: MIL-STD-105E Table I via pdfcoffee chart (see TABLE_I above).
    sizes = {low, high if high is not None else 10**9, (low + (high or 2 * low)) // 2}
    for size in sizes:
        assert code_letter(size, level) == letter, (size, level)


# Letter -> sample size. Source: MIL-STD-105E Table II-A via the Tablas copy
# (scribd 563507790), the pdfcoffee chart and nibs.org AC-TABLE.ASC.
LETTER_SIZES = "A 2, B 3, C 5, D 8, E 13, F 20, G 32, H 50, J 80, K 125, L 200, M 315, N 500, P 800, Q 1250, R 2000"


def test_sample_size_of_each_letter():
    expected = {pair.split()[0]: int(pair.split()[1]) for pair in LETTER_SIZES.split(", ")}
    assert {letter: sample_size(letter) for letter in LETTERS} == expected
    assert "I" not in LETTERS and "O" not in LETTERS


# --- Table II-A structure -----------------------------------------------------
# Source of each row's ordered plan list: MIL-STD-105E Table II-A via the
# Tablas copy (scribd 563507790) and the pdfcoffee chart. The column each
# list starts in follows the one-column-per-row diagonal (confirmed only in
# the 0.65-15 window, nibs.org Table 1-A; elsewhere structure only).
ROW_PLANS_A = ["1/2", "2/3", "3/4", "5/6", "7/8", "10/11", "14/15", "21/22", "30/31"]
ROW_PLANS_B_TO_E = ROW_PLANS_A + ["44/45"]
ROW_PLANS_F_TO_R = ROW_PLANS_A[:-1]


def _expected_normal_row(letter: str) -> list[str]:
    r = LETTERS.index(letter)
    zero_one = 14 - r  # AQL 6.5 in row A, one column left per row
    after = ROW_PLANS_A if letter == "A" else ROW_PLANS_B_TO_E if letter in "BCDE" else ROW_PLANS_F_TO_R
    row = []
    for col in range(len(AQLS)):
        k = col - zero_one
        if k < 0:
            row.append("v")
        elif k < 3:
            row.append(["0/1", "^", "v"][k])
        elif k - 3 < len(after):
            row.append(after[k - 3])
        else:
            row.append("^")
    return row


@pytest.mark.parametrize("letter", list(LETTERS))
def test_table_ii_a_row_follows_the_published_pattern(letter):
    got = [str(table_cell(letter, aql, "normal").content) for aql in AQLS]
    assert got == _expected_normal_row(letter)


def test_table_ii_a_each_row_one_column_left_of_the_row_above():
    def first_plan_col(letter):
        return next(i for i, aql in enumerate(AQLS) if isinstance(table_cell(letter, aql).content, Plan))

    for upper, lower in zip(LETTERS, LETTERS[1:]):
        if lower == "R":  # R has no 0/1: its first plan 1/2 sits where the pattern puts it
            assert first_plan_col("R") == first_plan_col("Q") + 2
        else:
            assert first_plan_col(lower) == first_plan_col(upper) - 1


def test_table_ii_a_rows_a_to_q_hold_one_zero_one_plan_and_r_none():
    # Source: Tablas / pdfcoffee row lists ("exactly rows A-Q hold a 0/1 plan").
    for letter in LETTERS:
        zeros = [aql for aql in AQLS if str(table_cell(letter, aql).content) == "0/1"]
        assert len(zeros) == (0 if letter == "R" else 1), letter


def test_every_plan_has_re_one_above_ac():
    for severity in ("normal", "tightened"):
        for letter in LETTERS:
            for aql in AQLS:
                content = table_cell(letter, aql, severity).content
                if isinstance(content, Plan):
                    assert content.re == content.ac + 1


# --- Table II-A confirmed cells -------------------------------------------------
# Source: nibs.org AC-TABLE.ASC Table 1-A (developed from MIL-STD-105E Tables I
# and II-A; prints Re, Ac = Re - 1), columns 0.65..15, rows A..Q, as recorded
# in reference-values.md 5c ("all 120 cells match the grid").
NIBS_1A_AQLS = ["0.65", "1.0", "1.5", "2.5", "4.0", "6.5", "10", "15"]
NIBS_1A = """
A | v v v v v 0/1 ^ v
B | v v v v 0/1 ^ v 1/2
C | v v v 0/1 ^ v 1/2 2/3
D | v v 0/1 ^ v 1/2 2/3 3/4
E | v 0/1 ^ v 1/2 2/3 3/4 5/6
F | 0/1 ^ v 1/2 2/3 3/4 5/6 7/8
G | ^ v 1/2 2/3 3/4 5/6 7/8 10/11
H | v 1/2 2/3 3/4 5/6 7/8 10/11 14/15
J | 1/2 2/3 3/4 5/6 7/8 10/11 14/15 21/22
K | 2/3 3/4 5/6 7/8 10/11 14/15 21/22 ^
L | 3/4 5/6 7/8 10/11 14/15 21/22 ^ ^
M | 5/6 7/8 10/11 14/15 21/22 ^ ^ ^
N | 7/8 10/11 14/15 21/22 ^ ^ ^ ^
P | 10/11 14/15 21/22 ^ ^ ^ ^ ^
Q | 14/15 21/22 ^ ^ ^ ^ ^ ^
"""


def _grid_cells(text, aqls):
    out = []
    for line in text.strip().splitlines():
        letter, cells = (part.strip() for part in line.split("|"))
        tokens = cells.split()
        assert len(tokens) == len(aqls)
        out += [(letter, aql, token) for aql, token in zip(aqls, tokens)]
    return out


NIBS_1A_CELLS = _grid_cells(NIBS_1A, NIBS_1A_AQLS)


def test_nibs_window_has_120_cells():
    assert len(NIBS_1A_CELLS) == 120


@pytest.mark.parametrize("letter,aql,token", NIBS_1A_CELLS, ids=[f"{c[0]}/{c[1]}" for c in NIBS_1A_CELLS])
def test_table_ii_a_confirmed_cell(letter, aql, token):
    # Source: nibs.org AC-TABLE.ASC Table 1-A.
    cell = table_cell(letter, aql, "normal")
    assert str(cell.content) == token
    assert cell.status == CONFIRMED
    assert any("nibs.org" in s for s in cell.sources)


def test_table_ii_a_cells_outside_the_window_are_marked_inferred():
    window = {(letter, aql) for letter, aql, _ in NIBS_1A_CELLS}
    for letter in LETTERS:
        for aql in AQLS:
            cell = table_cell(letter, aql, "normal")
            expected = CONFIRMED if (letter, aql) in window else INFERRED
            assert cell.status == expected, cell.label
    # Row R at 0.010 and 0.015 is unverified against a scan (reference-values 5c).
    assert any("unverified" in s for s in table_cell("R", "0.015").sources)


@pytest.mark.parametrize(
    "lot,aql,ac,re",
    [
        # Source: worked level II lookups, lots of 5000 and 10000 -> L (n = 200),
        # cgfinspections.com and apparelscience.com.
        (5000, "1.5", 7, 8),
        (5000, "2.5", 10, 11),
        (10000, "4.0", 14, 15),
        (10000, "1.5", 7, 8),
    ],
)
def test_letter_l_worked_lookups(lot, aql, ac, re):
    plan = lookup_plan(lot_size=lot, aql=aql, level="II")
    assert (plan.code_letter, plan.sample_size, plan.acceptance_number, plan.rejection_number) == ("L", 200, ac, re)
    assert plan.provenance == CONFIRMED
    assert any("cgfinspections" in s for s in plan.sources)


@pytest.mark.parametrize(
    "lot,letter,n,c",
    [
        # Source: Birolini, Reliability Engineering (2007) section 7.1, Fig. 7.4:
        # F/0.65 -> c = 0 (n = 20), J/0.65 -> c = 1 (n = 80), N/0.65 -> c = 7 (n = 500).
        (120, "F", 20, 0),
        (1000, "J", 80, 1),
        (100000, "N", 500, 7),
    ],
)
def test_birolini_cells_at_aql_0_65(lot, letter, n, c):
    plan = lookup_plan(lot_size=lot, aql="0.65")
    assert (plan.code_letter, plan.sample_size, plan.acceptance_number) == (letter, n, c)
    assert any("Birolini" in s for s in plan.sources)


# --- arrows ---------------------------------------------------------------------
# The rule (MIL-STD-105E Table II-A footnote, legend confirmed in the Tablas and
# pdfcoffee copies): follow v to the first plan below, ^ to the first plan
# above, and use that plan's sample size; 100 % inspection if it reaches N.


def test_down_arrow_uses_the_plan_below_with_its_own_sample_size():
    # B/10 is v (nibs Table 1-A); the first plan below is C/10 = 1/2 at n = 5.
    plan = lookup_plan(lot_size=1000, aql="10", level="S-1")
    assert plan.code_letter == "C"
    plan = lookup_plan(lot_size=12, aql="10", level="II")  # B
    assert (plan.code_letter, plan.plan_letter) == ("B", "C")
    assert (plan.sample_size, plan.acceptance_number, plan.rejection_number) == (5, 1, 2)
    assert any("arrow at B/10 pointing down" in note for note in plan.notes)


def test_up_arrow_uses_the_plan_above_with_its_own_sample_size():
    # G/0.65 is ^ (nibs Table 1-A); the plan above is F/0.65 = 0/1 at n = 20.
    plan = lookup_plan(lot_size=200, aql="0.65")  # G
    assert (plan.code_letter, plan.plan_letter, plan.sample_size) == ("G", "F", 20)
    assert (plan.acceptance_number, plan.rejection_number) == (0, 1)
    assert any("pointing up" in note for note in plan.notes)


def test_corner_a_at_smallest_aql_goes_all_the_way_down_to_q():
    # A/0.010 is v all the way down to Q/0.010 = 0/1 (n = 1250): inferred cells.
    plan = lookup_plan(lot_size=8, aql="0.010")
    assert (plan.code_letter, plan.plan_letter, plan.table_sample_size) == ("A", "Q", 1250)
    assert plan.full_inspection and plan.sample_size == 8
    assert plan.provenance == INFERRED


def test_corner_r_at_smallest_aql_goes_up_to_q():
    plan = lookup_plan(lot_size=600000, aql="0.010", level="III")  # R, ^
    assert (plan.code_letter, plan.plan_letter, plan.sample_size, plan.acceptance_number) == ("R", "Q", 1250, 0)
    assert not plan.full_inspection


def test_corner_r_at_largest_aql_goes_up_to_b():
    # Column 1000: C..R are ^, B = 44/45 at n = 3.
    plan = lookup_plan(lot_size=600000, aql="1000", level="III")
    assert (plan.plan_letter, plan.sample_size, plan.acceptance_number, plan.rejection_number) == ("B", 3, 44, 45)


def test_corner_a_at_largest_aql_is_a_plan():
    plan = lookup_plan(lot_size=8, aql="1000")
    assert (plan.plan_letter, plan.sample_size, plan.acceptance_number, plan.full_inspection) == ("A", 2, 30, False)


@pytest.mark.parametrize(
    "lot,level,aql,letter",
    [
        (5, "II", "10", "A"),  # A/10 is ^ with no row above (nibs ASCII shows the arrow)
        (600000, "III", "0.015", "R"),  # R/0.015 is v with no row below
    ],
)
def test_arrows_leading_off_the_table_are_refused(lot, level, aql, letter):
    with pytest.raises(TableError) as info:
        lookup_plan(lot_size=lot, aql=aql, level=level)
    assert info.value.field == "aql"
    message = str(info.value)
    assert f"code letter {letter}" in message and f"AQL {aql}" in message and "no plan" in message


def test_full_inspection_when_the_sample_reaches_the_lot():
    # Lot of 5 at level II: A; AQL 1.0 is v down to E/1.0 = 0/1 at n = 13 >= 5.
    plan = lookup_plan(lot_size=5, aql="1.0")
    assert plan.full_inspection and plan.sample_size == 5 and plan.table_sample_size == 13
    assert (plan.acceptance_number, plan.rejection_number) == (0, 1)
    assert any("100 %" in note for note in plan.notes)
    # Equal counts too: lot of 2 with A/6.5 = 0/1 at n = 2.
    plan = lookup_plan(lot_size=2, aql="6.5")
    assert plan.full_inspection and plan.sample_size == 2
    # And not when the sample is smaller than the lot.
    assert not lookup_plan(lot_size=3, aql="6.5").full_inspection


# --- Table II-B -------------------------------------------------------------------
# Source: nibs.org AC-TABLE.ASC Table 1-B ("single tightened"; Re printed,
# Ac = Re - 1), code letters A..L, AQL 0.65..15 (reference-values 5d).
NIBS_1B = """
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
NIBS_1B_CELLS = _grid_cells(NIBS_1B, NIBS_1A_AQLS)


@pytest.mark.parametrize("letter,aql,token", NIBS_1B_CELLS, ids=[f"{c[0]}/{c[1]}" for c in NIBS_1B_CELLS])
def test_table_ii_b_confirmed_cell(letter, aql, token):
    cell = table_cell(letter, aql, "tightened")
    assert str(cell.content) == token
    assert cell.status == CONFIRMED


def test_tightened_pattern_reproduces_the_confirmed_window_except_a_10():
    # The pattern stated in reference-values 5d must agree with nibs Table 1-B,
    # except A/10 where the reference itself notes the disagreement.
    mismatches = [
        f"{letter}/{aql}"
        for letter, aql, token in NIBS_1B_CELLS
        if str(tables.tightened_pattern_cell(letter, AQLS.index(aql))) != token
    ]
    assert mismatches == ["A/10"]


def test_tightened_cells_outside_the_window_are_inferred_or_not_given():
    window = {(letter, aql) for letter, aql, _ in NIBS_1B_CELLS}
    for letter in LETTERS:
        for aql in AQLS:
            cell = table_cell(letter, aql, "tightened")
            if (letter, aql) in window:
                assert cell.status == CONFIRMED
            elif isinstance(cell.content, NotGiven):
                assert cell.status == "" and cell.content.reason
            else:
                assert cell.status == INFERRED, cell.label


def test_tightened_inferred_cells_use_only_the_confirmed_acceptance_numbers():
    # Ac 0, 1, 2, 3, 5, 8, 12, 18 confirmed (nibs Table 1-B); 27 and 41 are
    # from memory and must not appear.
    seen = set()
    for letter in LETTERS:
        for aql in AQLS:
            content = table_cell(letter, aql, "tightened").content
            if isinstance(content, Plan):
                seen.add(content.ac)
    assert seen == {0, 1, 2, 3, 5, 8, 12, 18}


def test_tightened_plans_accept_no_more_than_normal_at_the_same_cell():
    # Common practice: tightened inspection is never more lenient than normal.
    for letter in LETTERS:
        for aql in AQLS:
            t = table_cell(letter, aql, "tightened").content
            n = table_cell(letter, aql, "normal").content
            if isinstance(t, Plan) and isinstance(n, Plan):
                assert t.ac <= n.ac, f"{letter}/{aql}"


def test_tightened_lookup_of_a_confirmed_cell():
    # J/1.0 tightened = 1/2 (nibs Table 1-B); lot 1000 at level II -> J.
    plan = lookup_plan(lot_size=1000, aql="1.0", severity="tightened")
    assert (plan.code_letter, plan.sample_size, plan.acceptance_number, plan.rejection_number) == ("J", 80, 1, 2)
    assert plan.provenance == CONFIRMED
    # A/10 tightened is v (nibs): down through B/10, C/10 to D/10 = 1/2 at n = 8.
    plan = lookup_plan(lot_size=8, aql="10", severity="tightened")
    assert (plan.plan_letter, plan.acceptance_number, plan.full_inspection) == ("D", 1, True)


def test_tightened_lookup_of_an_inferred_cell_says_so():
    plan = lookup_plan(lot_size=50000, aql="1.0", severity="tightened")  # N, pattern: 8/9
    assert (plan.code_letter, plan.acceptance_number, plan.provenance) == ("N", 8, INFERRED)
    assert any("inferred" in note for note in plan.notes)


@pytest.mark.parametrize(
    "lot,level,aql,why",
    [
        (5, "II", "25", "row A"),  # A beyond AQL 15
        (20, "II", "400", "27/28"),  # C/400: beyond 18/19 in rows B-E
        (200, "II", "150", "27/28"),  # G/150 is ^ up to E/150: beyond 18/19
        (100000, "II", "0.010", "row S"),  # column 0.010 leads to R/0.010
        (600000, "III", "0.015", "below the last row"),  # R/0.015 v off the table
    ],
)
def test_tightened_cells_not_given_are_refused(lot, level, aql, why):
    with pytest.raises(TableError) as info:
        lookup_plan(lot_size=lot, aql=aql, level=level, severity="tightened")
    assert info.value.field == "aql" and why in str(info.value)


# --- input ------------------------------------------------------------------------


@pytest.mark.parametrize(
    "value,expected",
    [("1", "1.0"), ("1.0", "1.0"), ("1.00", "1.0"), (" 0.65 ", "0.65"), ("0.010", "0.010"), ("0.01", "0.010"),
     (10, "10"), (Decimal("2.5"), "2.5"), (Fraction(13, 20), "0.65"), (0.65, "0.65"), ("1000", "1000")],
)
def test_aql_as_the_trade_writes_it(value, expected):
    assert parse_aql(value) == expected


@pytest.mark.parametrize("value", ["0.5", "3", "abc", "", "nan", "-1"])
def test_unknown_aql_is_refused_with_the_table_list(value):
    with pytest.raises(TableError) as info:
        parse_aql(value)
    assert info.value.field == "aql"
    assert "0.010, 0.015" in str(info.value) and "1000" in str(info.value)


@pytest.mark.parametrize(
    "kwargs,field",
    [
        (dict(lot_size=1, aql="1.0"), "lot_size"),
        (dict(lot_size=0, aql="1.0"), "lot_size"),
        (dict(lot_size=2.5, aql="1.0"), "lot_size"),
        (dict(lot_size=True, aql="1.0"), "lot_size"),
        (dict(lot_size=100, aql="1.0", level="IV"), "level"),
        (dict(lot_size=100, aql="1.0", severity="reduced"), "severity"),
        (dict(lot_size=100, aql="0.3"), "aql"),
    ],
)
def test_bad_lookup_input_names_the_field(kwargs, field):
    with pytest.raises(TableError) as info:
        lookup_plan(**kwargs)
    assert info.value.field == field


def test_tables_module_does_not_load_numpy():
    code = "import sys, inspector.stats.tables, inspector.stats.switching; print('numpy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


@settings(max_examples=80, deadline=None)
@given(
    lot=st.integers(min_value=2, max_value=10**9),
    level=st.sampled_from(tables.LEVELS),
    aql=st.sampled_from(AQLS),
    severity=st.sampled_from(tables.SEVERITIES),
)
def test_any_lookup_gives_a_consistent_plan_or_a_clear_refusal(lot, level, aql, severity):
    try:
        plan = lookup_plan(lot_size=lot, aql=aql, level=level, severity=severity)
    except TableError as exc:
        assert exc.field == "aql" and "no plan" in str(exc)
        return
    assert 1 <= plan.sample_size <= lot
    assert plan.rejection_number == plan.acceptance_number + 1
    assert plan.full_inspection == (plan.table_sample_size >= lot)
    assert plan.sample_size == (lot if plan.full_inspection else plan.table_sample_size)
    assert plan.table_sample_size == sample_size(plan.plan_letter)
    assert plan.provenance in (CONFIRMED, INFERRED)


# --- exact risks of a looked-up plan ---------------------------------------------
# Reference library: scipy.stats.hypergeom (hypergeom.cdf(c, N_lot, D, n)) and
# scipy.stats.binom, as named in reference-values.md section 1.

from inspector.stats.table_risks import PA_MATERIAL, table_plan_risks  # noqa: E402

RISK_CASES = [
    (5000, "1.5", "II", "normal"),
    (300, "0.65", "II", "normal"),
    (1200, "2.5", "II", "tightened"),
    (40, "4.0", "II", "normal"),
    (10**6, "0.65", "II", "normal"),
    (150, "1.0", "S-3", "normal"),
    (20000, "0.015", "II", "normal"),
]


@pytest.mark.parametrize("lot,aql,level,severity", RISK_CASES)
def test_risks_match_scipy(lot, aql, level, severity):
    from scipy.stats import binom, hypergeom

    plan = lookup_plan(lot_size=lot, aql=aql, level=level, severity=severity)
    assert not plan.full_inspection
    risks = table_plan_risks(plan)
    N, n, c = lot, plan.sample_size, plan.acceptance_number
    d1 = (N * Fraction(Decimal(aql))) // 100  # exact floor, in the test's own arithmetic
    assert risks.aql_defectives == d1
    # scipy.stats.hypergeom / binom as the reference.
    assert risks.pa_at_aql_lot == pytest.approx(hypergeom.cdf(c, N, d1, n), rel=1e-9, abs=1e-12)
    assert risks.pa_at_aql_process == pytest.approx(binom.cdf(c, n, float(Decimal(aql)) / 100), rel=1e-9)
    d = risks.rql_defectives
    assert hypergeom.cdf(c, N, d, n) <= 0.10 < hypergeom.cdf(c, N, d - 1, n)
    assert risks.rql_at_consumer_risk_lot == d / N
    assert binom.cdf(c, n, risks.rql_at_consumer_risk_process) == pytest.approx(0.10, abs=1e-9)
    for value in (risks.pa_at_aql_lot, risks.pa_at_aql_process,
                  risks.rql_at_consumer_risk_lot, risks.rql_at_consumer_risk_process):
        assert 0.0 <= value <= 1.0


def test_nonconforming_at_the_aql_is_floored_exactly_as_typed():
    # 20000 x 0.015 / 100 = 3 exactly; in binary floating point
    # 20000 * (0.015 / 100) is 2.9999999999999996 and would floor to 2.
    plan = lookup_plan(lot_size=20000, aql="0.015")
    assert table_plan_risks(plan).aql_defectives == 3


def test_risks_of_full_inspection_are_exact():
    from scipy.stats import binom

    plan = lookup_plan(lot_size=5, aql="1.0")  # every unit, Ac 0
    risks = table_plan_risks(plan)
    assert risks.aql_defectives == 0
    assert risks.pa_at_aql_lot == 1.0
    assert risks.rql_defectives == 1 and risks.rql_at_consumer_risk_lot == 1 / 5
    assert risks.pa_at_aql_process == pytest.approx(0.99**5, rel=1e-12)  # binomial, n = N = 5
    assert binom.cdf(0, 5, risks.rql_at_consumer_risk_process) == pytest.approx(0.10, abs=1e-9)
    assert any("exact" in note for note in risks.notes)


def test_full_inspection_rejects_a_lot_above_the_acceptance_number():
    # Lot of 2 at A/6.5 = 0/1 (n = 2 = N): 6.5 % of 2 units floors to 0.
    plan = lookup_plan(lot_size=2, aql="6.5")
    risks = table_plan_risks(plan)
    assert (risks.pa_at_aql_lot, risks.rql_at_consumer_risk_lot) == (1.0, 0.5)


def test_aql_above_ten_gives_no_unit_risks_and_says_why():
    plan = lookup_plan(lot_size=100, aql="25")
    risks = table_plan_risks(plan)
    assert plan.acceptance_number == 10  # the plan itself is still given (F/25)
    assert risks.pa_at_aql_lot is None and risks.rql_at_consumer_risk_process is None
    assert any("defects per hundred units" in note for note in risks.notes)


def test_material_difference_is_flagged_for_a_small_lot_only():
    small = table_plan_risks(lookup_plan(lot_size=300, aql="0.65"))  # H -> J/0.65 = 1/2, n = 80
    assert small.differ_materially
    assert abs(small.pa_at_aql_lot - small.pa_at_aql_process) > PA_MATERIAL
    assert any("differ materially" in note for note in small.notes)
    large = table_plan_risks(lookup_plan(lot_size=10**6, aql="0.65"))
    assert not large.differ_materially
    assert not any("differ materially" in note for note in large.notes)


@settings(max_examples=40, deadline=None)
@given(
    lot=st.integers(min_value=2, max_value=10**7),
    level=st.sampled_from(tables.LEVELS),
    aql=st.sampled_from(AQLS[:16]),  # up to 10: percent nonconforming
)
def test_risks_are_probabilities(lot, level, aql):
    try:
        plan = lookup_plan(lot_size=lot, aql=aql, level=level)
    except TableError:
        return
    risks = table_plan_risks(plan)
    for value in (risks.pa_at_aql_lot, risks.pa_at_aql_process,
                  risks.rql_at_consumer_risk_lot, risks.rql_at_consumer_risk_process):
        assert value is not None and 0.0 <= value <= 1.0
    # The lot's RQL is a whole number of units above the acceptance number.
    assert risks.rql_defectives >= plan.acceptance_number + 1
