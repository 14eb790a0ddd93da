"""The lot as a numbered frame: structure, unit addresses, reproducible draws.

Pure: no I/O, no clock, no entropy. The caller reads files and chooses the
seed (from OS entropy when the user gives none, e.g. ``secrets.randbits(53)``)
and records it; everything here is a function of its arguments.

Structures
----------
``flat_lot(N)``; ``parse_structure("pallet=18,layer=4,carton=9,unit=24",
lot_size=None)`` (a plain count gives a flat lot);
``manifest_from_csv_text(text, lot_size=None)`` for a manifest with a header
``container,units`` (one row per container) or ``serial,container`` (one row
per unit). ``lot_size`` is the declared quantity; a total that disagrees is
refused. Units are numbered 1..N outermost level first (mixed radix for
regular lots, cumulative counts for manifests: containers in row order --
for unit rows, containers in order of first appearance and units in row
order within each).

Every structure has ``size``, ``form``, ``level_names``,
``container_levels``, ``address_of(unit) -> Address`` (``str`` of it reads
``pallet 3 / layer 2 / carton 7 / unit 14``; manifests ``container P-07 /
unit 3`` plus ``serial``), ``unit_at(address | serial | number) -> int``
(O(log containers)), ``to_dict()`` / ``to_text()`` / ``fingerprint``, read
back by ``structure_from_dict`` / ``structure_from_text``.

Draws
-----
``draw(structure, n, method=..., seed=..., by=None, containers=None,
algorithm=None) -> Draw`` (frozen: method, algorithm, seed, lot_size,
sample_size, units ascending, frame fingerprint, level, container_count,
per_container, containers, substitutions). ``substitutes(structure, draw,
count)``, ``substitute(structure, draw, unit, reason) -> Draw``,
``pick_list(structure, draw_or_units) -> PickList``, ``verify(structure,
draw) -> Verification``, ``verify_units(structure, units, n=, seed=,
method=, ...)``, ``rederive(structure, draw)``.

All randomness comes from the seed's word stream (``inspector.frame.stream``:
SeedSequence(seed, spawn_key=(0,)) -> PCG64 raw 64-bit words -> exact
rejection for a whole number below m). ``below(m)`` below is that step;
``distinct(m, c)`` is "the first c distinct values of below(m)", a simple
random sample without replacement in draw order. Nothing is ever
materialized per unit of the lot, so 10^9-unit lots cost what small lots
cost.

``srswor-v1`` (simple): units = distinct(N, n) + 1. A larger simple sample
from the same seed contains the smaller one (the draw order is a prefix).
The expected number of words is about N*ln(N/(N-n)): drawing most of a big
lot is slow (all of 10^6 units takes seconds), a sample of thousands from
10^9 takes about a millisecond.

``srswr-v1`` (with-replacement, for non-destructive re-checks only): n
values below(N) + 1, repeats kept. Shown everywhere with that label.

``stratified-v1`` (stratified by a container level, default the outermost):
stratum h of size N_h has the share n*N_h/N. Each stratum gets the whole
part floor(n*N_h/N); the r = n - sum(floors) remaining units go to strata
chosen by systematic sampling over the fractional parts with a random start,
in a random order of the strata: put the strata in a random order
(Durstenfeld's Fisher-Yates, i = H-1 down to 1 swapping i with below(i+1)),
lay the numerators (n*N_h mod N) end to end on an integer axis (total r*N),
draw U = below(N), and give one more unit to the stratum holding each point
U + j*N, j = 0..r-1. Every interval is shorter than N, so no stratum gets
two extra units, and stratum h gets one with probability exactly
frac(n*N_h/N). When all strata have the same size (every level of a regular
structure) the fractional parts are all r/H and the r strata are simply
distinct(H, r) -- the same probabilities, without listing the strata. The
expected allocation is exactly n*N_h/N, and SRSWOR of n_h within each
stratum (ascending stratum order, distinct(N_h, n_h)) gives every unit the
inclusion probability (n*N_h/N)/N_h = n/N, exactly, in integer arithmetic.
The random order is deliberate: in numbering order the extra units of a
regular load would fall on the same layer or carton position in every
pallet, so a crushed bottom layer would be always or never in the sample.

``two-stage-pps-v1`` (two-stage, self-weighting; containers at level ``by``,
default the level just above the units): k containers with probability
k*N_h/N each -- systematic PPS over a random order of the containers (the
same steps as above with weights k*N_h and step N), or distinct(H, k) when
all containers have the same size (PPS is then equal probability k/H). Then
m = n/k units by distinct(N_h, m) in each opened container, ascending, so
each unit's inclusion probability is (k*N_h/N)*(m/N_h) = k*m/N = n/N.
Refused when k does not divide n, when a container holds fewer than m units,
or when k*N_h > N for some container (its probability would exceed 1).

Substitutes (every algorithm): the first ``count`` distinct values from the
seed's second stream (spawn_key=(1,)), drawn uniformly from the units not
drawn -- for two-stage only within the opened containers -- consumed in
order, each with its reason (``substitute``).

A released algorithm id never changes: ``tests/frame/fixtures`` holds
stored (inputs -> units) cases every version must keep reproducing. A better
procedure gets a new id; old ids stay in ``ALGORITHMS``.
"""

from inspector.frame.draws import (
    ALGORITHMS,
    CURRENT_ALGORITHM,
    MAX_SAMPLE_SIZE,
    METHOD_TITLES,
    METHODS,
    TWO_STAGE_NOTE,
    WITH_REPLACEMENT_NOTE,
    Draw,
    Substitution,
    Verification,
    compare_units,
    draw,
    draw_from_dict,
    rederive,
    substitute,
    substitutes,
    verify,
    verify_units,
)
from inspector.frame.errors import FrameError
from inspector.frame.picklist import PickLine, PickList, PickStop, pick_list
from inspector.frame.stream import SEED_LIMIT
from inspector.frame.structure import (
    MAX_LOT_SIZE,
    Address,
    LotStructure,
    ManifestLot,
    RegularLot,
    flat_lot,
    manifest_from_csv_text,
    manifest_rows,
    parse_structure,
    sizes_at,
    structure_from_dict,
    structure_from_text,
)

__all__ = [
    "ALGORITHMS",
    "CURRENT_ALGORITHM",
    "MAX_LOT_SIZE",
    "MAX_SAMPLE_SIZE",
    "METHOD_TITLES",
    "METHODS",
    "SEED_LIMIT",
    "TWO_STAGE_NOTE",
    "WITH_REPLACEMENT_NOTE",
    "Address",
    "Draw",
    "FrameError",
    "LotStructure",
    "ManifestLot",
    "PickLine",
    "PickList",
    "PickStop",
    "RegularLot",
    "Substitution",
    "Verification",
    "compare_units",
    "draw",
    "draw_from_dict",
    "flat_lot",
    "manifest_from_csv_text",
    "manifest_rows",
    "parse_structure",
    "pick_list",
    "rederive",
    "sizes_at",
    "structure_from_dict",
    "structure_from_text",
    "substitute",
    "substitutes",
    "verify",
    "verify_units",
]
