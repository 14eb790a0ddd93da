"""Printed worksheets: pick list, sample labels, bench log, lot release sheet.

Pure parts (no reportlab, safe for the terminal UI to import):

* :mod:`inspector.sheets.model` -- the view model, frozen values holding
  exactly what the sheets print (``SheetData`` and its parts);
* :mod:`inspector.sheets.codes` -- ``unit_code(lot_id, unit)`` and
  ``parse_unit_code(text)``, the scannable code of one unit;
* :mod:`inspector.sheets.forms` -- reading and checking the layouts in
  ``forms/`` (``load_form``, ``FormError``);
* :mod:`inspector.sheets.build` -- ``sheet_model_from_record`` /
  ``sheet_model_for_lot`` from the workflow's record, ``plan_figures``.

Rendering (reportlab): :func:`inspector.sheets.render.render_sheet` and
``render_pick``/``render_labels``/``render_bench``/``render_release``.
"""
