"""The vocabulary: how method, process and nucleus texts are read, suggestions, stored aliases
shared through the registry (and recorded in its history), solvents added with their source."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry import api
from registry.errors import NotFoundError, UnitError, UsageError, VocabularyError
from registry.record import spelling, vocab
from registry.record.entry import EntryInput, normalize_entry
from registry.storage.database import Database

FLUXLEDGER = Path(sys.executable).with_name("fluxledger")

# ---------------------------------------------------------------- reading texts


@pytest.mark.parametrize(
    ("text", "method"),
    [
        ("VT coalescence", "coalescence"),
        ("lineshape (DNMR fit)", "lineshape"),
        ("racemisation (chiral HPLC)", "equilibration"),
        ("coalescence (Gutowsky–Holm)", "coalescence"),
        ("band-shape analysis", "lineshape"),
        ("1H EXSY (mixing time 0.3 s)", "2d-exchange"),
        ("selective inversion transfer", "saturation-transfer"),
        ("DFT (B3LYP/def2-TZVP)", "computed"),
        ("DNMR coalescence", "coalescence"),  # a hint gives way to a word
        ("Eyring plot of EXSY rates", "2d-exchange"),
        ("EXSY", "2d-exchange"),
        ("Tc", "coalescence"),
    ],
)
def test_method_texts_chemists_write(text: str, method: str) -> None:
    assert vocab.method_name(text) == method


@pytest.mark.parametrize(
    ("text", "kind"),
    [
        ("thioamide rotation", "bond-rotation"),
        ("chair-chair inversion", "ring-inversion"),
        ("degenerate Cope", "degenerate-rearrangement"),
        ("amide C–N rotation", "bond-rotation"),
        ("phenyl ring rotation", "bond-rotation"),  # "ring" does not make it a ring inversion
        ("boat-boat interconversion", "ring-inversion"),
        ("umbrella inversion at P", "pyramidal-inversion"),
        ("N-inversion", "pyramidal-inversion"),
        ("[1,5]-H shift", "sigmatropic-shift"),
        ("haptotropic shift", "haptotropic-shift"),
        ("Berry pseudorotation", "pseudorotation"),
        ("Cope rearrangement", "degenerate-rearrangement"),
        ("hindered rotation", "bond-rotation"),
    ],
)
def test_process_texts_chemists_write(text: str, kind: str) -> None:
    assert vocab.process_kind_name(text) == kind


def test_unknown_texts_get_suggestions_and_the_choices_once() -> None:
    with pytest.raises(UnitError) as err:
        vocab.method_name("coalesense")
    assert str(err.value) == (
        "method: cannot read 'coalesense': unknown method; did you mean coalescence? (known: "
        "coalescence, lineshape, 2d-exchange, saturation-transfer, equilibration, computed)"
    )
    with pytest.raises(UnitError) as err:
        vocab.process_kind_name("rotaton", (*vocab.PROCESS_KINDS, "helix-inversion"))
    message = str(err.value)
    assert "did you mean bond-rotation?" in message
    for kind in (*vocab.PROCESS_KINDS, "helix-inversion"):
        assert message.count(kind) == (2 if kind == "bond-rotation" else 1), kind


def test_ambiguous_texts_name_their_candidates() -> None:
    with pytest.raises(UnitError) as err:
        vocab.process_kind_name("helix inversion")
    assert err.value.reason.startswith(
        "could be ring-inversion or pyramidal-inversion; write the one meant (known: "
    )
    with pytest.raises(UnitError, match=r"could be coalescence or lineshape"):
        vocab.method_name("coalescence and line shape")


def test_a_registry_kind_is_a_name_and_stored_aliases_win_over_built_in_readings() -> None:
    voc = vocab.Vocabulary(("helix-inversion",), (("method", "DNMR", "coalescence"),))
    assert vocab.process_kind_name("Helix inversion", voc) == "helix-inversion"
    assert vocab.method_name("dnmr", vocabulary=voc) == "coalescence"  # built in: lineshape
    assert vocab.method_name("lineshape", vocabulary=voc) == "lineshape"  # a name stays a name


@pytest.mark.parametrize(
    ("text", "nucleus"),
    [("1H", "1H"), ("H-1", "1H"), ("¹³C", "13C"), ("19f", "19F"), ("P31", "31P"),
     ("13C{1H}", "13C"), ("carbon-13", "13C"), ("proton", "1H"), ("H", "1H"), ("D", "2H"),
     ("1H NMR", "1H"), ("195Pt", "195Pt"), ("deuterium", "2H")],
)  # fmt: skip
def test_nucleus_spellings(text: str, nucleus: str) -> None:
    assert vocab.nucleus_name(text) == nucleus


def test_an_unknown_nucleus_is_refused_with_a_suggestion() -> None:
    with pytest.raises(UnitError) as err:
        vocab.nucleus_name("protn")
    assert str(err.value) == (
        "nucleus: cannot read 'protn': unknown nucleus; did you mean 1H? (write the mass "
        "number and the element: 1H, 13C, 19F, 31P)"
    )
    with pytest.raises(UnitError, match="unknown nucleus"):
        vocab.nucleus_name("13X")  # no element X
    entry, problems = normalize_entry(
        EntryInput(method="coalescence", compound="Q", nucleus="13X", tc="300 K", dnu="20 Hz")
    )
    assert entry is None and [p.field for p in problems] == ["nucleus"]


def test_solvent_suggestions_for_near_spellings() -> None:
    assert vocab.solvent_suggestions("CDC13") == ["CDCl3 (chloroform-d)"]
    assert vocab.solvent_suggestions("D20") == ["D2O (deuterium oxide)"]
    assert vocab.solvent_suggestions("tolune") == ["C7D8 (toluene-d8)"]
    assert vocab.solvent_suggestions("decalin") == []


# ---------------------------------------------------------------- properties of the reader

_NAMES = st.sampled_from(vocab.METHOD_LEXICON.names)
_NOISE = st.lists(st.sampled_from(sorted(vocab.METHOD_LEXICON.noise)), max_size=3)
_SEPARATORS = st.sampled_from([" ", "-", "_", "  ", "/", ""])


@given(_NAMES, st.lists(st.booleans(), min_size=20, max_size=20), _SEPARATORS)
def test_a_name_reads_as_itself_in_any_case_and_spacing(
    name: str, upper: list[bool], sep: str
) -> None:
    text = "".join(c.upper() if u else c for c, u in zip(name, upper, strict=False))
    text = text.replace("-", sep)
    assert vocab.method_name(text) == name


def _single_words(lexicon: spelling.Lexicon) -> list[tuple[str, str]]:
    return sorted((w, next(iter(m))) for w, m in lexicon.words.items() if len(m) == 1)


@given(
    st.sampled_from(_single_words(vocab.METHOD_LEXICON)),
    _NOISE,
    _NOISE,
    st.sampled_from(["", " (VT)", " (NMR)", " [1H]"]),
)
def test_noise_words_and_qualifiers_do_not_change_a_reading(
    word: tuple[str, str], before: list[str], after: list[str], qualifier: str
) -> None:
    text = " ".join([*before, word[0], *after]) + qualifier
    assert vocab.read_method(text).name == word[1]


@given(st.text(max_size=40))
def test_any_text_reads_as_a_known_name_or_gives_known_suggestions(text: str) -> None:
    for lexicon in (vocab.METHOD_LEXICON, vocab.PROCESS_LEXICON):
        reading = spelling.read(lexicon, text)
        known = set(lexicon.names)
        assert reading.name is None or reading.name in known
        assert set(reading.candidates) <= known and set(reading.suggestions) <= known
        assert reading.name is None or not reading.candidates


@given(
    st.sampled_from(sorted(spelling.ELEMENTS)),
    st.integers(min_value=1, max_value=300),
    st.sampled_from(["{m}{e}", "{e}-{m}", "{e}{m}", "{m} {e}", "{sup}{e}", "{m}{e} NMR"]),
)
def test_every_way_of_writing_a_nucleus_reads_the_same(element: str, mass: int, form: str) -> None:
    sup = str(mass).translate(str.maketrans("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹"))
    text = form.format(m=mass, e=element, sup=sup)
    assert spelling.read_nucleus(text) == f"{mass}{element}"
    assert spelling.read_nucleus(text.lower()) == f"{mass}{element}"


# ---------------------------------------------------------------- stored aliases


def _entry(**kw: str) -> dict[str, str]:
    return {"compound": "A-1", "tc": "300 K", "dnu": "40 Hz", "solvent": "CDCl3", **kw}


def test_stored_aliases_are_shared_by_every_handle_and_recorded_in_the_history(
    db_path: Path,
) -> None:
    first, second = api.open_registry(str(db_path)), api.open_registry(str(db_path))
    try:
        with pytest.raises(UnitError, match="unknown method"):
            api.add_measurement(second, _entry(method="our VT protocol B"))
        done = api.add_alias(first, "method", "our VT protocol B", "coalescence", actor="anna",
                             reason="the group's notebook term")  # fmt: skip
        assert (done["target"], done["overrides"], done["created_by"]) == (
            "coalescence", None, "anna",
        )  # fmt: skip
        mid = api.add_measurement(second, _entry(method="Our VT-protocol (B)"))
        assert api.get_measurement(second, mid)["method"] == "coalescence"
        assert [(a["kind"], a["alias"], a["target"]) for a in api.list_aliases(second)] == [
            ("method", "our VT protocol B", "coalescence")
        ]
        api.remove_alias(second, "method", "OUR vt protocol b", actor="ben", reason="renamed")
        with pytest.raises(UnitError, match="unknown method"):
            api.add_measurement(first, _entry(method="our VT protocol B", compound="A-2"))
        added, removed = api.history(first, limit=None)[:1] + api.history(first, limit=1)
        assert (added["actor"], added["action"], added["entity"]) == ("anna", "add-alias",
                                                                      "vocab_alias")  # fmt: skip
        assert added["summary"] == "add-alias: method 'our VT protocol B' → coalescence"
        assert added["reason"] == "the group's notebook term"
        assert (removed["actor"], removed["action"], removed["reason"]) == (
            "ben", "remove-alias", "renamed",
        )  # fmt: skip
        assert removed["before"] == {"kind": "method", "alias": "our VT protocol B",
                                     "target": "coalescence"}  # fmt: skip
        assert api.verify(first)["ok"]
    finally:
        first.close()
        second.close()


def test_an_alias_stored_by_another_process_is_seen_by_an_open_handle(
    database: Database, db_path: Path
) -> None:
    api.add_measurement(
        database, _entry(method="coalescence")
    )  # this process caches the vocabulary
    env = {**os.environ, "FLUXLEDGER_USER": "carla"}
    done = subprocess.run(
        [str(FLUXLEDGER), "--db", str(db_path), "vocab", "add", "process", "wobble",
         "bond-rotation", "--json"],
        capture_output=True, text=True, timeout=120, env=env, check=False,
    )  # fmt: skip
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["created_by"] == "carla"
    mid = api.add_measurement(database, _entry(method="coalescence", process="Wobble",
                                               compound="A-3"))  # fmt: skip
    assert api.get_measurement(database, mid)["process"]["kind"] == "bond-rotation"


@pytest.mark.parametrize(
    ("args", "error", "message"),
    [
        (("flavour", "x", "y"), UsageError,
         "unknown kind 'flavour'; one of method, process, solvent, nucleus"),
        (("method", "VT-X", "coalesense"), VocabularyError,
         "method target 'coalesense': unknown method; did you mean coalescence? (known: "
         "coalescence, lineshape, 2d-exchange, saturation-transfer, equilibration, computed)"),
        (("solvent", "my-CDCl3", "chloroforme"), VocabularyError,
         "solvent 'chloroforme': no such solvent in the registry; did you mean chloroform-d? "
         "(add it with its melting and boiling points first)"),
        (("process", "flip-flop", "wobbling"), VocabularyError,
         "process target 'wobbling': unknown process kind (known: bond-rotation, "
         "ring-inversion, sigmatropic-shift, degenerate-rearrangement, haptotropic-shift, "
         "pyramidal-inversion, pseudorotation, ligand-exchange, other)"),
        (("method", "VT coalescence", "coalescence"), VocabularyError,
         "method 'VT coalescence': already reads as coalescence (words); no alias is needed"),
        (("method", "line shape", "coalescence"), VocabularyError,
         "method 'line shape': already names lineshape; an alias cannot make it mean "
         "coalescence"),
        (("solvent", "tol-d8", "CDCl3"), VocabularyError,
         "solvent 'tol-d8': already names toluene-d8; an alias cannot make it mean "
         "chloroform-d"),
        (("nucleus", "‡", "1H"), VocabularyError, "nucleus '‡': an alias needs letters or digits"),
    ],
)  # fmt: skip
def test_bad_aliases_are_refused_with_clear_messages(
    database: Database, args: tuple[str, str, str], error: type, message: str
) -> None:
    with pytest.raises(error) as err:
        api.add_alias(database, *args)
    assert str(err.value) == message
    assert api.list_aliases(database) == [] and api.history(database) == []


def test_a_duplicate_alias_names_the_one_stored(database: Database) -> None:
    api.add_alias(database, "solvent", "CDC13", "chloroform-d", actor="anna")
    with pytest.raises(VocabularyError) as err:
        api.add_alias(database, "solvent", "cdc-13", "toluene-d8", actor="ben")
    assert str(err.value).startswith(
        "solvent 'cdc-13': an alias 'CDC13' → chloroform-d exists already (added by anna on "
    )
    assert str(err.value).endswith("); remove it first")
    with pytest.raises(NotFoundError, match="no stored method alias 'nothing' in this registry"):
        api.remove_alias(database, "method", "nothing")


def test_an_alias_may_override_a_built_in_reading(database: Database) -> None:
    done = api.add_alias(database, "process", "inversion", "ring-inversion")
    assert done["overrides"] == "pyramidal-inversion"
    assert api.read_term(database, "process", "Inversion") == {
        "kind": "process", "text": "Inversion", "reads_as": "ring-inversion", "how": "alias",
        "candidates": [], "suggestions": [],
    }  # fmt: skip


# ---------------------------------------------------------------- solvents


def test_add_solvent_with_its_liquid_range_and_source(database: Database) -> None:
    mid = api.add_measurement(database, _entry(method="coalescence", solvent="trans-decalin"))
    assert [f["rule_id"] for f in api.get_measurement(database, mid)["findings"]] == [
        "solvent-in-table"
    ]
    # trans-decahydronaphthalene: mp −30.4 °C, bp 187.3 °C (CRC Handbook of Chemistry and
    # Physics, physical constants of organic compounds; from memory)
    done = api.add_solvent(database, "decalin", mp="-30.4 °C", bp="460.45 K",
                           source="CRC Handbook, trans-decalin; from memory", formula="C10H18",
                           spellings=["trans-decalin", "decahydronaphthalene"], actor="anna")  # fmt: skip
    assert done["mp_k"] == pytest.approx(-30.4 + 273.15)  # NIST SP 811, 4.2.1.1
    assert done["bp_k"] == pytest.approx(460.45)
    assert done["measurements_linked"] == [mid]
    assert api.get_measurement(database, mid)["findings"] == []
    (row,) = [s for s in api.list_solvents(database) if s["name"] == "decalin"]
    assert row["source"] == "CRC Handbook, trans-decalin; from memory"
    assert row["spellings"] == ["decalin", "c10h18", "transdecalin", "decahydronaphthalene"]
    last = api.history(database, limit=1)[0]
    assert last["summary"] == (
        "add-solvent: decalin (mp 242.75 K, bp 460.45 K; source: CRC Handbook, trans-decalin; "
        f"from memory); linked measurement(s) {mid}"
    )


@pytest.mark.parametrize(
    ("kw", "message"),
    [
        ({"name": "hexane", "mp": "-95 °C", "bp": "69 °C", "source": ""},
         "solvent 'hexane': give the source of the melting and boiling points (a handbook and "
         "its edition, a supplier's data sheet, a paper)"),
        ({"name": "hexane", "mp": "69 °C", "bp": "-95 °C", "source": "x"},
         "solvent 'hexane': the melting point (342.15 K) must be below the boiling point "
         "(178.15 K)"),
        ({"name": "hexane", "mp": "-95 kJ/mol", "bp": "69 °C", "source": "x"},
         "melting point '-95 kJ/mol': kJ / mol is not a temperature (K, °C, °F)"),
        ({"name": "chloroform", "mp": "-64 °C", "bp": "61 °C", "source": "x"},
         "solvent 'chloroform': the spelling 'chloroform' already names chloroform-d"),
    ],
)  # fmt: skip
def test_bad_solvents_are_refused(database: Database, kw: dict[str, Any], message: str) -> None:
    with pytest.raises(VocabularyError) as err:
        api.add_solvent(database, **kw)
    assert str(err.value) == message


# ---------------------------------------------------------------- the command line


def test_vocab_commands(cli: Any) -> None:
    result = cli("vocab", "read", "method", "lineshape (DNMR fit)")
    assert (result.exit_code, result.stdout) == (
        0, "'lineshape (DNMR fit)' reads as method lineshape (words)\n",
    )  # fmt: skip
    result = cli("vocab", "read", "solvent", "CDC13")
    assert (result.exit_code, result.stdout) == (
        1, "'CDC13' is not a known solvent; did you mean chloroform-d?\n",
    )  # fmt: skip
    result = cli("--as", "anna", "vocab", "add", "solvent", "CDC13", "CDCl3")
    assert (result.exit_code, result.stdout) == (0, "stored solvent alias 'CDC13' → chloroform-d\n")
    result = cli("vocab", "add", "solvent", "CDC13", "CDCl3")
    assert result.exit_code == 1 and result.stdout == ""
    assert result.stderr.startswith("error: solvent 'CDC13': an alias 'CDC13' → chloroform-d")
    result = cli("vocab", "add", "colour", "x", "y")
    assert (result.exit_code, result.stderr) == (
        2, "error: unknown kind 'colour'; one of method, process, solvent, nucleus\n",
    )  # fmt: skip
    listed = json.loads(cli("vocab", "list", "--json").stdout)
    assert [(a["kind"], a["alias"], a["created_by"]) for a in listed] == [
        ("solvent", "CDC13", "anna")
    ]
    result = cli("vocab", "add-solvent", "hexane", "--mp", "-95.3 °C", "--bp", "68.7 °C",
                 "--source", "CRC Handbook; from memory")  # fmt: skip
    assert result.exit_code == 0, result.stderr
    assert result.stdout.startswith(
        "added solvent hexane: mp -95.3 °C, bp 68.7 °C (source: CRC Handbook; from memory)\n"
        "note: temperatures outside the liquid range are flagged by the checks; above the "
        "boiling point only a pressure-rated sealed NMR tube within its rating may be used."
    )
    solvents = json.loads(cli("vocab", "solvents", "--json").stdout)
    assert [s["stored_aliases"] for s in solvents if s["name"] == "chloroform-d"] == [["CDC13"]]
    assert json.loads(cli("vocab", "solvents", "--unlinked", "--json").stdout) == []
    result = cli("vocab", "remove", "solvent", "cdc13", "--reason", "not needed")
    assert result.stdout == "removed solvent alias 'CDC13' (→ chloroform-d)\n"
