"""Writes the invented demo datasets of specs-examples/data/.

Every scenario here is made up for the examples (no real study, no real people). The numbers
come from a fixed-seed generator so the files are reproducible: run
`python3 specs-examples/data/make_data.py` from the repository root to write them again.

The standard library writes every file but one: nests.parquet needs pyarrow
(`python3 -m pip install pyarrow`). Without it that file is left as it is (it is committed).
"""

import csv
import math
import os
import random
import zipfile
from xml.sax.saxutils import escape

HERE = os.path.dirname(os.path.abspath(__file__))


def write(name, header, rows, delimiter=","):
    with open(os.path.join(HERE, name), "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, delimiter=delimiter, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)


def reading(rng):
    """A reading study: 24 readers, paper and screen, morning and evening sessions."""
    rows = []
    for p in range(1, 25):
        base = rng.gauss(235, 35)
        age = rng.randint(19, 64)
        for medium, shift in (("paper", 0.0), ("screen", -14.0)):
            for session, s_shift in (("morning", 6.0), ("evening", -6.0)):
                speed = base + shift + s_shift + rng.gauss(0, 9)
                comfort = min(5, max(1, round(3.4 + (0.6 if medium == "paper" else -0.5) + rng.gauss(0, 0.9))))
                speed_text = f"{speed:.1f}"
                if p == 7 and medium == "screen" and session == "evening":
                    speed_text = "NA"
                rows.append([f"R{p:02d}", medium, session, speed_text, comfort, age])
    write("reading.csv", ["participant", "medium", "session", "speed", "comfort", "Age (years)"], rows)


def seedlings(rng):
    """Seedlings grown in trays under three light levels (one tray = one unit)."""
    rows = []
    tray = 0
    for light, mu in (("shade", 38.0), ("partial", 52.0), ("full", 61.0)):
        for _ in range(20):
            tray += 1
            height = max(2.0, rng.gauss(mu, 9.0))
            if tray == 17:
                height = 88.5
            rows.append([f"T{tray:03d}", light, f"{height:.1f}"])
    write("seedlings.csv", ["tray", "light", "height"], rows)


def commute(rng):
    """A commute survey: mode of travel and satisfaction."""
    modes = ["walk", "cycle", "bus", "train", "car"]
    weights = [0.14, 0.22, 0.25, 0.17, 0.22]
    sat_by_mode = {"walk": 0.7, "cycle": 0.8, "bus": -0.5, "train": 0.1, "car": -0.1}
    rows = []
    for r in range(1, 181):
        mode = rng.choices(modes, weights)[0]
        z = sat_by_mode[mode] + rng.gauss(0, 0.9)
        sat = "low" if z < -0.4 else ("medium" if z < 0.6 else "high")
        minutes = max(3, round(rng.lognormvariate(math.log(24), 0.55)))
        if r % 37 == 0:
            sat = "-"
        rows.append([f"C{r:03d}", mode, sat, minutes])
    write("commute.tsv", ["respondent", "mode", "satisfaction", "minutes"], rows, delimiter="\t")


def plots(rng):
    """Field plots: soil temperature (interval, deg C) and beetle counts under two mulches."""
    rows = []
    for i in range(1, 41):
        mulch = "straw" if i % 2 else "bark"
        temp = rng.gauss(14.5 if mulch == "straw" else 13.2, 1.6)
        beetles = max(0, round(rng.gauss(22 if mulch == "straw" else 15, 5)))
        rows.append([f"P{i:02d}", mulch, f"{temp:.2f}", beetles])
    write("plots.csv", ["plot", "mulch", "soil_temp", "beetles"], rows)


def clinic(rng):
    """A clinic follow-up: 64 patients in two arms, symptom severity at four visits.

    Severity tends to ease over the visits, more so under the exercise programme. A few
    patients miss a visit, and one severity was not recorded.
    """
    levels = ["none", "mild", "moderate", "severe"]
    visits = ["baseline", "week 4", "week 12", "week 26"]
    rows = []
    for p in range(1, 65):
        arm = "exercise" if p % 2 else "usual care"
        state = rng.choices([1, 2, 3], [0.3, 0.45, 0.25])[0]
        ease = 0.35 if arm == "exercise" else 0.2
        for v, visit in enumerate(visits):
            if v > 0:
                u = rng.random()
                if u < ease and state > 0:
                    state -= 1
                elif u > 0.9 and state < 3:
                    state += 1
            if (p, v) in ((9, 2), (23, 3), (40, 1), (51, 3)):
                continue
            severity = levels[state]
            if (p, v) == (31, 2):
                severity = ""
            rows.append([f"P{p:03d}", arm, visit, severity])
    write("clinic.csv", ["patient", "arm", "visit", "severity"], rows)


def responses(rng):
    """A response-time task: 28 participants, three cue conditions, three sessions, six trials each.

    Times are right-skewed (log-normal); participants differ in speed and get faster over
    sessions. Each row is one trial.
    """
    cues = {"valid": -0.08, "neutral": 0.0, "invalid": 0.1}
    sessions = {"first": 0.06, "second": 0.0, "third": -0.04}
    rows = []
    for p in range(1, 29):
        speed = rng.gauss(math.log(430), 0.16)
        for cue, shift in cues.items():
            for session, practice in sessions.items():
                for trial in range(1, 7):
                    ms = math.exp(speed + shift + practice + rng.gauss(0, 0.2))
                    rows.append([f"S{p:02d}", cue, session, trial, f"{ms:.0f}"])
    write("responses.csv", ["participant", "cue", "session", "trial", "ms"], rows)


def leaves(rng):
    """Leaves from two sites: dry mass and area, roughly proportional, with scatter."""
    rows = []
    for i in range(1, 61):
        site = "valley" if i % 3 else "ridge"
        mass = rng.uniform(0.15, 1.4)
        sla = 190.0 if site == "valley" else 150.0
        area = max(5.0, sla * mass + rng.gauss(0, 14))
        rows.append([f"L{i:02d}", site, f"{mass:.3f}", f"{area:.1f}"])
    write("leaves.csv", ["leaf", "site", "mass", "area"], rows)


NEST_HEADER = ["nest", "meadow", "eggs", "egg_mass"]


def nests(rng):
    """Bird nests in three meadows: clutch size and mean egg mass per nest.

    One table written four ways, as field data reaches a lab: plain CSV (nests.csv), a field
    workbook (nests.xlsx), a database export (nests.parquet) and a spreadsheet's semicolon
    export with decimal commas in windows-1252 (nests-semicolon.csv). Two masses were not
    recorded.
    """
    meadows = (("Prés-Hauts", 4.6, 1.92), ("Hölzliwiese", 4.1, 1.81), ("Ängsbacken", 5.0, 2.03))
    rows = []
    n = 0
    for meadow, clutch, mass in meadows:
        for _ in range(30):
            n += 1
            eggs = max(1, min(8, round(rng.gauss(clutch, 1.1))))
            grams = f"{max(1.2, rng.gauss(mass, 0.14)):.2f}"
            if n in (17, 62):
                grams = ""
            rows.append([f"N{n:03d}", meadow, eggs, grams])
    csv_rows = [[a, b, c, d or "NA"] for a, b, c, d in rows]
    write("nests.csv", NEST_HEADER, csv_rows)
    with open(os.path.join(HERE, "nests-semicolon.csv"), "w", newline="", encoding="cp1252") as f:
        w = csv.writer(f, delimiter=";", lineterminator="\r\n")
        w.writerow(NEST_HEADER)
        w.writerows([[a, b, c, d.replace(".", ",")] for a, b, c, d in csv_rows])
    nests_workbook(rows)
    nests_parquet(rows)


def survey(rng):
    """A library survey: 150 students on two campuses rate five statements about the library
    (strongly disagree to strongly agree, neutral in the middle).

    Each student has a general leaning; each statement its own. The south campus library was
    refurbished, so its students agree more about the seats and the quiet. A few ratings were
    left blank.
    """
    agree = ["strongly disagree", "disagree", "neither", "agree", "strongly agree"]
    items = {"hours": 0.3, "staff": 0.9, "quiet": -0.4, "seats": -0.8, "online": 0.1}
    refurbished = {"quiet": 0.9, "seats": 1.2}
    rows = []
    for s in range(1, 151):
        campus = "north" if s % 5 < 3 else "south"
        leaning = rng.gauss(0, 0.6)
        for item, shift in items.items():
            z = leaning + shift + (refurbished.get(item, 0.0) if campus == "south" else 0.0)
            z += rng.gauss(0, 0.8)
            rating = agree[min(4, max(0, round(2 + z)))]
            if (s, item) in ((12, "online"), (57, "quiet"), (101, "hours")):
                rating = ""
            rows.append([f"S{s:03d}", campus, item, rating])
    write("survey.csv", ["student", "campus", "item", "rating"], rows)


def cell_xml(ref, value, strings):
    """One worksheet cell: a number, or text kept in the shared-string table."""
    if value == "":
        return ""
    if isinstance(value, (int, float)):
        return f'<c r="{ref}"><v>{value!r}</v></c>'
    if value not in strings:
        strings.append(value)
    return f'<c r="{ref}" t="s"><v>{strings.index(value)}</v></c>'


def sheet_xml(rows, strings):
    """A worksheet: rows of (row number, values from column A)."""
    out = []
    for number, values in rows:
        cells = "".join(cell_xml(f"{'ABCD'[i]}{number}", v, strings) for i, v in enumerate(values))
        out.append(f'<row r="{number}">{cells}</row>')
    return (
        '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>'
        '<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
        f'<sheetData>{"".join(out)}</sheetData></worksheet>'
    )


def nests_workbook(rows):
    """nests.xlsx: a title above the table on sheet "Nests", a "Notes" sheet before it.

    Written as the Office Open XML parts of a workbook (ECMA-376, SpreadsheetML), with fixed
    times in the zip so the file is the same on every run.
    """
    strings = []
    notes = sheet_xml([(1, ["Counted on the first visit; masses are the mean of the clutch."])], strings)
    table = [(1, ["Nest survey, spring (invented data)"])]
    table.append((3, NEST_HEADER))
    for i, (nest, meadow, eggs, grams) in enumerate(rows):
        table.append((4 + i, [nest, meadow, eggs, float(grams) if grams else ""]))
    nests_sheet = sheet_xml(table, strings)
    main = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
    rel = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
    pkg = "http://schemas.openxmlformats.org/package/2006"
    xml = '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>'
    sst = "".join(f"<si><t>{escape(s)}</t></si>" for s in strings)
    parts = {
        "[Content_Types].xml": xml + f'<Types xmlns="{pkg}/content-types">'
        '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
        '<Default Extension="xml" ContentType="application/xml"/>'
        '<Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>'
        '<Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>'
        '<Override PartName="/xl/worksheets/sheet2.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>'
        '<Override PartName="/xl/styles.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.styles+xml"/>'
        '<Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"/>'
        "</Types>",
        "_rels/.rels": xml + f'<Relationships xmlns="{pkg}/relationships">'
        f'<Relationship Id="rId1" Type="{rel}/officeDocument" Target="xl/workbook.xml"/></Relationships>',
        "xl/workbook.xml": xml + f'<workbook xmlns="{main}" xmlns:r="{rel}"><sheets>'
        '<sheet name="Notes" sheetId="1" r:id="rId1"/><sheet name="Nests" sheetId="2" r:id="rId2"/>'
        "</sheets></workbook>",
        "xl/_rels/workbook.xml.rels": xml + f'<Relationships xmlns="{pkg}/relationships">'
        f'<Relationship Id="rId1" Type="{rel}/worksheet" Target="worksheets/sheet1.xml"/>'
        f'<Relationship Id="rId2" Type="{rel}/worksheet" Target="worksheets/sheet2.xml"/>'
        f'<Relationship Id="rId3" Type="{rel}/styles" Target="styles.xml"/>'
        f'<Relationship Id="rId4" Type="{rel}/sharedStrings" Target="sharedStrings.xml"/>'
        "</Relationships>",
        "xl/styles.xml": xml + f'<styleSheet xmlns="{main}"><cellXfs count="1">'
        '<xf numFmtId="0" fontId="0" fillId="0" borderId="0"/></cellXfs></styleSheet>',
        "xl/sharedStrings.xml": xml
        + f'<sst xmlns="{main}" count="{len(strings)}" uniqueCount="{len(strings)}">{sst}</sst>',
        "xl/worksheets/sheet1.xml": notes,
        "xl/worksheets/sheet2.xml": nests_sheet,
    }
    with zipfile.ZipFile(os.path.join(HERE, "nests.xlsx"), "w") as z:
        for name, text in parts.items():
            info = zipfile.ZipInfo(name, date_time=(1980, 1, 1, 0, 0, 0))
            info.compress_type = zipfile.ZIP_DEFLATED
            z.writestr(info, text.encode("utf-8"))


def nests_parquet(rows):
    """nests.parquet, as a database would export the table (needs pyarrow)."""
    try:
        import pyarrow as pa
        import pyarrow.parquet as pq
    except ImportError:
        print("pyarrow is not installed: nests.parquet is left as it is")
        return
    table = pa.table(
        {
            "nest": pa.array([r[0] for r in rows], pa.string()),
            "meadow": pa.array([r[1] for r in rows], pa.string()),
            "eggs": pa.array([r[2] for r in rows], pa.int64()),
            "egg_mass": pa.array([float(r[3]) if r[3] else None for r in rows], pa.float64()),
        }
    )
    pq.write_table(table, os.path.join(HERE, "nests.parquet"), compression="snappy")


def recovery(rng):
    """A rehabilitation follow-up: 36 patients in two arms, grip strength after hand surgery.

    Visits were scheduled at weeks 0, 2, 6 and 12; each took place on a day near its schedule
    (seven days a week, give or take three). Strength recovers towards a plateau, faster with
    supervised training than with exercises at home. A few visits were missed.
    """
    missed = {(5, 6), (12, 2), (17, 12), (26, 6), (33, 12)}
    rows = []
    for p in range(1, 37):
        arm = "supervised" if p % 2 else "home"
        base = rng.gauss(14.0, 3.5)
        gain = rng.gauss(17.0 if arm == "supervised" else 13.0, 3.0)
        rate = max(0.05, rng.gauss(0.32 if arm == "supervised" else 0.2, 0.05))
        for week in (0, 2, 6, 12):
            if (p, week) in missed:
                continue
            day = 0 if week == 0 else 7 * week + rng.randint(-3, 3)
            strength = base + gain * (1.0 - math.exp(-rate * day / 7.0)) + rng.gauss(0, 1.5)
            rows.append([f"H{p:02d}", arm, week, day, f"{strength:.1f}"])
    write("recovery.csv", ["patient", "arm", "week", "day", "grip"], rows)


def main():
    rng = random.Random(20261202)
    reading(rng)
    seedlings(rng)
    commute(rng)
    plots(rng)
    # Later datasets draw from their own generators, so adding one never changes another.
    clinic(random.Random(31))
    responses(random.Random(47))
    leaves(random.Random(59))
    nests(random.Random(71))
    recovery(random.Random(83))
    survey(random.Random(83))


if __name__ == "__main__":
    main()
