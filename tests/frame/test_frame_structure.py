"""Lot structures: parsing, validation, numbering and addresses both ways."""

from __future__ import annotations

import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from inspector import frame
from inspector.frame import FrameError

NESTED = "pallet=18,layer=4,carton=9,unit=24"


# --- regular lots ---------------------------------------------------------------


def test_nested_structure_numbers_outermost_level_first():
    lot = frame.parse_structure(NESTED)
    assert lot.size == 18 * 4 * 9 * 24
    assert lot.form == "nested"
    assert lot.level_names == ("pallet", "layer", "carton", "unit")
    assert lot.container_levels == ("pallet", "layer", "carton")
    assert str(lot.address_of(1)) == "pallet 1 / layer 1 / carton 1 / unit 1"
    assert str(lot.address_of(24)) == "pallet 1 / layer 1 / carton 1 / unit 24"
    assert str(lot.address_of(25)) == "pallet 1 / layer 1 / carton 2 / unit 1"
    assert str(lot.address_of(4 * 9 * 24 + 1)) == "pallet 2 / layer 1 / carton 1 / unit 1"
    assert str(lot.address_of(lot.size)) == "pallet 18 / layer 4 / carton 9 / unit 24"


def test_address_and_number_agree_by_hand():
    lot = frame.parse_structure(NESTED)
    # mixed radix, written out: ((pallet-1)*4 + (layer-1))*9 + (carton-1))*24 + unit
    number = (((3 - 1) * 4 + (2 - 1)) * 9 + (7 - 1)) * 24 + 14
    assert lot.unit_at("pallet 3 / layer 2 / carton 7 / unit 14") == number
    assert str(lot.address_of(number)) == "pallet 3 / layer 2 / carton 7 / unit 14"
    assert lot.address_of(number).container == "pallet 3 / layer 2 / carton 7"


def test_addresses_are_typed_back_leniently():
    lot = frame.parse_structure(NESTED)
    n = lot.unit_at("pallet 3 / layer 2 / carton 7 / unit 14")
    assert lot.unit_at("Pallet 3/LAYER 2 / carton 7/ unit 14") == n
    assert lot.unit_at("3/2/7/14") == n
    assert lot.unit_at(str(n)) == n
    assert lot.unit_at(n) == n


def test_a_billion_unit_lot_is_addressed_without_listing_units():
    lot = frame.parse_structure("pallet=1000,layer=10,carton=100,unit=1000")
    assert lot.size == 10**9
    assert str(lot.address_of(10**9)) == "pallet 1000 / layer 10 / carton 100 / unit 1000"
    assert lot.unit_at("pallet 500 / layer 1 / carton 1 / unit 1") == 499 * 10 * 100 * 1000 + 1


def test_flat_lot_has_one_level_and_no_containers():
    lot = frame.parse_structure("5000")
    assert lot == frame.flat_lot(5000)
    assert lot.form == "flat" and lot.container_levels == ()
    assert str(lot.address_of(17)) == "unit 17" and lot.address_of(17).container == ""
    assert lot.to_text() == "unit=5000"
    assert frame.structure_from_text("unit=5000") == lot


@pytest.mark.parametrize(
    "spec, needle",
    [
        ("pallet=0,unit=24", "at least 1, got 0"),
        ("pallet=-3,unit=24", "'pallet=-3'"),
        ("pallet=18,,unit=24", "got ''"),
        ("pallet=18;unit=24", "'pallet=18;unit=24'"),
        ("pallet=x,unit=24", "'pallet=x'"),
        ("pallet=2,Pallet=3,unit=4", "'Pallet' appears twice"),
        ("9pallet=2,unit=4", "'9pallet'"),
        ("pallet=2,unit=", "'unit='"),
        ("", "got ''"),
        ("0", "at least 1, got 0"),
        ("a=100000,b=100000,c=1000", "more than"),
    ],
)
def test_bad_structure_specs_are_refused_naming_the_part(spec, needle):
    with pytest.raises(FrameError) as info:
        frame.parse_structure(spec)
    assert info.value.field in ("structure", "lot_size")
    assert needle in str(info.value)


def test_declared_lot_size_must_match_the_structure():
    assert frame.parse_structure("pallet=2,unit=4", lot_size=8).size == 8
    with pytest.raises(FrameError, match="holds 8 units but the declared lot size is 9") as info:
        frame.parse_structure("pallet=2,unit=4", lot_size=9)
    assert info.value.field == "lot_size"


@pytest.mark.parametrize(
    "where, needle",
    [
        (0, "outside this lot's units 1..15552"),
        (15553, "outside"),
        ("pallet 19 / layer 1 / carton 1 / unit 1", "pallet must be a number from 1 to 18, got '19'"),
        ("pallet 1 / layer 1 / carton 1", "4 parts"),
        ("crate 1 / layer 1 / carton 1 / unit 1", "'pallet <number>'"),
        ("pallet 1 / layer 0 / carton 1 / unit 1", "got '0'"),
        (True, "expected a unit number"),
    ],
)
def test_bad_addresses_are_refused(where, needle):
    with pytest.raises(FrameError, match=None) as info:
        frame.parse_structure(NESTED).unit_at(where)
    assert needle in str(info.value)


# --- manifests ----------------------------------------------------------------

CONTAINERS = "container,units\nHP-P01,240\nHP-P02,216\nHP-P03,96\n"
SERIALS = (
    "serial,container\n"
    "AJ-001,HP-C1\nAJ-002,HP-C2\nAJ-003,HP-C1\nAJ-004,HP-C3\nAJ-005,HP-C2\nAJ-006,HP-C1\n"
)


def test_container_manifest_numbers_containers_in_row_order():
    lot = frame.manifest_from_csv_text(CONTAINERS)
    assert lot.size == 552 and lot.form == "manifest"
    assert lot.level_names == ("container", "unit")
    assert str(lot.address_of(240)) == "container HP-P01 / unit 240"
    assert str(lot.address_of(241)) == "container HP-P02 / unit 1"
    assert lot.unit_at("container HP-P03 / unit 96") == 552
    assert lot.address_of(300).serial is None


def test_unit_manifest_groups_rows_by_container_in_order_of_first_appearance():
    lot = frame.manifest_from_csv_text(SERIALS)
    assert lot.containers == ("HP-C1", "HP-C2", "HP-C3")
    assert lot.counts == (3, 2, 1)
    assert [lot.address_of(u).serial for u in range(1, 7)] == ["AJ-001", "AJ-003", "AJ-006", "AJ-002", "AJ-005", "AJ-004"]
    assert lot.unit_at("AJ-005") == 5
    assert str(lot.address_of(5)) == "container HP-C2 / unit 2"
    assert lot.unit_at("container HP-C2 / unit 2") == 5


def test_manifest_header_is_case_insensitive_any_column_order_extra_columns_ignored():
    text = "\ufeffUnits , Container,weight\n12,A,3.1\n\n8,B,2.0\n,,\n"
    lot = frame.manifest_from_csv_text(text)
    assert lot.containers == ("A", "B") and lot.counts == (12, 8)


@pytest.mark.parametrize(
    "text, needle",
    [
        ("", "the file is empty"),
        ("\n\n", "the file is empty"),
        ("container,units\n", "no rows after the header"),
        ("box,count\nA,3\n", "expected a header 'container,units'"),
        ("serial,container,units\nx,A,3\n", "expected a header"),
        ("container,units\nA,3\nA,4\n", "line 3: container 'A' is already listed on line 2"),
        ("container,units\nA,0\n", "line 2: units: expected a whole number of at least 1, got '0'"),
        ("container,units\nA,-2\n", "got '-2'"),
        ("container,units\nA,2.5\n", "got '2.5'"),
        ("container,units\nA\n", "line 2: expected 2 columns, got 1"),
        ("container,units\n,4\n", "line 2: container: expected a label"),
        ("serial,container\nS1,A\nS1,B\n", "line 3: serial 'S1' is already listed on line 2"),
        ("serial,container\nS1,\n", "line 2: container: expected a label"),
        ("serial,container\n,A\n", "line 2: serial: expected a serial"),
        ('container,units\n"A,3\n', "malformed CSV"),
        ("container,container,units\nA,B,3\n", "column 'container' appears twice"),
    ],
)
def test_bad_manifests_are_refused_naming_the_line_and_value(text, needle):
    with pytest.raises(FrameError) as info:
        frame.manifest_from_csv_text(text)
    assert info.value.field == "manifest"
    assert needle in str(info.value)


def test_manifest_total_must_match_the_declared_lot_size():
    assert frame.manifest_from_csv_text(CONTAINERS, lot_size=552).size == 552
    with pytest.raises(FrameError, match="holds 552 units but the declared lot size is 550"):
        frame.manifest_from_csv_text(CONTAINERS, lot_size=550)


@pytest.mark.parametrize(
    "where, needle",
    [
        ("container HP-P09 / unit 1", "no container 'HP-P09'"),
        ("container HP-P03 / unit 97", "holds units 1..96, got unit 97"),
        ("AJ-999", "expected a address"),
        (553, "outside"),
    ],
)
def test_bad_manifest_addresses_are_refused(where, needle):
    lot = frame.manifest_from_csv_text(CONTAINERS)
    with pytest.raises(FrameError) as info:
        lot.unit_at(where)
    assert needle in str(info.value)


def test_unknown_serial_is_refused_naming_it():
    with pytest.raises(FrameError, match="'AJ-999'"):
        frame.manifest_from_csv_text(SERIALS).unit_at("AJ-999")


# --- descriptions for the record store -------------------------------------------


@pytest.mark.parametrize("source", ["nested", "flat", "containers", "serials"])
def test_structure_text_and_dict_round_trip_keep_every_container_and_serial(source):
    lot = {
        "nested": lambda: frame.parse_structure(NESTED),
        "flat": lambda: frame.flat_lot(77),
        "containers": lambda: frame.manifest_from_csv_text(CONTAINERS),
        "serials": lambda: frame.manifest_from_csv_text(SERIALS),
    }[source]()
    again = frame.structure_from_text(lot.to_text())
    assert again == lot and again.fingerprint == lot.fingerprint
    assert frame.structure_from_dict(json.loads(json.dumps(lot.to_dict()))) == lot
    assert [str(a) for a in again.addresses(range(1, lot.size + 1, max(1, lot.size // 50)))] == [
        str(a) for a in lot.addresses(range(1, lot.size + 1, max(1, lot.size // 50)))
    ]


def test_fingerprint_tells_structures_apart():
    a = frame.manifest_from_csv_text(CONTAINERS)
    b = frame.manifest_from_csv_text(CONTAINERS.replace("HP-P03,96", "HP-P03,95"))
    c = frame.manifest_from_csv_text("container,units\nHP-P02,216\nHP-P01,240\nHP-P03,96\n")
    assert len({a.fingerprint, b.fingerprint, c.fingerprint}) == 3


@pytest.mark.parametrize(
    "text, needle",
    [
        ('{"form": "manifest", "containers": ["A"], "counts": [0]}', "at least 1 unit"),
        ('{"form": "manifest", "containers": ["A", "A"], "counts": [1, 2]}', "listed twice"),
        ('{"form": "manifest", "containers": ["A"], "counts": [2], "serials": ["x"]}', "1 serials for 2 units"),
        ('{"form": "nested", "levels": [["unit", 5]]}', "does not match"),
        ('{"form": "crate"}', "expected form"),
        ('{"form": "manifest"}', "malformed manifest description"),
        ("{not json", "malformed JSON"),
    ],
)
def test_stored_descriptions_are_validated_like_input(text, needle):
    with pytest.raises(FrameError) as info:
        frame.structure_from_text(text)
    assert needle in str(info.value)


# --- properties -------------------------------------------------------------------

level_names = st.sampled_from(["pallet", "layer", "carton", "tray", "case", "row"])


@st.composite
def regular_lots(draw):
    names = draw(st.lists(level_names, min_size=0, max_size=3, unique=True))
    counts = draw(st.lists(st.integers(1, 40), min_size=len(names) + 1, max_size=len(names) + 1))
    return frame.RegularLot(levels=tuple(zip(names + ["unit"], counts)))


@st.composite
def manifest_lots(draw):
    counts = draw(st.lists(st.integers(1, 30), min_size=1, max_size=12))
    labels = [f"HP-{i:02d}" for i in range(len(counts))]
    with_serials = draw(st.booleans())
    serials = tuple(f"AJ{u:05d}" for u in range(sum(counts))) if with_serials else None
    return frame.ManifestLot(containers=tuple(labels), counts=tuple(counts), serials=serials)


lots = st.one_of(regular_lots(), manifest_lots())


@settings(max_examples=150, deadline=None)
@given(lot=lots, data=st.data())
def test_address_round_trip(lot, data):
    unit = data.draw(st.integers(1, lot.size))
    address = lot.address_of(unit)
    assert address.unit == unit
    assert lot.unit_at(str(address)) == unit
    if address.serial is not None:
        assert lot.unit_at(address.serial) == unit


@settings(max_examples=100, deadline=None)
@given(lot=lots, data=st.data())
def test_numbering_runs_container_by_container(lot, data):
    # consecutive numbers never go back to an earlier container
    u = data.draw(st.integers(1, max(1, lot.size - 1)))
    if lot.size == 1:
        return
    a, b = lot.address_of(u), lot.address_of(u + 1)
    labels = lambda addr: [int(x) if x.isdigit() else x for _, x in addr.path]  # noqa: E731
    if isinstance(lot, frame.RegularLot):
        assert labels(a) < labels(b)
    else:
        ia, ib = lot.containers.index(a.path[0][1]), lot.containers.index(b.path[0][1])
        assert (ia, int(a.path[1][1])) < (ib, int(b.path[1][1]))


@settings(max_examples=60, deadline=None)
@given(lot=lots)
def test_description_round_trip(lot):
    again = frame.structure_from_text(lot.to_text())
    assert again == lot and again.fingerprint == lot.fingerprint
