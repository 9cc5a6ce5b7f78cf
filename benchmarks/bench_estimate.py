"""Leave-one-out of ``estimate`` on real molecules with SYNTHETIC barriers, beside a plain baseline.

The registry: the first N molecules of the open molsets set, each with one invented line-shape
barrier that depends on substructure (45 kJ/mol plus 10 per amide C–N, 15 per biaryl bond,
3 per halogen, 5 per aromatic ring, plus Gaussian noise of 2 kJ/mol: demo data, not chemistry).
For Q of them (spread evenly) the estimate is made with the compound itself left out and
compared with its barrier; the baseline is the median barrier of the other compounds that share
the compound's first built-in motif (the whole registry's median when it has none). Printed:
both mean absolute errors, their ratio, how many queries had neighbours, and the median time of
one estimate (library call, warm). Nothing is asserted.

Usage: ``python benchmarks/bench_estimate.py [--n 5000] [--queries 300]``
"""

from __future__ import annotations

import argparse
import random
import statistics
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from find_data import molsets_smiles  # noqa: E402

AMOUNTS = {"C(=O)[NX3]": 10.0, "a-!@a": 15.0, "[F,Cl,Br,I]": 3.0}


def _barriers(smiles: list[str], rng: random.Random) -> list[float]:
    from rdkit import Chem, RDLogger
    from rdkit.Chem import rdMolDescriptors

    RDLogger.DisableLog("rdApp.*")

    patterns = {Chem.MolFromSmarts(q): v for q, v in AMOUNTS.items()}
    out = []
    for s in smiles:
        mol = Chem.MolFromSmiles(s)
        counted = sum(v * len(mol.GetSubstructMatches(p)) for p, v in patterns.items())
        rings = rdMolDescriptors.CalcNumAromaticRings(mol)
        out.append(45.0 + counted + 5.0 * rings + rng.gauss(0.0, 2.0))
    return out


def main() -> None:
    from registry import api
    from registry.search.estimate import estimate

    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--n", type=int, default=5000)
    parser.add_argument("--queries", type=int, default=300)
    args = parser.parse_args()
    rng = random.Random(11)
    smiles = molsets_smiles(args.n)
    barriers = _barriers(smiles, rng)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "estimate.sqlite"
        api.init_registry(str(path))
        database = api.open_registry(str(path))
        entries = [
            {"method": "lineshape", "smiles": s, "compound": f"E{i:05d}",
             "dg": f"{g:.2f} kJ/mol", "dg_t": "298.15 K"}
            for i, (s, g) in enumerate(zip(smiles, barriers, strict=True))
        ]  # fmt: skip
        with api.deferred_checks(database):
            for entry in entries:
                api.add_measurement(database, entry)
        rows = api.list_measurements(database)
        compound_of = {r["compound"]: r["compound_id"] for r in rows}
        motifs = api.motif_matches(database)
        first_motif: dict[int, str] = {}
        for name, ids in motifs.items():
            for cid in ids:
                first_motif.setdefault(cid, name)
        by_motif: dict[str, list[tuple[int, float]]] = {}
        truth = {compound_of[f"E{i:05d}"]: g for i, g in enumerate(barriers)}
        for cid, g in truth.items():
            by_motif.setdefault(first_motif.get(cid, ""), []).append((cid, g))
        everything = statistics.median(barriers)
        step = max(1, args.n // args.queries)
        errors, baseline, seconds = [], [], []
        for i in range(0, args.n, step)[: args.queries]:
            cid = compound_of[f"E{i:05d}"]
            start = time.perf_counter()
            found = estimate(database, smiles[i], exclude_ids=[cid])  # the defaults of the CLI
            seconds.append(time.perf_counter() - start)
            if found.dg_kj_mol is None:
                continue
            errors.append(abs(found.dg_kj_mol - truth[cid]))
            others = [g for c, g in by_motif.get(first_motif.get(cid, ""), []) if c != cid]
            base = statistics.median(others) if first_motif.get(cid) and others else everything
            baseline.append(abs(base - truth[cid]))
        database.close()
    mae, base_mae = statistics.mean(errors), statistics.mean(baseline)
    print(f"{args.n:,} molsets molecules with synthetic barriers; {len(seconds)} leave-one-out "
          f"queries, {len(errors)} with neighbours (similarity >= 0.3)")  # fmt: skip
    print(f"  estimate (5 neighbours, weights similarity^3): MAE {mae:.2f} kJ/mol")
    print(f"  baseline (median of the same motif):           MAE {base_mae:.2f} kJ/mol")
    print(f"  ratio estimate/baseline: {mae / base_mae:.2f}")
    print(f"  one estimate: median {statistics.median(seconds) * 1000:.1f} ms")


if __name__ == "__main__":
    main()
