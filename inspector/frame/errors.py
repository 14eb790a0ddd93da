"""The one error type of the frame package."""

from __future__ import annotations


class FrameError(ValueError):
    """Bad lot structure, address, manifest or draw request.

    ``field`` names what was wrong in the caller's terms (``"structure"``,
    ``"lot_size"``, ``"manifest"``, ``"n"``, ``"method"``, ``"by"``,
    ``"containers"``, ``"seed"``, ``"unit"``, ``"algorithm"``, ...), so a
    front end can point at its own argument; the message says what was
    expected and what came.
    """

    def __init__(self, field: str, message: str):
        super().__init__(message)
        self.field = field
