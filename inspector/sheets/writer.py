"""The sheet writer the services factory builds: one way for the CLI and the
terminal UI to print a lot's sheets from its record.

Importing this module is cheap; reportlab is loaded on the first write.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable


@dataclass(frozen=True, kw_only=True)
class SheetWriter:
    """Renders the sheets of lots kept by ``workflow``.

    ``forms_dir`` is a site's own forms folder (None: the shipped forms);
    ``clock`` stamps the "printed" time, so tests can fix it.
    """

    workflow: Any
    forms_dir: Path | None = None
    clock: Callable[[], Any] | None = None

    def model(self, lot_id: str):
        """The sheet view model of one lot (see ``inspector.sheets.model``)."""
        from inspector.sheets.build import sheet_model_for_lot

        return sheet_model_for_lot(self.workflow, lot_id)

    def write(self, sheet: str, lot_id: str, out: str | os.PathLike, *, data=None) -> int:
        """Write one sheet of the lot as a PDF at ``out``; return the page count.

        ``data`` reuses a model already built (several sheets of one lot).
        """
        from inspector.sheets.render import render_sheet

        data = self.model(lot_id) if data is None else data
        return render_sheet(sheet, data, out, forms_dir=self.forms_dir, clock=self.clock)
