"""Text that leaves for a spreadsheet cannot become a formula, and comes back as it was."""

from __future__ import annotations

import csv
import io

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry.io.cells import cell_text, column_texts, keep_apostrophes, neutralise, unneutralise


@given(st.text(max_size=30))
def test_every_text_survives_the_guard_and_its_removal(text: str) -> None:
    assert unneutralise(neutralise(text)) == text


@given(st.text(max_size=30).map(str.strip).filter(bool))
def test_the_importer_reads_a_guarded_text_back_on_both_of_its_paths(text: str) -> None:
    """The fast path for string cells (column_texts) and cell_text read a guarded cell alike:
    an apostrophe the user typed before '=' used to survive on one path and not the other."""
    import pandas as pd

    guarded = neutralise(text)
    assert column_texts(pd.Series([guarded], dtype=object)) == [text.strip() or None]
    assert cell_text(guarded) == text.strip()


@given(st.text(max_size=30))
def test_apostrophes_kept_for_files_that_are_not_spreadsheets(text: str) -> None:
    # an SD data item is not guarded, but what the user typed must come back from the importer
    assert unneutralise(keep_apostrophes(text)) == text


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
