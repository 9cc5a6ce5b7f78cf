"""2D structure drawings as SVG text, for the HTML report.

RDKit's ``MolDraw2DSVG`` draws from the stored molecule (``mol_binary``) or the canonical
SMILES. RDKit is imported lazily through :func:`registry.record.chem._rdkit` (which also silences its
logger). A compound stored unsanitized (``structure_ok`` false) gets no drawing: coordinates
and aromaticity of such structures are unreliable, and a wrong picture is worse than none,
so the page shows a text placeholder with the reason.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from typing import Any

from registry.reports import theme


def structure_svg(
    compound: Mapping[str, Any], *, width: int = 320, height: int = 240
) -> str | None:
    """An inline ``<svg>`` element for the compound, or None when it cannot or should not be drawn."""
    if not compound.get("structure_ok", True):
        return None
    mol = _molecule(compound)
    if mol is None:
        return None
    from rdkit.Chem.Draw import rdMolDraw2D

    try:
        from rdkit.Chem import rdDepictor

        rdDepictor.SetPreferCoordGen(True)
        rdDepictor.Compute2DCoords(mol)
        drawer = rdMolDraw2D.MolDraw2DSVG(width, height)
        options = drawer.drawOptions()
        options.clearBackground = False
        options.bondLineWidth = 1.6
        options.padding = 0.08
        options.setSymbolColour(_rgb(theme.INK))
        options.updateAtomPalette({6: _rgb(theme.INK)})
        drawer.DrawMolecule(mol)
        drawer.FinishDrawing()
        svg = drawer.GetDrawingText()
    except Exception:  # RDKit raises assorted C++ exceptions on odd structures
        return None
    return _inline(svg)


def _molecule(compound: Mapping[str, Any]) -> Any:
    from registry.record.chem import _rdkit

    Chem = _rdkit()
    binary = compound.get("mol_binary")
    if binary:
        try:
            return Chem.Mol(binary)
        except Exception:
            pass
    smiles = compound.get("smiles_canonical") or compound.get("smiles_input")
    if not smiles:
        return None
    return Chem.MolFromSmiles(smiles)


def _rgb(hex_colour: str) -> tuple[float, float, float]:
    h = hex_colour.lstrip("#")
    r, g, b = (int(h[i : i + 2], 16) / 255.0 for i in (0, 2, 4))
    return (r, g, b)


def _inline(svg: str) -> str:
    """Drop the XML prolog so the drawing can sit inside an HTML page; keep one ``<svg>`` root."""
    svg = re.sub(r"^\s*<\?xml[^>]*\?>\s*", "", svg)
    svg = svg.replace("<svg ", '<svg role="img" ', 1)
    return svg.strip()
