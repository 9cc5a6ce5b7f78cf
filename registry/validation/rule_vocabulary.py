"""Rules on the registry's vocabulary: a solvent the registry does not know.

An unknown solvent text is accepted (a group may use a solvent the table lacks), but without
its melting and boiling points nothing warns when a temperature is outside its liquid range —
above the boiling point a sample builds pressure. The warning says so, suggests the solvent a
near spelling names (``CDC13`` → CDCl3), and says how to link the text: store an alias, or add
the solvent with its melting and boiling points and their source.
"""

from __future__ import annotations

from registry.kinetics.safety import DEFER
from registry.record import vocab
from registry.validation.base import CheckConfig, Finding, Rule
from registry.validation.data import CheckData


class SolventInTable(Rule):
    """A measurement's solvent text should name a solvent of the registry's table."""

    id = "solvent-in-table"
    version = 1
    severity = "warning"
    title = "solvent known to the registry (its liquid range)"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        texts = data.text("solvent_text")
        linked = data.text("solvent_id")
        rows = [
            p
            for p in range(len(data))
            if linked[p] is None and texts[p] is not None and str(texts[p]).strip()
        ]
        spellings = vocab.builtin_solvent_spellings() if rows else {}
        out: list[Finding] = []
        for p in rows:
            text = str(texts[p]).strip()
            near = vocab.solvent_suggestions(text, spellings)
            guess = f" — did you mean {' or '.join(near)}?" if near else "."
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"solvent {text!r} is not in the registry's solvent table{guess} Its liquid "
                    "range is unknown, so no temperature is checked against its melting and "
                    "boiling points; store the spelling as an alias of a known solvent, or add "
                    "the solvent with its melting and boiling points and their source. Above a "
                    "solvent's boiling point only a pressure-rated sealed NMR tube may be used. "
                    f"{DEFER}",
                    likely_cause=f"a misspelt solvent: {', '.join(near)}" if near else None,
                    context="near:" + "|".join(near),
                )
            )
        return out


__all__ = ["SolventInTable"]
