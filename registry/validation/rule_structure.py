"""Rules on identity: the structure parses, and repeated measurements agree with each other."""

from __future__ import annotations

import numpy as np
import pandas as pd

from registry.record import vocab
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.data import CheckData, energy_units


class StructureParses(Rule):
    """A SMILES that RDKit could not sanitize is kept as entered; say so and why."""

    id = "structure-parse"
    version = 1
    severity = "note"
    title = "SMILES parses"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        ok = data.m["structure_ok"]
        rows = np.flatnonzero((ok.notna() & ~ok.fillna(True).astype(bool)).to_numpy())
        problem = data.text("structure_problem")
        label = data.text("compound_label")
        out = []
        for p in rows:
            who = f"compound {label[p]}" if label[p] else "the compound"
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"the SMILES of {who} does not parse cleanly ({problem[p] or 'no reason given'}); "
                    "it is kept as entered, but structure searches may miss it",
                )
            )
        return out


def _match_key(frame: pd.DataFrame) -> pd.DataFrame:
    """compound, process, method and solvent (table id, else the spelling key) of each row."""
    in_table = frame["solvent_id"].notna().to_numpy()
    key = np.empty(len(frame), dtype=object)
    key[in_table] = [f"id:{int(v)}" for v in frame["solvent_id"].to_numpy()[in_table].tolist()]
    others = frame["solvent_text"].to_numpy(dtype=object)[~in_table]
    key[~in_table] = ["text:" + vocab.solvent_key(str(t or "")) for t in others]
    return pd.DataFrame(
        {
            "id": frame["id"].to_numpy(),
            "k_compound": frame["compound_id"].to_numpy(),
            "k_process": frame["process_id"].fillna(-1).astype(np.int64).to_numpy(),
            "k_method": frame["method"].astype(str).to_numpy(),
            "k_solvent": key,
            "dg": frame["dg_kj_mol"].to_numpy(dtype=float),
            "err": np.nan_to_num(frame["dg_err_kj_mol"].to_numpy(dtype=float), nan=0.0),
            "t": frame["dg_t_k"].to_numpy(dtype=float),
        }
    )


class RepeatsAgree(Rule):
    """The same compound, process, solvent and method measured twice must give one barrier.

    Two barriers disagree when they differ by more than the base tolerance plus the coverage
    times their combined uncertainty; barriers quoted more than ``duplicate_max_dt_k`` apart
    in temperature are not compared (ΔS‡ may legitimately separate them).
    """

    id = "repeat-disagrees"
    version = 1
    severity = "warning"
    title = "repeated measurements agree"
    uses = ("dg_tolerance_kj_mol", "coverage", "duplicate_max_dt_k")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        if data.peers is None or data.peers.empty:
            return []
        mine = _match_key(data.m)
        mine = mine[np.isfinite(mine["dg"])]
        peers = _match_key(data.peers)
        peers = peers[np.isfinite(peers["dg"])]
        keys = ["k_compound", "k_process", "k_method", "k_solvent"]
        pairs = mine.merge(peers, on=keys, suffixes=("", "_o"))
        pairs = pairs[pairs["id"] != pairs["id_o"]]
        if pairs.empty:
            return []
        dt = (pairs["t"] - pairs["t_o"]).abs()
        close_t = dt.isna() | (dt <= config.duplicate_max_dt_k)
        tol = config.dg_tolerance_kj_mol + config.coverage * np.sqrt(
            pairs["err"] ** 2 + pairs["err_o"] ** 2
        )
        excess = (pairs["dg"] - pairs["dg_o"]).abs() - tol
        pairs = pairs.assign(tol=tol, excess=excess)[close_t & (excess > 0)]
        if pairs.empty:
            return []
        worst = pairs.sort_values(["id", "excess"], ascending=[True, False]).drop_duplicates("id")
        pos = pd.Index(data.m["id"]).get_indexer(worst["id"])
        labels, factors = energy_units(
            data.m["dg_text"].iloc[pos].reset_index(drop=True),
            data.m["dg_kj_mol"].iloc[pos].reset_index(drop=True),
        )
        others = (pairs.groupby("id").size()).to_dict()
        out = []
        for i, row in enumerate(worst.itertuples(index=False)):
            u, f = labels[i], float(factors[i])
            more = others[row.id] - 1
            extra = f" (and {more} other repeat(s) disagree too)" if more else ""
            out.append(
                self.finding(
                    int(row.id),
                    f"ΔG‡ {fnum(row.dg * f, 2)} {u} disagrees with measurement {row.id_o} of the "
                    f"same compound, process, solvent and method ({fnum(row.dg_o * f, 2)} {u}): "
                    f"they differ by {fnum((row.dg - row.dg_o) * f, 2)} {u}, more than their "
                    f"combined uncertainty allows (±{row.tol * f:.2f} {u}){extra}",
                    reported=opt(row.dg * f),
                    recomputed=opt(row.dg_o * f),
                    difference=opt((row.dg - row.dg_o) * f),
                    unit=u,
                    context=f"{row.id_o}:{row.dg_o!r}:{row.err_o!r}:{row.t_o!r}:{more}",
                )
            )
        return out
