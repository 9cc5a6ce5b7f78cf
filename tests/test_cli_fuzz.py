"""Any text a user types into a CLI argument: a clear answer or a clear refusal, never a traceback.

Hypothesis writes arbitrary texts (control characters, lone combining marks, quotes, SMARTS and
unit fragments, very long strings; NUL cannot be in a command-line argument and is left out)
into the text options of the commands that read values, structures, filters and vocabulary.
Each run must end with exit status 0, 1 or 2 and no traceback; an entry that was accepted must be
readable back, and the registry must still verify. Runs in-process (CliRunner) on a real SQLite
file.
"""

from __future__ import annotations

from collections.abc import Callable

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from registry import api

#: pieces chemists type, so that the fuzz reaches past the first parse
PIECES = st.sampled_from(
    ["kcal/mol", "kJ/mol", "°C", "K", "Hz", "ppm", "MHz", " ± ", "(3)", "e308", "-", "1.5",
     "c1ccccc1", "[#7]", "C(=O)N", "$(", "CDCl3", "coalescence", ">=", "..", "=", ";", "'",
     "\t", "\x01", "\u0301", "\u202e", "∞", "NaN", "inf"]
)  # fmt: skip
TEXT = st.one_of(
    st.text(st.characters(blacklist_categories=("Cs",), blacklist_characters="\x00"), max_size=40),
    st.lists(PIECES, max_size=6).map("".join),
    st.lists(st.one_of(PIECES, st.text(max_size=3)), max_size=8)
    .map("".join)
    .map(lambda s: s.replace("\x00", "")),
)

#: commands with one free text each: (name, arguments for a text)
COMMANDS: list[tuple[str, Callable[[str], list[str]]]] = [
    ("add dg", lambda t: ["add", "--compound", "FZ-1", "--smiles", "CC(=O)N(C)C", "--method",
                          "coalescence", "--solvent", "CDCl3", "--tc", "300 K", "--dnu", "40 Hz",
                          "--mhz", "400", "--dg", t]),
    ("add compound", lambda t: ["add", "--compound", t, "--smiles", "CCO", "--method", "computed",
                                "--dg", "60 kJ/mol", "--dg-t", "298.15 K"]),
    ("add smiles", lambda t: ["add", "--compound", "FZ-2", "--smiles", t, "--method", "computed",
                              "--dg", "60 kJ/mol", "--dg-t", "298.15 K"]),
    ("add solvent", lambda t: ["add", "--compound", "FZ-3", "--smiles", "CCO", "--method",
                               "computed", "--solvent", t, "--dg", "60 kJ/mol", "--dg-t", "300 K"]),
    ("add method", lambda t: ["add", "--compound", "FZ-4", "--smiles", "CCO", "--method", t,
                              "--dg", "60 kJ/mol", "--dg-t", "300 K"]),
    ("list compound", lambda t: ["list", "--compound", t, "--csv"]),
    ("list barrier", lambda t: ["list", "--barrier-min", t]),
    ("list solvent", lambda t: ["list", "--solvent", t, "--json"]),
    ("find smarts", lambda t: ["find", "--smarts", t, "--time-limit", "20"]),
    ("find smiles", lambda t: ["find", "--smiles", t]),
    ("find reference", lambda t: ["find", "--motif", "amide", "--reference", t, "--csv"]),
    ("find barrier", lambda t: ["find", "--motif", "amide", "--barrier", t]),
    ("edit", lambda t: ["edit", "1", "--set", t]),
    ("edit dg", lambda t: ["edit", "1", "--set", f"dg={t}"]),
    ("show", lambda t: ["show", t]),
    ("calc coalescence", lambda t: ["calc", "coalescence", "--tc", t, "--dnu", "30 Hz"]),
    ("calc rate", lambda t: ["calc", "rate", "--t", "298 K", "--dg", t]),
    ("vocab read", lambda t: ["vocab", "read", "process", t]),
    ("vocab add", lambda t: ["vocab", "add", "solvent", t, "CDCl3"]),
]  # fmt: skip


@pytest.fixture
def seeded(cli):  # type: ignore[no-untyped-def]
    added = cli("add", "--compound", "FZ-0", "--smiles", "CC(=O)N(C)C", "--method", "coalescence",
                "--solvent", "CDCl3", "--tc", "300 K", "--dnu", "40 Hz", "--mhz", "400",
                "--dg", "62.4 kJ/mol")  # fmt: skip
    assert added.exit_code in (0, 1), added.stderr
    return cli


@pytest.mark.parametrize("name,args", COMMANDS, ids=[c[0] for c in COMMANDS])
@settings(
    max_examples=40,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(text=TEXT)
def test_any_text_gets_an_answer_or_a_refusal(seeded, db_path, name: str, args, text: str) -> None:  # type: ignore[no-untyped-def]
    result = seeded(*args(text))
    assert result.exit_code in (0, 1, 2), (name, text, result.stderr, result.exception)
    if result.exception is not None:
        assert isinstance(result.exception, SystemExit), (name, text, repr(result.exception))
    assert "Traceback" not in result.stdout + result.stderr, (name, text)
    if result.exit_code == 2:
        assert result.stderr.strip(), (name, text)  # a refusal says why


def test_the_registry_verifies_after_the_fuzz(seeded, db_path) -> None:  # type: ignore[no-untyped-def]
    for _name, args in COMMANDS:
        for text in ("1e308 kcal/mol", "\x01", '=HYPERLINK("x")', "'=1+1", "ﬀ" * 300, "∞"):
            result = seeded(*args(text))
            assert result.exit_code in (0, 1, 2), (args(text), result.stderr)
            assert "Traceback" not in result.stdout + result.stderr
    report = api.verify(api.open_registry(str(db_path)))
    assert report["ok"], report
