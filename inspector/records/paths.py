"""Where the record store lives."""

from __future__ import annotations

import os
from pathlib import Path
from typing import Mapping

ENV_VAR = "INSPECTOR_DB"
FILE_NAME = "inspector.db"


def default_db_path(environ: Mapping[str, str]) -> Path:
    """``$XDG_DATA_HOME/inspector/inspector.db``, else ``~/.local/share/...``.

    The XDG specification says a relative ``XDG_DATA_HOME`` is invalid and
    must be ignored, so only an absolute one is used.
    """
    xdg = environ.get("XDG_DATA_HOME", "")
    if xdg and os.path.isabs(xdg):
        base = Path(xdg)
    else:
        home = environ.get("HOME") or str(Path.home())
        base = Path(home) / ".local" / "share"
    return base / "inspector" / FILE_NAME


def resolve_db_path(cli_value: str | os.PathLike | None, environ: Mapping[str, str] | None = None) -> Path:
    """The store path: ``--db`` if given, else ``$INSPECTOR_DB``, else the default.

    ``~`` is expanded in the first two; an empty value counts as not given.
    """
    environ = os.environ if environ is None else environ
    if cli_value is not None and str(cli_value) != "":
        return Path(os.path.expanduser(str(cli_value)))
    env_value = environ.get(ENV_VAR, "")
    if env_value:
        return Path(os.path.expanduser(env_value))
    return default_db_path(environ)
