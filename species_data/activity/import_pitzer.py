"""Re-runnable import of the Pitzer parameters for Na-K-Mg-Ca-H-Cl-SO4-HCO3-CO3-OH at 25 °C.

Reads the PITZER block of the ``pitzer.dat`` file that the registry package
``pygcc`` ships (a PHREEQC-format compilation whose 25 °C values for this
system are those of Harvie, Møller & Weare 1984) and writes
``pitzer_hmw84.csv`` beside this script: one row per parameter (beta0, beta1,
beta2, cphi, theta, psi) with the 25 °C value only (the first number of each
line; the temperature terms are not used). Only ions of the HMW84 system are
kept.

Run:  python species_data/activity/import_pitzer.py
(needs ``pygcc``, a test-only dependency; the CSV is what the package reads).

Reference: Harvie, C. E., Møller, N. & Weare, J. H. (1984). The prediction of
mineral solubilities in natural waters: the Na-K-Mg-Ca-H-Cl-SO4-OH-HCO3-CO3-CO2-H2O
system to high ionic strengths at 25 °C. Geochim. Cosmochim. Acta 48, 723-751.
doi:10.1016/0016-7037(84)90098-X
"""

from __future__ import annotations

import csv
import importlib.util
from pathlib import Path

IONS = {"Na+", "K+", "Mg+2", "Ca+2", "H+", "Cl-", "SO4-2", "HCO3-", "CO3-2", "OH-"}
KINDS = {
    "-B0": "beta0",
    "-B1": "beta1",
    "-B2": "beta2",
    "-C0": "cphi",
    "-THETA": "theta",
    "-PSI": "psi",
}
# our formula notation for the file's ion names
NAMES = {
    "Na+": "Na^+",
    "K+": "K^+",
    "Mg+2": "Mg^2+",
    "Ca+2": "Ca^2+",
    "H+": "H^+",
    "Cl-": "Cl^-",
    "SO4-2": "SO4^2-",
    "HCO3-": "HCO3^-",
    "CO3-2": "CO3^2-",
    "OH-": "OH^-",
}


def source_file():
    """The pitzer.dat file shipped by pygcc."""
    spec = importlib.util.find_spec("pygcc")
    return Path(spec.origin).parent / "default_db" / "pitzer.dat"


def read_rows(path):
    """Parameter rows (kind, ion, ion, ion or "", value) of the HMW84 ions, 25 °C values."""
    rows, kind, inside = [], None, False
    for line in Path(path).read_text(encoding="utf-8", errors="replace").splitlines():
        text = line.split("#", 1)[0].strip()
        if not text:
            continue
        if text == "PITZER":
            inside = True
            continue
        if not inside:
            continue
        if len(text.split()) == 1 and text.isupper() and not text.startswith("-"):
            break  # the next keyword block
        if text.startswith("-"):
            kind = KINDS.get(text.split()[0])
            continue
        if kind is None:
            continue
        parts = text.split()
        n_ions = 3 if kind == "psi" else 2
        ions, value = parts[:n_ions], float(parts[n_ions])
        if set(ions) <= IONS:
            rows.append((kind, *[NAMES[i] for i in ions], *([""] * (3 - n_ions)), value))
    return rows


def main():
    """Write pitzer_hmw84.csv beside this script."""
    src = source_file()
    out = Path(__file__).with_name("pitzer_hmw84.csv")
    rows = read_rows(src)
    with out.open("w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, lineterminator="\n")
        f.write("# Pitzer parameters at 25 °C: Harvie, Møller & Weare 1984 (GCA 48 p. 723)\n")
        f.write("# read by import_pitzer.py from pygcc default_db/pitzer.dat; do not edit\n")
        w.writerow(["kind", "ion_1", "ion_2", "ion_3", "value", "source"])
        for kind, a, b, c, v in rows:
            w.writerow([kind, a, b, c, repr(v), "HMW84"])
    print(f"wrote {len(rows)} parameters to {out}")


if __name__ == "__main__":
    main()
