"""``show``'s lines for the raw data of a 2D-exchange, transfer or time-course measurement."""

from __future__ import annotations

from typing import Any


def _matrix(rows: list[list[float]]) -> str:
    return "; ".join(",".join(f"{v:.6g}" for v in row) for row in rows)


def raw_data_lines(raw: dict[str, Any] | None) -> list[str]:
    """The stored raw data: as reported, and as the registry read it (s, fractions)."""
    if not raw:
        return []
    kind = raw["kind"]
    if kind == "exsy":
        taus = ", ".join(f"{t:.6g} s" for t in raw["mixing_s"])
        lines = [f"  EXSY         mixing {taus}   ({raw['mixing_text']})"]
        names = raw["site_names"] or []
        for tau, mat in zip(raw["mixing_s"], raw["volumes"], strict=True):
            lines.append(f"               volumes at {tau:.6g} s: {_matrix(mat)}")
        extra = []
        if raw["populations"]:
            pops = ", ".join(f"{p:.4g}" for p in raw["populations"])
            extra.append(f"populations {pops} ({raw['populations_text']})")
        if names:
            extra.append(f"sites {', '.join(names)}")
        if raw["volume_err"] is not None:
            extra.append(f"σ(volume) {raw['volume_err']:g}")
        if extra:
            lines.append(f"               {'; '.join(extra)}")
        return lines
    if kind == "saturation":
        err = f" ± {raw['ratio_err']:g}" if raw["ratio_err"] is not None else ""
        t1_err = f" ± {raw['t1_err_s']:.4g}" if raw["t1_err_s"] is not None else ""
        which = "partner saturated" if raw["t1_kind"] == "apparent" else "intrinsic"
        return [
            f"  sat. transf. M_ss/M0 {raw['ratio']:g}{err} ({raw['ratio_text']}); "
            f"T1 {raw['t1_s']:.4g}{t1_err} s, {which} ({raw['t1_text']})"
        ]
    head = f"  course       {kind}: {len(raw['t_s'])} points, {', '.join(raw['headers'])}"
    if raw["x_eq"] is not None:
        head += f"; equilibrium fraction {raw['x_eq']:g} ({raw['x_eq_text']})"
    lines = [head]
    for t, *vals in zip(raw["t_s"], *raw["values"], strict=True):
        lines.append(f"               t {t:.6g} s   " + "   ".join(f"{v:.6g}" for v in vals))
    lines.append(f"               (reported: {raw['course_text']})")
    return lines
