"""One way to build the services, shared by the CLI, the terminal UI and tests.

    with build_services(args.db) as services:
        services.store ...

Nothing here is a global: each call builds its own store connection.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Mapping

from inspector.records import ENV_VAR, Clock, Store, default_clock, open_store, resolve_db_path


@dataclass(frozen=True, kw_only=True)
class Services:
    """The built services. ``sheets`` is None until the worksheet writer
    exists."""

    store: Store
    workflow: Any = None
    sheets: Any = None
    forms_dir: Path | None = None

    def close(self) -> None:
        self.store.close()

    def __enter__(self) -> "Services":
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def build_services(
    db_path: str | os.PathLike | None = None,
    *,
    environ: Mapping[str, str] | None = None,
    clock: Clock | None = None,
    forms_dir: str | os.PathLike | None = None,
) -> Services:
    """Open the store (``db_path``, else ``$INSPECTOR_DB``, else the user's data
    directory) and build the services on it.

    The default data directory is created when missing; a path the user named
    must be in an existing directory, so that a typing slip does not scatter
    stores over the disk.
    """
    environ = os.environ if environ is None else environ
    path = resolve_db_path(db_path, environ)
    named = (db_path is not None and str(db_path) != "") or bool(environ.get(ENV_VAR, ""))
    clock = clock or default_clock()
    store = open_store(path, clock=clock, create_dirs=not named)
    from inspector.sheets.writer import SheetWriter
    from inspector.workflow import Workflow

    workflow = Workflow(store=store, clock=clock)
    forms = None if forms_dir is None else Path(forms_dir)
    return Services(
        store=store,
        workflow=workflow,
        sheets=SheetWriter(workflow=workflow, forms_dir=forms, clock=store.clock),
        forms_dir=forms,
    )

