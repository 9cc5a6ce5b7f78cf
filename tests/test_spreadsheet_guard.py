"""Text that leaves for a spreadsheet cannot become a formula, and comes back as it was."""

from __future__ import annotations

import csv
import io

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry.io.cells import neutralise, unneutralise


@given(st.text(max_size=30))
def test_every_text_survives_the_guard_and_its_removal(text: str) -> None:
    assert unneutralise(neutralise(text)) == text


@pytest.mark.parametrize(
    ("text", "guarded"),
    [
        ("=1+1", "'=1+1"),
        ("'=1+1", "''=1+1"),  # an apostrophe the user typed before a trigger is kept
        ("''-2", "'''-2"),
        ("'plain", "'plain"),  # no trigger after it: nothing to guard
        ("x;=1+1", "x;'=1+1"),  # a reader splitting on ';' would start a cell at '='
        ("a,-b", "a,'-b"),
        ("1.2 s-1 @ 250 K; 4 s-1 @ 260 K", "1.2 s-1 @ 250 K; 4 s-1 @ 260 K"),
    ],
)
def test_the_guard_in_examples(text: str, guarded: str) -> None:
    assert neutralise(text) == guarded
    assert unneutralise(guarded) == text


def test_csv_listings_guard_and_quote_their_texts(cli) -> None:  # type: ignore[no-untyped-def]
    for name, compound in (('=HYPERLINK("http://x")', "H-1"), ("x;=1+1", "H-2")):
        added = cli("add", "--method", "computed", "--compound", compound, "--name", name,
                    "--dg", "60 kJ/mol")  # fmt: skip
        assert added.exit_code == 0, added.stderr
    listed = cli("list", "--csv")
    assert listed.exit_code == 0
    rows = list(csv.DictReader(io.StringIO(listed.stdout)))
    assert [r["compound_name"] for r in rows] == ['\'=HYPERLINK("http://x")', "x;'=1+1"]
    # a reader splitting on ';' (as some spreadsheet locales do) finds no formula cell
    for row in csv.reader(io.StringIO(listed.stdout), delimiter=";"):
        assert not any(cell.lstrip('"').startswith("=") for cell in row)
