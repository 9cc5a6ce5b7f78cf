"""Structures that arrive as Molfiles (drawn in a structure editor, or organometallics with
dative bonds that a SMILES writer of another program would lose): read into the SMILES the
registry stores, so that ``add_measurement(..., smiles=…)`` stays the one way in."""

from __future__ import annotations

from pathlib import Path

from registry.errors import FileFormatError


def smiles_from_molfile(molfile: str | Path) -> str:
    """The SMILES of a Molfile (V2000 or V3000), given as a path or as the Molfile's text.

    Dative bonds are kept (RDKit's ``->``), stereo is taken from wedges and coordinates; an
    empty connection table gives ``""``. Errors name the file and what is wrong with it."""
    from registry.record.chem import MAX_MOLFILE_CHARACTERS
    from registry.record.chem import smiles_from_molfile as read

    text = str(molfile)
    if "\n" in text:
        return read(text, "Molfile")
    path = Path(text).expanduser()
    if not path.is_file():
        what = "is a folder, not a file" if path.is_dir() else "no such file"
        raise FileFormatError(str(path), what)
    if path.stat().st_size > MAX_MOLFILE_CHARACTERS * 4:
        raise FileFormatError(str(path), "far larger than one molecule's Molfile")
    data = path.read_bytes()
    try:
        content = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        content = data.decode("latin-1")
    return read(content, str(path))
