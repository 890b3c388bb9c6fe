"""Field measurements on a map: read a CSV of (pH, potential, reference) readings, convert and classify them."""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from pourbaix.errors import DataFileError, OptionError

__all__ = [
    "FieldReading",
    "FieldProblem",
    "FieldData",
    "read_field_csv",
    "place_readings",
    "field_readings",
    "place_readings_at_temperature",
    "series_of",
    "GROUPINGS",
    "field_table_lines",
]

REQUIRED_COLUMNS = ("ph", "potential_v", "reference")
OPTIONAL_COLUMNS = ("temperature_c", "label", "time", "site")
#: How readings meet maps: one map per temperature of the readings (rounded to
#: TEMPERATURE_STEP_C), one map per reading, or every reading on the one map.
GROUPINGS = ("temperature", "reading", "none")
#: Readings whose temperatures round to the same step share a map [°C].
TEMPERATURE_STEP_C = 1.0
#: pH values accepted in a reading [-] (beyond this a number is almost surely a typing slip).
PH_LIMITS = (-2.0, 16.0)
#: Temperatures accepted [°C] (the range of the temperature routes).
TEMPERATURE_LIMITS_C = (0.0, 300.0)
#: A reading taken this far from the map's temperature gets a note [°C].
TEMPERATURE_NOTE_C = 5.0


@dataclass(frozen=True)
class FieldReading:
    """One usable reading.

    Attributes
    ----------
    line : int
        Line number in the file (1 = header).
    ph : float
        Measured pH [-].
    potential_v : float
        Measured potential [V vs ``reference``].
    reference : str
        Reference electrode (registry name).
    temperature_c : float or None
        Temperature of the reading [°C]; None when the file has none (the
        map's temperature is then used for the conversion).
    label : str
        Sample name or note ("" if none).
    time : str
        Time stamp as written ("" if none).
    site : str
        Where the reading was taken ("" if none); readings of one site over
        time form one path on the map.
    potential_v_she : float or None
        Potential converted to SHE [V vs SHE] (set when placed on a map).
    potential_v_map : float or None
        Potential vs the map's reference [V] (set when placed).
    species, state : str or None
        Stable species (assemblage) and corrosion reading at the point (set when placed).
    margin_down_v, margin_up_v : float or None
        Distance to the boundaries below and above [V] (inf where none).
    margin_acid_ph, margin_alkaline_ph : float or None
        Distance to the boundaries towards lower and higher pH [pH units].
    neighbour_down, neighbour_up, neighbour_acid, neighbour_alkaline : str or None
        Species across those boundaries.
    notes : tuple of str
        Remarks on this reading (e.g. measured far from the map's temperature).
    """

    line: int
    ph: float
    potential_v: float
    reference: str
    temperature_c: float | None = None
    label: str = ""
    time: str = ""
    site: str = ""
    potential_v_she: float | None = None
    potential_v_map: float | None = None
    species: str | None = None
    state: str | None = None
    margin_down_v: float | None = None
    margin_up_v: float | None = None
    margin_acid_ph: float | None = None
    margin_alkaline_ph: float | None = None
    neighbour_down: str | None = None
    neighbour_up: str | None = None
    neighbour_acid: str | None = None
    neighbour_alkaline: str | None = None
    notes: tuple = ()


@dataclass(frozen=True)
class FieldProblem:
    """A row that could not be used.

    Attributes
    ----------
    line : int
        Line number in the file.
    column : str
        Column at fault ("" for the row as a whole).
    reason : str
        What is wrong and what would be valid.
    """

    line: int
    column: str
    reason: str

    def __str__(self):
        where = f"line {self.line}" + (f", column {self.column}" if self.column else "")
        return f"{where}: {self.reason}"


@dataclass
class FieldData:
    """Readings from a file: the usable rows and the problems found.

    Attributes
    ----------
    path : str
        The file read.
    rows : list of FieldReading
        Usable readings, in file order (or time order when every row has an
        ISO-8601 time).
    problems : list of FieldProblem
        Rows left out, with line numbers and reasons.
    has_time : bool
        Whether the file has a time column (the readings are a time series).
    reference : str or None
        The map's reference once placed.
    map_temperature_c : float or None
        The map's temperature once placed [°C].
    """

    path: str
    rows: list
    problems: list
    has_time: bool = False
    reference: str | None = None
    map_temperature_c: float | None = None
    notes: list = field(default_factory=list)

    def to_frame(self):
        """The readings as a pandas DataFrame (pandas is an optional extra).

        Returns
        -------
        pandas.DataFrame
            One row per reading, the columns of :meth:`table`.
        """
        from pourbaix.frames import as_frame

        return as_frame(self.table())

    def _repr_html_(self):
        try:
            return self.to_frame()._repr_html_()
        except OptionError:
            return None  # no pandas: the plain text form is shown

    def table(self):
        """The readings as plain dicts (JSON-ready; inf -> None).

        Returns
        -------
        list of dict
        """
        out = []
        for r in self.rows:
            d = {}
            for k in FieldReading.__dataclass_fields__:
                v = getattr(r, k)
                if isinstance(v, float) and not math.isfinite(v):
                    v = None
                if isinstance(v, tuple):
                    v = list(v)
                d[k] = v
            out.append(d)
        return out


def _norm_header(name):
    return name.strip().lower().replace(" ", "_").replace("-", "_")


def _number(text, column, line, problems, *, limits=None, unit=""):
    t = text.strip()
    if t == "":
        problems.append(
            FieldProblem(line, column, f"empty; give a number{(' in ' + unit) if unit else ''}")
        )
        return None
    try:
        v = float(t.replace("\u2212", "-"))  # a typographic minus sign from spreadsheets
    except ValueError:
        hint = " (use a point as the decimal separator)" if "," in t else ""
        problems.append(FieldProblem(line, column, f"{t!r} is not a number{hint}"))
        return None
    if not math.isfinite(v):
        problems.append(FieldProblem(line, column, f"{t!r} is not a finite number"))
        return None
    if limits is not None and not (limits[0] <= v <= limits[1]):
        problems.append(
            FieldProblem(
                line,
                column,
                f"{v:g}{unit and ' ' + unit} is outside {limits[0]:g} to {limits[1]:g}",
            )
        )
        return None
    return v


def read_field_csv(path):
    r"""Read field readings from a CSV file.

    Parameters
    ----------
    path : str or Path
        CSV with a header row. Required columns: ``ph``, ``potential_v`` (V
        vs the row's electrode) and ``reference`` (e.g. SCE, Cu/CuSO4,
        Ag/AgCl-sat, SHE, RHE); optional ``temperature_c`` [°C], ``label``
        ``time`` (ISO 8601 sorts the rows by time) and ``site`` (readings of
        one site over time are drawn as one path). Lines starting with
        ``#`` and blank lines are skipped but counted.

    Returns
    -------
    FieldData
        The usable rows and, for every other row, its line number and reason.

    Raises
    ------
    DataFileError
        If the file cannot be read, has no header, or lacks a required column
        (nothing can be used then).

    Examples
    --------
    >>> import tempfile, os
    >>> with tempfile.NamedTemporaryFile("w", suffix=".csv", delete=False) as f:
    ...     _ = f.write("ph,potential_v,reference\n7.2,-0.65,SCE\n7.1,abc,SCE\n")
    >>> d = read_field_csv(f.name); os.unlink(f.name)
    >>> len(d.rows), str(d.problems[0])
    (1, "line 3, column potential_v: 'abc' is not a number")
    """
    from pourbaix.errors import PourbaixError
    from pourbaix.physics.electrodes import get_reference

    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise DataFileError(
            [(str(p), 0, "", f"cannot read the file ({exc.__class__.__name__}: {exc})")]
        ) from None
    lines = text.splitlines()
    header, header_line = None, 0
    body = []
    for n, raw in enumerate(lines, 1):
        if not raw.strip() or raw.lstrip().startswith("#"):
            continue
        if header is None:
            header, header_line = raw, n
        else:
            body.append((n, raw))
    if header is None:
        raise DataFileError(
            [
                (
                    str(p),
                    1,
                    "",
                    "no header row; the first line must name the columns: "
                    + ",".join(REQUIRED_COLUMNS),
                )
            ]
        )
    cols = [_norm_header(c) for c in next(csv.reader([header]))]
    missing = [c for c in REQUIRED_COLUMNS if c not in cols]
    if missing:
        hint = (
            " (the file looks semicolon-separated; use commas)"
            if ";" in header and "," not in header
            else ""
        )
        raise DataFileError(
            [
                (
                    str(p),
                    header_line,
                    ", ".join(missing),
                    f"missing column(s) {', '.join(missing)}; the header must hold "
                    f"{', '.join(REQUIRED_COLUMNS)} and may hold {', '.join(OPTIONAL_COLUMNS)}{hint}",
                )
            ]
        )
    dup = sorted({c for c in cols if c and cols.count(c) > 1})
    if dup:
        raise DataFileError(
            [(str(p), header_line, ", ".join(dup), f"column(s) named twice: {', '.join(dup)}")]
        )
    idx = {c: cols.index(c) for c in (*REQUIRED_COLUMNS, *OPTIONAL_COLUMNS) if c in cols}
    rows, problems = [], []
    for n, raw in body:
        fields = next(csv.reader([raw]))
        if len(fields) < len(cols):
            lacking = [c for c in cols[len(fields) :] if c in REQUIRED_COLUMNS]
            if lacking:
                problems.append(
                    FieldProblem(
                        n,
                        ", ".join(lacking),
                        f"row has {len(fields)} field(s) for {len(cols)} columns; missing {', '.join(lacking)}",
                    )
                )
                continue
            fields = fields + [""] * (len(cols) - len(fields))
        elif len(fields) > len(cols):
            problems.append(
                FieldProblem(
                    n,
                    "",
                    f"row has {len(fields)} fields for {len(cols)} columns (a comma inside a value needs quotes)",
                )
            )
            continue
        found = []
        ph = _number(fields[idx["ph"]], "ph", n, found, limits=PH_LIMITS)
        e = _number(fields[idx["potential_v"]], "potential_v", n, found, unit="V")
        unit_col = next((c for c in ("unit", "units") if c in cols), None)
        if unit_col is not None and cols.index(unit_col) < len(fields):
            unit = fields[cols.index(unit_col)].strip()
            if unit.lower() not in ("", "v", "volt", "volts"):
                found.append(
                    FieldProblem(
                        n,
                        unit_col,
                        f"unit {unit[:20]!r}: potential_v is read in volts; convert the value "
                        "to V (e.g. -650 mV -> -0.65) and write V here",
                    )
                )
        if e is not None and abs(e) > 5.0:
            found.append(
                FieldProblem(
                    n,
                    "potential_v",
                    f"{e:g} V is beyond ±5 V; potentials are in volts (write -0.65, not -650)",
                )
            )
            e = None
        ref_text = fields[idx["reference"]].strip()
        ref = None
        if not ref_text:
            found.append(
                FieldProblem(
                    n,
                    "reference",
                    "empty; name the reference electrode (see `pourbaix references`)",
                )
            )
        else:
            try:
                ref = get_reference(ref_text).name
            except PourbaixError as exc:
                found.append(FieldProblem(n, "reference", str(exc)))
        t = None
        if "temperature_c" in idx and fields[idx["temperature_c"]].strip():
            t = _number(
                fields[idx["temperature_c"]],
                "temperature_c",
                n,
                found,
                limits=TEMPERATURE_LIMITS_C,
                unit="°C",
            )
        if found:
            problems += found
            continue
        label = fields[idx["label"]].strip() if "label" in idx else ""
        time = fields[idx["time"]].strip() if "time" in idx else ""
        site = fields[idx["site"]].strip() if "site" in idx else ""
        rows.append(
            FieldReading(
                line=n,
                ph=ph,
                potential_v=e,
                reference=ref,
                temperature_c=t,
                label=label,
                time=time,
                site=site,
            )
        )
    has_time = "time" in idx
    notes = []
    if has_time and rows:
        from datetime import datetime

        try:
            stamps = [datetime.fromisoformat(r.time) for r in rows]
        except ValueError:
            notes.append(
                "times are not all ISO 8601 (e.g. 2024-05-01T08:30); rows kept in file order"
            )
        else:
            try:
                order = sorted(range(len(rows)), key=lambda k: stamps[k])
            except TypeError:  # mixed naive and zoned times
                notes.append("times mix zoned and unzoned stamps; rows kept in file order")
            else:
                if order != list(range(len(rows))):
                    notes.append("rows sorted by time")
                rows = [rows[k] for k in order]
    return FieldData(path=str(p), rows=rows, problems=problems, has_time=has_time, notes=notes)


def place_readings(dmap, data):
    """Convert readings to the map's reference and classify them on the map.

    Parameters
    ----------
    dmap : DomainMap
        The map (any reference electrode, any system).
    data : FieldData
        From :func:`read_field_csv`.

    Returns
    -------
    FieldData
        A copy whose rows carry the potential vs SHE and vs the map's
        reference, the stable species, the state and the margins.

    Notes
    -----
    E(vs SHE) = E(vs electrode) + offset(electrode, T of the reading), with
    the electrode's published temperature dependence (pourbaix.physics.electrodes;
    RHE: E_SHE = E_RHE - k_T pH, Nernst). The point is then expressed vs the
    map's reference and classified with the map's exact probe; the map is
    for its own temperature, and a reading taken more than
    ``TEMPERATURE_NOTE_C`` away is flagged.
    """
    import warnings

    from pourbaix.physics.electrodes import to_she

    c = dmap.conditions
    out = []
    notes = list(data.notes)
    if not data.rows:
        return replace(
            data, rows=[], reference=c.reference, map_temperature_c=c.temperature_c, notes=notes
        )
    she = []
    row_notes = []
    for r in data.rows:
        t = c.temperature_c if r.temperature_c is None else r.temperature_c
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            she.append(float(to_she(r.potential_v, r.reference, t, ph=r.ph)))
        rn = [str(w.message) for w in caught]
        if (
            r.temperature_c is not None
            and abs(r.temperature_c - c.temperature_c) > TEMPERATURE_NOTE_C
        ):
            rn.append(f"measured at {r.temperature_c:g} °C, the map is for {c.temperature_c:g} °C")
        row_notes.append(tuple(rn))
    ph = np.array([r.ph for r in data.rows])
    e_she = np.array(she)
    e_map = np.asarray(c.from_she(ph, e_she), dtype=float)
    res = dmap.probe(ph, e_map)
    for k, r in enumerate(data.rows):
        out.append(
            replace(
                r,
                potential_v_she=float(e_she[k]),
                potential_v_map=float(e_map[k]),
                species=str(res.species[k]),
                state=str(res.state[k]),
                margin_down_v=float(res.margin_down_v[k]),
                margin_up_v=float(res.margin_up_v[k]),
                margin_acid_ph=float(res.margin_acid_ph[k]),
                margin_alkaline_ph=float(res.margin_alkaline_ph[k]),
                neighbour_down=str(res.neighbour_down[k]),
                neighbour_up=str(res.neighbour_up[k]),
                neighbour_acid=str(res.neighbour_acid[k]),
                neighbour_alkaline=str(res.neighbour_alkaline[k]),
                notes=row_notes[k],
            )
        )
    x0, x1, y0, y1 = dmap.window
    outside = [r.line for r in out if not (x0 <= r.ph <= x1 and y0 <= r.potential_v_map <= y1)]
    if outside:
        notes.append(
            "outside the drawn window (classified all the same): line(s) "
            + ", ".join(map(str, outside))
        )
    return replace(
        data, rows=out, reference=c.reference, map_temperature_c=c.temperature_c, notes=notes
    )


def field_readings(dmap_or_element, path, **conditions):
    """Read a CSV of readings and place them on a map.

    Parameters
    ----------
    dmap_or_element : DomainMap or str
        A computed map, or an element whose map is computed with ``conditions``.
    path : str or Path
        The CSV file (see :func:`read_field_csv`).
    **conditions
        Keyword arguments of :func:`pourbaix.maps.domain_map.compute_map`.

    Returns
    -------
    (DomainMap, FieldData)
        The map and the placed readings with their problems.

    Raises
    ------
    DataFileError
        If the file is unusable as a whole.
    OptionError
        If conditions are given with a computed map.
    """
    from pourbaix.maps.domain_map import DomainMap, compute_map

    if isinstance(dmap_or_element, DomainMap):
        if conditions:
            raise OptionError("give either a computed map or an element with conditions, not both")
        dmap = dmap_or_element
    else:
        dmap = compute_map(dmap_or_element, **conditions)
    data = read_field_csv(path)
    return dmap, place_readings(dmap, data)


def series_of(data):
    """Readings of one site over time: lists of row indices, in time order, two or more each.

    Only a file with a ``time`` column has series. Rows are grouped by
    ``site``; a file without a site column groups them by ``label`` when
    labels repeat (a site's name written on each reading); otherwise the
    whole file is one site's series.

    Parameters
    ----------
    data : FieldData
        Readings (placed or not).

    Returns
    -------
    list of list of int
    """
    if not data.has_time:
        return []
    labels = [r.label for r in data.rows]
    if any(r.site for r in data.rows):
        keys = [r.site for r in data.rows]
    elif any(labels.count(x) > 1 for x in labels if x):
        keys = labels  # a label repeated over time names a site
    else:
        keys = [""] * len(data.rows)  # labels name readings (week 1, week 2 ...): one site
    groups = {}
    for k, key in enumerate(keys):
        if key or not any(keys):
            groups.setdefault(key, []).append(k)
    return [g for g in groups.values() if len(g) > 1]


def place_readings_at_temperature(element, data, *, group="temperature", **conditions):
    """Place each reading on the map at its own temperature.

    Parameters
    ----------
    element : str or sequence of str
        Element(s) of the maps.
    data : FieldData
        From :func:`read_field_csv`.
    group : {"temperature", "reading", "none"}
        ``"temperature"``: one map per temperature of the readings, rounded to
        ``TEMPERATURE_STEP_C``; ``"reading"``: each reading classified on
        the map at its exact temperature; ``"none"``: every reading on the one
        map of ``conditions`` (readings far from its temperature get a note).
        Readings without a temperature use the temperature of ``conditions``.
    **conditions
        Keyword arguments of :func:`pourbaix.maps.domain_map.compute_map`.

    Returns
    -------
    list of (DomainMap, FieldData)
        One entry per map, coldest first; the rows keep their time order.

    Raises
    ------
    OptionError
        For an unknown ``group``.
    """
    from pourbaix.maps.domain_map import compute_map

    if group not in GROUPINGS:
        raise OptionError(f"unknown grouping {group!r}; valid: {', '.join(GROUPINGS)}")
    if group == "none" or not data.rows:
        dmap = compute_map(element, **conditions)
        return [(dmap, place_readings(dmap, data))]
    default_t = float(conditions.get("temperature_c", 25.0) or 25.0)
    keys = []
    for r in data.rows:
        t = default_t if r.temperature_c is None else r.temperature_c
        if group == "temperature":
            t = round(t / TEMPERATURE_STEP_C) * TEMPERATURE_STEP_C
        keys.append(float(t))
    out = []
    for n, t in enumerate(sorted(set(keys))):
        rows = [r for r, k in zip(data.rows, keys, strict=True) if k == t]
        dmap = compute_map(element, **{**conditions, "temperature_c": t})
        subset = replace(data, rows=rows, problems=list(data.problems) if n == 0 else [])
        out.append((dmap, place_readings(dmap, subset)))
    return out


def _fmt(v, unit):
    if v is None or not math.isfinite(v):
        return "-"
    return f"{v * 1000:.0f}" if unit == "mV" else f"{v:.2f}"


def field_table_lines(data, groups=None):
    """Plain-text table of placed readings (used by the command line).

    Names are shown in full (the column is as wide as the longest); the
    potential vs the map's reference is shown only when that reference is
    not SHE (it would repeat the SHE column); with readings placed on maps
    of several temperatures a column gives each reading's map temperature.
    """
    parts = groups if groups is not None else [(None, data)]
    rows = [(d, r) for _, d in parts for r in d.rows]
    ref = data.reference
    show_map = ref != "SHE"
    show_t = groups is not None and len(groups) > 1
    names = [
        (r.site + ": " if r.site and r.site != r.label else "") + (r.label or r.time)
        for _, r in rows
    ]
    nw = max([len("label"), *map(len, names)])
    head = f"{'line':>4}  {'label':<{nw}} {'pH':>5}  {'E meas [V]':>10} {'electrode':<16} {'E SHE [V]':>9}"
    if show_map:
        head += f"  {'E ' + ref + ' [V]':>12}"
    if show_t:
        head += f"  {'map °C':>6}"
    head += (
        f"  {'state':<11} {'species':<24} {'down mV':>7} {'up mV':>6} {'acid pH':>7} {'alk pH':>6}"
    )
    out = [head]
    for (d, r), name in zip(rows, names, strict=True):
        line = (
            f"{r.line:>4}  {name:<{nw}} {r.ph:5.2f}  {r.potential_v:+10.3f} {r.reference:<16} "
            f"{r.potential_v_she:+9.3f}"
        )
        if show_map:
            line += f"  {r.potential_v_map:+12.3f}"
        if show_t:
            line += f"  {d.map_temperature_c:6g}"
        line += (
            f"  {r.state:<11} {r.species:<24} {_fmt(r.margin_down_v, 'mV'):>7} "
            f"{_fmt(r.margin_up_v, 'mV'):>6} {_fmt(r.margin_acid_ph, 'pH'):>7} {_fmt(r.margin_alkaline_ph, 'pH'):>6}"
        )
        out.append(line)
        for note in r.notes:
            out.append(f"{'':>6}note: {note}")
    return out


# old private names, kept one release for code not yet moved to the public ones
_table_lines = field_table_lines
