"""A small reader for 1D JCAMP-DX spectra (IUPAC open standard), written for line-shape fits.

What it reads (McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), JCAMP-DX 4.24; NMR labels
from Davies & Lampen, Appl. Spectrosc. 47, 1093 (1993)):

* ``##XYDATA=(X++(Y..Y))`` in AFFN (free-format numbers, ``+``/``-`` as separators) and in the
  compressed ASDF forms: SQZ (``@A-Ia-i``: a value whose first digit carries the sign), DIF
  (``%J-Rj-r``: a difference from the previous value), DUP (``S-Zs``: the previous item repeated
  to this total count). After a line ending in DIF form the next line starts with the last value
  again (the Y check), which is compared and dropped.
* ``##XYPOINTS=(XY..XY)``.
* ``##XFACTOR``, ``##YFACTOR``, ``##FIRSTX``, ``##LASTX``, ``##NPOINTS``, ``##XUNITS`` (HZ or
  PPM), ``##.OBSERVE FREQUENCY`` (MHz), and a temperature from ``##TEMPERATURE`` (°C unless a unit
  is written, as JCAMP-DX 4.24 defines it; from memory) or the vendor label ``##$TE`` (K).

Labels are compared after dropping blanks, ``-``, ``/`` and ``_`` and folding case, as the
standard asks. ``$$`` starts a comment. Only the first data block is read; NTUPLES (FIDs,
complex or nD data) are refused with a message saying so. Any bad file raises
:class:`registry.errors.FileFormatError` naming the file and the line.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from registry.errors import FileFormatError, UnitError
from registry.lineshape.spectrum import Spectrum

_SQZ = {c: (i, 1) for i, c in enumerate("@ABCDEFGHI")} | {
    c: (i + 1, -1) for i, c in enumerate("abcdefghi")
}
_DIF = {"%": (0, 1)} | {c: (i + 1, 1) for i, c in enumerate("JKLMNOPQR")}
_DIF |= {c: (i + 1, -1) for i, c in enumerate("jklmnopqr")}
_DUP = {c: i + 1 for i, c in enumerate("STUVWXYZs")}
#: most points one spectrum may hold (a 1D NMR spectrum has at most a few hundred thousand);
#: a repeat count or ##NPOINTS beyond it is refused before any memory is taken for it
MAX_POINTS = 1 << 22
_COMPRESSED = set(_SQZ) | set(_DIF) | set(_DUP)
_AFFN_RE = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_PLAIN_RE = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)")  # no exponent: E is SQZ in ASDF lines
_DIGITS_RE = re.compile(r"\d*\.?\d*")

#: a unitless ##TEMPERATURE read as °C above this is more likely kelvin: refuse, do not guess
_IMPLAUSIBLE_CELSIUS_K = 500.0


@dataclass
class _Record:
    label: str
    value: str
    line: int
    data: list[tuple[int, str]]


def normalise_label(label: str) -> str:
    """``##.OBSERVE FREQUENCY`` → ``.OBSERVEFREQUENCY`` (JCAMP-DX label comparison rule)."""
    return re.sub(r"[\s\-/_]", "", label).upper()


def _strip_comment(line: str) -> str:
    pos = line.find("$$")
    return line if pos < 0 else line[:pos]


def _records(text: str, source: str) -> list[_Record]:
    """Labelled data records of the first block holding spectral data."""
    records: list[_Record] = []
    current: _Record | None = None
    for lineno, raw in enumerate(text.splitlines(), start=1):
        line = _strip_comment(raw).rstrip()
        if line.lstrip().startswith("##"):
            body = line.lstrip()[2:]
            if "=" not in body:
                raise FileFormatError(source, f"line {lineno}: label without '=': {raw.strip()!r}")
            label, value = body.split("=", 1)
            current = _Record(normalise_label(label), value.strip(), lineno, [])
            records.append(current)
            if current.label == "END" and any(r.label in ("XYDATA", "XYPOINTS") for r in records):
                break
        elif current is not None and line.strip():
            current.data.append((lineno, line.strip()))
    if not records:
        raise FileFormatError(source, "no JCAMP-DX labels (##LABEL=) found")
    return records


def _float_label(recs: dict[str, _Record], label: str, source: str, default: float | None = None):
    rec = recs.get(label)
    if rec is None:
        if default is not None:
            return default
        raise FileFormatError(source, f"missing ##{label}= needed to read the data")
    try:
        value = float(rec.value.split()[0].replace(",", ".")) if rec.value.split() else math.nan
    except ValueError:
        value = math.nan
    if not math.isfinite(value):
        raise FileFormatError(source, f"line {rec.line}: ##{label}= {rec.value!r} is not a number")
    return value


def parse_jcamp(text: str, source: str) -> Spectrum:
    """Parse JCAMP-DX text holding one 1D spectrum (see module docstring)."""
    recs_list = _records(text, source)
    recs: dict[str, _Record] = {}
    for rec in recs_list:
        recs.setdefault(rec.label, rec)
    if "NTUPLES" in recs:
        raise FileFormatError(
            source,
            f"line {recs['NTUPLES'].line}: NTUPLES data (FID, complex or nD) are not supported; "
            "export the processed real 1D spectrum as ##XYDATA",
        )
    x_unit = _x_unit(recs, source)
    xfactor = _float_label(recs, "XFACTOR", source, 1.0)
    yfactor = _float_label(recs, "YFACTOR", source, 1.0)
    if "XYDATA" in recs:
        xs, ys = _read_xydata(recs, source, xfactor, yfactor)
    elif "XYPOINTS" in recs:
        xs, ys = _read_xypoints(recs["XYPOINTS"], source, xfactor, yfactor)
        if "NPOINTS" in recs:
            npoints = int(_float_label(recs, "NPOINTS", source))
            if npoints != len(xs):
                raise FileFormatError(
                    source,
                    f"line {recs['XYPOINTS'].line}: ##XYPOINTS holds {len(xs)} points but "
                    f"##NPOINTS= says {npoints}",
                )
    else:
        raise FileFormatError(source, "no ##XYDATA= or ##XYPOINTS= spectrum found")
    if len(xs) < 2:
        raise FileFormatError(source, "a spectrum needs at least two points")
    observe = None
    if ".OBSERVEFREQUENCY" in recs:
        observe = _float_label(recs, ".OBSERVEFREQUENCY", source)
        if observe <= 0:
            raise FileFormatError(
                source, f"line {recs['.OBSERVEFREQUENCY'].line}: observe frequency must be > 0"
            )
    t_k, t_text = _temperature(recs, source)
    return Spectrum(xs, ys, x_unit, source, observe, t_k, t_text)


def _x_unit(recs: dict[str, _Record], source: str) -> str | None:
    rec = recs.get("XUNITS")
    if rec is None:
        return None
    unit = rec.value.strip().upper()
    if unit in ("HZ", "HERTZ"):
        return "Hz"
    if unit == "PPM":
        return "ppm"
    raise FileFormatError(
        source, f"line {rec.line}: ##XUNITS= {rec.value!r}: an NMR spectrum in HZ or PPM is needed"
    )


def _temperature(recs: dict[str, _Record], source: str) -> tuple[float | None, str | None]:
    from registry.record.units import parse_value

    for label, default_unit in (("TEMPERATURE", "degC"), ("$TE", "K")):
        rec = recs.get(label)
        if rec is None or not rec.value.strip("<> "):
            continue
        value = rec.value.strip().strip("<>").strip()
        try:
            parsed = parse_value(
                value, "temperature", field=f"##{label}", default_unit=default_unit
            )
        except UnitError as exc:
            raise FileFormatError(source, f"line {rec.line}: {exc}") from exc
        has_unit = bool(re.search(r"[A-Za-z°]", value))
        if not has_unit and label == "TEMPERATURE" and parsed.value > _IMPLAUSIBLE_CELSIUS_K:
            raise FileFormatError(
                source,
                f"line {rec.line}: ##TEMPERATURE= {value} has no unit; JCAMP-DX means °C, "
                f"which gives {parsed.value:.0f} K — probably kelvin was meant; write the unit "
                "in the file or give the temperatures of the files (temps)",
            )
        text = value if has_unit else f"{value} {'°C' if default_unit == 'degC' else 'K'}"
        return parsed.value, text
    return None, None


def _read_xydata(
    recs: dict[str, _Record], source: str, xfactor: float, yfactor: float
) -> tuple[np.ndarray, np.ndarray]:
    rec = recs["XYDATA"]
    form = rec.value.replace(" ", "").upper()
    if form not in ("(X++(Y..Y))", "(X++(R..R))"):
        raise FileFormatError(
            source, f"line {rec.line}: ##XYDATA= {rec.value!r}: only (X++(Y..Y)) is supported"
        )
    firstx = _float_label(recs, "FIRSTX", source)
    lastx = _float_label(recs, "LASTX", source)
    npoints_f = _float_label(recs, "NPOINTS", source)
    if not 2 <= npoints_f <= MAX_POINTS or npoints_f != int(npoints_f):
        raise FileFormatError(
            source,
            f"line {recs['NPOINTS'].line}: ##NPOINTS= must be a whole number from 2 to "
            f"{MAX_POINTS:,}",
        )
    npoints = int(npoints_f)
    if not rec.data:
        raise FileFormatError(source, f"line {rec.line}: ##XYDATA= has no data lines")
    deltax = (lastx - firstx) / (npoints - 1)
    ys: list[float] = []
    last_line_dif = False
    for lineno, line in rec.data:
        values, ends_in_dif = decode_asdf_line(line, source, lineno)
        if len(values) < 1:
            continue
        x_line, yvals = values[0], values[1:]
        start = len(ys)
        if last_line_dif and yvals:
            check = yvals[0]
            if not math.isclose(check, ys[-1], rel_tol=1e-9, abs_tol=1e-9):
                raise FileFormatError(
                    source,
                    f"line {lineno}: Y check value {check:g} differs from the last value "
                    f"{ys[-1]:g} of the previous line (damaged DIF data)",
                )
            yvals = yvals[1:]
            start -= 1
        expected = firstx + start * deltax
        tolerance = abs(deltax) + 0.5 * abs(xfactor) + 1e-9 * abs(expected)
        if abs(x_line * xfactor - expected) > tolerance:
            raise FileFormatError(
                source,
                f"line {lineno}: X = {x_line * xfactor:g} but point {start + 1} should be at "
                f"{expected:g} (missing or extra values before this line?)",
            )
        ys.extend(yvals)
        last_line_dif = ends_in_dif
        if len(ys) > npoints:
            raise FileFormatError(
                source, f"line {lineno}: more than ##NPOINTS= {npoints} values in ##XYDATA"
            )
    if len(ys) != npoints:
        last = rec.data[-1][0]
        raise FileFormatError(
            source,
            f"line {last}: ##XYDATA holds {len(ys)} points but ##NPOINTS= says {npoints}",
        )
    xs = firstx + deltax * np.arange(npoints)
    return xs, np.asarray(ys, dtype=float) * yfactor


def decode_asdf_line(line: str, source: str, lineno: int) -> tuple[list[float], bool]:
    """Numbers of one data line (AFFN or ASDF) and whether it ended in DIF form.

    An ``E``/``e`` is an exponent only on lines with no other compression character and
    only right after a digit; otherwise it is the SQZ digit +5/−5.
    """
    compressed = any(c in _COMPRESSED and c not in "Ee" for c in line) or bool(
        re.search(r"(?:^|[\s,;])[Ee]", line)
    )
    if not compressed:
        return _decode_affn(line, source, lineno), False
    values: list[float] = []
    last_kind = ""  # "abs" or "dif"
    last_delta = 0.0
    pos = 0
    n = len(line)
    while pos < n:
        ch = line[pos]
        if ch in " \t,;":
            pos += 1
            continue
        if ch == "?":
            raise FileFormatError(source, f"line {lineno}: missing value '?' is not supported")
        m = _DIGITS_RE.match(line, pos + 1)
        digits = m.group(0) if m else ""
        end = m.end() if m else pos + 1
        if ch in _SQZ:
            lead, sign = _SQZ[ch]
            values.append(sign * float(f"{lead}{digits}"))
            last_kind = "abs"
        elif ch in _DIF:
            if not values:
                raise FileFormatError(
                    source, f"line {lineno}: DIF value {ch!r} with nothing before"
                )
            lead, sign = _DIF[ch]
            last_delta = sign * float(f"{lead}{digits}")
            values.append(values[-1] + last_delta)
            last_kind = "dif"
        elif ch in _DUP:
            count = int(f"{_DUP[ch]}{digits}") if digits.isdigit() or not digits else 0
            if not values or count < 1:
                raise FileFormatError(source, f"line {lineno}: bad DUP count at {line[pos:end]!r}")
            if len(values) + count > MAX_POINTS:
                raise FileFormatError(
                    source,
                    f"line {lineno}: a run of {count:,} repeats at {line[pos:end]!r} gives more "
                    f"points than a spectrum holds (at most {MAX_POINTS:,})",
                )
            for _ in range(count - 1):
                values.append(values[-1] + last_delta if last_kind == "dif" else values[-1])
        elif ch in "+-" or ch.isdigit() or ch == ".":
            am = _PLAIN_RE.match(line, pos)
            if not am:
                raise FileFormatError(source, f"line {lineno}: cannot read {line[pos:]!r}")
            values.append(float(am.group(0)))
            last_kind = "abs"
            end = am.end()
        else:
            raise FileFormatError(source, f"line {lineno}: unexpected character {ch!r} in {line!r}")
        pos = end
    return values, last_kind == "dif"


def _decode_affn(line: str, source: str, lineno: int) -> list[float]:
    """Free-format numbers; ``+`` and ``-`` also separate values (the PAC form)."""
    out: list[float] = []
    pos = 0
    while pos < len(line):
        if line[pos] in " \t,;":
            pos += 1
            continue
        m = _AFFN_RE.match(line, pos)
        if not m:
            token = re.split(r"[\s,;]", line[pos:], maxsplit=1)[0]
            if token.startswith("?"):
                raise FileFormatError(source, f"line {lineno}: missing value '?' is not supported")
            raise FileFormatError(source, f"line {lineno}: cannot read {token!r} as a number")
        out.append(float(m.group(0)))
        pos = m.end()
    return out


def _read_xypoints(
    rec: _Record, source: str, xfactor: float, yfactor: float
) -> tuple[np.ndarray, np.ndarray]:
    form = rec.value.replace(" ", "").upper()
    if form not in ("(XY..XY)", "(XY,XY)"):
        raise FileFormatError(
            source, f"line {rec.line}: ##XYPOINTS= {rec.value!r}: only (XY..XY) is supported"
        )
    xs: list[float] = []
    ys: list[float] = []
    lines: list[int] = []
    for lineno, line in rec.data:
        if "?" in line:
            raise FileFormatError(source, f"line {lineno}: missing value '?' is not supported")
        nums = _decode_affn(line, source, lineno)
        if len(nums) % 2:
            raise FileFormatError(source, f"line {lineno}: X without its Y in {line!r}")
        xs.extend(nums[0::2])
        ys.extend(nums[1::2])
        lines.extend([lineno] * (len(nums) // 2))
    if not xs:
        raise FileFormatError(source, f"line {rec.line}: ##XYPOINTS= has no data lines")
    x = np.asarray(xs) * xfactor
    steps = np.sign(np.diff(x))
    if len(steps) and ((steps == 0).any() or (steps != steps[0]).any()):
        bad = int(np.nonzero((steps == 0) | (steps != steps[0]))[0][0]) + 1
        raise FileFormatError(
            source, f"line {lines[bad]}: X values repeat or change direction in ##XYPOINTS"
        )
    return x, np.asarray(ys) * yfactor
