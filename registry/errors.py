"""One error hierarchy for everything a user can get wrong.

The CLI catches only :class:`FluxledgerError`; anything else is a bug and may show a
traceback. Each subclass carries structured fields and builds its message in
``__str__`` so that library callers can inspect the fields and users read one line.
"""

from __future__ import annotations

from dataclasses import dataclass


class FluxledgerError(Exception):
    """Base class of every error a user can cause. ``exit_code`` tells the CLI what to return."""

    exit_code = 1


class UsageError(FluxledgerError):
    """The command was called wrongly (bad option combination, unknown id form …)."""

    exit_code = 2


class NotFoundError(FluxledgerError):
    """A measurement, compound or file that the user named does not exist."""

    exit_code = 1


class DatabaseError(FluxledgerError):
    """The database cannot be opened, is at the wrong schema version, or is damaged."""

    exit_code = 1


class UnitError(ValueError, FluxledgerError):
    """A physical value whose text cannot be read as the quantity the field needs."""

    exit_code = 1

    def __init__(self, field: str, text: str, reason: str) -> None:
        super().__init__(field, text, reason)
        self.field = field
        self.text = text
        self.reason = reason

    def __str__(self) -> str:
        if self.text in (None, ""):
            return f"{self.field}: {self.reason}"
        return f"{self.field}: cannot read {shorten(str(self.text))!r}: {self.reason}"


class VocabularyError(FluxledgerError):
    """A spelling or solvent that cannot be stored or removed: an unknown target, a duplicate,
    a spelling that already means something else. Nothing was written."""

    exit_code = 1

    def __init__(self, kind: str, text: str, reason: str) -> None:
        super().__init__(kind, text, reason)
        self.kind = kind
        self.text = text
        self.reason = reason

    def __str__(self) -> str:
        return f"{self.kind} {self.text!r}: {self.reason}"


class StructureError(ValueError, FluxledgerError):
    """A SMILES that cannot be read at all (not even unsanitized)."""

    exit_code = 1

    def __init__(self, smiles: str, reason: str) -> None:
        super().__init__(smiles, reason)
        self.smiles = smiles
        self.reason = reason

    def __str__(self) -> str:
        return f"SMILES {self.smiles!r}: {self.reason}"


class MolfileError(StructureError):
    """A Molfile (or one record of an SD file) that cannot be read; ``source`` says which."""

    def __str__(self) -> str:
        return f"{self.smiles}: {self.reason}"


#: how much of a user's text a message quotes
QUOTED_CHARACTERS = 120


def shorten(text: str | None, limit: int = QUOTED_CHARACTERS) -> str | None:
    """A text as a message quotes it: cut to ``limit`` characters with an ellipsis."""
    if text is None or len(text) <= limit:
        return text
    return text[: limit - 1] + "…"


@dataclass(frozen=True)
class RowProblem:
    """Where in a file a value is wrong, and why. ``row`` is the 1-based row as a spreadsheet shows it."""

    file: str
    sheet: str | None
    row: int | None
    column: str | None
    text: str | None
    reason: str

    def __str__(self) -> str:
        parts = [self.file]
        if self.sheet:
            parts.append(f"sheet {self.sheet!r}")
        if self.row is not None:
            parts.append(f"row {self.row}")
        if self.column:
            parts.append(f"column {self.column!r}")
        where = ", ".join(parts)
        text = f" {shorten(self.text)!r}:" if self.text not in (None, "") else ""
        return f"{where}:{text} {self.reason}"


class ImportRowError(FluxledgerError):
    """One or more rows of an input file are wrong; nothing was written."""

    exit_code = 1

    def __init__(self, problems: list[RowProblem]) -> None:
        super().__init__(problems)
        self.problems = problems

    def __str__(self) -> str:
        head = f"{len(self.problems)} problem(s) in the input; nothing was written"
        shown = "\n  ".join(str(p) for p in self.problems[:50])
        more = f"\n  … and {len(self.problems) - 50} more" if len(self.problems) > 50 else ""
        return f"{head}\n  {shown}{more}"


class FileFormatError(FluxledgerError):
    """A whole file cannot be read (empty, wrong encoding, missing sheet …)."""

    exit_code = 1

    def __init__(self, file: str, reason: str, sheet: str | None = None) -> None:
        super().__init__(file, reason, sheet)
        self.file = file
        self.reason = reason
        self.sheet = sheet

    def __str__(self) -> str:
        where = f"{self.file}, sheet {self.sheet!r}" if self.sheet else self.file
        return f"{where}: {self.reason}"


class OpenFindingError(FluxledgerError):
    """A status change that an open error finding forbids (a flagged value marked reviewed).

    ``findings`` are (finding id, rule id, message) of the open error findings.
    """

    exit_code = 1

    def __init__(
        self,
        measurement_id: int,
        status: str,
        findings: list[tuple[int | None, str, str]],
        *,
        edited: bool = False,
    ) -> None:
        super().__init__(measurement_id, status, findings)
        self.measurement_id = measurement_id
        self.status = status
        self.findings = findings
        self.edited = edited  # the findings are those of the edited values (nothing written)

    def __str__(self) -> str:
        named = "; ".join(
            f"finding {fid} [{rule}]: {message}" if fid is not None else f"[{rule}]: {message}"
            for fid, rule, message in self.findings
        )
        if self.edited:
            return (
                f"status: measurement {self.measurement_id} cannot become {self.status!r}: with "
                f"the edited values the check still finds an error — {named}. Nothing was "
                "written; correct the values so that the check passes, or accept the finding "
                "with a reason and then set the status"
            )
        if self.findings and all(fid is None for fid, _, _ in self.findings):
            return (  # its values were never checked: the finding is not stored yet
                f"status: measurement {self.measurement_id} cannot become {self.status!r}: the "
                f"check finds an error in its values — {named}. Nothing was written; correct "
                "the values, or check it and accept the finding with a reason"
            )
        return (
            f"status: measurement {self.measurement_id} stays 'flagged' while an error finding is"
            f" open, so it cannot become {self.status!r} — {named}. Correct the values so that"
            " the check passes, or accept the finding with a reason; the status then returns by"
            " itself"
        )
