"""Rules on identity: the structure parses, and repeated measurements agree with each other."""

from __future__ import annotations

from typing import Any

import numpy as np
from numpy.typing import NDArray

from registry.record import vocab
from registry.record.theory import THEORY_COLUMNS, theory_key
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.data import CheckData
from registry.validation.reported import energy_units


class StructureParses(Rule):
    """A SMILES that RDKit could not sanitize is kept as entered; say so and why."""

    id = "structure-parse"
    version = 1
    severity = "note"
    title = "SMILES parses"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        rows = np.flatnonzero([v is not None and not v for v in data.text("structure_ok").tolist()])
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


class RepeatsAgree(Rule):
    """The same compound, process, solvent and method measured twice must give one barrier.

    Two barriers disagree when they differ by more than the base tolerance plus the coverage
    times their combined uncertainty. Barriers quoted at different temperatures differ by
    ΔT·ΔS‡ even for one process: where either stores ΔS‡, the checked one is moved to the
    other's temperature (ΔG‡(T₂) = ΔG‡(T₁) − (T₂ − T₁)·ΔS‡) and compared there; where
    neither does, up to ``duplicate_max_dt_k`` apart the tolerance grows by
    |ΔT|·``ds_allowance_j_mol_k``, and further apart the two are not comparable: a note says
    so (they are not compared).
    """

    id = "repeat-disagrees"
    version = 3  # 3: repeats too far apart in temperature to compare get a note saying so
    severity = "warning"
    title = "repeated measurements agree"
    uses = ("dg_tolerance_kj_mol", "coverage", "duplicate_max_dt_k", "ds_allowance_j_mol_k")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        pairs = _disagreeing_pairs(data, config)
        if pairs is None:
            return []
        mine, other, tol, excess, shift, far_mine, far_other = pairs
        out = self._not_comparable(data, far_mine, far_other, config)
        if mine.size == 0:
            return out
        # per checked row the worst disagreement (ties: the repeat stored first), and how many
        order = np.lexsort((other, -excess, mine))
        mine, other, tol, shift = mine[order], other[order], tol[order], shift[order]
        first = np.r_[True, mine[1:] != mine[:-1]]
        disagreeing = np.diff(np.r_[np.flatnonzero(first), mine.size])
        rows, peers, tol, shift = mine[first], other[first], tol[first], shift[first]
        # the peer's ΔG‡ at this row's temperature (moved with ΔS‡ where it was; see the class)
        dg, dg_o = data.col("dg_kj_mol")[rows], data.peers["dg_kj_mol"][peers] - shift
        t_mine = data.col("dg_t_k")[rows]
        err_o = np.nan_to_num(data.peers["dg_err_kj_mol"][peers], nan=0.0)
        t_o = data.peers["dg_t_k"][peers]
        peer_ids = data.peers["id"][peers]
        labels, factors = energy_units(data.text("dg_text")[rows], data.col("dg_kj_mol")[rows])
        for i, p in enumerate(rows.tolist()):
            u, f = labels[i], float(factors[i])
            mine_dg, their_dg, their_id = float(dg[i]), float(dg_o[i]), int(peer_ids[i])
            more = int(disagreeing[i]) - 1
            extra = f" (and {more} other repeat(s) disagree too)" if more else ""
            theirs = f"{fnum(their_dg * f, 2)} {u}"
            if shift[i] != 0.0:
                theirs = (
                    f"{fnum((their_dg + shift[i]) * f, 2)} {u} at {t_o[i]:.1f} K, i.e. {theirs} "
                    f"at {t_mine[i]:.1f} K with ΔS‡: ΔG‡(T₁) = ΔG‡(T₂) − (T₁ − T₂)·ΔS‡"
                )
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"ΔG‡ {fnum(mine_dg * f, 2)} {u} disagrees with measurement {their_id} of "
                    f"the same compound, process, solvent and method ({theirs}): they differ "
                    f"by {fnum((mine_dg - their_dg) * f, 2)} {u}, more than their combined "
                    f"uncertainty allows (±{float(tol[i]) * f:.2f} {u}){extra}",
                    reported=opt(mine_dg * f),
                    recomputed=opt(their_dg * f),
                    difference=opt((mine_dg - their_dg) * f),
                    unit=u,
                    context=f"{their_id}:{their_dg!r}:{float(err_o[i])!r}:{float(t_o[i])!r}:{more}",
                )
            )
        return out

    def _not_comparable(
        self, data: CheckData, mine: NDArray[np.int64], other: NDArray[np.int64],
        config: CheckConfig,
    ) -> list[Finding]:  # fmt: skip
        """A note per checked row whose repeats lie too far apart in temperature, without ΔS‡
        on either side, to say whether they agree (the nearest one named)."""
        if mine.size == 0:
            return []
        t_m, t_o = data.col("dg_t_k")[mine], data.peers["dg_t_k"][other]
        gap = np.abs(t_o - t_m)
        order = np.lexsort((gap, mine))
        mine, other, gap = mine[order], other[order], gap[order]
        first = np.r_[True, mine[1:] != mine[:-1]]
        out = []
        for p, o, dt in zip(mine[first].tolist(), other[first].tolist(), gap[first].tolist(),
                            strict=True):  # fmt: skip
            peer = int(data.peers["id"][o])
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"not compared with measurement {peer} of the same compound, process, "
                    f"solvent and method: their ΔG‡ were taken {dt:.0f} K apart (more than "
                    f"{config.duplicate_max_dt_k:g} K) and neither stores ΔS‡ to move one to the "
                    "other's temperature",
                    severity="note",
                    context=f"far:{peer}",
                )
            )
        return out


def _integers(values: NDArray[Any], missing: int = -1) -> NDArray[np.int64]:
    """An object column of integer ids as int64 (``missing`` where None)."""
    items = values.tolist()
    try:
        return np.array(items, dtype=np.int64)
    except TypeError:  # some are None
        return np.array([missing if v is None else v for v in items], dtype=np.int64)


def _match_keys(columns: dict[str, NDArray[Any]], methods: dict[str, int]) -> NDArray[np.int64]:
    """(compound, process, method, solvent) of each row as four integers: the solvent is its
    table id, else (negative) the code of its spelling's key; -1 for no process."""
    method = [methods.setdefault(_method_of(columns, i), len(methods))
              for i in range(len(columns["method"]))]  # fmt: skip
    solvent = _integers(columns["solvent_id"], missing=-1)
    for row in np.flatnonzero(solvent < 0).tolist():
        text = columns["solvent_text"][row]
        key = "text:" + vocab.solvent_key(str(text or ""))
        solvent[row] = -1 - methods.setdefault(key, len(methods))
    return np.column_stack(
        [_integers(columns["compound_id"]), _integers(columns["process_id"]), method, solvent]
    )


def _method_of(columns: dict[str, NDArray[Any]], row: int) -> str:
    """The method as repeats are matched on: a computed value with its level of theory (two
    levels of theory for one compound are two methods, not a repeat)."""
    method = str(columns["method"][row])
    if method != "computed":
        return method
    return "computed|" + theory_key({c: columns[c][row] for c in THEORY_COLUMNS})


def _match_codes(data: CheckData) -> tuple[NDArray[np.int64], NDArray[np.int64]]:
    """One code per checked row and per peer: equal codes mean the same compound, process,
    method and solvent (for a whole-registry check the peers are the checked rows)."""
    names: dict[str, int] = {}
    mine = _match_keys(data.columns, names)
    if data.peers["id"] is data.columns["id"]:
        keys = mine
    else:
        keys = np.concatenate([mine, _match_keys(data.peers, names)])
    _, codes = np.unique(keys, axis=0, return_inverse=True)
    codes = codes.reshape(-1)
    return codes[: len(data)], codes[len(data) :] if keys is not mine else codes


def _disagreeing_pairs(
    data: CheckData, config: CheckConfig
) -> tuple[NDArray[np.int64], NDArray[np.int64], NDArray[np.float64], NDArray[np.float64],
           NDArray[np.float64], NDArray[np.int64], NDArray[np.int64]] | None:  # fmt: skip
    """(checked row, peer row, tolerance, excess, ΔG‡ shift of the checked row) of every repeat
    pair that disagrees (the shift moves it to the peer's temperature; 0 where not moved), and
    (checked row, peer row) of the repeats too far apart in temperature to compare."""
    peers = data.peers
    if len(data) == 0 or peers["id"].size == 0:
        return None
    mine_code, peer_code = _match_codes(data)
    mine_rows = np.flatnonzero(np.isfinite(data.col("dg_kj_mol")))
    peer_rows = np.flatnonzero(np.isfinite(peers["dg_kj_mol"]))
    # peers grouped by code (by id inside a group), each checked row paired with its group
    peer_rows = peer_rows[np.lexsort((peer_rows, peer_code[peer_rows]))]
    sorted_codes = peer_code[peer_rows]
    start = np.searchsorted(sorted_codes, mine_code[mine_rows], side="left")
    stop = np.searchsorted(sorted_codes, mine_code[mine_rows], side="right")
    sizes = stop - start
    mine = np.repeat(mine_rows, sizes)
    offsets = np.arange(int(sizes.sum())) - np.repeat(np.cumsum(sizes) - sizes, sizes)
    other = peer_rows[np.repeat(start, sizes) + offsets]
    peer_ids = peers["id"].astype(np.int64)
    keep = data.ids[mine] != peer_ids[other]
    mine, other = mine[keep], other[keep]
    if mine.size == 0:
        return None
    dg, dg_o = data.col("dg_kj_mol")[mine], peers["dg_kj_mol"][other]
    err = np.nan_to_num(data.col("dg_err_kj_mol")[mine], nan=0.0)
    err_o = np.nan_to_num(peers["dg_err_kj_mol"][other], nan=0.0)
    # ΔG‡ of the checked row moved to the peer's temperature with ΔS‡ (its own, else the peer's)
    t_m, t_o = data.col("dg_t_k")[mine], peers["dg_t_k"][other]
    ds = data.col("ds_j_mol_k")[mine]
    ds = np.where(np.isfinite(ds), ds, peers["ds_j_mol_k"][other])
    with np.errstate(invalid="ignore"):
        apart = np.isfinite(t_m) & np.isfinite(t_o) & (np.abs(t_o - t_m) > _SAME_T_K)
        movable = apart & np.isfinite(ds)
        shift = np.where(movable, -(t_o - t_m) * ds / 1000.0, 0.0)
        dt = np.where(apart & ~movable, np.abs(t_o - t_m), 0.0)
        comparable = dt <= config.duplicate_max_dt_k
    tol = (
        config.dg_tolerance_kj_mol
        + config.coverage * np.sqrt(err**2 + err_o**2)
        + dt * config.ds_allowance_j_mol_k / 1000.0
    )
    excess = np.abs(dg + shift - dg_o) - tol
    bad = comparable & (excess > 0)
    far = ~comparable
    return (mine[bad], other[bad], tol[bad], excess[bad], shift[bad], mine[far], other[far])


#: temperatures this close count as the same (rounding; common practice, no source)
_SAME_T_K = 0.5
