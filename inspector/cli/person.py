"""`inspector person ...`: the people who inspect and approve.

A person's secret is read from the terminal without echo, or from standard
input with ``--secret-stdin``; it never appears in the process arguments and
is kept only as a salted slow hash.
"""

from __future__ import annotations

import argparse

from inspector.cli._common import add_json, emit, table


def _name(text: str) -> str:
    if not text.strip():
        raise argparse.ArgumentTypeError(f"expected a name, got {text!r}")
    return text


def register(subparsers) -> None:
    person = subparsers.add_parser("person", help="register inspectors and approvers")
    person.set_defaults(handler=lambda args: person.print_help())
    sub = person.add_subparsers(title="person commands", metavar="WHAT")

    p = sub.add_parser("add", help="register a person with a role and a secret",
                       description="The secret is asked on the terminal (twice), or read as one line from "
                                   "standard input with --secret-stdin.")
    p.add_argument("name", type=_name, metavar="NAME")
    p.add_argument("--role", required=True, choices=("inspector", "approver"))
    p.add_argument("--secret-stdin", action="store_true", help="read the secret from standard input")
    add_json(p)
    p.set_defaults(handler=_add)

    p = sub.add_parser("list", help="the registered people")
    add_json(p)
    p.set_defaults(handler=_list)


def _add(args) -> int:
    from inspector.cli.lot import read_secret, workflow_for

    secret = read_secret(args, confirm=True)
    with workflow_for(args) as wf:
        person = wf.add_person(name=args.name, role=args.role, secret=secret)
    emit(args, person, lambda: f"Registered {person['name']} ({person['role']}), entry {person['entry']}.")
    return 0


def _list(args) -> int:
    from inspector.cli.lot import workflow_for

    with workflow_for(args) as wf:
        people = wf.people()
    emit(args, {"people": people},
         lambda: table([[p["name"], p["role"], p["at"]] for p in people], header=["name", "role", "registered"])
         if people else "No people registered.")
    return 0
