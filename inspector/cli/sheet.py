"""`inspector sheet`: print a lot's worksheets as PDF.

    inspector sheet pick LOT -o pick.pdf
    inspector sheet labels LOT -o labels.pdf
    inspector sheet bench LOT -o bench.pdf
    inspector sheet release LOT -o release.pdf --forms /site/forms

The store, the workflow and reportlab are imported inside the handler, so
building the parser stays cheap.
"""

from __future__ import annotations

import os

from inspector.cli._common import CommandError, UsageError, add_json, emit

SHEET_CHOICES = ("pick", "labels", "bench", "release")
_NEEDS_DRAW = ("pick", "labels", "bench")


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "sheet",
        help="print a lot's pick list, sample labels, bench log or release sheet (PDF)",
        description=(
            "Print one worksheet of a lot as a PDF: the pick list (units in walking order with a "
            "scannable code each), sample labels, the bench log for recording on paper, or the lot "
            "release sheet. Layouts come from the forms shipped with the tool, or from --forms DIR."
        ),
    )
    p.add_argument("sheet", choices=SHEET_CHOICES, help="which sheet")
    p.add_argument("lot", metavar="LOT", help="the lot ID")
    p.add_argument("-o", "--output", required=True, metavar="FILE.pdf", help="where to write the PDF")
    p.add_argument(
        "--forms",
        metavar="DIR",
        help="a folder of forms (site.toml, pick.toml, labels.toml, bench.toml, release.toml) "
        "to use instead of the shipped ones",
    )
    add_json(p)
    p.set_defaults(handler=run)


def _check_paths(args) -> None:
    if args.forms is not None and not os.path.isdir(args.forms):
        raise UsageError(f"--forms: no such folder {args.forms!r}")
    out = args.output
    if not out.strip():
        raise UsageError(f"--output: expected a file name, got {out!r}")
    if os.path.isdir(out):
        raise UsageError(f"--output: {out!r} is a folder; give a file name such as {os.path.join(out, 'sheet.pdf')!r}")
    folder = os.path.dirname(os.path.abspath(out))
    if not os.path.isdir(folder):
        raise UsageError(f"--output: the folder {folder!r} does not exist")


def run(args) -> int:
    _check_paths(args)
    from inspector.sheets.forms import FormError, load_form

    # Read the form first: a broken form file is reported before the store
    # is opened, and nothing is written.
    try:
        load_form(args.sheet, args.forms)
    except FormError as exc:
        raise CommandError(f"--forms: {exc}" if args.forms else str(exc)) from None

    from inspector.records import StoreError
    from inspector.services import build_services

    try:
        services = build_services(getattr(args, "db", None), forms_dir=args.forms)
    except StoreError as exc:
        raise CommandError(f"--db: {exc}") from None
    try:
        workflow = services.workflow
        if workflow is None:  # a build without the lot lifecycle service
            raise CommandError("sheet: this build has no lot records to print from")
        try:
            data = _model(workflow, args.lot)
        except StoreError as exc:
            raise CommandError(str(exc)) from None
        if args.sheet in _NEEDS_DRAW and not data.stops:
            raise CommandError(f"LOT: lot {data.lot.lot_id} has no sample drawn yet, so there is no {args.sheet} sheet")
        try:
            pages = services.sheets.write(args.sheet, args.lot, args.output, data=data)
        except FormError as exc:
            raise CommandError(str(exc)) from None
        except OSError as exc:
            raise CommandError(f"--output: cannot write {args.output!r} ({exc.strerror or exc})") from None
    finally:
        services.close()
    payload = {"sheet": args.sheet, "lot": data.lot.lot_id, "file": args.output, "pages": pages}
    emit(args, payload, f"Wrote the {args.sheet} sheet of lot {data.lot.lot_id}: {args.output} "
                        f"({pages} page{'s' if pages != 1 else ''})")
    return 0


def _model(workflow, lot_id: str):
    from inspector.sheets.build import sheet_model_for_lot

    try:
        from inspector.workflow import WorkflowError
    except ImportError:  # pragma: no cover - the workflow ships with the tool
        WorkflowError = ()  # type: ignore[assignment]
    try:
        return sheet_model_for_lot(workflow, lot_id)
    except WorkflowError as exc:  # type: ignore[misc]
        text = str(exc)
        raise CommandError(text if not text.startswith("id:") else "LOT:" + text[3:]) from None
