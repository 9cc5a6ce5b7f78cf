"""One measured 1D spectrum, and reading/writing the simple CSV form of it.

A spectrum keeps its abscissa as the file gave it (ppm or Hz) together with the observe
frequency when the file states one; :meth:`Spectrum.frequency_hz` converts through
:func:`registry.record.units.ppm_to_hz` only when asked, so a spectrum in ppm without a known
spectrometer frequency is an error at the point of use, never a guess.

CSV form: two columns (shift, intensity; further columns ignored), separated by commas,
semicolons, tabs or blanks; an optional header whose first column name says ``ppm`` or ``Hz``;
comment lines start with ``#`` and may carry ``# temperature: 298.2 K`` and
``# observe frequency: 400.13 MHz``.
"""

from __future__ import annotations

import csv
import io
import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from registry.errors import FileFormatError, UnitError, UsageError
from registry.record.units import ppm_to_hz

X_UNITS = ("ppm", "Hz")
JCAMP_SUFFIXES = (".dx", ".jdx", ".jcamp", ".jcm")

_META_RE = re.compile(r"^#\s*(?P<key>[A-Za-z][A-Za-z _.-]*?)\s*[:=]\s*(?P<value>.+?)\s*$")
_TEMPERATURE_KEYS = ("temperature", "temp", "t")
_FIELD_KEYS = ("observe frequency", "observe_frequency", "spectrometer frequency", "field", "sf")


@dataclass(frozen=True, eq=False)
class Spectrum:
    """Abscissa (``x_unit``: ppm or Hz), intensities, and what the file said about the run."""

    x: NDArray[np.float64]
    intensity: NDArray[np.float64]
    x_unit: str | None
    source: str
    observe_mhz: float | None = None
    t_k: float | None = None
    t_text: str | None = None

    def frequency_hz(self, observe_mhz: float | None = None) -> NDArray[np.float64]:
        """The abscissa in Hz; a ppm axis needs the observe frequency (file or ``observe_mhz``)."""
        unit = self.x_unit
        if unit is None:
            raise UsageError(
                f"{self.source}: the abscissa unit is unknown; name it in the header "
                "(e.g. 'shift_ppm') or give it as x_unit (ppm or Hz)"
            )
        if unit == "Hz":
            return self.x
        mhz = observe_mhz or self.observe_mhz
        if not mhz:
            raise UsageError(
                f"{self.source}: the spectrum is in ppm but no spectrometer frequency is known; "
                "give it as field (MHz)"
            )
        return np.asarray(ppm_to_hz(self.x, mhz), dtype=float)

    def with_x_unit(self, unit: str) -> Spectrum:
        return Spectrum(
            self.x, self.intensity, unit, self.source, self.observe_mhz, self.t_k, self.t_text
        )

    def with_temperature(self, t_k: float, t_text: str) -> Spectrum:
        return Spectrum(
            self.x, self.intensity, self.x_unit, self.source, self.observe_mhz, t_k, t_text
        )


def read_spectrum(path: str | Path) -> Spectrum:
    """Read a spectrum file, JCAMP-DX or CSV, chosen by suffix or by a leading ``##``."""
    p = Path(path)
    text = _read_text(p)
    if p.suffix.lower() in JCAMP_SUFFIXES or text.lstrip().startswith("##"):
        from registry.lineshape.jcamp import parse_jcamp

        return parse_jcamp(text, str(path))
    return parse_csv_spectrum(text, str(path))


def _read_text(path: Path) -> str:
    try:
        raw = path.read_bytes()
    except FileNotFoundError as exc:
        raise FileFormatError(str(path), "no such file") from exc
    except OSError as exc:
        raise FileFormatError(str(path), f"cannot read: {exc.strerror or exc}") from exc
    if not raw.strip():
        raise FileFormatError(str(path), "the file is empty")
    if b"\x00" in raw[:4096]:
        raise FileFormatError(str(path), "binary file; expected CSV text or JCAMP-DX")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        return raw.decode("latin-1")  # JCAMP-DX is ASCII; old exports use Latin-1 comments


def _unit_from_header(name: str) -> str | None:
    low = name.lower()
    if "ppm" in low:
        return "ppm"
    if re.search(r"hz\b|hz\)|hz]|_hz|\bhertz", low):
        return "Hz"
    return None


def _number(text: str, decimal_comma: bool) -> float:
    t = text.strip()
    if decimal_comma:
        t = t.replace(",", ".")
    value = float(t)
    if not math.isfinite(value):
        raise ValueError("not finite")
    return value


def _delimiter(line: str) -> str | None:
    for delim in ("\t", ";", ","):
        if delim in line:
            return delim
    return None  # blanks


def parse_csv_spectrum(text: str, source: str) -> Spectrum:
    """Parse the CSV form (see module docstring); any bad line raises FileFormatError with its number."""
    from registry.record.units import parse_value

    meta: dict[str, tuple[int, str]] = {}
    # comprehensions, not a statement loop: 16k-line spectra are the normal case
    lines = [(n, line.strip()) for n, line in enumerate(text.splitlines(), start=1)]
    for lineno, line in (x for x in lines if x[1].startswith("#")):
        m = _META_RE.match(line)
        if m:
            meta[m["key"].strip().lower()] = (lineno, m["value"])
    rows = [x for x in lines if x[1] and not x[1].startswith("#")]
    delim: str | None = None
    header: list[str] | None = None
    if rows:
        delim = _delimiter(rows[0][1])
        fields = _split(rows[0][1], delim)
        if not _looks_numeric(fields, delim):
            header = fields
            rows = rows[1:]
    if not rows:
        raise FileFormatError(source, "no data rows")
    xs, ys = _columns(rows, delim, source)
    _check_axis(xs, [r[0] for r in rows], source)
    x_unit = _unit_from_header(header[0]) if header else None
    observe = None
    t_k = t_text = None
    for key, (lineno, value) in meta.items():
        try:
            if key in _TEMPERATURE_KEYS:
                parsed = parse_value(value, "temperature", field="temperature")
                t_k, t_text = parsed.value, value
            elif key in _FIELD_KEYS:
                observe = parse_value(value, "field", field=key, default_unit="MHz").value
        except UnitError as exc:
            raise FileFormatError(source, f"line {lineno}: {exc}") from exc
    return Spectrum(xs, ys, x_unit, source, observe, t_k, t_text)


def _columns(
    rows: list[tuple[int, str]], delim: str | None, source: str
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """First two columns as floats: one vectorised conversion, or a line-by-line hunt for the
    line that breaks it (so the message can name that line)."""
    decimal_comma = delim in (";", "\t")
    body = "\n".join(r[1] for r in rows)
    if decimal_comma:
        body = body.replace(",", ".")
    if delim is not None:
        body = body.replace(delim, " ")
    tokens = body.split()
    n = len(rows)
    if len(tokens) % n == 0 and len(tokens) // n >= 2 and '"' not in body:
        try:
            table = np.array(tokens, dtype=float).reshape(n, len(tokens) // n)
        except ValueError:
            table = None
        if table is not None and np.isfinite(table[:, :2]).all():
            return table[:, 0].copy(), table[:, 1].copy()
    xs = np.empty(n)
    ys = np.empty(n)
    for i, (lineno, line) in enumerate(rows):
        fields = _split(line, delim)
        if len(fields) < 2:
            raise FileFormatError(
                source, f"line {lineno}: expected two columns (shift, intensity), found {line!r}"
            )
        for j, target in ((0, xs), (1, ys)):
            try:
                target[i] = _number(fields[j], decimal_comma)
            except ValueError as exc:
                raise FileFormatError(
                    source, f"line {lineno}: cannot read {fields[j]!r} as a number"
                ) from exc
    return xs, ys


def _split(line: str, delim: str | None) -> list[str]:
    if delim is None:
        return line.split()
    return [f.strip() for f in next(csv.reader([line], delimiter=delim))]


def _looks_numeric(fields: list[str], delim: str | None) -> bool:
    try:
        for f in fields[:2]:
            _number(f, delim in (";", "\t"))
    except ValueError:
        return False
    return len(fields) >= 2


def _check_axis(xs: NDArray[np.float64], linenos: list[int], source: str) -> None:
    """The abscissa must run one way without repeats, as any sampled spectrum does."""
    if len(xs) < 2:
        raise FileFormatError(source, "a spectrum needs at least two points")
    steps = np.diff(xs)
    sign = np.sign(steps[0])
    bad = np.nonzero(np.sign(steps) != sign)[0] if sign != 0 else np.array([0])
    if len(bad):
        lineno = linenos[int(bad[0]) + 1]
        raise FileFormatError(
            source, f"line {lineno}: the shift column repeats or changes direction"
        )


def csv_text(
    x: NDArray[np.float64],
    intensity: NDArray[np.float64],
    x_unit: str,
    comments: dict[str, str] | None = None,
) -> str:
    """The CSV form of a spectrum, readable back by :func:`parse_csv_spectrum`."""
    if x_unit not in X_UNITS:
        raise ValueError(f"x_unit must be one of {X_UNITS}")
    out = io.StringIO()
    for key, value in (comments or {}).items():
        out.write(f"# {key}: {value}\n")
    out.write(f"{'shift_ppm' if x_unit == 'ppm' else 'frequency_hz'},intensity\n")
    for xv, yv in zip(x, intensity, strict=True):
        out.write(f"{xv:.9g},{yv:.9g}\n")
    return out.getvalue()
