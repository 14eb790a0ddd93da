"""An inspector at a bench, as a separate process, for the concurrency test.

    python bench.py DB LOT NAME UNIT[,UNIT...] GO_FILE

Waits for GO_FILE, then records a pass for each unit through the workflow and
prints ``ok UNIT ENTRY`` or ``refused UNIT MESSAGE`` per unit.
"""

from __future__ import annotations

import os
import sys
import time


def main() -> int:
    db, lot, name, units, go = sys.argv[1:6]
    from inspector.services import build_services
    from inspector.workflow import WorkflowError

    with build_services(db, environ={}) as services:
        print("ready", flush=True)
        while not os.path.exists(go):
            time.sleep(0.001)
        for unit in units.split(","):
            try:
                outcome = services.workflow.record(lot, int(unit), outcome="pass", by=name)
            except WorkflowError as exc:
                print(f"refused {unit} {exc}", flush=True)
            else:
                print(f"ok {unit} {outcome.entries[0]}", flush=True)
            time.sleep(0.001)
    return 0


if __name__ == "__main__":
    sys.exit(main())
