"""Exceptions of plumbrod.

Every error the package raises on purpose derives from :class:`PlumbrodError` and from
the matching built-in, so callers can catch either.  Errors keep their data as
attributes and build the one-line message from them.
"""

from __future__ import annotations

__all__ = [
    "ASSEMBLY_KINDS",
    "AssemblyError",
    "DesignFileError",
    "LocationError",
    "OutputError",
    "PlumbrodError",
    "UsageError",
]


ASSEMBLY_KINDS = ("dead-point", "cannot-reach", "redundancy-conflict", "branch-change")
"""The causes a sweep can fail with, in the order of their exit codes 3, 4, 5, 6."""


class PlumbrodError(Exception):
    """Root of every error plumbrod raises on purpose."""


class DesignFileError(PlumbrodError, ValueError):
    """A design file that cannot be used as written.

    Attributes: ``path`` (the file), ``key`` (the key path, dotted, or "" for the whole
    file), ``problem`` (what is wrong) and ``fix`` (how to fix it).
    """

    def __init__(self, path: str, key: str, problem: str, fix: str = "") -> None:
        self.path = str(path)
        self.key = key
        self.problem = problem
        self.fix = fix
        super().__init__(str(self))

    def __str__(self) -> str:
        where = f"{self.path}: {self.key}: " if self.key else f"{self.path}: "
        tail = f"; {self.fix}" if self.fix else ""
        return f"{where}{self.problem}{tail}"


class AssemblyError(PlumbrodError, RuntimeError):
    """The linkage cannot be assembled at some pose (a rod cannot reach, lock-up).

    Attributes: ``member`` (name of the member that fails), ``sweep`` (sweep name),
    ``driver`` (the driver value, with unit, where it fails), ``detail`` and ``kind``,
    the cause: one of :data:`ASSEMBLY_KINDS` (``dead-point``, ``cannot-reach``,
    ``redundancy-conflict``, ``branch-change``).
    """

    def __init__(
        self, member: str, sweep: str, driver: str, detail: str, kind: str = "cannot-reach"
    ) -> None:
        self.member = member
        self.sweep = sweep
        self.driver = driver
        self.detail = detail
        self.kind = kind
        super().__init__(str(self))

    def __str__(self) -> str:
        return (
            f"the linkage does not assemble in sweep '{self.sweep}' at {self.driver}: "
            f"{self.detail} (member '{self.member}')"
        )


class LocationError(PlumbrodError, ValueError):
    """A body is not exactly located: a free motion or a redundant member.

    Attributes: ``body``, ``kind`` ("free" or "redundant") and ``detail``.
    """

    def __init__(self, body: str, kind: str, detail: str) -> None:
        self.body = body
        self.kind = kind
        self.detail = detail
        super().__init__(str(self))

    def __str__(self) -> str:
        return self.detail


class UsageError(PlumbrodError, ValueError):
    """A command-line value that cannot be used (a negative length, an unknown material).

    Attributes: ``option`` (the option as typed, e.g. ``--od``), ``problem`` and ``fix``.
    """

    def __init__(self, option: str, problem: str, fix: str = "") -> None:
        self.option = option
        self.problem = problem
        self.fix = fix
        super().__init__(str(self))

    def __str__(self) -> str:
        tail = f"; {self.fix}" if self.fix else ""
        return f"{self.option}: {self.problem}{tail}"


class OutputError(PlumbrodError, OSError):
    """An output file that cannot be written.

    Attributes: ``path``, ``problem`` and ``fix``.
    """

    def __init__(self, path: str, problem: str, fix: str = "") -> None:
        self.path = path
        self.problem = problem
        self.fix = fix
        super().__init__(str(self))

    def __str__(self) -> str:
        tail = f"; {self.fix}" if self.fix else ""
        return f"{self.path}: {self.problem}{tail}"
