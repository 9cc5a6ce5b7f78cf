"""A first barrier for a new structure: neighbours, their weighted barrier, and the plan.

Expected values are computed here without the code under test: Tanimoto similarities with
RDKit's own ``DataStructs.TanimotoSimilarity`` on Morgan bit vectors (not the registry's numpy
word arithmetic), the weighted mean written out, the LaPlante half-life from the Eyring equation
with CODATA constants. The leave-one-out check uses a public molecule set that RDKit ships (the
first 5,000 compounds of the NCI open database, ``rdkit/Data/NCI/first_5K.smi``) with SYNTHETIC
barriers that depend on substructure (invented for this test, not chemistry).
"""

from __future__ import annotations

import json
import math
import statistics
from pathlib import Path

import pytest
from rdkit import Chem, DataStructs, RDConfig
from rdkit.Chem import rdFingerprintGenerator, rdMolDescriptors
from scipy import constants as C

from registry import api
from registry.errors import FluxledgerError, UsageError
from registry.storage.database import Database

_MORGAN = rdFingerprintGenerator.GetMorganGenerator(radius=2, fpSize=2048)


def _tanimoto(a: str, b: str) -> float:
    fa, fb = (_MORGAN.GetFingerprint(Chem.MolFromSmiles(s)) for s in (a, b))
    return DataStructs.TanimotoSimilarity(fa, fb)


def _add(database: Database, smiles: str, label: str, dg: str, **more: str) -> int:
    """A measured barrier (a line-shape result: ΔG‡ at its temperature, nothing to recompute)."""
    entry = {"method": "lineshape", "smiles": smiles, "compound": label, "dg": dg,
             "dg_t": "298.15 K", **more}  # fmt: skip
    return api.add_measurement(database, entry)


AMIDES = {  # label: (SMILES, invented ΔG‡ in kJ/mol)
    "A1": ("CN(C)C(=O)c1ccc(Cl)cc1", "62"),
    "A2": ("CN(C)C(=O)c1ccc(C)cc1", "64"),
    "A3": ("CN(C)C(=O)c1ccccc1", "66"),
    "B1": ("Cc1cccc(C)c1-c1c(C)cccc1C(=O)O", "100"),
}
QUERY = "CN(C)C(=O)c1ccc(Br)cc1"


def test_the_estimate_is_the_similarity_cubed_weighted_mean(database: Database) -> None:
    for label, (smiles, dg) in AMIDES.items():
        _add(database, smiles, label, f"{dg} kJ/mol")
    res = api.estimate_barrier(database, QUERY, neighbours=3, min_similarity=0.1)
    sims = {label: _tanimoto(QUERY, smiles) for label, (smiles, _) in AMIDES.items()}
    top = sorted(sims, key=lambda k: -sims[k])[:3]
    assert [n.compound for n in res.estimate.neighbours] == top
    for n in res.estimate.neighbours:
        assert n.similarity == pytest.approx(sims[n.compound], abs=1e-4)  # stored rounded
    w = {k: sims[k] ** 3 for k in top}
    mean = sum(w[k] * float(AMIDES[k][1]) for k in top) / sum(w.values())
    sd = math.sqrt(sum(w[k] * (float(AMIDES[k][1]) - mean) ** 2 for k in top) / sum(w.values()))
    assert res.estimate.dg_kj_mol == pytest.approx(mean, abs=0.05)
    assert res.estimate.spread_kj_mol == pytest.approx(sd, abs=0.05)
    # LaPlante half-life at 37 °C: ln 2 / k, Eyring with CODATA constants (kappa 1)
    t = 310.15
    k = C.k * t / C.h * math.exp(-res.estimate.dg_kj_mol * 1000 / (C.R * t))
    assert res.atropisomer.half_life_37c_s == pytest.approx(math.log(2) / k, rel=1e-9)
    assert res.atropisomer.stability_class == 1  # < 20 kcal/mol (LaPlante 2011)


def test_flagged_computed_and_the_structure_itself_are_left_out(database: Database) -> None:
    for label, (smiles, dg) in AMIDES.items():
        _add(database, smiles, label, f"{dg} kJ/mol")
    api.add_measurement(database, {"method": "computed", "smiles": "CN(C)C(=O)c1ccc(I)cc1",
                                   "compound": "I-calc", "dg": "40 kJ/mol",
                                   "dg_t": "298.15 K"})  # fmt: skip
    own = _add(database, QUERY, "Q", "63 kJ/mol")
    # a coalescence value off by a slip: flagged by the check, so it does not count
    api.add_measurement(database, {"method": "coalescence", "compound": "A4",
        "smiles": "CN(C)C(=O)c1ccc(F)cc1", "tc": "300 K", "dnu": "10 Hz", "field": "400 MHz",
        "dg": "90 kJ/mol"})  # fmt: skip
    res = api.estimate_barrier(database, QUERY, min_similarity=0.1)
    names = [n.compound for n in res.estimate.neighbours]
    assert "Q" not in names and "I-calc" not in names and "A4" not in names
    assert res.estimate.already_measured == (own,)
    assert any("already measured (measurement" in n for n in res.estimate.notes)
    with_flagged = api.estimate_barrier(database, QUERY, min_similarity=0.1, include_flagged=True)
    assert "A4" in [n.compound for n in with_flagged.estimate.neighbours]


def test_process_and_motif_narrow_the_neighbours(database: Database) -> None:
    for label, (smiles, dg) in AMIDES.items():
        process = "bond-rotation" if label != "A3" else "ring-inversion"
        _add(database, smiles, label, f"{dg} kJ/mol", process=process)
    by_process = api.estimate_barrier(database, QUERY, process="ring-inversion", min_similarity=0.1)
    assert [n.compound for n in by_process.estimate.neighbours] == ["A3"]
    by_motif = api.estimate_barrier(database, QUERY, motif="biaryl-ortho", min_similarity=0.05)
    assert [n.compound for n in by_motif.estimate.neighbours] == ["B1"]


def test_nothing_near_gives_no_estimate(database: Database, cli) -> None:  # type: ignore[no-untyped-def]
    _add(database, "CCCCCCCC", "C8", "30 kJ/mol")
    res = api.estimate_barrier(database, QUERY)
    assert res.estimate.dg_kj_mol is None and res.plan is None
    result = cli("estimate", QUERY)
    assert result.exit_code == 1
    assert "note: no measured compound is at least 0.3 similar: no estimate" in result.stdout


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["C1CC"], "SMILES 'C1CC'"),
        ([QUERY, "--neighbours", "0"], "neighbours 0: give a whole number from 1"),
        ([QUERY, "--min-similarity", "1.5"], "min_similarity 1.5: give a number in (0, 1]"),
        ([QUERY, "--solvent", "unobtainium"], "solvent 'unobtainium': not a solvent"),
        ([QUERY, "--motif", "no-such-motif"], "no-such-motif"),
    ],
)
def test_bad_input_is_named(cli, database: Database, args: list[str], message: str) -> None:  # type: ignore[no-untyped-def]
    for label, (smiles, dg) in AMIDES.items():
        _add(database, smiles, label, f"{dg} kJ/mol")
    result = cli("estimate", *args, "--dnu", "0.1 ppm")
    assert result.exit_code in (1, 2), result.stdout
    assert message in result.stderr
    assert "Traceback" not in result.stdout + result.stderr


def test_the_plan_from_the_cli(cli, database: Database) -> None:  # type: ignore[no-untyped-def]
    for label, (smiles, dg) in AMIDES.items():
        _add(database, smiles, label, f"{dg} kJ/mol")
    result = cli("estimate", QUERY, "--dnu", "0.12 ppm", "--field", "400", "--field", "600",
                 "--solvent", "CDCl3", "--json")  # fmt: skip
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["solvent"] == "chloroform-d"
    assert [f["field_MHz"] for f in data["plan"]["fields"]] == [400, 600]
    assert data["plan"]["dg_at_T_kj_mol"] == pytest.approx(data["dg_kj_mol"])
    # Gutowsky–Holm at coalescence: k_c = π Δν / √2 with Δν = 0.12 ppm × 400 Hz/ppm (test's own)
    assert data["plan"]["fields"][0]["k_c_per_s"] == pytest.approx(math.pi * 48 / math.sqrt(2))
    text = cli("estimate", QUERY, "--dnu", "0.12 ppm", "--solvent", "CDCl3")
    assert "Estimated ΔG‡:" in text.stdout and "In chloroform-d:" in text.stdout


def _synthetic_barrier(mol: Chem.Mol) -> float:
    """SYNTHETIC: 45 kJ/mol plus fixed amounts per amide, biaryl bond, aromatic ring and
    halogen, so that the barrier follows the structure (invented for this test)."""
    amounts = {"C(=O)[NX3]": 10.0, "a-!@a": 15.0, "[F,Cl,Br,I]": 3.0}
    counted = sum(v * len(mol.GetSubstructMatches(Chem.MolFromSmarts(q)))
                  for q, v in amounts.items())  # fmt: skip
    rings = rdMolDescriptors.CalcNumAromaticRings(mol)
    return 45.0 + counted + 5.0 * rings


def test_leave_one_out_on_a_public_set_beats_the_plain_median(tmp_path: Path) -> None:
    source = Path(RDConfig.RDDataDir) / "NCI" / "first_5K.smi"
    molecules = []
    for line in source.read_text(encoding="utf-8").splitlines():
        mol = Chem.MolFromSmiles(line.split()[0])
        if mol is not None and 8 <= mol.GetNumHeavyAtoms() <= 40:
            molecules.append((Chem.MolToSmiles(mol), _synthetic_barrier(mol)))
        if len(molecules) == 160:
            break
    path = tmp_path / "loo.sqlite"
    api.init_registry(str(path))
    database = api.open_registry(str(path))
    try:
        with api.deferred_checks(database):
            ids = [_add(database, s, f"N{i}", f"{g} kJ/mol") for i, (s, g) in enumerate(molecules)]
        compound_of = {r["id"]: r["compound_id"] for r in api.list_measurements(database)}
        from registry.search.estimate import estimate

        errors, baseline = [], []
        median_all = statistics.median(g for _, g in molecules)
        for mid, (smiles, truth) in zip(ids, molecules, strict=True):
            found = estimate(database, smiles, min_similarity=0.05, exclude_ids=[compound_of[mid]])
            if found.dg_kj_mol is not None:
                errors.append(abs(found.dg_kj_mol - truth))
                baseline.append(abs(median_all - truth))
        print(f"leave-one-out MAE {statistics.mean(errors):.2f} kJ/mol, global median "
              f"{statistics.mean(baseline):.2f} kJ/mol over {len(errors)}")  # fmt: skip
        assert len(errors) > 100
        # the neighbours carry the substructure signal; the global median cannot
        assert statistics.mean(errors) < 0.8 * statistics.mean(baseline)
    finally:
        database.close()


def test_the_library_refuses_what_the_cli_refuses(database: Database) -> None:
    with pytest.raises(UsageError):
        api.estimate_barrier(database, QUERY, neighbours=0)
    with pytest.raises(FluxledgerError):
        api.estimate_barrier(database, "not a smiles")
