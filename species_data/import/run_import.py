"""Write the imported species tables from compilations shipped in registry packages.

Run by maintainers, never at install time::

    python species_data/import/run_import.py            # rewrite species_data/
    python species_data/import/run_import.py --out DIR  # write into DIR instead

Sources read (both as installed in the environment):

* the LLNL ``thermo.com.V8.R6`` data file shipped by ``pygcc``
  (``pygcc/default_db/thermo.com.dat``): delG0f, delH0f and S0 of aqueous
  species and minerals with a reference code per species; the code is mapped
  to the original publication through the file's own reference list;
* the CRC Handbook table of standard thermodynamic properties shipped by
  ``chemicals`` (element entropies where the LLNL file has no native element).

Parameters for temperature routes come from the SUPCRT file ``speq21.dat``
(pygcc): revised-HKF a1-a4, c1, c2, omega of aqueous species (unscaled from the
printed a1 x 10, a2 x 10^-2, a4 x 10^-4, c2 x 10^-4, omega x 10^-5) and
Maier-Kelley a, b, c (cal x 4.184; b x 10^-3, c x 10^5), V and phase transitions
of minerals. They fill only empty columns, in the generated tables and in the
hand-typed ones; ``hkf_source`` names their publication (for minerals, that of
the Maier-Kelley and volume values). A transition printed without an enthalpy
(999999: a change of the Cp fit, such as the magnetite Curie point) is written
with dh 0.

Every row is checked against the file's own log K at 25 C: the Gibbs energy
implied by the species' reaction (with the file's values of the other species)
must agree with its printed delG0f within 1 kJ/mol, otherwise the species is
left out and listed in ``import_report.txt`` (this catches, e.g., a value
printed in kcal/mol but labelled kJ/mol).

References
----------
Delany, J. M.; Lundeen, S. R. The LLNL thermochemical database. LLNL report
UCRL-21658 (1990).
Haynes, W. M. (ed.) CRC Handbook of Chemistry and Physics, 95th ed. CRC Press,
Boca Raton (2014), section 5.
"""

from __future__ import annotations

import argparse
import csv
import functools
import io
import math
import re
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parents[1]))

from llnl_file import read_llnl, read_llnl_references  # noqa: E402
from supcrt_file import NO_VALUE, read_supcrt, read_supcrt_references  # noqa: E402
from thermoddem_file import (  # noqa: E402
    read_thermoddem_phases,
    read_thermoddem_references,
    read_thermoddem_species,
)

from pourbaix.errors import FormulaError  # noqa: E402
from pourbaix.tables.formula import parse_formula  # noqa: E402

KCAL = 4.184  # thermochemical calorie [J] (exact by definition)
RT_LN10 = 8.31446261815324 * 298.15 * math.log(10) / 1000  # [kJ/mol] at 25 C (CODATA 2018 R)

HEADER = (
    "formula,phase,form,dgf_kj_mol,dhf_kj_mol,s_j_molk,cp_j_molk,mk_a_j_molk,mk_b_j_molk2,"
    "mk_c_jk_mol,mk_tmax_k,metastable,cas,source,note"
).split(",")

# element -> output table (species_data/<stem>.csv)
NEW_ELEMENTS = {
    "As": "arsenic",
    "Sb": "antimony",
    "Bi": "bismuth",
    "Cd": "cadmium",
    "Hg": "mercury",
    "Se": "selenium",
    "Te": "tellurium",
    "U": "uranium",
    "V": "vanadium",
    "W": "tungsten",
    "Zr": "zirconium",
    "Nb": "niobium",
    "Ta": "tantalum",
    "Pt": "platinum",
    "Pd": "palladium",
    "Ga": "gallium",
    "Ge": "germanium",
    "In": "indium",
    "Si": "silicon",
    "Be": "beryllium",
    "Ca": "calcium",
    "Sr": "strontium",
    "Ba": "barium",
    "Li": "lithium",
    "Tl": "thallium",
    "Ce": "cerium",
    "La": "lanthanum",
    "Re": "rhenium",
    "P": "phosphorus",
    "F": "fluorine",
    "K": "potassium",
    "Na": "sodium",
}
# LLNL entries added for metals whose base rows are typed (species_data/<metal>.csv):
# the basic salts, phosphates and fluoride complexes users asked for.
ADDITIONS = (
    "Malachite",
    "Atacamite",
    "Antlerite",
    "Jarosite",
    "Jarosite-Na",
    "Pb3(PO4)2",
    "PbHPO4",
    "Pyromorphite",
    "Pyromorphite-OH",
    "Cu3(PO4)2",
    "Cu3(PO4)2:3H2O",
    "PbHPO4(aq)",
    "PbH2PO4+",
    "CuHPO4(aq)",
    "CuH2PO4+",
    "ZnHPO4(aq)",
    "ZnH2PO4+",
    "FeHPO4(aq)",
    "FeH2PO4+",
    "FeHPO4+",
    "FeH2PO4++",
    "FePO4:2H2O",
    "PbF+",
    "PbF2(aq)",
    "CuF+",
    "ZnF+",
    "FeF+",
    "FeF++",
    "FeF2+",
    "AlF++",
    "AlF2+",
    "AlF3(aq)",
    "AlF4-",
    "MgF+",
    "NiF+",
    "CoF+",
    "MnF+",
    "Sellaite",
)
ADDITIONS_STEM = "additions"
# LLNL entries whose value contradicts the solubility measured by the original study: the
# Thermoddem file shipped by pygcc prints that study's log K, read instead and converted to dG
# with the values of these tables for the other species of its reaction.
# LLNL name -> (Thermoddem phase, code the file prints, code cited, why)
THERMODDEM_FILE = "PHREEQC_ThermoddemV1.10_15Dec2020.dat"
FROM_THERMODDEM = {
    "PbHPO4": (
        "PbHPO4",
        "74nri",
        "74nri",
        "Nriagu's measured solubility replaces the NBS82 value of the LLNL file, which made "
        "PbHPO4 the stable lead solid of neutral phosphate waters; the lead phosphates of these "
        "tables all come from Nriagu's studies (1972-1974)",
    ),
    "Jarosite": (
        "Jarosite(K)",
        "96abar/pal",
        "96bbar/pal",
        "Baron & Palmer's solubility measurement replaces the older value of Kashkay et al. 1975 "
        "(LLNL); the Thermoddem file prints code 96abar/pal, which its reference list gives to "
        "the same authors' paper on the chromate analogue: the value is that of their jarosite "
        "paper (96bbar/pal). No dH or S: the file's reaction enthalpy (-103.2 kJ/mol, Drouet & "
        "Navrotsky 2003) with this dG and the tables' ions gives S near 170 J/(mol K), implausibly low "
        "for this 28-atom solid, so jarosite keeps its 25 C dG at other temperatures (the map "
        "says so)",
    ),
}
# reference codes of studies that report equilibrium constants: an addition from such a study
# takes its dG from the entry's log K at 25 C with these tables' values of the reaction's other
# species, when those differ from the file's by more than 1 kJ/mol in all (the file derived the
# dG from the constant with its own values; iron(II) and iron(III) differ by 12.6 kJ/mol)
LOGK_CODES = ("76smi/mar", "82hog", "79lan", "72nri 1", "75kas/bor", "79mat/spo", "89mar/smi")
# solids of the new elements that only the Thermoddem file holds: table stem -> (phase, code
# printed, code cited, why)
THERMODDEM_SOLIDS = {
    "thallium": (
        (
            "Tl2O3",
            "Internal calculation",
            "84pan/stu",
            "the file derives this log K from the dH and S of Pankratz, Stuve & Gokcen 1984 "
            "(84pan/stu); thallium(III) oxide is in no other compilation read here, and its Tl3+ "
            "agrees with this table's (0.5O2 + 2H+ + Tl+ = Tl3+ + H2O: log_k -0.281 there, -0.30 "
            "here)",
        ),
    ),
}
# aqueous species whose SUPCRT value (speq21.dat) is a defect, read instead from the Thermoddem
# file's formation constant: table stem -> (species, code printed, code cited, why)
THERMODDEM_AQUEOUS = {
    "thallium": (
        (
            "TlOH",
            "09xio",
            "09xio",
            "replaces the SUPCRT entry 'TlOH(aq)' (G -65550 cal/mol, Shock et al. 1997), which "
            "gives log *beta1(Tl+ + H2O = TlOH + H+) = +0.83 with this table's Tl+, so that TlOH(aq) "
            "held the whole thallium map from pH -1; thallium(I) hydrolyses only in strong alkali "
            "(this constant, -13.3)",
        ),
    ),
}
# LLNL minerals given our formula text and form: the file's formula line misses an element, or
# its name is not the mineral's name (LLNL name -> formula, form, why)
MINERAL_NAMES = {
    "Pyromorphite-OH": ("Pb5(PO4)3OH", "hydroxypyromorphite", ""),
    "Pyromorphite": ("Pb5(PO4)3Cl", "chloropyromorphite", ""),
    "Jarosite-Na": (
        "NaFe3(SO4)2(OH)6",
        "natrojarosite",
        "; the file's formula line reads Fe3(SO4)2(OH)6 (no Na); the entry's name and reaction "
        "(1 Na+) give NaFe3(SO4)2(OH)6",
    ),
}

# reference codes that are already keys of the hand-typed tables
SAME_AS = {"82wag/eva": "NBS82", "89cox/wag": "CODATA89", "76bae/mes": "BM76"}
# entries left out by judgement, with the reason written to the report
EXCLUDE = {
    "La++": "implies E0(La3+/La2+) = +5.6 V where the divalent lanthanum couple lies near -3 V "
    "(Bard, Parsons & Jordan 1985): a defect of the derived value",
    "Ce++": "implies E0(Ce3+/Ce2+) = +6.2 V where the divalent cerium couple lies near -3 V "
    "(Bard, Parsons & Jordan 1985): a defect of the derived value",
}
# standard potentials from the imported values that differ from the electrochemical series
# (CRC Handbook; Bard, Parsons & Jordan 1985) by more than 10 mV, as computed by
# tests/test_new_elements_e0.py; written into the note of the element's species
E0_NOTES = {
    ("H3AsO4", "aq"): "E0(H3AsO4/HAsO2) = 0.574 V where the series lists 0.56 V",
    ("AsO4^3-", "aq"): "E0(AsO4^3-/AsO2-) = -0.744 V where the series lists -0.71 V (OH- form)",
    ("Bi^3+", "aq"): "E0(Bi3+/Bi) = 0.286 V where the series lists 0.308 V",
    ("BiO^+", "aq"): "E0(BiO+/Bi) = 0.351 V where the series lists 0.32 V",
    ("Cd(OH)2", "s"): "E0(Cd(OH)2/Cd) = -0.825 V where the series lists -0.809 V (OH- form)",
    ("H2Se", "aq"): "E0(Se/H2Se) = -0.115 V where the series lists -0.399 V",
    ("Se^2-", "aq"): "E0(Se/Se^2-) = -0.670 V where the series lists -0.924 V",
    ("TeO2", "s"): "E0(TeO2/Te) = 0.528 V where the series lists 0.593 V",
    ("U^3+", "aq"): "E0(U3+/U) = -1.646 V where the series lists -1.798 V",
    ("U^4+", "aq"): "E0(U4+/U3+) = -0.553 V where the series lists -0.607 V",
    (
        "UO2^2+",
        "aq",
    ): "E0(UO2^2+/UO2+) = 0.088 V where the series lists 0.062 V; E0(UO2^2+/U4+) = 0.267 V where the series lists 0.327 V",
    ("UO2^+", "aq"): "E0(UO2+/U4+) = 0.447 V where the series lists 0.612 V",
    ("V^2+", "aq"): "E0(V2+/V) = -1.127 V where the series lists -1.175 V",
    ("WO2", "s"): "E0(WO2/W) = -0.155 V where the series lists -0.119 V",
    ("ZrO2:baddeleyite", "s"): "E0(ZrO2/Zr) = -1.473 V where the series lists -1.553 V",
    ("Zr^4+", "aq"): "E0(Zr4+/Zr) = -1.359 V where the series lists -1.45 V",
    ("Nb2O5", "s"): "E0(Nb2O5/Nb) = -0.601 V where the series lists -0.644 V",
    ("Pt^2+", "aq"): "E0(Pt2+/Pt) = 1.336 V where the series lists 1.18 V",
    ("PtCl4^2-", "aq"): "E0(PtCl4^2-/Pt) = 0.743 V where the series lists 0.755 V",
    ("Pd^2+", "aq"): "E0(Pd2+/Pd) = 0.915 V where the series lists 0.951 V",
    ("PdCl4^2-", "aq"): "E0(PdCl4^2-/Pd) = 0.465 V where the series lists 0.591 V",
    ("Tl^3+", "aq"): "E0(Tl3+/Tl+) = 1.280 V where the series lists 1.252 V",
    ("GeO2", "s"): "E0(GeO2/Ge) = -0.122 V where the series lists -0.15 V",
    ("SiO2:quartz", "s"): "E0(SiO2/Si) = -0.990 V where the series lists 0.857 V",
    ("Be^2+", "aq"): "E0(Be2+/Be) = -1.810 V where the series lists -1.847 V",
    ("Sr^2+", "aq"): "E0(Sr2+/Sr) = -2.922 V where the series lists -2.899 V",
    ("Ce^4+", "aq"): "E0(Ce4+/Ce3+) = 1.740 V where the series lists 1.72 V",
    ("F^-", "aq"): "E0(F2/F-) = 2.920 V where the series lists 2.866 V",
}
E0_REASON = (
    "; the values of this element's compilation are kept (one compilation per element); the "
    "series value rests on other data: read the boundary as uncertain by the difference"
)
# published equilibrium constants the imported values miss (tests/test_phase_relations.py)
K_NOTES = {
    ("SeO3^2-", "aq"): (
        "; with HSeO3- of this table gives pKa2(H2SeO3) = 7.29 where Smith & Martell list 8.32: the "
        "selenite values of the file disagree with the measured constant, so the HSeO3-/SeO3^2- "
        "boundary sits about 1 pH unit low. The NEA-TDB selenium review (Olin et al. 2005) selects "
        "about 8.36 (recalled, not read from the printed volume). Every shipped compilation read "
        "here (LLNL, Thermoddem, the CRC table of aqueous ions) prints these NBS82 selenite values, "
        "and the series' alkaline couples agree with them: SeO3^2-/Se -0.357 V here (series "
        "-0.366 V) and SeO4^2-/SeO3^2- 0.030 V (series 0.05 V); SeO3^2- moved to pKa2 8.36 would "
        "put them 16 mV and 32 mV further off. Kept, as read"
    ),
    ("Bi^3+", "aq"): (
        "; the bismuth system: the solids Bi2O3 and BiOCl and the base ion Bi3+ are NBS82 (the "
        "CRC tables), the hydrolysis species come from the SUPCRT set (Shock et al. 1997) moved "
        "with its Bi3+ onto NBS82. The solids agree with the series on their own (Bi2O3/Bi "
        "-0.46 V, BiOCl/Bi 0.158 V, tests/test_new_elements_e0.py). log *Ks(1/2 Bi2O3 + 3H+ = "
        "Bi3+ + 1.5H2O) is 4.56 here; the SUPCRT Bi3+ as printed gave 2.30, and the series' "
        "E0(Bi3+/Bi) 0.308 V gives 3.45, so the Bi2O3/Bi3+ line carries about 1 log unit of doubt"
    ),
    ("HBiO2", "aq"): (
        "; with Bi2O3 of this table gives the oxide's solubility as HBiO2(aq), log a = -3.63 "
        "(1/2 Bi2O3 + 1/2 H2O = HBiO2), so the oxide appears on the map only above about 2.4e-4 "
        "dissolved bismuth; log *beta(Bi3+ + 2H2O = HBiO2 + 3H+) = -8.19 is an estimate by Shock "
        "et al.'s correlations, the weak link of this system: read the neutral bismuth field "
        "with that doubt"
    ),
    ("Pt^2+", "aq"): (
        "; the platinum system takes its ions and chloride and sulfate complexes from one "
        "compilation (Sassani & Shock 1998) and its sulfides PtS and PtS2 from the CRC table "
        "(NBS82, where Pt2+ is 254.8 kJ/mol, giving E0(Pt2+/Pt) 1.320 V); the series' 1.18 V "
        "agrees with neither: the Pt2+ field is uncertain by that much. No platinum oxide is in these compilations, so the map has no passive film "
        "of platinum"
    ),
    ("Tl^+", "aq"): (
        "; the thallium system mixes SUPCRT ions (Shock & Helgeson 1988 for Tl+ and Tl3+, Shock "
        "et al. 1997 and Sverjensky et al. 1997 for the hydroxo, chloro and fluoro complexes) with "
        "CRC solids (NBS82); Tl+ and Tl3+ equal the NBS82 values of the CRC table of aqueous ions "
        "(-32.4 and 214.6 kJ/mol), so ions and solids form one set: E0(Tl+/Tl) -0.3356 V (series "
        "-0.336), E0(TlCl/Tl) -0.556 V (series -0.5568) and log Ksp(TlCl) -3.73, as the CRC "
        "table of solubility products gives (1.86e-4, recalled; tests/test_system_consistency.py); "
        "thallium(III) oxide, Tl2O3, is read from the Thermoddem file (see its row)"
    ),
    ("SrSO4:celestite", "s"): (
        "; gives log Ksp = -5.66 where Reardon & Armstrong 1987 measured -6.63: the file's Sr^2+ "
        "(see its note) and celestite values disagree with the measured solubility; kept, as read"
    ),
    ("Pb5(PO4)3OH:hydroxypyromorphite", "s"): (
        "; gives log Ksp(Pb5(PO4)3OH = 5Pb2+ + 3PO4^3- + OH-) = -76.76 with these tables, "
        "Nriagu's -76.8 (tests/test_lead_phosphate.py). The Thermoddem file (pygcc) prints for "
        "the same solid (reference 74nri) log K -18.12 for Pb5(PO4)3OH + 7H+ = 5Pb2+ + 3H2PO4- + "
        "H2O, where this value gives -4.19: 13.9 units apart, the size of log Kw, as if the "
        "constant had been written with H2O in place of OH-; with it, chloropyromorphite would "
        "give way to hydroxypyromorphite below 0.2 mol/kg chloride at pH 7, against Nriagu's "
        "finding that chloropyromorphite is the stable lead phosphate wherever chloride is "
        "present; not used"
    ),
    ("PbH2PO4^+", "aq"): (
        "; gives log K(Pb2+ + H2PO4- = PbH2PO4+) = -5.80 with these tables: the file writes "
        "the constant it cites, 1.5, for Pb2+ + H+ + HPO4^2- instead, and Smith & Martell give "
        "1.5 for the reaction with H2PO4- (recalled); the Thermoddem file prints -1.5 for it "
        "(74nri). With any of these values the complex stays below 0.4 % of dissolved lead at "
        "1e-4 phosphate, so the maps do not change; kept, as read"
    ),
    ("Pb3(PO4)2", "s"): (
        "; gives log Ksp(Pb3(PO4)2 = 3Pb2+ + 2PO4^3-) = -44.33 with these tables (Thermoddem, "
        "reference 74nri: -5.48 for Pb3(PO4)2 + 4H+ = 3Pb2+ + 2H2PO4-, against -5.28 here). With "
        "these values Pb3(PO4)2 holds the lead map between about pH 5.2 and 8.5 at 1e-4 total "
        "phosphate, and hydroxypyromorphite takes over above; pipe scales of orthophosphate-dosed "
        "waters are usually reported as hydroxypyromorphite (recalled from the lead-control "
        "literature, not a tabulated value), so read the "
        "Pb3(PO4)2 field as uncertain: --exclude Pb3(PO4)2 shows where hydroxypyromorphite "
        "would reach"
    ),
    ("CaF2:fluorite", "s"): (
        "; with the CODATA F^- of this table gives log Ksp = -10.04 where Nordstrom & Jenne 1977 "
        "give -10.6: the fluorite value rests on the older F^- value; kept, as read"
    ),
}
E0_SPECIAL = {
    ("Bi^3+", "aq"): (
        "; 82.8 kJ/mol is NBS82's (the CRC table of aqueous ions), the compilation of the "
        "bismuth solids, which agree with the series themselves; the series' 0.308 V implies "
        "89.2 kJ/mol: read the Bi3+ boundaries as uncertain by about 20 mV"
    ),
    ("H2Se", "aq"): (
        "; 22.2 kJ/mol is the NBS82 value (the LLNL file reprints it); the series' -0.399 V "
        "implies dG(H2Se,aq) = 77.0 kJ/mol, an older value none of the compilations read here "
        "holds: kept"
    ),
    ("Se^2-", "aq"): (
        "; the CRC table of aqueous ions lists the same 129.3 kJ/mol (NBS82), so the handbook's "
        "own two tables disagree: the series' -0.924 V implies dG(Se2-) = 178.3 kJ/mol, 49 kJ/mol "
        "above every compilation read here: kept"
    ),
    ("SiO2:quartz", "s"): (
        "; the series' 0.857 V cannot hold: it would make silicon nobler than copper, and "
        "dG(SiO2) of every compilation gives about -0.99 V"
    ),
}
# reference codes the LLNL file uses without listing them (citations checked by hand)
MISSING_REFS = {
    "93sti/par": (
        "Stipp, S. L. S.; Parks, G. A.; Nordstrom, D. K.; Leckie, J. O. Solubility-product "
        "constant and thermodynamic properties for synthetic otavite, CdCO3(s), and aqueous "
        "association constants for the Cd(II)-CO2-H2O system. Geochim. Cosmochim. Acta 57, "
        "2699-2713 (1993)."
    ),
    "89smi/mar": (
        "Smith, R. M.; Martell, A. E. Critical Stability Constants, Vol. 6: Second Supplement. "
        "Plenum Press, New York (1989)."
    ),
}
# CODATA Key Values (Cox, Wagman & Medvedev 1989): the printed +/- of dfH [kJ/mol] and S
# [J/(mol K)] of rows the LLNL file takes from them (reference code 89cox/wag), by entry name,
# and the +/- of S of the elements in their formation reactions, per mole of the element's
# reference form (typed from the printed key-value table, from memory; the file's dG of each
# of these rows equals dH - T dS from these key values). CODATA's +/- is about twice the
# standard uncertainty (95 % level; from memory).
CODATA_PLUS_MINUS = {
    "Monteponite": (0.40, 1.5),
    "Montroydite": (0.12, 0.30),
    "Calomel": (0.40, 0.8),
    "Hg2SO4": (0.40, 0.20),
    "Bromellite": (2.5, 0.04),
    "Uraninite": (1.0, 0.20),
    "UO2++": (1.5, 3.0),
    "Sellaite": (1.2, 0.5),
}
CODATA_ELEMENT_S = {  # element: (atoms per mole of its reference form, +/- of its S)
    "Be": (1, 0.08, "Be(cr) 9.50"),
    "Cd": (1, 0.15, "Cd(cr) 51.80"),
    "F": (2, 0.005, "F2(g) 202.791"),
    "Mg": (1, 0.10, "Mg(cr) 32.67"),
    "U": (1, 0.20, "U(cr) 50.20"),
    "Hg": (1, 0.12, "Hg(l) 75.90"),
    "S": (1, 0.050, "S(rh) 32.054"),
    "O": (2, 0.005, "O2(g) 205.152"),
    "Cl": (2, 0.010, "Cl2(g) 223.081"),
    "H": (2, 0.003, "H2(g) 130.680"),
}


def codata_uncertainty(f, plus_minus) -> tuple[float, str]:
    """Standard uncertainty of dG = dH - T dfS from CODATA +/- values, and the note saying so.

    U(dG)^2 = U(dH)^2 + T^2 [U(S)^2 + sum (nu_el U(S_el))^2] for independent inputs (JCGM
    100:2008 eq. 10); u = U / 2. Ions: the H2 of the formation reaction (charge / 2) counts.
    """
    u_dh, u_s = plus_minus
    terms = [u_s**2]
    named = []
    counts = dict(f.composition)
    if f.charge:
        # M + z H+ = M^z+ + z/2 H2; for an anion |z|/2 more H2 on the left (H2 = 2 H+ + 2 e-)
        counts["H"] = counts.get("H", 0) + abs(f.charge)
    for element, n in sorted(counts.items()):
        atoms, u_el, text = CODATA_ELEMENT_S[element]
        terms.append((n / atoms * u_el) ** 2)
        named.append(f"{text} +/- {u_el:g}")
    u = 0.5 * math.sqrt(u_dh**2 + (298.15e-3) ** 2 * sum(terms))
    note = (
        f"; u(dG) = {u:.2f} kJ/mol (dgf_unc_kj_mol), half of U(dG) = sqrt(U(dH)^2 + T^2 "
        f"[U(S)^2 + sum (nu U(S of element))^2]) (JCGM 100:2008 eq. 10) with the CODATA89 "
        f"key-value +/- (dH {u_dh:g}, S {u_s:g}; {', '.join(named)} J/(mol K); from memory); "
        "CODATA's +/- is about twice the standard uncertainty (95 % level; from memory)"
    )
    return u, note


# NEA-TDB uranium volume (Grenthe et al. 1992, the tables of selected values at 25 C and
# I = 0; typed from the printed tables, from memory): for rows the LLNL file takes from it
# (reference code 92gre/fug), by entry name, the species the row was derived from (LLNL entry,
# table name), the other reactants (auxiliary entry: moles consumed), the printed log K and
# its +/- (95 % level, about twice the standard uncertainty; from memory), and the reaction.
# The row's dG must equal dG(parent) + sum n dG(auxiliary) - RT ln10 log K (NEA92_MATCH), or
# no uncertainty is attached. Polynuclear species ((UO2)2(OH)2^2+, (UO2)3(CO3)6^6-, ...) move
# with n times their parent's draw (NEA92_UNITS; dgf_unc_parent_units).
NEA92_AUXILIARY = {  # dG [kJ/mol] of the NEA-TDB auxiliary data (CODATA89 key values; from memory)
    "H2O": -237.140,
    "CO3^2-": -527.900,
    "F-": -281.523,
    "Cl-": -131.217,
    "SO4^2-": -744.004,
}
NEA92_MATCH = 0.05  # [kJ/mol]: the constants are printed to 0.01 in log K (0.03 kJ/mol)
_UO2 = ("UO2++", "UO2^2+")
_U4 = ("U++++", "U^4+")
NEA92_LOG_K = {
    "UO2+": (*_UO2, {}, 1.484, 0.022, "UO2^2+ + e- = UO2^+"),
    "U++++": (*_UO2, {"H2O": -2}, 9.038, 0.041, "UO2^2+ + 4 H+ + 2 e- = U^4+ + 2 H2O"),
    "U+++": (*_U4, {}, -9.353, 0.07, "U^4+ + e- = U^3+"),
    "UOH+++": (*_U4, {"H2O": 1}, -0.54, 0.06, "U^4+ + H2O = UOH^3+ + H+"),
    "UO2OH+": (*_UO2, {"H2O": 1}, -5.2, 0.3, "UO2^2+ + H2O = UO2OH^+ + H+"),
    "UO2(OH)3-": (*_UO2, {"H2O": 3}, -19.2, 0.4, "UO2^2+ + 3 H2O = UO2(OH)3^- + 3 H+"),
    "UO2(OH)4--": (*_UO2, {"H2O": 4}, -33.0, 2.0, "UO2^2+ + 4 H2O = UO2(OH)4^2- + 4 H+"),
    "UO2CO3(aq)": (*_UO2, {"CO3^2-": 1}, 9.68, 0.04, "UO2^2+ + CO3^2- = UO2CO3(aq)"),
    "UO2(CO3)2--": (*_UO2, {"CO3^2-": 2}, 16.94, 0.12, "UO2^2+ + 2 CO3^2- = UO2(CO3)2^2-"),
    "UO2(CO3)3----": (*_UO2, {"CO3^2-": 3}, 21.60, 0.05, "UO2^2+ + 3 CO3^2- = UO2(CO3)3^4-"),
    "UO2CO3": (*_UO2, {"CO3^2-": 1}, 14.47, 0.04, "UO2^2+ + CO3^2- = UO2CO3(cr), -log Ks0"),
    "UO2F+": (*_UO2, {"F-": 1}, 5.09, 0.13, "UO2^2+ + F- = UO2F^+"),
    "UO2F2(aq)": (*_UO2, {"F-": 2}, 8.62, 0.04, "UO2^2+ + 2 F- = UO2F2(aq)"),
    "UO2F3-": (*_UO2, {"F-": 3}, 10.9, 0.4, "UO2^2+ + 3 F- = UO2F3^-"),
    "UO2F4--": (*_UO2, {"F-": 4}, 11.7, 0.7, "UO2^2+ + 4 F- = UO2F4^2-"),
    "UO2Cl+": (*_UO2, {"Cl-": 1}, 0.17, 0.02, "UO2^2+ + Cl- = UO2Cl^+"),
    "UO2Cl2(aq)": (*_UO2, {"Cl-": 2}, -1.1, 0.4, "UO2^2+ + 2 Cl- = UO2Cl2(aq)"),
    "UO2SO4(aq)": (*_UO2, {"SO4^2-": 1}, 3.15, 0.02, "UO2^2+ + SO4^2- = UO2SO4(aq)"),
    "UO2(SO4)2--": (*_UO2, {"SO4^2-": 2}, 4.14, 0.07, "UO2^2+ + 2 SO4^2- = UO2(SO4)2^2-"),
    "UF+++": (*_U4, {"F-": 1}, 9.28, 0.09, "U^4+ + F- = UF^3+"),
    "UF2++": (*_U4, {"F-": 2}, 16.23, 0.15, "U^4+ + 2 F- = UF2^2+"),
    "UF3+": (*_U4, {"F-": 3}, 21.6, 1.0, "U^4+ + 3 F- = UF3^+"),
    "UF4(aq)": (*_U4, {"F-": 4}, 25.6, 1.0, "U^4+ + 4 F- = UF4(aq)"),
    "UF5-": (*_U4, {"F-": 5}, 27.01, 0.30, "U^4+ + 5 F- = UF5^-"),
    "UF6--": (*_U4, {"F-": 6}, 29.08, 0.18, "U^4+ + 6 F- = UF6^2-"),
    "UCl+++": (*_U4, {"Cl-": 1}, 1.72, 0.13, "U^4+ + Cl- = UCl^3+"),
    "USO4++": (*_U4, {"SO4^2-": 1}, 6.58, 0.19, "U^4+ + SO4^2- = USO4^2+"),
    "U(SO4)2(aq)": (*_U4, {"SO4^2-": 2}, 10.51, 0.20, "U^4+ + 2 SO4^2- = U(SO4)2(aq)"),
}
# rows whose printed dG and its +/- [kJ/mol] were determined on their own (calorimetric dH and S)
# Polynuclear complexes: n UO2^2+ + ... (same layout as NEA92_LOG_K); their units of the parent.
NEA92_LOG_K_POLY = {
    "(UO2)2OH+++": (*_UO2, {"H2O": 1}, -2.7, 1.0, "2 UO2^2+ + H2O = (UO2)2OH^3+ + H+"),
    "(UO2)2(OH)2++": (*_UO2, {"H2O": 2}, -5.62, 0.04, "2 UO2^2+ + 2 H2O = (UO2)2(OH)2^2+ + 2 H+"),
    "(UO2)3(OH)4++": (*_UO2, {"H2O": 4}, -11.9, 0.3, "3 UO2^2+ + 4 H2O = (UO2)3(OH)4^2+ + 4 H+"),
    "(UO2)3(OH)5+": (*_UO2, {"H2O": 5}, -15.55, 0.12, "3 UO2^2+ + 5 H2O = (UO2)3(OH)5^+ + 5 H+"),
    "(UO2)3(OH)7-": (*_UO2, {"H2O": 7}, -31.0, 2.0, "3 UO2^2+ + 7 H2O = (UO2)3(OH)7^- + 7 H+"),
    "(UO2)4(OH)7+": (*_UO2, {"H2O": 7}, -21.9, 1.0, "4 UO2^2+ + 7 H2O = (UO2)4(OH)7^+ + 7 H+"),
    "(UO2)3(CO3)6(6-)": (
        *_UO2,
        {"CO3^2-": 6},
        54.0,
        1.0,
        "3 UO2^2+ + 6 CO3^2- = (UO2)3(CO3)6^6-",
    ),
}
NEA92_UNITS = {
    "(UO2)2OH+++": 2,
    "(UO2)2(OH)2++": 2,
    "(UO2)3(OH)4++": 3,
    "(UO2)3(OH)5+": 3,
    "(UO2)3(OH)7-": 3,
    "(UO2)4(OH)7+": 4,
    "(UO2)3(CO3)6(6-)": 3,
}
NEA92_LOG_K.update(NEA92_LOG_K_POLY)
NEA92_GIBBS = {
    "UO3:2H2O": (-1636.506, 1.705),
    "Schoepite": (-1636.506, 1.705),
}


def nea92_uncertainty(name: str, dgf: float, gibbs: dict) -> tuple[float, str | None, str]:
    """Standard uncertainty, parent and note of a NEA-TDB 1992 uranium row, from its printed +/-.

    A complex or ion derived from a parent by a constant: u = RT ln10 U(log K) / 2, and the
    row names the parent (dgf_unc_parent); a row with its own printed dG: u = U(dG) / 2.
    Raises ValueError when the row's dG is not the NEA value recalled here.
    """
    half = "the volume's +/- being a 95 % interval (about twice the standard uncertainty)"
    if name in NEA92_GIBBS:
        printed, plus_minus = NEA92_GIBBS[name]
        if abs(dgf - printed) > NEA92_MATCH:
            raise ValueError(f"dG {dgf} against the NEA-TDB {printed}")
        u = plus_minus / 2
        note = (
            f"; u(dG) = {u:.2f} kJ/mol (dgf_unc_kj_mol), half of the NEA-TDB +/- {plus_minus:g} "
            f"kJ/mol of dG {printed:.3f} (Grenthe et al. 1992, selected values; from memory), "
            f"{half}; drawn on its own (its dH and S are calorimetric)"
        )
        return u, None, note
    parent, parent_name, others, log_k, plus_minus, reaction = NEA92_LOG_K[name]
    units = NEA92_UNITS.get(name, 1)
    expected = units * gibbs[parent] - RT_LN10 * log_k
    expected += sum(n * NEA92_AUXILIARY[a] for a, n in others.items())
    if abs(dgf - expected) > NEA92_MATCH:
        raise ValueError(f"dG {dgf} against {expected:.3f} from log K {log_k:g} ({reaction})")
    u = RT_LN10 * plus_minus / 2
    aux = "".join(f", dG({a}) {NEA92_AUXILIARY[a]:.3f}" for a in others)
    aux += " (NEA-TDB auxiliary values; from memory)" if others else ""
    note = (
        f"; u(dG) = RT ln10 x {plus_minus:g} / 2 = {u:.2f} kJ/mol (dgf_unc_kj_mol) from the "
        f"NEA-TDB log K = {log_k:g} +/- {plus_minus:g} ({reaction}; Grenthe et al. 1992, "
        f"selected values; from memory), {half}; the row's dG follows from dG({parent_name}) "
        f"{gibbs[parent]:.3f}{aux} and this constant within {NEA92_MATCH:g} kJ/mol "
        f"(dgf_unc_parent {parent_name}: sampled energies move with "
        + (f"{units} times " if units != 1 else "")
        + f"that of {parent_name}, plus this"
        + ("; the other reactants are not sampled with it)" if others else ")")
    )
    return u, parent_name, note


def _with_uncertainty(cols, rows, stated, parents=None, units=None) -> tuple:
    """Insert dgf_unc_kj_mol after dgf_kj_mol when a row of the table states one.

    A table with a row that names a parent (``parents``) gets dgf_unc_parent after it, and
    one with a row holding more than one unit of its parent (``units``) gets
    dgf_unc_parent_units after that.
    """
    if not any((r[0], r[1], r[2]) in stated for r in rows):
        return cols, rows
    at = cols.index("dgf_kj_mol") + 1
    parents = parents or {}
    units = units or {}
    named = any((r[0], r[1], r[2]) in parents for r in rows)
    counted = any((r[0], r[1], r[2]) in units for r in rows)
    return (
        cols[:at]
        + ["dgf_unc_kj_mol"]
        + ["dgf_unc_parent"] * named
        + ["dgf_unc_parent_units"] * counted
        + cols[at:],
        [
            r[:at]
            + [stated.get((r[0], r[1], r[2]), "")]
            + [parents.get((r[0], r[1], r[2]), "")] * named
            + [units.get((r[0], r[1], r[2]), "")] * counted
            + r[at:]
            for r in rows
        ],
    )


# native elements the LLNL file lacks: CAS in the CRC table, phase
CRC_ELEMENTS = {
    "Bi": ("7440-69-9", "s"),
    "Ge": ("7440-56-4", "s"),
    "Nb": ("7440-03-1", "s"),
    "Ta": ("7440-25-7", "s"),
    "Te": ("13494-80-9", "s"),
    "Pt": ("7440-06-4", "s"),
    "V": ("7440-62-2", "s"),
    "F": ("7782-41-4", "g"),
}
# oxides and salts from the CRC table for elements the LLNL file leaves thin: element -> CAS
CRC_SOLIDS = {
    "Bi": ("1304-76-3 Bi2O3", "7787-59-9 BiOCl"),
    "Ga": ("12024-21-4 Ga2O3", "12023-99-3 Ga(OH)3"),
    "Ge": ("1310-53-8 GeO2", "20619-16-3 GeO"),
    "In": ("1312-43-2 In2O3",),
    "Nb": ("1313-96-8 Nb2O5", "12034-59-2 NbO2", "12034-57-0 NbO"),
    "Ta": ("1314-61-0 Ta2O5",),
    "Te": ("7446-07-3 TeO2",),
    "Tl": ("1314-12-1 Tl2O", "12026-06-1 TlOH", "7791-12-0 TlCl"),
    "W": ("1314-35-8 WO3", "12036-22-5 WO2"),
    "V": ("1314-62-1 V2O5", "1314-34-7 V2O3", "12035-98-2 VO"),
    "Sb": ("1314-60-9 Sb2O5",),
    "Be": ("13327-32-7 Be(OH)2",),
    "Re": ("1314-68-7 Re2O7",),
    "Pt": ("12038-20-9 PtS", "12038-21-0 PtS2"),
}
# elements whose LLNL aqueous species are few; their base ions in the LLNL file are the
# SUPCRT values (88sho/hel), so SUPCRT hydrolysis and chloride complexes fit them
SUPCRT_FILLS = set(CRC_SOLIDS) | {"Hg"}
# SUPCRT aqueous sets anchored on the NBS82 value of their base ion (the CRC table of aqueous
# ions), the compilation of the element's solids: every species of the set is shifted by the same
# amount per atom of the element, so the set's hydrolysis constants are kept (element -> ion)
SUPCRT_ANCHOR = {"Bi": "Bi^3+"}
# SUPCRT file whose aqueous species fill the gaps the LLNL file leaves
SUPCRT_FILE = "speq21.dat"
CRC_KEY = "CRC95"
CRC_CITATION = (
    "Haynes, W. M. (ed.) CRC Handbook of Chemistry and Physics, 95th ed. CRC Press, Boca Raton "
    "(2014), section 5: Standard thermodynamic properties of chemical substances (as shipped in the "
    "'chemicals' package, Heat Capacity/CRC Standard Thermodynamic Properties of Chemical "
    "Substances.tsv)."
)
LLNL_FILE = "thermo.com.dat"
_LIGAND_RULES = {
    "C": lambda text: "CO3" in text,
    "S": lambda text: "SO4" in text or "O" not in text,
    "Cl": lambda text: "ClO" not in text,
    "N": lambda text: "NH3" in text or "NH4" in text,
    "P": lambda text: "PO4" in text,
    "F": lambda text: True,
}


def pygcc_db() -> Path:
    """Folder of pygcc's parameter files."""
    import pygcc

    return Path(pygcc.__file__).resolve().parent / "default_db"


def crc_solids_file() -> Path:
    """The CRC table of standard thermodynamic properties inside ``chemicals``."""
    import chemicals

    return (
        Path(chemicals.__file__).resolve().parent
        / "Heat Capacity"
        / "CRC Standard Thermodynamic Properties of Chemical Substances.tsv"
    )


def crc_ions_file() -> Path:
    """The CRC table of aqueous ions inside ``chemicals``."""
    import chemicals

    return (
        Path(chemicals.__file__).resolve().parent
        / "Electrolytes"
        / "CRC Thermodynamic Properties of Aqueous Ions.tsv"
    )


def _read_crc_ions(path: Path) -> dict:
    out = {}
    with path.open(newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle, delimiter="\t"):
            m = re.match(r"^(.*?)([+-])(\d*)$", row["Formula"])
            if not row["Gf(aq)"] or not m:
                continue
            try:
                f = parse_formula(f"{m.group(1)}^{m.group(3)}{m.group(2)}")
            except FormulaError:
                continue
            out[(frozenset(f.composition.items()), f.charge)] = float(row["Gf(aq)"]) / 1000
    return out


# element reference states whose CAS in the CRC table is not the element's own
_DIATOMIC = {
    "H": "1333-74-0",
    "O": "7782-44-7",
    "N": "7727-37-9",
    "F": "7782-41-4",
    "Cl": "7782-50-5",
    "Br": "7726-95-6",
    "I": "7553-56-2",
}
_REFERENCE_FORM = {"C": "7782-42-5", "S": "7704-34-9", "P": "7723-14-0"}


def element_entropies(crc: dict) -> dict[str, float]:
    """S of each element's reference state per atom [J/(mol K)] from the CRC table."""
    from chemicals.elements import periodic_table

    out = {}
    for element in periodic_table:
        symbol = element.symbol
        cas = _DIATOMIC.get(symbol) or _REFERENCE_FORM.get(symbol) or element.CAS
        row = crc.get(cas)
        if not row:
            continue
        for phase in "slg":
            h = row["Hf" + phase]
            if row["S0" + phase] and (h == "" or float(h) == 0) and (h != "" or phase == "s"):
                out[symbol] = float(row["S0" + phase]) / (2 if symbol in _DIATOMIC else 1)
                break
    return out


def gibbs_remark(f, dgf: float, dhf: float | None, s: float | None, entropies: dict) -> str:
    """Note text when dG, dH and S of a row disagree by more than 0.8 kJ/mol."""
    if dhf is None or s is None or any(el not in entropies for el in f.composition):
        return ""
    # formation from the elements; an ion's charge balanced with H+/H2 (S(H+) = 0)
    ds = s - sum(n * entropies[el] for el, n in f.composition.items()) + f.charge * entropies["H"]
    implied = dhf - 298.15 * ds / 1000
    if abs(dgf - implied) <= 0.8:
        return ""
    return (
        f"; the printed dG, dH and S disagree: dH - T dS gives {implied:.1f} kJ/mol "
        f"({dgf - implied:+.1f}; element entropies of the CRC table): dG kept, as it sets the "
        "map at 25 C; routes to other temperatures carry the difference"
    )


def crc_remark(f, phase: str, dgf: float, crc_ions: dict) -> str:
    """Note text when the CRC ion table (NBS82 values) differs by more than 1 kJ/mol."""
    ref = crc_ions.get((frozenset(f.composition.items()), f.charge)) if phase == "aq" else None
    if ref is None or f.charge == 0 or abs(dgf - ref) <= 1.0:
        return ""
    return (
        f"; CRC lists {ref:.1f} (the NBS82 value): compilations differ by {dgf - ref:+.1f} kJ/mol; "
        "this value is kept so that the element's species come from one compilation"
    )


def water_signature(f) -> tuple:
    """Equal for two aqueous species that differ only by whole H2O molecules."""
    c = dict(f.composition)
    heavy = tuple(sorted((el, n) for el, n in c.items() if el not in ("H", "O")))
    return heavy, f.charge, c.get("H", 0) - 2 * c.get("O", 0)


def balanced(entry, f, by_name) -> bool:
    """Elements and charge of our formula equal those of the entry's reaction."""
    if not entry.reaction:
        return True
    total: dict[str, float] = {}
    charge = 0.0
    for coefficient, name in entry.reaction:
        other = by_name.get(name)
        try:
            text, _, _ = formula_text(name, other.section if other else "aqueous species", "")
            g = parse_formula(text)
        except FormulaError:
            return True  # cannot tell; the log K check still applies
        for element, count in g.composition.items():
            total[element] = total.get(element, 0.0) + float(coefficient) * count
        charge += float(coefficient) * g.charge
    mine = dict(f.composition)
    return abs(charge - f.charge) < 1e-6 and all(
        abs(total.get(el, 0.0) - mine.get(el, 0)) < 1e-6 for el in set(total) | set(mine)
    )


def to_kj(number: str, unit: str) -> float:
    """Printed energy to kJ/mol (kcal x 4.184 exactly)."""
    return float(number) * (KCAL if unit.lower().startswith("kcal") else 1.0)


def to_j(number: str, unit: str) -> float:
    """Printed entropy to J/(mol K) (cal x 4.184 exactly)."""
    return float(number) * (KCAL if unit.lower().startswith("cal") else 1.0)


def fmt(value: float | None) -> str:
    """Fixed text for a number: 6 decimals, trailing zeros dropped."""
    if value is None:
        return ""
    text = f"{value:.6f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def source_key(code: str) -> str:
    """Our source key for an LLNL reference code."""
    return SAME_AS.get(code, code.replace(" ", "-"))


def formula_text(name: str, section: str, formula: str) -> tuple[str, str, str]:
    """Return (our formula text, phase, form) for an LLNL entry, or raise FormulaError."""
    if section == "minerals":
        phase = "l" if name.endswith("(l)") else "s"
        raw = (formula or name).replace(":", "*")
        if name.endswith("(l)"):
            raw = name[:-3]
        f = parse_formula(raw)
        plain = re.sub(r"[^A-Za-z0-9]", "", name)
        same = plain == re.sub(r"[^A-Za-z0-9]", "", raw) or name.endswith("(l)")
        form = "" if same else name.lower()
        form = re.sub(r"[^a-z0-9_.\- ]", "-", form).strip("-")
        return f.text, phase, form
    text = name[:-4] if name.endswith("(aq)") else name
    m = re.search(r"\((\d+)([+-])\)$", text)
    if m:
        text = f"{text[: m.start()]}^{m.group(1)}{m.group(2)}"
    else:
        m = re.search(r"([+-]+)$", text)
        if m:
            n = len(m.group(1))
            text = f"{text[: m.start()]}^{'' if n == 1 else n}{m.group(1)[0]}"
    return parse_formula(text).text, "aq", ""


def _selected(elements: set[str], text: str, target: str) -> bool:
    others = elements - {"H", "O", target}
    if target not in elements:
        return False
    if target in ("P", "F"):
        return not others
    if target in ("K", "Na"):
        return not others or others <= {"Cl", "F"}
    return all(el in _LIGAND_RULES and _LIGAND_RULES[el](text) for el in others)


def llnl_checks(entries) -> dict[str, float]:
    """Printed delG0f [kJ/mol] minus the value implied by the entry's own log K at 25 C."""
    g = {}
    for e in entries:
        v = e.value("delG0f")
        if v:
            g[e.name] = to_kj(*v)
    out = {}
    for e in entries:
        if e.name not in g or len(e.logk) < 2 or e.logk[1].startswith("500"):
            continue
        try:
            total = sum(float(c) * g[s] for c, s in e.reaction)
        except KeyError:
            continue
        out[e.name] = g[e.name] - (total + RT_LN10 * float(e.logk[1]))
    return out


def relabel_kcal(entry):
    """The entry with its kJ-labelled energies and J-labelled entropy read as calories."""
    import dataclasses

    values = tuple(
        (k, n, u.lower().replace("kj", "kcal").replace("j/", "cal/")) for k, n, u in entry.values
    )
    return dataclasses.replace(entry, values=values)


def _row(entry, text, phase, form, key, extra_note="", as_printed=None) -> list[str]:
    g = entry.value("delG0f")
    h = entry.value("delH0f")
    s = entry.value("S0")
    shown = as_printed or entry
    printed = []
    for label, k in (("delG0f", "delG0f"), ("delH0f", "delH0f"), ("S0", "S0")):
        v = shown.value(k)
        if v:
            printed.append(f"{label} {v[0]} {v[1]}")
    note = (
        f"read by species_data/import from LLNL {LLNL_FILE} entry '{entry.name}' "
        f"({', '.join(printed)}; reference code {entry.source})" + extra_note
    )
    return [
        text,
        phase,
        form,
        fmt(to_kj(*g)),
        fmt(to_kj(*h) if h else None),
        fmt(to_j(*s) if s else None),
        "",
        "",
        "",
        "",
        "",
        "",
        "",
        key,
        note,
    ]


def _existing_keys(species_dir: Path, generated: set[str]) -> set[tuple[str, str]]:
    keys = set()
    for f in sorted(species_dir.glob("*.csv")):
        if f.stem in generated or f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        with f.open(newline="", encoding="utf-8") as handle:
            for row in csv.DictReader(handle):
                name = parse_formula(row["formula"]).text
                if row.get("form"):
                    name += ":" + row["form"]
                keys.add((name, row["phase"]))
    return keys


HKF_COLUMNS = (
    "hkf_a1_cal_mol_bar",
    "hkf_a2_cal_mol",
    "hkf_a3_cal_k_mol_bar",
    "hkf_a4_cal_k_mol",
    "hkf_c1_cal_mol_k",
    "hkf_c2_cal_k_mol",
    "hkf_omega_cal_mol",
)
PARAMETER_COLUMNS = ("mk_a_j_molk", "mk_b_j_molk2", "mk_c_jk_mol", "mk_tmax_k", "v_cm3_mol")
PARAMETER_COLUMNS += HKF_COLUMNS + ("hkf_source",)
# printed scale of the SUPCRT file: true value = printed x factor (Johnson et al. 1992)
HKF_SCALE = (0.1, 100.0, 1.0, 1.0e4, 1.0, 1.0e4, 1.0e5)
TRANSITIONS_HEADER = (
    "formula,phase,form,t_k,dh_j_mol,dv_cm3_mol,dpdt_bar_k,mk_a_j_molk,mk_b_j_molk2,mk_c_jk_mol,"
    "source"
).split(",")


def _mk(fields) -> tuple[str, str, str]:
    """Maier-Kelley a, b, c in J units from a printed SUPCRT line (a, b x 10^3, c x 10^-5 cal)."""
    a, b, c = (float(x) for x in fields[:3])
    return fmt(a * KCAL), fmt(b * 1e-3 * KCAL), fmt(c * 1e5 * KCAL)


def _printed_or_none(text: str | None, scale: float = 1.0) -> float | None:
    return None if text is None else float(text) * scale


class SupcrtIndex:
    """SUPCRT entries by our formula text (aqueous) and by formula or name (minerals)."""

    def __init__(self, entries, refs):
        self.refs = refs
        self.aq: dict[str, object] = {}
        self.minerals: dict[str, list] = {}
        self.names: dict[str, object] = {}
        self.used: set[str] = set()
        for e in entries:
            try:
                if e.phase == "aq":
                    text = formula_text(e.name, "aqueous species", "")[0]
                elif e.phase == "s":
                    text = parse_formula(e.formula_text.replace(":", "*")).text
                else:
                    continue
            except (FormulaError, IndexError):
                continue
            if e.phase == "aq":
                f = parse_formula(text)
                if f.charge == e.charge and dict(f.composition) == dict(e.composition):
                    self.aq.setdefault(text, e)
            else:
                self.minerals.setdefault(text, []).append(e)
                self.names.setdefault(e.name.lower(), (text, e))

    def match(self, formula: str, phase: str, form: str):
        """The SUPCRT entry for a row, or None when there is none or the choice is ambiguous."""
        if phase == "aq":
            return self.aq.get(formula)
        if phase != "s":
            return None
        if form:
            hit = self.names.get(form.lower())
            return hit[1] if hit and hit[0] == formula else None
        candidates = self.minerals.get(formula, [])
        return candidates[0] if len(candidates) == 1 else None

    def key(self, entry) -> str | None:
        """Our source key for the entry's first reference (recorded as used)."""
        code = entry.refs[0] if entry.refs and entry.refs[0] else ""
        if code not in self.refs:
            return None
        self.used.add(code)
        return supcrt_key(code, self.refs[code])

    def columns(self, entry) -> dict[str, str]:
        """Our parameter columns from a SUPCRT entry (unscaled; J for Maier-Kelley)."""
        key = self.key(entry)
        if key is None:
            return {}
        if entry.phase == "aq":
            printed = [entry.field(1, k) for k in range(4)] + [entry.field(2, k) for k in range(3)]
            if any(v is None for v in printed):
                return {}
            out = {
                c: fmt(float(v) * f)
                for c, v, f in zip(HKF_COLUMNS, printed, HKF_SCALE, strict=True)
            }
            out["hkf_source"] = key
            return out
        first = entry.numbers[1]
        if any(x.startswith(NO_VALUE) for x in first[:3]):
            return {}
        a, b, c = _mk(first)
        tmax = first[3] if entry.transitions else entry.numbers[-1][0]
        out = {"mk_a_j_molk": a, "mk_b_j_molk2": b, "mk_c_jk_mol": c, "mk_tmax_k": fmt(float(tmax))}
        v = entry.field(0, 3)
        if v is not None and float(v) > 0:
            out["v_cm3_mol"] = fmt(float(v))
        out["hkf_source"] = key
        return out

    def transitions(self, entry, formula: str, form: str) -> list[list[str]]:
        """Rows of the phase-transition table for a mineral with transitions."""
        rows = []
        key = self.key(entry)
        for k in range(entry.transitions):
            line, above = entry.numbers[1 + k], entry.numbers[2 + k]
            t, dh, dv, dpdt = (None if x.startswith(NO_VALUE) else x for x in line[3:7])
            a, b, c = _mk(above)
            rows.append(
                [
                    formula,
                    "s",
                    form,
                    fmt(float(t)),
                    fmt(float(dh) * KCAL) if dh else "0",
                    fmt(float(dv)) if dv else "",
                    fmt(float(dpdt)) if dpdt else "",
                    a,
                    b,
                    c,
                    key or "",
                ]
            )
        return rows


def _with_parameters(header: list[str], rows: list[list[str]], index, transitions) -> tuple:
    """Header and rows with the parameter columns filled from the SUPCRT index."""
    cols = list(header)
    for name in PARAMETER_COLUMNS:
        if name not in cols:
            cols.insert(cols.index("metastable"), name)
    out = []
    for row in rows:
        values = dict(zip(header, row, strict=True))
        try:
            formula = parse_formula(values["formula"]).text
        except FormulaError:
            formula = values["formula"]
        entry = index.match(formula, values["phase"], values.get("form", ""))
        if entry is not None:
            got = index.columns(entry)
            keep = any(values.get(c) for c in PARAMETER_COLUMNS if c != "hkf_source")
            # a row filled by an earlier run holds the same values: its transitions still belong
            # in the transition table (else a re-run would drop them)
            same = bool(got) and all(
                values.get(c, "") == v for c, v in got.items() if c != "hkf_source"
            )
            if got and not keep:
                values.update(got)
                if got.get("hkf_source") == values.get("source"):
                    values["hkf_source"] = ""
            if got and (same or not keep) and entry.phase == "s" and entry.transitions:
                transitions += index.transitions(entry, formula, values.get("form", ""))
        out.append([values.get(c, "") for c in cols])
    return cols, out


_LLNL_ENTRIES: list = []  # entries of the LLNL file, set by build()


def build(species_dir: Path) -> tuple[dict[str, str], str]:
    """Return {file name: text} of the generated tables and the import report."""
    path = pygcc_db() / LLNL_FILE
    entries = read_llnl(path)
    _LLNL_ENTRIES[:] = entries
    refs = read_llnl_references(path)
    mismatch = llnl_checks(entries)
    report = [f"import report: {path.name}, {len(entries)} entries"]
    generated = set(NEW_ELEMENTS.values()) | {ADDITIONS_STEM}
    taken = _existing_keys(species_dir, generated)
    tables: dict[str, list[list[str]]] = {stem: [] for stem in generated}
    used_codes: set[str] = set()
    seen: set[tuple[str, str]] = set()
    entries_by_name = {e.name: e for e in entries}
    hydrates: dict[tuple, str] = {}
    crc_ions = _read_crc_ions(crc_ions_file())
    stated: dict[tuple[str, str, str], str] = {}  # (formula, phase, form) -> dgf_unc_kj_mol
    parents: dict[tuple[str, str, str], str] = {}  # (formula, phase, form) -> dgf_unc_parent
    parent_units: dict[tuple[str, str, str], str] = {}  # -> dgf_unc_parent_units (when not 1)
    remarks: dict[tuple[str, str, str], str] = {}  # the uncertainty remark, last in the note
    nea92_gibbs = {  # dG [kJ/mol] of the LLNL entries the NEA-TDB rows are derived from
        name: to_kj(*entries_by_name[name].value("delG0f")) for name in ("UO2++", "U++++")
    }
    entropies = element_entropies(_read_crc(crc_solids_file()))

    gibbs_now: list[dict] = [{}]  # dG of the tables, read once the element tables are built

    def accept(entry, stem) -> None:
        if entry.section in ("gases", "oxides") or not entry.value("delG0f"):
            return
        if entry.name in EXCLUDE:
            report.append(f"left out {entry.name}: {EXCLUDE[entry.name]}")
            return
        if entry.source not in refs and entry.source not in SAME_AS | MISSING_REFS.keys():
            report.append(f"left out {entry.name}: reference code {entry.source!r} not cited")
            return
        try:
            text, phase, form = formula_text(entry.name, entry.section, entry.formula)
        except FormulaError:
            report.append(f"left out {entry.name}: formula not read")
            return
        text, form, renamed = MINERAL_NAMES.get(entry.name, (text, form, ""))
        f = parse_formula(text)
        if not balanced(entry, f, entries_by_name):
            report.append(f"left out {entry.name}: its formula does not balance its reaction")
            return
        if abs(f.charge) > 6:
            report.append(f"left out {entry.name}: charge beyond +-6 (tables keep to +-6)")
            return
        if phase == "aq" and entry.charge is not None and f.charge != round(entry.charge):
            report.append(f"left out {entry.name}: charge {entry.charge} against {f.charge}")
            return
        extra = renamed
        printed = entry
        g = entry.value("delG0f")
        off = mismatch.get(entry.name, 0.0)
        if (
            abs(off) > 1.0
            and g[1].lower().startswith("kj")
            and abs(off + float(g[0]) * (KCAL - 1)) < 1.0
        ):
            # printed in kcal/mol but labelled kJ/mol: the entry's log K settles it
            printed = entry
            entry = relabel_kcal(entry)
            extra += (
                "; the file labels these numbers kJ but they are kcal (the entry's own log K at "
                f"25 C agrees with kcal within {abs(off + float(g[0]) * (KCAL - 1)):.2f} kJ/mol)"
            )
            off = 0.0
        if abs(off) > 1.0:
            report.append(
                f"left out {entry.name}: delG0f differs by {mismatch[entry.name]:+.1f} kJ/mol "
                "from its own log K at 25 C (a defect of the file)"
            )
            return
        key = (text + (":" + form if form else ""), phase)
        if key in taken or key in seen:
            return
        if phase == "aq" and water_signature(f) in hydrates:
            report.append(
                f"left out {entry.name}: the same species as {hydrates[water_signature(f)]} "
                "written with more or less water"
            )
            return
        seen.add(key)
        if phase == "aq":
            hydrates[water_signature(f)] = text
        used_codes.add(entry.source)
        row = _row(entry, text, phase, form, source_key(entry.source), extra, printed)
        if stem == ADDITIONS_STEM and entry.source in LOGK_CODES:
            row = _from_logk(row, entry, gibbs_now[0])
        row[-1] += crc_remark(f, phase, float(row[3]), crc_ions)
        if entry.source == "89cox/wag" and entry.name in CODATA_PLUS_MINUS:
            u, remark = codata_uncertainty(f, CODATA_PLUS_MINUS[entry.name])
            stated[(text, phase, form)] = f"{u:.2f}"
            remarks[(text, phase, form)] = remark
        elif entry.source == "92gre/fug" and entry.name in NEA92_LOG_K.keys() | NEA92_GIBBS:
            try:
                u, parent, remark = nea92_uncertainty(entry.name, float(row[3]), nea92_gibbs)
            except ValueError as exc:
                report.append(f"no NEA-TDB uncertainty for {entry.name}: {exc}")
            else:
                stated[(text, phase, form)] = f"{u:.2f}"
                remarks[(text, phase, form)] = remark
                if parent:
                    parents[(text, phase, form)] = parent
                if entry.name in NEA92_UNITS:
                    parent_units[(text, phase, form)] = str(NEA92_UNITS[entry.name])

        tables[stem].append(row)

    for symbol, stem in NEW_ELEMENTS.items():
        for entry in entries:
            if entry.section in ("gases", "oxides") or not entry.value("delG0f"):
                continue
            try:
                text, _, _ = formula_text(entry.name, entry.section, entry.formula)
            except FormulaError:
                continue
            if _selected(set(parse_formula(text).composition), text, symbol):
                owner = stem
                # a species goes to the table of its first new element in NEW_ELEMENTS order
                accept(entry, owner)
    by_name = {e.name: e for e in entries}
    gibbs_now[0] = _table_gibbs(species_dir, generated, tables)
    thermoddem = read_thermoddem_phases(pygcc_db() / THERMODDEM_FILE)
    thermoddem_refs = read_thermoddem_references(pygcc_db() / THERMODDEM_FILE)
    thermoddem_used: set[str] = set()
    for name in ADDITIONS:
        if name in FROM_THERMODDEM:
            row = _thermoddem_row(by_name[name], FROM_THERMODDEM[name], thermoddem, gibbs_now[0])
            tables[ADDITIONS_STEM].append(row)
            thermoddem_used.add(FROM_THERMODDEM[name][2])
            report.append(f"replaced {name}: log K of Thermoddem phase {FROM_THERMODDEM[name][0]}")
        elif name in by_name:
            accept(by_name[name], ADDITIONS_STEM)
        else:
            report.append(f"addition {name}: not in the file")

    thermoddem_aq = read_thermoddem_species(pygcc_db() / THERMODDEM_FILE)
    for stem, species in THERMODDEM_AQUEOUS.items():
        for choice in species:
            row = _thermoddem_aqueous_row(choice, thermoddem_aq, gibbs_now[0])
            tables[stem].append(row)
            seen.add((row[0], "aq"))
            hydrates[water_signature(parse_formula(row[0]))] = row[0]
            thermoddem_used.add(choice[2])
            report.append(f"replaced SUPCRT {choice[0]}(aq): log K of Thermoddem ({choice[2]})")
    crc = _read_crc(crc_solids_file())
    sup_path = pygcc_db() / SUPCRT_FILE
    sup_refs = supcrt_citations(read_supcrt_references(sup_path))
    sup_used: set[str] = set()
    for symbol, stem in NEW_ELEMENTS.items():
        shift, anchor_note = _supcrt_anchor(symbol, read_supcrt_cached(sup_path), crc_ions)
        # only the elements the LLNL file leaves thin take SUPCRT aqueous species
        for entry in read_supcrt_cached(sup_path) if symbol in SUPCRT_FILLS else ():
            if entry.phase != "aq":
                continue
            try:
                text, _, _ = formula_text(entry.name, "aqueous species", "")
                f = parse_formula(text)
            except FormulaError:
                continue
            if not _selected(set(f.composition), text, symbol) or (text, "aq") in taken | seen:
                continue
            if water_signature(f) in hydrates:
                continue
            if f.charge != entry.charge or dict(f.composition) != dict(entry.composition):
                continue
            code = entry.refs[0] if entry.refs else ""
            if code not in sup_refs or entry.field(0, 0) is None:
                continue
            seen.add((text, "aq"))
            hydrates[water_signature(f)] = text
            sup_used.add(code)
            g, h, s_ = (entry.field(0, k) for k in range(3))
            printed = (
                f"G {g} cal/mol"
                + (f", H {h} cal/mol" if h else "")
                + (f", S {s_} cal/(mol K)" if s_ else "")
            )
            moved = f.composition.get(symbol, 0) * shift
            anchored = f"; dG and dH shifted by {fmt(moved)} kJ/mol{anchor_note}" if moved else ""
            g_kj = to_kj(g, "kcal") / 1000 + moved
            tables[stem].append(
                [
                    text,
                    "aq",
                    "",
                    fmt(g_kj),
                    fmt(to_kj(h, "kcal") / 1000 + moved if h else None),
                    fmt(to_j(s_, "cal") if s_ else None),
                    "",
                    "",
                    "",
                    "",
                    "",
                    "",
                    "",
                    supcrt_key(code, sup_refs[code]),
                    f"read by species_data/import from SUPCRT {SUPCRT_FILE} entry '{entry.name}' ({printed}; "
                    f"ref {','.join(entry.refs)}); the LLNL file has no value for this species"
                    + crc_remark(f, "aq", g_kj, crc_ions).replace(
                        "this value is kept so that the element's species come from one compilation",
                        "the SUPCRT aqueous set is kept whole (its hydrolysis constants rest on it)"
                        + (
                            "; the solids of this element come from the CRC table, so solubilities "
                            "carry this difference"
                            if not moved
                            else ""
                        ),
                    )
                    + anchored,
                ]
            )
        for item in CRC_SOLIDS.get(symbol, ()):
            cas, text = item.split()
            text = parse_formula(text).text
            if (text, "s") in taken | seen:
                continue
            row = crc[cas]
            seen.add((text, "s"))
            tables[stem].append(
                [
                    text,
                    "s",
                    "",
                    fmt(float(row["Gfs"]) / 1000),
                    fmt(float(row["Hfs"]) / 1000) if row["Hfs"] else "",
                    row["S0s"],
                    row["Cps"],
                    "",
                    "",
                    "",
                    "",
                    "",
                    cas,
                    CRC_KEY,
                    f"read by species_data/import from the CRC table (CAS {cas}: {row['Chemical']}; "
                    f"Gf {row['Gfs']} J/mol, Hf {row['Hfs']} J/mol, S0 {row['S0s']} J/(mol K)); "
                    "the LLNL file has no value for this solid",
                ]
            )
    for stem, solids in THERMODDEM_SOLIDS.items():
        for choice in solids:
            tables[stem].append(_thermoddem_row(None, choice, thermoddem, gibbs_now[0]))
            thermoddem_used.add(choice[2])
    for symbol, (cas, phase) in CRC_ELEMENTS.items():
        stem = NEW_ELEMENTS[symbol]
        text = symbol + ("2" if phase == "g" else "")
        if (text, phase) in seen:
            continue
        row = crc[cas]
        s_col = "S0g" if phase == "g" else "S0s"
        tables[stem].insert(
            0,
            [
                text,
                phase,
                "",
                "0",
                "0",
                fmt(float(row[s_col])),
                "",
                "",
                "",
                "",
                "",
                "",
                cas,
                CRC_KEY,
                f"element reference state; S read by species_data/import from the CRC table "
                f"(CAS {cas}: {row['Chemical']}, S0 {row[s_col]} J/(mol K))",
            ],
        )

    index = SupcrtIndex(read_supcrt_cached(sup_path), sup_refs)
    llnl_index = _llnl_by_species(entries)
    llnl_aqueous = _llnl_aqueous(entries)
    transitions: list[list[str]] = []
    out: dict[str, str] = {}
    for f in sorted(species_dir.glob("*.csv")):
        if f.stem in generated or f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        # hand-typed tables: only the empty parameter columns are filled, the rest is kept
        with f.open(newline="", encoding="utf-8") as handle:
            header, *rows = list(csv.reader(handle))
        rows = [_verified_by_crc(header, row, crc) for row in rows]
        if f.stem in HAND_TABLES:
            rows = [_read_from_llnl(header, row, llnl_index, gibbs_now[0], crc) for row in rows]
        if f.stem in CROSS_TABLES:
            rows = [_cross_check(header, row, llnl_aqueous, gibbs_now[0]) for row in rows]
        cols, rows = _with_parameters(header, rows, index, transitions)
        out[f.name] = _csv_text(cols, rows)
    for stem, rows in sorted(tables.items()):
        if not rows:
            continue
        rows.sort(key=lambda r: (r[1] != "s" and r[1] != "l", r[0], r[2]))
        for row in rows:
            name = (row[0] + (":" + row[2] if row[2] else ""), row[1])
            if name in E0_NOTES:
                row[-1] += "; " + E0_NOTES[name] + E0_SPECIAL.get(name, E0_REASON)
            row[-1] += K_NOTES.get(name, "")
            row[-1] += gibbs_remark(
                parse_formula(row[0]),
                float(row[3]),
                float(row[4]) if row[4] else None,
                float(row[5]) if row[5] else None,
                entropies,
            )
            row[-1] += remarks.get((row[0], row[1], row[2]), "")
        cols, rows = _with_parameters(HEADER, rows, index, transitions)
        cols, rows = _with_uncertainty(cols, rows, stated, parents, parent_units)
        out[f"{stem}.csv"] = _csv_text(cols, rows)
    out["transitions/phase_transitions.csv"] = _csv_text(TRANSITIONS_HEADER, transitions)
    src = io.StringIO()
    writer = csv.writer(src, lineterminator="\n")
    writer.writerow(["key", "citation", "note"])
    for code in sorted(used_codes - set(SAME_AS)):
        writer.writerow(
            [
                source_key(code),
                refs.get(code) or MISSING_REFS[code],
                f"reference code {code} of the LLNL thermo.com.V8.R6 database; values read by "
                "species_data/import/run_import.py",
            ]
        )
    for code in sorted(sup_used | index.used):
        writer.writerow(
            [
                supcrt_key(code, sup_refs[code]),
                sup_refs[code],
                f"reference {code} of the SUPCRT file {SUPCRT_FILE}; values read by "
                "species_data/import/run_import.py",
            ]
        )
    for code in sorted(thermoddem_used):
        writer.writerow(
            [
                code,
                thermoddem_refs[code],
                f"reference {code} of the Thermoddem file {THERMODDEM_FILE}; values read by "
                "species_data/import/run_import.py",
            ]
        )
    writer.writerow([CRC_KEY, CRC_CITATION, "values read by the import"])
    out["sources_imported.csv"] = src.getvalue()
    for stem in sorted(tables):
        report.append(f"{stem}: {len(tables[stem])} rows")
    return out, "\n".join(report) + "\n"


# a SUPCRT citation printed as "in review" and later published (checked by hand)
SUPCRT_PUBLISHED = {
    "G12": (
        "Sassani, D. C.; Shock, E. L. Solubility and transport of platinum-group elements in "
        "supercritical fluids: summary and estimates of thermodynamic properties for ruthenium, "
        "rhodium, palladium, and platinum solids, aqueous ions, and aqueous complexes to 1000 C "
        "and 5 kbar. Geochim. Cosmochim. Acta 62, 2643-2671 (1998)."
    ),
}


def supcrt_citations(refs: dict[str, str]) -> dict[str, str]:
    """Codes like ``G7A`` ("corrected values based on G7") carry the cited paper's text."""
    out = dict(refs)
    out.update(SUPCRT_PUBLISHED)
    for code, text in refs.items():
        m = re.search(r"(?:based on data from|used in)\s+(\w+)", text)
        if m and m.group(1) in out and not re.search(r"(19|20)\d\d", text):
            out[code] = f"{out[m.group(1)]} [{text.strip()}]"
    return out


@functools.cache
def _crc_ion_rows() -> dict:
    """Rows of the CRC aqueous-ion table by (composition, charge)."""
    out = {}
    with crc_ions_file().open(newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle, delimiter="\t"):
            m = re.match(r"^(.*?)([+-])(\d*)$", row["Formula"])
            try:
                f = parse_formula(f"{m.group(1)}^{m.group(3)}{m.group(2)}") if m else None
            except FormulaError:
                continue
            if f is not None:
                out[(frozenset(f.composition.items()), f.charge)] = row
    return out


def _close(ours: str, printed: str, scale: float) -> bool:
    """Our value equals the CRC's to its last printed digit (0.1 kJ/mol or J/(mol K))."""
    return not ours or (printed != "" and abs(float(ours) - float(printed) / scale) <= 0.051)


def _verified_by_crc(header, row, crc) -> list[str]:
    """A hand row typed from memory whose values all equal the CRC table's: say so instead.

    Applies to NBS82 and CODATA89 rows only (the CRC table reprints those
    compilations); every value the row gives (dG, and dH and S when given) must
    equal the CRC value to the CRC's 0.1 kJ/mol and 0.1 J/(mol K).
    """
    values = dict(zip(header, row, strict=True))
    note = values.get("note", "")
    if "from memory" not in note or values.get("source") not in ("NBS82", "CODATA89"):
        return row
    if "which reprints this compilation" in note:
        return row  # checked already; a later "from memory" is about something else (e.g. +/-)
    try:
        f = parse_formula(values["formula"])
    except FormulaError:
        return row
    phase = values["phase"]
    if phase == "aq" and f.charge != 0:
        hit = _crc_ion_rows().get((frozenset(f.composition.items()), f.charge))
        if hit is None:
            return row
        checks = (
            ("dgf_kj_mol", "Gf(aq)", 1000),
            ("dhf_kj_mol", "Hf(aq)", 1000),
            ("s_j_molk", "S(aq)", 1),
        )
        where = f"the CRC table of aqueous ions ({hit['Formula']})"
    elif phase in ("s", "l", "g") and values.get("cas") in crc:
        hit = crc[values["cas"]]
        if hit["Hf" + phase] == "":
            return row
        if hit["Gf" + phase] == "":  # elements: Gf left blank, zero by definition
            hit = dict(hit, **{"Gf" + phase: "0"})
        checks = (
            ("dgf_kj_mol", "Gf" + phase, 1000),
            ("dhf_kj_mol", "Hf" + phase, 1000),
            ("s_j_molk", "S0" + phase, 1),
        )
        where = f"the CRC table (CAS {values['cas']}: {hit['Chemical']})"
    else:
        return row
    if not all(_close(values.get(col, ""), hit[key], scale) for col, key, scale in checks):
        return row
    values["note"] = note.replace(
        "from memory",
        f"typed by hand; its dG, dH and S (those given) equal {where}, which reprints this compilation",
        1,
    )
    return [values[c] for c in header]


def thermoddem_species(name: str) -> tuple[str, str]:
    """Our (formula text, phase) for a species of a Thermoddem reaction (``Fe+3``, ``H2O``)."""
    if name == "H2O":
        return "H2O", "l"
    m = re.match(r"^(.*?)([+-])(\d*)$", name)
    return parse_formula(f"{m.group(1)}^{m.group(3)}{m.group(2)}" if m else name).text, "aq"


def _table_gibbs(species_dir: Path, generated: set[str], tables: dict) -> dict:
    """Gibbs energies [kJ/mol] by (formula, phase) of the hand tables and rows generated so far."""
    out = {}
    for f in sorted(species_dir.glob("*.csv")):
        if f.stem in generated or f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        with f.open(newline="", encoding="utf-8") as handle:
            for row in csv.DictReader(handle):
                if not row.get("form"):
                    out[(parse_formula(row["formula"]).text, row["phase"])] = row["dgf_kj_mol"]
    for rows in tables.values():
        for row in rows:
            if not row[2]:
                out.setdefault((row[0], row[1]), row[3])
    return out


def llnl_species(name: str) -> tuple[str, str]:
    """Our (formula text, phase) for a species of an LLNL reaction (``Fe+++``, ``H2O``)."""
    return ("H2O", "l") if name == "H2O" else (formula_text(name, "aqueous species", "")[0], "aq")


def _from_logk(row: list[str], entry, gibbs: dict) -> list[str]:
    """The row with dG from the entry's log K at 25 C and these tables' reaction species.

    Unchanged when those species differ from the file's values by 1 kJ/mol or less in all.
    """
    file_g = {e.name: e for e in _LLNL_ENTRIES}
    shift, total, used = 0.0, RT_LN10 * float(entry.logk[1]), []
    for coefficient, name in entry.reaction:
        key = llnl_species(name)
        if key == ("H^+", "aq"):
            continue
        ours = float(gibbs[key])
        total += float(coefficient) * ours
        shift += float(coefficient) * (ours - to_kj(*file_g[name].value("delG0f")))
        used.append(f"dG({key[0]}) {gibbs[key]}")
    if abs(shift) <= 1.0:
        return row
    out = list(row)
    out[3] = fmt(total)
    out[4] = out[5] = ""
    out[-1] += (
        f"; dG converted from the entry's log K at 25 C ({entry.logk[1]}; {entry.source} reports "
        f"equilibrium constants) with {', '.join(used)} of these tables, as the file's values of "
        f"these species differ by {shift:+.1f} kJ/mol in all (the printed delG0f would shift the "
        f"constant by {-shift / RT_LN10:+.2f}); dH and S left out with it"
    )
    return out


def _supcrt_anchor(symbol: str, supcrt_entries, crc_ions: dict) -> tuple[float, str]:
    """Shift per atom [kJ/mol] that puts the element's SUPCRT base ion on its NBS82 value."""
    if symbol not in SUPCRT_ANCHOR:
        return 0.0, ""
    ion = parse_formula(SUPCRT_ANCHOR[symbol])
    entry = next(
        e
        for e in supcrt_entries
        if e.phase == "aq"
        and e.charge == ion.charge
        and dict(e.composition) == dict(ion.composition)
    )
    printed = to_kj(entry.field(0, 0), "kcal") / 1000
    nbs = crc_ions[(frozenset(ion.composition.items()), ion.charge)]
    shift = (nbs - printed) / ion.composition[symbol]
    return shift, (
        f" ({fmt(shift)} per {symbol}): the SUPCRT set is anchored on the NBS82 {ion.text} of the "
        f"CRC table of aqueous ions ({nbs:.1f} kJ/mol, against {fmt(printed)} here), the "
        f"compilation of this element's solids, so that the set's hydrolysis constants are kept "
        f"and its ions agree with the solids"
    )


def _thermoddem_aqueous_row(choice, species, gibbs) -> list[str]:
    """Row of an aqueous species from its Thermoddem formation constant and these tables."""
    name, printed_code, cited, why = choice
    block = species[name]
    if block.source != printed_code:
        raise SystemExit(f"Thermoddem {name}: reference {block.source}, not {printed_code}")
    text = thermoddem_species(name)[0]
    used = []
    # formed = reactants - other products: dG = sum(reactants) - sum(others) - RT ln10 log K
    total = -RT_LN10 * float(block.logk)
    for sign, side in ((1, block.reactants), (-1, block.products)):
        for coefficient, other in side:
            key = thermoddem_species(other)
            if key != ("H^+", "aq"):
                total += sign * float(coefficient) * float(gibbs[key])
                used.append(f"dG({key[0]}) {gibbs[key]}")
    reaction = " + ".join(f"{c}{n}" for c, n in block.reactants) + f" = {name}"
    reaction += "".join(f" + {c}{n}" for c, n in block.products)
    note = (
        f"read by species_data/import from Thermoddem {THERMODDEM_FILE} species '{name}' "
        f"({reaction}, log_k {block.logk}; reference code {block.source}), converted to dG with "
        f"{', '.join(used)} of these tables; {why}"
    )
    return [text, "aq", "", fmt(total), "", "", "", "", "", "", "", "", "", cited, note]


def _thermoddem_row(entry, choice, phases, gibbs) -> list[str]:
    """Row of an LLNL mineral from the log K the Thermoddem file prints for it."""
    phase_name, printed_code, cited, why = choice
    phase = phases[phase_name]
    if phase.source != printed_code:
        raise SystemExit(f"Thermoddem {phase_name}: reference {phase.source}, not {printed_code}")
    if entry is None:  # a solid only this file holds
        text, form = parse_formula(phase.formula).text, ""
    else:
        text, _, form = formula_text(entry.name, entry.section, entry.formula)
        text, form, _ = MINERAL_NAMES.get(entry.name, (text, form, ""))
    used = []
    total = RT_LN10 * float(phase.logk)
    for sign, side in ((1, phase.products), (-1, phase.reactants)):
        for coefficient, name in side:
            key = thermoddem_species(name)
            value = 0.0 if key == ("H^+", "aq") else float(gibbs[key])
            total += sign * float(coefficient) * value
            if key != ("H^+", "aq"):
                used.append(f"dG({key[0]}) {gibbs[key]}")
    reaction = " + ".join([phase.formula] + [f"{c}{n}" for c, n in phase.reactants])
    reaction += " = " + " + ".join(f"{c}{n}" for c, n in phase.products)
    note = (
        f"read by species_data/import from Thermoddem {THERMODDEM_FILE} phase '{phase_name}' "
        f"({reaction}, log_k {phase.logk}; reference code {phase.source}), converted to dG with "
        f"{', '.join(used)} of these tables; {why}"
    )
    if entry is not None:
        old = to_kj(*entry.value("delG0f"))
        note += (
            f": the LLNL entry '{entry.name}' (reference code {entry.source}, delG0f "
            f"{' '.join(entry.value('delG0f'))}) gives log K "
            f"{float(phase.logk) + (old - total) / RT_LN10:.2f} for this reaction with these tables"
        )
    return [text, "s", form, fmt(total), "", "", "", "", "", "", "", "", "", cited, note]


# hand rows typed from memory whose compilation the LLNL file reprints under its own code: their
# values are read from the file (our source key -> LLNL reference code); a hydrolysis constant
# (Baes & Mesmer) is read as the entry's log K and converted with these tables' values
HAND_CODES = {"BM76": "76bae/mes", "NBS82": "82wag/eva"}
# tables whose rows this pass reads (the others keep their typed rows until reviewed)
HAND_TABLES = (
    "carbon", "chromium", "cobalt", "iron", "lead", "manganese", "nitrogen", "sulfur", "titanium",
)  # fmt: skip
_HAND_PREFIX = "read by species_data/import from LLNL "
_BM76_CLAUSE = re.compile(
    r"from memory; log \*beta\d* = \S+ (?:\(.*?\) )?converted with [^;]*?-237\.129(?:; |$)"
)


def _llnl_by_species(entries) -> dict:
    """LLNL entries of the codes in HAND_CODES by (formula text, phase, form)."""
    out = {}
    for e in entries:
        if e.source not in HAND_CODES.values() or not e.value("delG0f"):
            continue
        try:
            if e.section == "gases":
                text, phase, form = parse_formula(e.name.removesuffix("(g)")).text, "g", ""
            else:
                text, phase, form = formula_text(e.name, e.section, e.formula)
        except FormulaError:
            continue
        out.setdefault((text, phase, form), e)
    return out


# tables whose aqueous rows typed from memory get a cross-check against the LLNL file's constant
# for the same species from another study (the typed value stays; the note gives both)
CROSS_TABLES = HAND_TABLES + ("gold", "molybdenum", "silver", "tin", "chlorine", "cyanide")
_CROSS = re.compile(r"; cross-check: the LLNL file[^;]*$")


def _llnl_aqueous(entries) -> dict:
    """LLNL aqueous entries with a log K at 25 C, by our formula text."""
    out = {}
    for e in entries:
        if e.section != "aqueous species" or len(e.logk) < 2 or e.logk[1].startswith("500"):
            continue
        try:
            out.setdefault(formula_text(e.name, "aqueous species", "")[0], e)
        except FormulaError:
            continue
    return out


def _cross_check(header, row, index, gibbs) -> list[str]:
    """A row typed from memory with the LLNL file's constant for the same species beside it."""
    values = dict(zip(header, row, strict=True))
    note = _CROSS.sub("", values["note"])
    if "from memory" not in note or values["phase"] != "aq":
        return row
    entry = index.get(parse_formula(values["formula"]).text)
    if entry is None:
        return row
    try:
        basis = sum(
            float(c) * (0.0 if n == "H+" else float(gibbs[llnl_species(n)]))
            for c, n in entry.reaction
        )
    except (KeyError, FormulaError):
        return row
    ours = (float(values["dgf_kj_mol"]) - basis) / RT_LN10
    values["note"] = note + (
        f"; cross-check: the LLNL file's entry '{entry.name}' (reference code {entry.source}) "
        f"gives log K {float(entry.logk[1]):.2f} for its dissociation where this row gives "
        f"{ours:.2f} with these tables ({ours - float(entry.logk[1]):+.2f})"
    )
    return [values[c] for c in header]


def _read_from_llnl(header, row, index, gibbs, crc) -> list[str]:
    """A hand row typed from memory, its values read from the LLNL entry of its compilation.

    The file gives no heat capacity: a Cp the row holds is checked against the CRC table
    (same CAS, to its 0.1 J/(mol K)) or stays marked as typed from memory.
    """
    values = dict(zip(header, row, strict=True))
    note = values["note"]
    code = HAND_CODES.get(values["source"])
    if code is None or not (_HAND_PREFIX in note or "from memory" in note):
        return row
    try:
        text = parse_formula(values["formula"]).text
    except FormulaError:
        return row
    entry = index.get((text, values["phase"], values.get("form", "")))
    if entry is None or entry.source != code:
        return row
    if code == "76bae/mes":
        rest = note.partition(" of these tables; ")[2] if _HAND_PREFIX in note else note
        rest = _BM76_CLAUSE.sub("", rest, count=1)
        total, used = RT_LN10 * float(entry.logk[1]), []
        for coefficient, name in entry.reaction:
            key = llnl_species(name)
            if key != ("H^+", "aq"):
                total += float(coefficient) * float(gibbs[key])
                used.append(f"dG({key[0]}) {gibbs[key]}")
        values["dgf_kj_mol"] = fmt(total)
        head = (
            f"{_HAND_PREFIX}{LLNL_FILE} entry '{entry.name}' (log K at 25 C {entry.logk[1]} for "
            f"the entry's dissociation; reference code {code}): dG converted from the entry's log "
            f"K with {', '.join(used)} of these tables"
        )
    else:
        rest = note.partition(f"{code}); ")[2] if _HAND_PREFIX in note else note
        rest = rest.replace("from memory; ", "", 1).replace("; from memory", "", 1)
        if values.get("cp_j_molk") and not rest.startswith("Cp "):
            printed_cp = crc.get(values.get("cas"), {}).get(
                "Cps" if values["phase"] == "s" else "Cpg"
            )
            if values["phase"] in "sg" and _close(values["cp_j_molk"], printed_cp or "", 1):
                rest = f"Cp equals the CRC table's ({printed_cp}, CAS {values['cas']}); " + rest
            else:
                rest = "Cp typed from memory (the file gives none); " + rest
        printed = []
        for column, key, convert in (
            ("dgf_kj_mol", "delG0f", to_kj),
            ("dhf_kj_mol", "delH0f", to_kj),
            ("s_j_molk", "S0", to_j),
        ):
            got = entry.value(key)
            if got:
                values[column] = fmt(convert(*got))
                printed.append(f"{key} {got[0]} {got[1]}")
        head = (
            f"{_HAND_PREFIX}{LLNL_FILE} entry '{entry.name}' ({', '.join(printed)}; reference "
            f"code {code})"
        )
    if "from memory" in rest:  # partly typed: the note does not open as an imported row's
        head = "values " + head
    values["note"] = head + ("; " + rest if rest else "")
    return [values[c] for c in header]


def _csv_text(header, rows) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(rows)
    return buffer.getvalue()


_SUPCRT_CACHE: dict = {}


def read_supcrt_cached(path: Path):
    """Entries of a SUPCRT file, read once."""
    if path not in _SUPCRT_CACHE:
        _SUPCRT_CACHE[path] = read_supcrt(path)
    return _SUPCRT_CACHE[path]


def supcrt_key(code: str, citation: str) -> str:
    """Source key for a SUPCRT reference: first author and year, plus the code."""
    author = re.match(r"([A-Za-z']+)", citation)
    year = re.search(r"(19|20)(\d\d)", citation)
    return (
        f"{author.group(1).upper() if author else 'SUPCRT'}{year.group(2) if year else ''}-{code}"
    )


def _read_crc(path: Path) -> dict[str, dict[str, str]]:
    with path.open(newline="", encoding="utf-8") as handle:
        return {row["CAS"]: row for row in csv.DictReader(handle, delimiter="\t")}


def main(argv=None) -> int:
    """Run the import; write the tables and the report."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--out", type=Path, default=HERE.parent, help="output folder")
    args = parser.parse_args(argv)
    files, report = build(HERE.parent)
    args.out.mkdir(parents=True, exist_ok=True)
    for name, text in files.items():
        (args.out / name).parent.mkdir(parents=True, exist_ok=True)
        (args.out / name).write_text(text, encoding="utf-8")
    (args.out / "import" if args.out == HERE.parent else args.out).mkdir(exist_ok=True)
    target = HERE if args.out == HERE.parent else args.out
    (target / "import_report.txt").write_text(report, encoding="utf-8")
    print(report, end="")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
