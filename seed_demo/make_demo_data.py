"""Regenerate the demo spreadsheets of the invented Halvorsen group (see README.md).

    .venv/bin/python seed_demo/make_demo_data.py

Everything here is invented except the structures, which are real, publicly known compounds.
Clean entries get ΔG‡ computed correctly from their Tc and Δν (and J) with registry.kinetics,
after reading the written texts through registry.record.units exactly as the importer will, so that the
validation rules find nothing on them. The planted slips (README.md) are computed with the
mistake in question. Rate points follow the Eyring equation for the ΔH‡/ΔS‡ chosen here, with a
small fixed scatter.
"""

from __future__ import annotations

import csv
import math
from pathlib import Path

from openpyxl import Workbook

from registry.kinetics import coalescence_barrier, eyring_barrier, eyring_rate
from registry.kinetics.constants import R_KJ_MOL_K
from registry.record.units import convert, parse_value

HERE = Path(__file__).resolve().parent
KCAL = convert(1.0, "kcal/mol", "kJ/mol")  # 4.184 kJ per kcal (thermochemical calorie)
CAL = convert(1.0, "cal/(mol*K)", "J/(mol*K)")  # 4.184 J per e.u.

# label, compound code, name, SMILES, process, nucleus, sites, solvent, field MHz,
# Tc text (header °C), Δν text (header Hz), J text, method, slip
WORKBOOK_COALESCENCE = [
    ("HG-01", "HG-A1", "N,N-dimethylbenzamide", "CN(C)C(=O)c1ccccc1", "amide rotation", "1H", "N-CH3", "CDCl3", 400, "12", "38.5", None, "coalescence", None),
    ("HG-02", "HG-A1", "N,N-dimethylbenzamide", "CN(C)C(=O)c1ccccc1", "amide rotation", "1H", "N-CH3", "tol-d8", 500, "5", "52.0", None, "coalescence", None),
    ("HG-03", "HG-A2", "N,N-dimethylthioacetamide", "CC(=S)N(C)C", "amide rotation", "1H", "N-CH3", "DMSO-d6", 400, "108", "0.090 ppm", None, "coalescence", None),
    ("HG-04", "HG-A3", "N,N-diethylacetamide", "CCN(CC)C(C)=O", "amide rotation", "1H", "N-CH2", "CDCl3", 400, "48", "12.4", None, "coalescence", None),
    ("HG-05", "HG-A4", "methyl N,N-dimethylcarbamate", "COC(=O)N(C)C", "amide rotation", "1H", "N-CH3", "CD2Cl2", 400, "268 K", "8.2", None, "coalescence", None),
    ("HG-06", "HG-A5", "N,N-dimethylacrylamide", "C=CC(=O)N(C)C", "amide rotation", "1H", "N-CH3", "CDCl3", 300, "32", "24.0", None, "coalescence", None),
    ("HG-07", "HG-A6", "1-acetylpiperidine", "CC(=O)N1CCCCC1", "amide rotation", "1H", "N-CH2 (C2/C6)", "CDCl3", 400, "313 K", "46.0", None, "coalescence", "kcal-as-kj"),
    ("HG-08", "HG-A7", "N,N-dimethyl-2-furamide", "CN(C)C(=O)c1ccco1", "amide rotation", "1H", "N-CH3", "acetone-d6", 400, "30", "30.0", None, "coalescence", None),
    ("HG-09", "HG-A8", "N,N-dimethylcarbamoyl chloride", "CN(C)C(=O)Cl", "amide rotation", "1H", "N-CH3", "CDCl3", 400, "20", "10.5", None, "coalescence", None),
    ("HG-10", "HG-B1", "2,2'-diisopropylbiphenyl", "CC(C)c1ccccc1-c1ccccc1C(C)C", "biaryl rotation", "1H", "iPr CH3 (diastereotopic)", "TCE-d2", 400, "121", "9.5", None, "coalescence", None),
    ("HG-11", "HG-B2", "2-isopropyl-2'-methylbiphenyl", "CC(C)c1ccccc1-c1ccccc1C", "biaryl rotation", "1H", "iPr CH3 (diastereotopic)", "tol-d8", 500, "86", "11.0", None, "coalescence", None),
    ("HG-14", "HG-C1", "1,3-dioxane", "C1COCOC1", "ring flip", "1H", "H-2 ax/eq", "CD2Cl2", 400, "-85", "28.0", None, "coalescence", None),
    ("HG-15", "HG-A9", "N,N-dimethylthiobenzamide", "CN(C)C(=S)c1ccccc1", "amide rotation", "1H", "N-CH3", "tol-d8", 400, "95", "62.0", None, "coalescence", "tc-celsius-as-kelvin"),
    ("HG-16", "HG-C2", "1,3,5-trioxane", "C1OCOCO1", "ring flip", "1H", "CH2 ax/eq", "CD2Cl2", 400, "-60", "30.0", None, "coalescence", None),
    ("HG-17", "HG-C3", "tetrahydropyran", "C1CCOCC1", "ring flip", "13C", "C3/C5", "CD2Cl2", 400, "-70", "180", None, "coalescence", None),
    ("HG-18", "HG-C4", "1-methylpiperidine", "CN1CCCCC1", "ring flip", "13C", "C3/C5", "CD2Cl2", 400, "-62", "150", None, "coalescence", None),
    ("HG-19", "HG-C5", "thiane", "C1CCSCC1", "ring flip", "1H", "H-2 ax/eq", "CD2Cl2", 500, "-80", "25.0", None, "coalescence", None),
    ("HG-20", "HG-D1", "1-benzyl-2,2-dimethylaziridine", "CC1(C)CN1Cc1ccccc1", "N-inversion", "1H", "C(CH3)2", "CDCl3", 400, "45", "10.0", None, "coalescence", None),
    ("HG-21", "HG-D2", "1,2,2-trimethylaziridine", "CN1CC1(C)C", "N-inversion", "1H", "C(CH3)2", "DMSO-d6", 400, "145", "6.0", None, "coalescence", "kc-pi-dnu"),
    ("HG-22", "HG-D3", "1-benzyl-2-methylaziridine", "CC1CN1Cc1ccccc1", "N-inversion", "1H", "N-CH2Ph (AB)", "CDCl3", 400, "35", "24.0", "13.5 Hz", "coalescence", None),
    ("HG-23", "HG-E1", "dicarbonyl(η5-cyclopentadienyl)(η1-cyclopentadienyl)iron", "O=C=[Fe+](=C=O)C1C=CC=C1.c1cc[cH-]c1", "ring whizzing", "1H", "η1-C5H5 ring H", "CD2Cl2", 400, "-40", "0.85 ppm", None, "coalescence", None),
    ("HG-24", "HG-A10", "N,N-dimethylnicotinamide", "CN(C)C(=O)c1cccnc1", "amide rotation", "1H", "N-CH3", "CDCl3", 400, "25", "22.0", None, "coalescence", None),
    ("HG-25", "HG-A11", "1-formylpiperidine", "O=CN1CCCCC1", "amide rotation", "13C", "C2/C6", "CDCl3", 400, "56", "540", None, "coalescence", None),
    ("HG-26", "HG-A12", "1-benzoylpiperidine", "O=C(c1ccccc1)N1CCCCC1", "amide rotation", "1H", "N-CH2 (C2/C6)", "acetone-d6", 400, "10", "45.0", None, "coalescence", None),
]  # fmt: skip

# label, code, name, SMILES, process, nucleus, sites, solvent, method, ΔH‡ kJ/mol, ΔS‡ e.u.,
# rate temperatures °C, give Ea?
WORKBOOK_RATES = [
    ("HG-12", "HG-B3", "1,1'-binaphthyl", "c1ccc2c(c1)cccc2-c1cccc2ccccc12", "racemization", None, "", "C6D6", "chiral HPLC", 95.5, -1.5, (35, 40, 45, 50, 55, 60), False),
    ("HG-13", "HG-B4", "1-(2-methylphenyl)naphthalene", "Cc1ccccc1-c1cccc2ccccc12", "biaryl rotation", "1H", "Ar-CH3", "TCE-d2", "DNMR", 78.0, -3.0, (80, 90, 100, 110, 120, 130), True),
]  # fmt: skip

# label, name, SMILES, process, solvent, spectrometer, Tc text (header K), Δν ppm text, J, method, slip
LITERATURE = [
    ("LIT-01", "N,N-dimethylpropanamide", "CCC(=O)N(C)C", "amide rotation", "CDCl3", "400 MHz", "323", "0.080", None, "coalescence", None),
    ("LIT-02", "N,N-dimethyl-4-nitrobenzamide", "CN(C)C(=O)c1ccc([N+](=O)[O-])cc1", "amide rotation", "acetone-d6", "400 MHz", "301", "0.105", None, "coalescence", None),
    ("LIT-03", "4-methoxy-N,N-dimethylbenzamide", "COc1ccc(C(=O)N(C)C)cc1", "amide rotation", "CDCl3", "400 MHz", "-10 °C", "0.095", None, "coalescence", None),
    ("LIT-04", "N,N-diisopropylacetamide", "CC(=O)N(C(C)C)C(C)C", "amide rotation", "DMSO-d6", "300 MHz", "368", "0.120", None, "coalescence", None),
    ("LIT-05", "N,N-dimethylpivalamide", "CC(C)(C)C(=O)N(C)C", "amide rotation", "CD2Cl2", "300 MHz", "248", "0.150", None, "coalescence", "dnu-ppm-as-hz"),
    ("LIT-06", "1,3-dithiane", "C1CSCSC1", "ring inversion", "CD2Cl2", "500 MHz", "203", "0.110", None, "coalescence", None),
    ("LIT-07", "1,4-dioxane", "C1COCCO1", "ring inversion", "CD2Cl2", "400 MHz", "-90 °C", "0.070", None, "coalescence", None),
    ("LIT-08", "4-methylmorpholine", "CN1CCOCC1", "ring inversion", "CD2Cl2", "400 MHz", "213", "0.085", None, "coalescence", None),
    ("LIT-09", "1-benzyl-2,2-dimethylaziridine", "CC1(C)CN1Cc1ccccc1", "nitrogen inversion", "toluene-d8", "400 MHz", "331", "0.060", "13.2", "coalescence", "coupled-as-uncoupled"),
    ("LIT-10", "1-methylaziridine", "CN1CC1", "nitrogen inversion", "DMSO-d6", "400 MHz", "378", "0.180", None, "coalescence", None),
    ("LIT-11", "2,2'-diisopropylbiphenyl", "CC(C)c1ccccc1-c1ccccc1C(C)C", "biaryl rotation", "DMSO-d6", "500 MHz", "396", "0.022", None, "coalescence", None),
    ("LIT-12", "N,N-dimethyl-2-phenylacetamide", "CN(C)C(=O)Cc1ccccc1", "amide rotation", "CDCl3", "400 MHz", "310", "0.090", None, "coalescence", None),
    ("LIT-13", "1-acetylindoline", "CC(=O)N1CCc2ccccc21", "amide rotation", "DMSO-d6", "400 MHz", "352", "0.410", None, "coalescence", None),
    ("LIT-14", "N,N-dimethylcinnamamide", "CN(C)C(=O)/C=C/c1ccccc1", "amide rotation", "CDCl3", "400 MHz", "39 °C", "0.100", None, "coalescence", None),
]  # fmt: skip

#: fixed relative scatter of the invented rate constants
SCATTER = (0.015, -0.012, 0.008, -0.015, 0.011, -0.007)


def _tc_k(text: str, header_unit: str) -> float:
    return parse_value(text, "temperature", default_unit=header_unit).value


def _dnu_hz(text: str, header_unit: str, field_mhz: float) -> float:
    return parse_value(text, "shift", default_unit=header_unit, spectrometer_mhz=field_mhz).value


def coalescence_dg(tc_k: float, dnu_hz: float, j_hz: float | None, slip: str | None) -> float:
    """ΔG‡ (kJ/mol) at Tc, done right (Gutowsky–Holm / Kurland for AB) or with the planted slip."""
    if slip == "kc-pi-dnu":
        return float(eyring_barrier(math.pi * dnu_hz, tc_k))
    if slip == "tc-celsius-as-kelvin":
        k_c = math.pi * dnu_hz / math.sqrt(2.0)
        return float(eyring_barrier(k_c, tc_k - 273.15))
    if slip == "coupled-as-uncoupled":
        return float(coalescence_barrier(tc_k, dnu_hz).dg_kj_mol)
    return float(coalescence_barrier(tc_k, dnu_hz, j_hz).dg_kj_mol)


def workbook_rows() -> tuple[list[list[object]], list[list[object]]]:
    entries: list[list[object]] = []
    for (
        label, code, name, smiles, process, nucleus, sites, solvent, mhz, tc, dnu, j, method, slip,
    ) in WORKBOOK_COALESCENCE:  # fmt: skip
        tc_k = _tc_k(tc, "°C")
        dnu_hz = _dnu_hz(dnu, "Hz", mhz)
        j_hz = parse_value(j, "frequency").value if j else None
        dg = coalescence_dg(tc_k, dnu_hz, j_hz, slip)
        if slip == "kcal-as-kj":
            dg_cell: object = f"{dg / KCAL:.1f} kJ/mol"  # the kcal number, labelled kJ
        elif label in ("HG-05", "HG-17"):
            dg_cell = f"{dg:.1f} kJ/mol"  # some rows typed in kJ although the header says kcal
        elif slip is not None:
            dg_cell = round(dg / KCAL, 2)  # a small slip: quoted to 0.01 so it stays visible
        else:
            dg_cell = round(dg / KCAL, 1)
        entries.append(
            [
                label, code, name, smiles, process, nucleus, sites, solvent, mhz,
                _number_or_text(tc), _number_or_text(dnu), j, dg_cell, method,
                None, None, None, None, f"HG notebook {2 + int(label[3:]) // 10}, p. {10 + int(label[3:]) * 3}",
                "invented demo value", ("IH", "MB", "SK")[int(label[3:]) % 3],
            ]
        )  # fmt: skip
    rates: list[list[object]] = []
    for (
        label, code, name, smiles, process, nucleus, sites, solvent, method, dh, ds_eu, temps, give_ea,
    ) in WORKBOOK_RATES:  # fmt: skip
        ds = ds_eu * CAL
        t_ref = 298.15
        dg_ref = dh - t_ref * ds / 1000.0
        t_list = [convert(t, "degC", "K") for t in temps]
        ea = dh + R_KJ_MOL_K * sum(t_list) / len(t_list) if give_ea else None
        entries.append(
            [
                label, code, name, smiles, process, nucleus, sites, solvent, None, None, None, None,
                round(dg_ref / KCAL, 2), method, round(dh, 1), round(ds_eu, 1), t_ref,
                round(ea, 1) if ea is not None else None,
                f"HG notebook 5, p. {int(label[3:]) * 2}", "invented demo value", "MB",
            ]
        )  # fmt: skip
        for t_c, t_k, scatter in zip(temps, t_list, SCATTER, strict=True):
            k = float(eyring_rate(dh - t_k * ds / 1000.0, t_k)) * (1.0 + scatter)
            rates.append([label, t_c, float(f"{k:.3g}"), float(f"{0.05 * k:.2g}")])
    return entries, rates


def _number_or_text(text: str) -> object:
    """Cells as a group types them: plain numbers as numbers, numbers with a unit as text."""
    try:
        value = float(text)
    except ValueError:
        return text
    return int(value) if value.is_integer() else value


def literature_rows() -> list[list[object]]:
    rows: list[list[object]] = []
    for label, name, smiles, process, solvent, spectro, tc, dnu, j, method, slip in LITERATURE:
        mhz = parse_value(spectro, "field").value
        tc_k = _tc_k(tc, "K")
        dnu_hz = _dnu_hz(dnu, "ppm", mhz)
        j_hz = parse_value(j, "frequency", default_unit="Hz").value if j else None
        if slip == "dnu-ppm-as-hz":
            dg = coalescence_dg(tc_k, float(dnu), j_hz, None)  # the ppm number taken as Hz
        else:
            dg = coalescence_dg(tc_k, dnu_hz, j_hz, slip)
        rows.append(
            [
                name, smiles, process, solvent, spectro, tc, dnu, j or "", f"{dg:.1f}", method,
                f"invented reference {label} (demo)", label,
                "value re-derived by the group" if int(label[4:]) % 4 == 0 else "",
            ]
        )  # fmt: skip
    return rows


ENTRY_HEADERS = [
    "label", "compound", "name", "SMILES", "process", "nucleus", "sites", "solvent",
    "field (MHz)", "Tc (°C)", "Δν (Hz)", "J_AB / Hz", "ΔG‡ (kcal/mol)", "method",
    "ΔH‡ (kJ/mol)", "ΔS‡ (e.u.)", "T (K)", "Ea [kJ/mol]", "notebook", "ref", "operator",
]  # fmt: skip
RATE_HEADERS = ["label", "T (°C)", "k (s-1)", "σ_k"]
LITERATURE_HEADERS = [
    "Compound name", "SMILES", "Process", "Solvent", "Spectrometer", "T_c/K",
    "delta nu (ppm)", "J (Hz)", "dG# / kJ mol-1", "Method", "DOI", "Measurement", "comment",
]  # fmt: skip


def main() -> None:
    entries, rates = workbook_rows()
    book = Workbook()
    sheet = book.active
    sheet.title = "entries"
    sheet.append(ENTRY_HEADERS)
    for row in entries:
        sheet.append(row)
    rate_sheet = book.create_sheet("rates")
    rate_sheet.append(RATE_HEADERS)
    for row in rates:
        rate_sheet.append(row)
    notes = book.create_sheet("notes")
    notes.append(["Invented demo data: the Halvorsen group does not exist."])
    notes.append(["Structures are real, public compounds; every number is invented."])
    book.save(HERE / "halvorsen_barriers.xlsx")
    # written as Windows-1252, the way a spreadsheet program on Windows saves "CSV"
    with (HERE / "literature_barriers.csv").open("w", newline="", encoding="cp1252") as fh:
        writer = csv.writer(fh)
        writer.writerow(LITERATURE_HEADERS)
        writer.writerows(literature_rows())
    print(f"wrote {len(entries)} workbook entries, {len(rates)} rate points, ", end="")
    print(f"{len(LITERATURE)} literature rows")


if __name__ == "__main__":
    main()
