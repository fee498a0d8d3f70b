"""Error hierarchy. Library code raises these; only the CLI turns them into exit codes."""

from __future__ import annotations


class FvheatError(Exception):
    """Base class of every error fvheat raises on purpose."""


class CaseError(FvheatError, ValueError):
    """Bad input: a case file, a key in it, an override or a file it points to.

    The message is one line of the form ``FILE: key.path: what is wrong``.
    """

    def __init__(self, message: str, *, file: str | None = None, key: str | None = None):
        self.file = file
        self.key = key
        parts = [p for p in (file, key) if p]
        super().__init__(": ".join([*parts, message]))


class ConvergenceError(FvheatError, RuntimeError):
    """A numerical method did not converge (non-linear iteration, iterative solver)."""


class DrawingError(CaseError):
    """A drawing that cannot be used: missing, not DXF, or a bad shape on a layer.

    ``file`` is the drawing; ``detail`` names the layer and entity (handle) and says what is
    wrong, so that a case file using the drawing can quote it under its own key.
    """

    def __init__(
        self, message: str, *, file: str, layer: str | None = None, entity: str | None = None
    ):
        where = ", ".join(p for p in (f"layer {layer!r}" if layer else None, entity) if p)
        self.detail = f"{where}: {message}" if where else message
        self.layer = layer
        self.entity = entity
        super().__init__(self.detail, file=file)
