"""A bench that records results in a loop, for the durability and concurrency
tests (run as a separate process).

    python recorder.py DB LOT PERSON_ID FIRST_UNIT COUNT [--busy-ms MS] [--go FILE] [--pause-ms MS]

Each user action is one transaction: the result and an event that points at
it. The line ``ack RESULT_ID UNIT`` is printed only after the commit.
With ``--go FILE`` it waits until FILE exists before starting, so that two
processes can be started together; ``--pause-ms`` waits between actions, as
a person at a bench would, and ``--hold-ms`` keeps each transaction open a
little, as a slow disk would (SQLite's busy handler sleeps rather than queues,
so without a pause one process may run its whole stream before the other).
"""

from __future__ import annotations

import argparse
import os
import sys
import time


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("db")
    parser.add_argument("lot")
    parser.add_argument("person", type=int)
    parser.add_argument("first", type=int)
    parser.add_argument("count", type=int)
    parser.add_argument("--busy-ms", type=int, default=5000)
    parser.add_argument("--go")
    parser.add_argument("--pause-ms", type=float, default=0.0)
    parser.add_argument("--hold-ms", type=float, default=0.0)
    args = parser.parse_args()

    from inspector.records import StoreError, open_store

    store = open_store(args.db, busy_timeout_ms=args.busy_ms)
    print("ready", flush=True)
    if args.go:
        while not os.path.exists(args.go):
            time.sleep(0.001)
    for unit in range(args.first, args.first + args.count):
        try:
            with store.transaction() as tx:
                result = tx.add_result(lot_id=args.lot, unit=unit, defect_class="major",
                                       outcome="fail" if unit % 7 == 0 else "pass", by_person=args.person)
                tx.add_event(lot_id=args.lot, kind="result", detail={"result": result, "unit": unit})
                if args.hold_ms:  # keep the write lock a little, as a slow disk would
                    time.sleep(args.hold_ms / 1000)
        except StoreError as exc:  # what a user would see: one line
            print(f"inspector: {exc}", file=sys.stderr, flush=True)
            return 2
        print(f"ack {result} {unit}", flush=True)
        if args.pause_ms:
            time.sleep(args.pause_ms / 1000)
    store.close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
