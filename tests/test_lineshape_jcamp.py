"""The JCAMP-DX reader on small files written here, plain and compressed, and on broken ones.

Compression characters as defined by McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988)
(JCAMP-DX 4.24): SQZ @=0, A–I = +1…+9, a–i = −1…−9 (first digit with sign); DIF % = 0,
J–R = +1…+9, j–r = −1…−9; DUP S–Z, s = 1…9 (total count of the repeated item); after a line
ending in DIF form the next line repeats the last value (Y check). ##TEMPERATURE is in °C
unless a unit is written (JCAMP-DX 4.24; from memory); ##$TE is the vendor label in K.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from registry.errors import FileFormatError
from registry.lineshape.jcamp import decode_asdf_line, normalise_label, parse_jcamp
from registry.lineshape.spectrum import read_spectrum

# ten ordinates, written below in every form; x runs 10 → 1 (decreasing, as NMR ppm often does)
VALUES = [100, 102, 105, 105, 105, 101, 98, 98, 96, 90]

HEADER = """##TITLE= test spectrum
##JCAMP-DX= 4.24
##DATA TYPE= NMR SPECTRUM
##.OBSERVE FREQUENCY= 400.13
##XUNITS= PPM
##YUNITS= ARBITRARY UNITS
##FIRSTX= 10.0
##LASTX= 1.0
##XFACTOR= 1.0
##YFACTOR= 0.5
##NPOINTS= 10
##TEMPERATURE= -20.5
"""

FORMS = {
    "affn": "10 100 102 105 105 105\n5 101 98 98 96 90\n",
    "pac": "10+100+102+105+105+105\n5+101+98+98+96+90\n",
    "affn-exponent": "10 1.00E+02 1.02e2 105 105 105\n5.0 101,98,98,96;90\n",
    "sqz": "10A00A02A05A05A05\n5A01I8I8I6I0\n",
    "sqz-dup": "10A00A02A05U\n5A01I8TI6I0\n",
    # DIF with DUP; each line after a DIF line starts with the Y check (the last value again)
    "difdup": "10A00KL%T\n6A05ml%ko\n1I0\n",
}


def _file(body: str, header: str = HEADER) -> str:
    return f"{header}##XYDATA=(X++(Y..Y))\n{body}##END=\n"


@pytest.mark.parametrize("form", sorted(FORMS))
def test_every_form_gives_the_same_spectrum(form: str) -> None:
    spec = parse_jcamp(_file(FORMS[form]), "t.dx")
    np.testing.assert_allclose(spec.intensity, np.array(VALUES) * 0.5)
    np.testing.assert_allclose(spec.x, np.linspace(10.0, 1.0, 10))
    assert spec.x_unit == "ppm"
    assert spec.observe_mhz == pytest.approx(400.13)
    assert spec.t_k == pytest.approx(252.65)  # −20.5 °C
    assert spec.t_text == "-20.5 °C"
    np.testing.assert_allclose(spec.frequency_hz(), np.linspace(10.0, 1.0, 10) * 400.13)


def test_decoder_pieces() -> None:
    assert decode_asdf_line("1@A1a1J", "f", 1) == ([1.0, 0.0, 11.0, -11.0, -10.0], True)
    assert decode_asdf_line("0 A0 S", "f", 1) == ([0.0, 10.0], False)  # S: count 1, no repeat
    assert decode_asdf_line("0A0JV", "f", 1) == ([0.0, 10.0, 11.0, 12.0, 13.0, 14.0], True)
    assert decode_asdf_line("1 2.5 -3", "f", 1) == ([1.0, 2.5, -3.0], False)
    assert normalise_label(".Observe Frequency") == ".OBSERVEFREQUENCY"
    assert normalise_label("X_Units") == "XUNITS"


def test_long_difdup_round_trip(tmp_path: Path) -> None:
    """A test-local DIFDUP writer (independent of the reader) on 1,000 integer ordinates."""
    rng = np.random.default_rng(4)
    ys = np.cumsum(rng.integers(-40, 41, 1000))
    ys[300:340] = ys[299]  # a flat run so DUP is exercised

    def sqz(v: int) -> str:
        s = str(abs(v))
        return ("@ABCDEFGHI" if v >= 0 else "@abcdefghi")[int(s[0])] + s[1:]

    def dif(v: int) -> str:
        s = str(abs(v))
        return ("%JKLMNOPQR" if v >= 0 else "%jklmnopqr")[int(s[0])] + s[1:]

    def dup(n: int) -> str:
        s = str(n)
        return "@STUVWXYZs"[int(s[0])] + s[1:]

    lines = []
    start = 0
    while start < len(ys):
        chunk = ys[start : start + 25]
        tokens = [sqz(int(chunk[0]))]
        diffs = np.diff(chunk)
        i = 0
        while i < len(diffs):
            j = i
            while j + 1 < len(diffs) and diffs[j + 1] == diffs[i]:
                j += 1
            tokens.append(dif(int(diffs[i])) + (dup(j - i + 1) if j > i else ""))
            i = j + 1
        lines.append(f"{start} " + "".join(tokens))
        start += len(chunk) - 1  # the last value is repeated as the next line's Y check
        if start == len(ys) - 1:
            lines.append(f"{start} {sqz(int(ys[-1]))}")
            break
    header = (
        "##TITLE= long\n##JCAMP-DX= 5.01\n##XUNITS= HZ\n##FIRSTX= 0\n##LASTX= 999\n"
        "##NPOINTS= 1000\n##$TE= 253.2\n"
    )
    path = tmp_path / "long.jdx"
    path.write_text(_file("\n".join(lines) + "\n", header), encoding="ascii")
    spec = read_spectrum(path)
    np.testing.assert_array_equal(spec.intensity, ys)
    assert spec.x_unit == "Hz" and spec.t_k == pytest.approx(253.2) and spec.t_text == "253.2 K"


def test_xypoints() -> None:
    text = (
        "##TITLE= pts\n##XUNITS= HZ\n##XFACTOR= 2\n##NPOINTS= 3\n##XYPOINTS=(XY..XY)\n"
        "1.0, 5.0; 2.0, 6.0\n3.0, 7.0 $$ a comment\n##END=\n"
    )
    spec = parse_jcamp(text, "p.dx")
    np.testing.assert_allclose(spec.x, [2.0, 4.0, 6.0])
    np.testing.assert_allclose(spec.intensity, [5.0, 6.0, 7.0])


def test_temperature_with_a_unit_and_without_one() -> None:
    kelvin = HEADER.replace("##TEMPERATURE= -20.5", "##TEMPERATURE= 298.2 K")
    assert parse_jcamp(_file(FORMS["affn"], kelvin), "t.dx").t_k == pytest.approx(298.2)
    none = HEADER.replace("##TEMPERATURE= -20.5\n", "")
    assert parse_jcamp(_file(FORMS["affn"], none), "t.dx").t_k is None


BAD = {
    "missing NPOINTS": (
        _file(FORMS["affn"], HEADER.replace("##NPOINTS= 10\n", "")),
        "t.dx: missing ##NPOINTS= needed to read the data",
    ),
    "wrong count": (
        _file(FORMS["affn"], HEADER.replace("##NPOINTS= 10", "##NPOINTS= 11")),
        "t.dx: line 15: ##XYDATA holds 10 points but ##NPOINTS= says 11",
    ),
    "wrong x": (
        _file("10 100 102 105 105 105\n3 101 98 98 96 90\n"),
        "t.dx: line 15: X = 3 but point 6 should be at 5 (missing or extra values before "
        "this line?)",
    ),
    "short": (
        _file("10 100 102 105 105 105\n5 101 98 98 96\n"),
        "t.dx: line 15: ##XYDATA holds 9 points but ##NPOINTS= says 10",
    ),
    "unreadable": (
        _file("10 100 102 105 105 105\n5 101 9x8 98 96 90\n"),
        "t.dx: line 15: cannot read 'x8' as a number",
    ),
    "bad y check": (
        _file("10A00KL%T\n6A04ml%ko\n1I0\n"),
        "t.dx: line 15: Y check value 104 differs from the last value 105 of the previous "
        "line (damaged DIF data)",
    ),
    "missing value": (
        _file("10 100 102 105 ? 105\n5 101 98 98 96 90\n"),
        "t.dx: line 14: missing value '?' is not supported",
    ),
    "bad compressed": (
        _file("10A00KL%T\n6A05ml%k#o\n1I0\n"),
        "t.dx: line 15: unexpected character '#' in '6A05ml%k#o'",
    ),
    "ntuples": (
        HEADER + "##NTUPLES= NMR FID\n##END=\n",
        "t.dx: line 13: NTUPLES data (FID, complex or nD) are not supported; export the "
        "processed real 1D spectrum as ##XYDATA",
    ),
    "wrong unit": (
        _file(FORMS["affn"], HEADER.replace("PPM", "NANOMETERS")),
        "t.dx: line 5: ##XUNITS= 'NANOMETERS': an NMR spectrum in HZ or PPM is needed",
    ),
    "no data": (HEADER + "##END=\n", "t.dx: no ##XYDATA= or ##XYPOINTS= spectrum found"),
    "bad factor": (
        _file(FORMS["affn"], HEADER.replace("##YFACTOR= 0.5", "##YFACTOR= half")),
        "t.dx: line 10: ##YFACTOR= 'half' is not a number",
    ),
    "kelvin without unit": (
        _file(FORMS["affn"], HEADER.replace("-20.5", "298")),
        "t.dx: line 12: ##TEMPERATURE= 298 has no unit; JCAMP-DX means °C",
    ),
    "no labels": ("just text\n", "t.dx: no JCAMP-DX labels (##LABEL=) found"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_files_name_file_and_line(case: str) -> None:
    text, message = BAD[case]
    with pytest.raises(FileFormatError) as info:
        parse_jcamp(text, "t.dx")
    assert str(info.value).startswith(message)
    assert info.value.file == "t.dx"


def test_a_huge_repeat_count_is_refused_before_it_takes_memory() -> None:
    # DUP "V" is the leading digit 4 of the repeat count (McDonald & Wilks 1988): 4,999,999,999
    with pytest.raises(FileFormatError) as info:
        decode_asdf_line("0 1 2 V999999999", "t.dx", 12)
    assert str(info.value) == (
        "t.dx: line 12: a run of 4,999,999,999 repeats at 'V999999999' gives more points than a "
        "spectrum holds (at most 4,194,304)"
    )


def test_a_huge_point_count_is_refused() -> None:
    header = HEADER.replace("##NPOINTS= 10", "##NPOINTS= 1e12")
    with pytest.raises(
        FileFormatError, match=r"##NPOINTS= must be a whole number from 2 to 4,194,304"
    ):
        parse_jcamp(_file(FORMS["affn"], header), "t.dx")
