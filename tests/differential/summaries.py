#!/usr/bin/env python3
"""End-to-end reference for tests/summary_differential.rs: random datasets and specs, and every
number of the summaries Figura writes for them, computed independently with numpy and scipy.

Modes:
  summaries.py generate DIR SEED   writes DIR/*.csv (random data), DIR/diff.figura (figures
                                   using box, mean with sd / se / ci(L) / ci(L, within),
                                   median, counts with percent, histograms with every rule,
                                   lines, points, ordinal medians) and DIR/manifest.json (what
                                   the figures ask for, read back by `reference`)
  summaries.py reference DIR OUT   reads DIR/manifest.json, the data files and, for histogram
                                   edges only, Figura's summaries in OUT; prints JSON:
                                   {"figures": {NAME: [[panel, layer, group, x, stat, value,
                                   scale], ...]}, "problems": [text, ...]}

`value` is a number, or {"level": NAME} for an ordinal median or quartile. `scale` is the
magnitude of the data a location statistic comes from (0 for counts): the Rust side allows an
absolute error of 1e-12 times it, for results that cancel to nearly zero (a mean of values of
both signs); otherwise the tolerance is 1e-9 relative.

The seed changes every run (the Rust test derives it from the clock and prints it), so each run
checks data nobody has seen before; `FIGURA_DIFF_SEED=N cargo test --test summary_differential`
replays one.

References (each computed here, independently of Figura's code):
  numpy.percentile(method="linear")          quartiles and medians (Hyndman & Fan definition 7)
  numpy.quantile(method="inverted_cdf")      ordinal median and quartile levels (definition 1)
  numpy.mean, numpy.std(ddof=1)              mean and sample sd; se = sd / sqrt(n)
  scipy.stats.t.ppf                          ci(L) = mean +- t(1 - (1 - L)/2, n - 1) * se
  numpy.histogram                            bin counts on the edges Figura reports
Restated in numpy from their publications (the comment beside each says so): Tukey's fences
(Tukey 1977), Cousineau (2005) normalisation with Morey's (2008) correction, the Sturges, Scott
and Freedman-Diaconis bin widths, and the readable-step rounding of language.md section 5.
"""

import csv
import json
import math
import os
import sys
from fractions import Fraction

try:
    import numpy as np
    from scipy import stats
except ImportError as err:  # the Rust test prints this and fails
    sys.stderr.write(
        "summaries.py needs numpy and scipy (pip install numpy scipy): %s\n" % err
    )
    sys.exit(3)

MISSING = ["NA", ""]

# --- generating data and specs --------------------------------------------------------------


def fmt(x):
    """The shortest text that reads back to the same double (Python's repr)."""
    return repr(float(x))


def shuffled(rng, items):
    items = list(items)
    rng.shuffle(items)
    return items


def make_names(rng, prefix, n):
    """n distinct level names with mixed case and lengths, in a random order."""
    stems = ["alder", "Birch", "cedar", "dune", "Elm", "fern", "gorse", "heath", "Iris",
             "juniper", "kelp", "larch", "moss", "nettle", "oak", "pine"]
    picked = rng.choice(len(stems), size=n, replace=False)
    return [prefix + stems[i] for i in picked]


def magnitude(rng):
    """A location and spread for a numeric variable: ordinary, huge offset, or tiny scale."""
    kind = rng.integers(0, 4)
    if kind == 0:
        return 50.0, 10.0, 1
    if kind == 1:
        return 1e6, 3.0, 3
    if kind == 2:
        return 0.004, 0.001, 6
    return 250.0, 40.0, 0


def rounded(rng, x, decimals):
    """Data as written by hand: a few decimals, so ties and values on bin edges happen."""
    return float(np.round(x, decimals)) if rng.random() < 0.8 else float(x)


def gen_repeated(rng):
    """Repeated measures: subjects in between groups, each measured in cond x phase cells."""
    groups = make_names(rng, "g", int(rng.integers(2, 4)))
    conds = make_names(rng, "c", int(rng.integers(2, 5)))
    phases = ["early", "late"]
    choices = make_names(rng, "k", int(rng.integers(3, 6)))
    ratings = ["low", "mid", "high", "top"]
    centre, spread, decimals = magnitude(rng)
    cond_effect = {c: rng.normal(0.0, spread) for c in conds}
    rows = []
    subject = 0
    for g in groups:
        n_subjects = int(rng.integers(2, 14))
        for _ in range(n_subjects):
            subject += 1
            sid = "S%03d" % subject
            base = rng.normal(0.0, spread)
            rating_shift = rng.normal(0.0, 1.0)
            for c in conds:
                for ph in phases:
                    score = centre + base + cond_effect[c] + rng.normal(0.0, spread / 2.0)
                    score = abs(rounded(rng, score, decimals))
                    temp = rounded(rng, rng.normal(2.0, 6.0), 1)
                    r = int(np.clip(np.round(1.5 + rating_shift + rng.normal(0, 1)), 0, 3))
                    row = {
                        "subject": sid,
                        "group": g,
                        "cond": c,
                        "phase": ph,
                        "score": fmt(score),
                        "temp": fmt(temp),
                        "rating": ratings[r],
                        "choice": choices[int(rng.integers(0, len(choices)))],
                    }
                    # Missing values: measured values, and a few categorical cells.
                    if rng.random() < 0.07:
                        row["score"] = MISSING[int(rng.integers(0, 2))]
                    if rng.random() < 0.05:
                        row["temp"] = "NA"
                    if rng.random() < 0.05:
                        row["rating"] = ""
                    if rng.random() < 0.05:
                        row["choice"] = "NA"
                    rows.append(row)
    rows = shuffled(rng, rows)
    codebook = {
        "name": "rm",
        "file": "rm.csv",
        "columns": ["subject", "group", "cond", "phase", "score", "temp", "rating", "choice"],
        "vars": {
            "subject": {"scale": "id"},
            "group": {"scale": "nominal", "levels": shuffled(rng, groups)},
            # Sometimes a declared condition nobody was measured in: empty cells everywhere.
            "cond": {"scale": "nominal",
                     "levels": shuffled(rng, conds + (["cunused"] if rng.random() < 0.5 else []))},
            "phase": {"scale": "nominal", "levels": ["late", "early"]},
            "score": {"scale": "ratio"},
            "temp": {"scale": "interval"},
            "rating": {"scale": "ordinal", "levels": ratings},
            # No declared levels: the order is that of first appearance in the file.
            "choice": {"scale": "nominal"},
        },
        "subject": "subject",
        "within": ["cond", "phase"],
        "between": ["group"],
    }
    return codebook, rows


def gen_independent(rng):
    """Independent rows: sites and kinds, a ratio size with zeros and ties, a positive mass."""
    sites = make_names(rng, "s", int(rng.integers(3, 7)))
    kinds = make_names(rng, "t", int(rng.integers(2, 4)))
    weights = rng.dirichlet(np.ones(len(sites)))
    n = int(rng.integers(5, 160))
    centre, spread, decimals = magnitude(rng)
    rows = []
    for _ in range(n):
        site = sites[int(rng.choice(len(sites), p=weights))]
        size = float(rng.integers(0, 9)) if rng.random() < 0.5 else abs(rng.normal(4.0, 3.0))
        mass = abs(rounded(rng, centre + rng.normal(0.0, spread) * rng.exponential(1.0), decimals))
        if mass == 0.0:
            mass = centre
        row = {
            "site": site,
            "kind": kinds[int(rng.integers(0, len(kinds)))],
            "size": fmt(round(size, 2)),
            "mass": fmt(mass),
            # One decimal in a small range: many values lie exactly on decimal bin edges.
            "dose": fmt(round(float(rng.uniform(0.0, 3.0)), 1)),
        }
        if rng.random() < 0.06:
            row["site"] = "NA"
        if rng.random() < 0.06:
            row["size"] = ""
        if rng.random() < 0.04:
            row["kind"] = "NA"
        rows.append(row)
    codebook = {
        "name": "ind",
        "file": "ind.csv",
        "columns": ["site", "kind", "size", "mass", "dose"],
        "vars": {
            "site": {"scale": "nominal"},
            "kind": {"scale": "nominal", "levels": shuffled(rng, kinds)},
            "size": {"scale": "ratio"},
            "mass": {"scale": "ratio"},
            "dose": {"scale": "ratio"},
        },
        "subject": None,
        "within": [],
        "between": [],
    }
    return codebook, rows


def gen_trials(rng, collapse):
    """Repeated trials: each subject measured several times in each condition; the data block
    declares `replicates trial collapse(...)`, so each subject counts once per cell."""
    conds = make_names(rng, "r", int(rng.integers(2, 4)))
    centre, spread, decimals = magnitude(rng)
    rows = []
    for subject in range(int(rng.integers(2, 16))):
        base = rng.normal(0.0, spread)
        for c in conds:
            shift = rng.normal(0.0, spread)
            for trial in range(1, int(rng.integers(1, 5)) + 1):
                value = abs(rounded(rng, centre + base + shift + rng.normal(0, spread), decimals))
                rows.append({
                    "person": "P%02d" % subject,
                    "task": c,
                    "trial": str(trial),
                    "time": "NA" if rng.random() < 0.08 else fmt(value),
                })
    rows = shuffled(rng, rows)
    name = "tr_" + collapse
    codebook = {
        "name": name,
        "file": name + ".csv",
        "columns": ["person", "task", "trial", "time"],
        "vars": {
            "person": {"scale": "id"},
            "task": {"scale": "nominal", "levels": shuffled(rng, conds)},
            "trial": {"scale": "ratio"},
            "time": {"scale": "ratio"},
        },
        "subject": "person",
        "within": ["task"],
        "between": [],
        "replicates": ["trial", collapse],
    }
    return codebook, rows


def level_option(rng):
    return float(rng.choice([0.5, 0.8, 0.9, 0.95, 0.99, round(float(rng.uniform(0.6, 0.99)), 3)]))


def gen_figures(rng, rm, ind):
    """The figures: every layer and option the differential test covers."""
    late_or_early = ["early", "late"][int(rng.integers(0, 2))]
    figs = []

    def fig(name, data, x, layers, y=None, colour=None, panels=None, where=None, order="levels",
            y_scale=None):
        figs.append({"name": name, "data": data, "x": x, "y": y, "colour": colour,
                     "panels": panels, "where": where, "order": order, "layers": layers,
                     "y_scale": y_scale})

    points = {"kind": "points", "jitter": 0.3}
    fig("rm_box", "rm", "cond", [points, {"kind": "box", "whiskers": "tukey"}], y="score",
        colour="group", panels="phase")
    fig("rm_box_range", "rm", "cond", [points, {"kind": "box", "whiskers": "range"}], y="temp")
    fig("rm_mean_sd", "rm", "cond", [points, {"kind": "mean", "error": "sd"}], y="score",
        colour="group")
    fig("rm_mean_se", "rm", "group", [points, {"kind": "mean", "error": "se"}], y="temp")
    fig("rm_mean_ci", "rm", "cond",
        [points, {"kind": "mean", "error": "ci", "level": level_option(rng)}], y="score",
        panels="group")
    fig("rm_within_full", "rm", "cond",
        [points, {"kind": "lines"},
         {"kind": "mean", "error": "within", "level": level_option(rng)}],
        y="score", colour="phase", panels="group")
    fig("rm_within_panels", "rm", "cond",
        [points, {"kind": "mean", "error": "within", "level": level_option(rng)}],
        y="score", colour="group", panels="phase")
    fig("rm_within_x", "rm", "cond",
        [points, {"kind": "lines"},
         {"kind": "mean", "error": "within", "level": level_option(rng)}],
        y="score", where=("phase", late_or_early))
    fig("rm_within_colour", "rm", "phase",
        [points, {"kind": "mean", "error": "within", "level": level_option(rng)}],
        y="temp", colour="cond")
    fig("rm_median", "rm", "cond", [points, {"kind": "median"}], y="temp", colour="group")
    fig("rm_ordinal", "rm", "cond", [{"kind": "median"}], y="rating", colour="group")
    fig("rm_counts_percent", "rm", "choice", [{"kind": "counts", "heights": "percent"}],
        panels="group")
    fig("rm_counts_ordinal", "rm", "rating", [{"kind": "counts", "heights": "count"}],
        colour="phase")
    rules = ["sturges", "scott", "fd", int(rng.integers(2, 30)),
             ("width", float(rng.choice([0.5, 1.0, 2.0, 2.5, 3.0, 0.7])))]
    for i, rule in enumerate(rules):
        heights = ["count", "percent", "density"][i % 3]
        fig("rm_hist_%d" % i, "rm", "score",
            [{"kind": "histogram", "rule": rule, "heights": heights}],
            colour="group" if i % 2 == 0 else None, panels="phase" if i == 1 else None)
        fig("ind_hist_%d" % i, "ind", "size" if i % 2 else "mass",
            [{"kind": "histogram", "rule": rule, "heights": ["density", "count", "percent"][i % 3]}])
    for i, rule in enumerate(["sturges", int(rng.integers(8, 40)), ("width", 0.1),
                              ("width", float(rng.choice([0.2, 0.3, 0.7])))]):
        fig("ind_dose_%d" % i, "ind", "dose",
            [{"kind": "histogram", "rule": rule, "heights": "count"}],
            colour="kind" if i % 2 else None)
    fig("rm_xy", "rm", "temp", [{"kind": "xypoints"}], y="score", colour="group")
    fig("ind_counts_count", "ind", "site", [{"kind": "counts", "heights": "percent"}],
        order="count")
    fig("ind_counts_name", "ind", "site", [{"kind": "counts", "heights": "count"}],
        colour="kind", order="name")
    fig("ind_box", "ind", "site", [points, {"kind": "box", "whiskers": "tukey"}], y="size",
        order="count")
    fig("ind_mean_bar", "ind", "kind",
        [points, {"kind": "mean", "error": "se", "bar": True}], y="size")
    fig("ind_mean_log", "ind", "site",
        [points, {"kind": "mean", "error": "ci", "level": level_option(rng)}], y="mass",
        y_scale="log", order="name")
    for collapse in ["mean", "median"]:
        data = "tr_" + collapse
        fig(data + "_within", data, "task",
            [points, {"kind": "lines"},
             {"kind": "mean", "error": "within", "level": level_option(rng)}], y="time")
        fig(data + "_box", data, "task",
            [points, {"kind": "box", "whiskers": "tukey"}, {"kind": "median"}], y="time")
        fig(data + "_ci", data, "task",
            [points, {"kind": "mean", "error": "ci", "level": level_option(rng)}], y="time")
    return figs


def spec_text(codebooks, figs):
    out = ["# Generated by tests/differential/summaries.py: random data, not a study.", ""]
    subjects = {book["name"]: book["subject"] for book in codebooks}
    for book in codebooks:
        out.append('data %s "%s" {' % (book["name"], book["file"]))
        out.append('  missing("NA", "")')
        for name in book["columns"]:
            var = book["vars"][name]
            line = "  %s: %s" % (name, var["scale"])
            if var.get("levels"):
                line += " levels(%s)" % ", ".join('"%s"' % l for l in var["levels"])
            out.append(line)
        if book["subject"]:
            out.append("  subject " + book["subject"])
        if book["within"]:
            out.append("  within " + ", ".join(book["within"]))
        if book["between"]:
            out.append("  between " + ", ".join(book["between"]))
        if book.get("replicates"):
            out.append("  replicates %s collapse(%s)" % tuple(book["replicates"]))
        out.append("}")
        out.append("")
    for f in figs:
        out.append("figure %s {" % f["name"])
        out.append("  from " + f["data"])
        x = "  x " + f["x"]
        if f["order"] != "levels":
            x += " order(%s)" % f["order"]
        out.append(x)
        if f["y"]:
            out.append("  y " + f["y"] + (" scale(log)" if f["y_scale"] == "log" else ""))
        if f["colour"]:
            out.append("  colour " + f["colour"])
        if f["panels"]:
            out.append("  panels " + f["panels"])
        if f["where"]:
            out.append('  where %s == "%s"' % f["where"])
        for layer in f["layers"]:
            out.append("  " + layer_text(layer, subjects[f["data"]]))
        out.append("  formats svg")
        out.append("}")
        out.append("")
    return "\n".join(out)


def layer_text(layer, subject):
    k = layer["kind"]
    if k == "points" or k == "xypoints":
        return "points jitter(%s)" % layer["jitter"] if k == "points" else "points"
    if k == "box":
        return "box whiskers(%s)" % layer["whiskers"]
    if k == "mean":
        bar = " bar" if layer.get("bar") else ""
        err = layer["error"]
        if err in ("sd", "se"):
            return "mean%s error(%s)" % (bar, err)
        if err == "ci":
            return "mean%s error(ci(%s))" % (bar, layer["level"])
        return "mean error(ci(%s, within))" % layer["level"]
    if k == "median":
        return "median"
    if k == "lines":
        return "lines by(%s)" % subject
    if k == "counts":
        return "counts heights(%s)" % layer["heights"]
    if k == "histogram":
        rule = layer["rule"]
        if isinstance(rule, int):
            text = "bins(%d)" % rule
        elif isinstance(rule, (list, tuple)):
            text = "width(%s)" % rule[1]
        else:
            text = "bins(%s)" % rule
        return "histogram %s heights(%s)" % (text, layer["heights"])
    raise ValueError(k)


def write_csv(path, columns, rows):
    with open(path, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(columns)
        for r in rows:
            w.writerow([r[c] for c in columns])


def generate(out_dir, seed):
    rng = np.random.default_rng(seed)
    rm, rm_rows = gen_repeated(rng)
    ind, ind_rows = gen_independent(rng)
    books = [(rm, rm_rows), (ind, ind_rows), gen_trials(rng, "mean"), gen_trials(rng, "median")]
    figs = gen_figures(rng, rm, ind)
    os.makedirs(out_dir, exist_ok=True)
    for book, rows in books:
        write_csv(os.path.join(out_dir, book["file"]), book["columns"], rows)
    codebooks = [book for book, _ in books]
    with open(os.path.join(out_dir, "diff.figura"), "w", encoding="utf-8") as f:
        f.write(spec_text(codebooks, figs))
    with open(os.path.join(out_dir, "manifest.json"), "w", encoding="utf-8") as f:
        json.dump({"seed": seed, "codebooks": codebooks, "figures": figs}, f, indent=1)


# --- reading the data back ------------------------------------------------------------------


class Data:
    """A data file read with the codebook: categorical cells as text, numbers as floats."""

    def __init__(self, book, folder):
        self.book = book
        with open(os.path.join(folder, book["file"]), newline="", encoding="utf-8") as f:
            raw = list(csv.DictReader(f))
        self.rows = []
        for r in raw:
            row = {}
            for name, var in book["vars"].items():
                text = r[name]
                if text in MISSING and var["scale"] != "id":
                    row[name] = None
                elif var["scale"] in ("ratio", "interval"):
                    row[name] = float(text)
                else:
                    row[name] = text
            self.rows.append(row)

    def levels(self, name):
        """Declared levels, else the distinct values in order of first appearance."""
        declared = self.book["vars"][name].get("levels")
        if declared:
            return list(declared)
        seen = []
        for r in self.rows:
            v = r[name]
            if v is not None and v not in seen:
                seen.append(v)
        return seen


def parse_bin(label):
    """`[lo,hi)` or `[lo,hi]` → (lo, hi)."""
    lo, hi = label[1:-1].split(",")
    return float(lo), float(hi)


def read_summary(path):
    with open(path, newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


# --- reference statistics -------------------------------------------------------------------


def percentile(values, q):
    # numpy.percentile(method="linear") is Hyndman & Fan definition 7.
    return float(np.percentile(np.asarray(values, dtype=float), q, method="linear"))


def box_rows(v, whiskers):
    """Box numbers of one cell (q1, median, q3, whiskers, outliers, min, max)."""
    v = np.sort(np.asarray(v, dtype=float))
    q1, med, q3 = percentile(v, 25), percentile(v, 50), percentile(v, 75)
    out = [("q1", q1), ("median", med), ("q3", q3)]
    if whiskers == "range":
        lo, hi, outliers = float(v[0]), float(v[-1]), []
    else:
        # Tukey (1977) restated: fences 1.5 IQR beyond the box; whiskers at the most extreme
        # values inside them, never pointing back into the box (common practice).
        iqr = q3 - q1
        lo_f, hi_f = q1 - 1.5 * iqr, q3 + 1.5 * iqr
        inside = v[(v >= lo_f) & (v <= hi_f)]
        lo = min(float(inside[0]), q1) if len(inside) else q1
        hi = max(float(inside[-1]), q3) if len(inside) else q3
        outliers = [float(x) for x in v[(v < lo_f) | (v > hi_f)]]
    out += [("whisker_low", lo), ("whisker_high", hi)]
    out += [("outliers", o) for o in outliers]
    out += [("min", float(v[0])), ("max", float(v[-1]))]
    return out


def t_multiplier(level, n):
    return float(stats.t.ppf(1.0 - (1.0 - level) / 2.0, n - 1))


def mean_rows(v, error, level, log=False):
    """The mean and its error bar; on a log axis the geometric mean (scipy.stats.gmean) with
    the interval of the mean of numpy.log exponentiated, sd and se as the factors exp(sd) and
    exp(se) of the logs (language.md section 9, log axes)."""
    v = np.asarray(v, dtype=float)
    n = len(v)
    on = np.log(v) if log else v
    m = float(np.mean(on))
    back = math.exp if log else (lambda a: a)
    out = [("geometric_mean", float(stats.gmean(v))) if log else ("mean", m)]
    if n < 2:
        return out
    sd = float(np.std(on, ddof=1))
    se = sd / math.sqrt(n)
    if error == "sd":
        out.append(("geometric_sd" if log else "sd", back(sd)))
    elif error == "se":
        out.append(("geometric_se" if log else "se", back(se)))
    elif error == "ci":
        half = t_multiplier(level, n) * se
        out += [("ci_low", back(m - half)), ("ci_high", back(m + half))]
    return out


def cousineau_morey(matrix, level):
    """Cousineau (2005) normalisation and Morey (2008) correction, restated in numpy.

    `matrix` is subjects x J within cells (complete subjects only). Returns per cell
    (mean, ci_low, ci_high).
    """
    y = np.asarray(matrix, dtype=float)
    n, j = y.shape
    normalised = y - y.mean(axis=1, keepdims=True) + y.mean()
    sd = normalised.std(axis=0, ddof=1) * math.sqrt(j / (j - 1.0))
    half = t_multiplier(level, n) * sd / math.sqrt(n)
    means = y.mean(axis=0)
    return [(float(means[c]), float(means[c] - half[c]), float(means[c] + half[c]))
            for c in range(j)]


# Readable steps: 1, 2, 2.5 or 5 x 10^k (language.md section 5), nearest on a log scale
# (common practice; the geometric midpoints between candidates decide).
SIGNIFICANDS = [Fraction(1), Fraction(2), Fraction(5, 2), Fraction(5)]


def readable_step(raw):
    """(step as an exact Fraction, ambiguous?) nearest to `raw` on a log scale."""
    p = math.floor(math.log10(raw))
    best, best_d, second_d = None, None, None
    for k in (p - 1, p, p + 1):
        for s in SIGNIFICANDS:
            c = s * Fraction(10) ** k
            d = abs(math.log(float(c)) - math.log(raw))
            if best_d is None or d < best_d - 1e-12 or (abs(d - best_d) <= 1e-12 and c > best):
                best, second_d, best_d = c, best_d, d
            elif second_d is None or d < second_d:
                second_d = d
    ambiguous = second_d is not None and abs(second_d - best_d) < 1e-9
    return best, ambiguous


def rule_width(values, rule):
    """The unrounded bin width of a rule (restated from Sturges 1926, Scott 1979,
    Freedman & Diaconis 1981), or None for a fixed width."""
    v = np.asarray(values, dtype=float)
    n = len(v)
    rng_ = float(v.max() - v.min())
    if isinstance(rule, (list, tuple)):
        return None
    if isinstance(rule, int):
        return rng_ / rule
    if rule == "sturges":
        return rng_ / (math.ceil(math.log2(n)) + 1)
    sd = float(np.std(v, ddof=1))
    scott = 3.49 * sd * n ** (-1.0 / 3.0)
    if rule == "scott":
        return scott
    iqr = percentile(v, 75) - percentile(v, 25)
    return 2.0 * iqr * n ** (-1.0 / 3.0) if iqr > 0 else scott


def grid_width(pooled, rule):
    """The bin width as an exact fraction: the rule's width from the values of every panel and
    group together, rounded to a readable step; or the given width, as written in the spec (its
    shortest decimal text). None when the rounding is ambiguous or all values are equal."""
    if isinstance(rule, (list, tuple)):
        return Fraction(repr(float(rule[1])))
    v = np.asarray(pooled, dtype=float)
    if v.max() == v.min():
        return None
    w, ambiguous = readable_step(rule_width(v, rule))
    return None if ambiguous else w


def edge_indices(lo, hi, width):
    """The first and last edge index of a grid of whole multiples of the width (each the double
    nearest to the exact multiple) covering [lo, hi]: the first at or below lo, the last at or
    above hi, at least one bin apart (language.md section 9)."""
    edge = lambda k: float(k * width)  # noqa: E731  the double nearest to k x width
    # Values and edges are compared as doubles: "2.7" in the data is the edge 27 x 0.1.
    k0 = math.floor(Fraction(lo) / width)
    while edge(k0) > lo:
        k0 -= 1
    while edge(k0 + 1) <= lo:
        k0 += 1
    k1 = math.ceil(Fraction(hi) / width)
    while edge(k1) < hi:
        k1 += 1
    while edge(k1 - 1) >= hi:
        k1 -= 1
    return k0, max(k1, k0 + 1)


def expected_edges(values, width, pooled):
    """The edges of one group on the figure's shared grid (which covers the `pooled` values):
    from the bin holding its smallest value to the bin holding its largest, bins [a, b) and the
    grid's last closed, so a largest value on an inner edge starts the next bin and one on the
    grid's last edge is in the last bin."""
    v = np.asarray(values, dtype=float)
    lo, hi = float(v.min()), float(v.max())
    edge = lambda k: float(k * width)  # noqa: E731
    grid_first, grid_last = edge_indices(min(pooled), max(pooled), width)

    def bin_of(x):
        # The bin starting at the last edge at or below x; a value on the grid's last edge is in
        # the last bin.
        k, _ = edge_indices(x, x, width)
        return min(max(k, grid_first), grid_last - 1)

    first, last = bin_of(lo), bin_of(hi)
    return [edge(k) for k in range(first, last + 2)]


def ordinal_levels(codes):
    """Median and quartiles of level indices by Hyndman & Fan definition 1
    (numpy.quantile method="inverted_cdf")."""
    a = np.asarray(codes, dtype=float)
    q = np.quantile(a, [0.5, 0.25, 0.75], method="inverted_cdf")
    return [int(round(float(x))) for x in q]


# --- the figure's cells ---------------------------------------------------------------------


class Figure:
    """A figure of the manifest over its data: kept rows, level orders, cells."""

    def __init__(self, fig, data):
        self.fig = fig
        self.data = data
        book = data.book
        self.kept = [r for r in data.rows if self.keeps(r)]
        self.panels = data.levels(fig["panels"]) if fig["panels"] else [""]
        self.groups = data.levels(fig["colour"]) if fig["colour"] else [""]
        x_var = book["vars"][fig["x"]]
        self.x_categorical = x_var["scale"] in ("nominal", "ordinal")
        self.x_levels = self.ordered_x() if self.x_categorical else [""]

    def keeps(self, row):
        w = self.fig["where"]
        return w is None or row[w[0]] == w[1]

    def ordered_x(self):
        levels = self.data.levels(self.fig["x"])
        order = self.fig["order"]
        if order == "count":
            # Most frequent first; ties keep level order (a stable sort).
            counts = {l: 0 for l in levels}
            for r in self.kept:
                if r[self.fig["x"]] is not None:
                    counts[r[self.fig["x"]]] += 1
            return sorted(levels, key=lambda l: -counts[l])
        if order == "name":
            return sorted(levels, key=lambda l: l.lower())
        return levels

    def part(self, row, var):
        """The row's level of a panel/colour variable ('' when unused); None when missing."""
        if not self.fig[var]:
            return ""
        return row[self.fig[var]]

    def cell(self, row, with_x=True):
        p, g = self.part(row, "panels"), self.part(row, "colour")
        x = row[self.fig["x"]] if (with_x and self.x_categorical) else ""
        if p is None or g is None or x is None:
            return None
        return (p, x, g)

    def values(self, var):
        """(values by cell, missing count by cell) for a measured variable."""
        vals, missing = {}, {}
        for r in self.kept:
            c = self.cell(r)
            if c is None:
                continue
            if r[var] is None:
                missing[c] = missing.get(c, 0) + 1
            else:
                vals.setdefault(c, []).append(r)
        rep = self.data.book.get("replicates")
        if rep:
            vals = {c: collapse_trials(rs, self.data.book["subject"], var, rep[1])
                    for c, rs in vals.items()}
        return vals, missing


def collapse_trials(rows, subject, var, how):
    """One row per subject: the mean (numpy.mean) or median (numpy.median) of its trials."""
    by_subject = {}
    for r in rows:
        by_subject.setdefault(r[subject], []).append(r[var])
    out = []
    for s, values in by_subject.items():
        value = float(np.mean(values) if how == "mean" else np.median(values))
        out.append({subject: s, var: value})
    return out


def reference_figure(fig, data, summary, problems):
    f = Figure(fig, data)
    y = fig["y"]
    rows = []

    def emit(p, layer, g, x, stat, value, scale=0.0):
        rows.append([p, layer, g, x, stat, value, scale])

    y_var = data.book["vars"][y] if y else None
    if y is None and f.x_categorical:
        counts_ref(f, emit)
    elif y is None:
        histogram_ref(f, summary, emit, problems)
    elif not f.x_categorical:
        xy_ref(f, emit)
    elif y_var["scale"] == "ordinal":
        ordinal_ref(f, emit)
    else:
        cat_num_ref(f, emit)
    return rows


def counts_ref(f, emit):
    x = f.fig["x"]
    for p in f.panels:
        for layer in f.fig["layers"]:
            for g in f.groups:
                in_pg = [r for r in f.kept
                         if f.part(r, "panels") == p and f.part(r, "colour") == g]
                present = [r[x] for r in in_pg if r[x] is not None]
                total = len(present)
                emit(p, "counts", g, "", "n", total)
                emit(p, "counts", g, "", "n_missing", len(in_pg) - total)
                for level in f.x_levels:
                    count = present.count(level)
                    emit(p, "counts", g, level, "count", count)
                    # A group with no rows has no percentages (language.md section 9).
                    if layer["heights"] == "percent" and total:
                        emit(p, "counts", g, level, "percent", 100.0 * count / total)


def histogram_ref(f, summary, emit, problems):
    """One bin width for the whole figure, chosen by the rule from the values of every panel and
    colour group together; each group's edges are the multiples of it that cover its own values
    (so overlaid bars line up); counts per panel and group."""
    x = f.fig["x"]
    layer = f.fig["layers"][0]
    pooled = [r[x] for r in f.kept if r[x] is not None
              and f.part(r, "panels") is not None and f.part(r, "colour") is not None]
    width = grid_width(pooled, layer["rule"]) if pooled else None
    for p in f.panels:
        for g in f.groups:
            in_pg = [r for r in f.kept
                     if f.part(r, "panels") == p and f.part(r, "colour") == g]
            v = np.asarray([r[x] for r in in_pg if r[x] is not None], dtype=float)
            emit(p, "histogram", g, "", "n", len(v))
            emit(p, "histogram", g, "", "n_missing", len(in_pg) - len(v))
            if len(v) == 0:
                continue
            labels = [s["x"] for s in summary
                      if s["layer"] == "histogram" and s["stat"] == "count"
                      and s["panel"] == p and s["group"] == g]
            if not labels:
                problems.append("%s: no bins reported for panel %r group %r"
                                % (f.fig["name"], p, g))
                continue
            bins = [parse_bin(l) for l in labels]
            edges = [b[0] for b in bins] + [bins[-1][1]]
            if any(bins[i][1] != bins[i + 1][0] for i in range(len(bins) - 1)):
                problems.append("%s: bins %s are not contiguous" % (f.fig["name"], labels))
            want = expected_edges(v, width, pooled) if width is not None else None
            if want is not None and want != edges:
                problems.append("%s (panel %r group %r, rule %r): edges %s, expected %s"
                                % (f.fig["name"], p, g, layer["rule"], edges, want))
            # numpy.histogram: half-open bins, the last closed.
            counts, _ = np.histogram(v, bins=np.asarray(edges))
            density, _ = np.histogram(v, bins=np.asarray(edges), density=True)
            for i, label in enumerate(labels):
                emit(p, "histogram", g, label, "count", int(counts[i]))
                if layer["heights"] == "percent":
                    emit(p, "histogram", g, label, "percent", 100.0 * counts[i] / len(v))
                elif layer["heights"] == "density":
                    emit(p, "histogram", g, label, "density", float(density[i]), 0.0)


def xy_ref(f, emit):
    x, y = f.fig["x"], f.fig["y"]
    for p in f.panels:
        for g in f.groups:
            in_pg = [r for r in f.kept
                     if f.part(r, "panels") == p and f.part(r, "colour") == g]
            n = sum(1 for r in in_pg if r[x] is not None and r[y] is not None)
            emit(p, "points", g, "", "n", n)
            emit(p, "points", g, "", "n_missing", len(in_pg) - n)


def ordinal_ref(f, emit):
    y = f.fig["y"]
    y_levels = f.data.levels(y)
    vals, missing = f.values(y)
    for p in f.panels:
        for x in f.x_levels:
            for g in f.groups:
                c = (p, x, g)
                codes = [y_levels.index(r[y]) for r in vals.get(c, [])]
                emit(p, "median", g, x, "n", len(codes))
                emit(p, "median", g, x, "n_missing", missing.get(c, 0))
                if codes:
                    med, q1, q3 = ordinal_levels(codes)
                    emit(p, "median", g, x, "median", {"level": y_levels[med]})
                    emit(p, "median", g, x, "q1", {"level": y_levels[q1]})
                    emit(p, "median", g, x, "q3", {"level": y_levels[q3]})


def within_cells(f, vals, level):
    """Cousineau-Morey intervals per cell. The within cells are every combination of the
    within factors the figure uses (x, and colour or panels when they are within factors);
    between factors (or other variables) on colour or panels split the subjects into separate
    normalisations. Only subjects with a value in every within cell are used; a cell with no
    value at all is left out.

    Returns {cell: (n, n_unused, mean, ci_low, ci_high or None)}."""
    book = f.data.book
    y = f.fig["y"]
    within = set(book["within"])
    panel_within = f.fig["panels"] in within if f.fig["panels"] else False
    colour_within = f.fig["colour"] in within if f.fig["colour"] else False
    out = {}
    sets = {}
    for p in f.panels:
        for g in f.groups:
            key = (None if panel_within else p, None if colour_within else g)
            sets.setdefault(key, [])
            for x in f.x_levels:
                sets[key].append((p, x, g))
    for key, all_cells in sets.items():
        # A cell with no value at all (a level nobody was measured at) is no within cell.
        for c in all_cells:
            if not vals.get(c):
                out[c] = (0, 0, None, None, None)
        cells = [c for c in all_cells if vals.get(c)]
        by_subject = {}
        for c in cells:
            for r in vals.get(c, []):
                by_subject.setdefault(r[book["subject"]], {})[c] = r[y]
        complete = [s for s, m in by_subject.items() if all(c in m for c in cells)]
        n = len(complete)
        matrix = [[by_subject[s][c] for c in cells] for s in complete]
        if n >= 2 and len(cells) >= 2:
            result = cousineau_morey(matrix, level)
        else:
            result = [(float(np.mean([m[i] for m in matrix])) if n else None, None, None)
                      for i in range(len(cells))]
        for i, c in enumerate(cells):
            unused = len(vals.get(c, [])) - n
            out[c] = (n, unused, result[i][0], result[i][1], result[i][2])
    return out


def cat_num_ref(f, emit):
    y = f.fig["y"]
    vals, missing = f.values(y)
    book = f.data.book
    for p in f.panels:
        for layer in f.fig["layers"]:
            kind = layer["kind"]
            if kind == "lines":
                for g in f.groups:
                    subjects = set()
                    for x in f.x_levels:
                        subjects.update(r[book["subject"]] for r in vals.get((p, x, g), []))
                    emit(p, "lines", g, "", "n", len(subjects))
                continue
            within = (within_cells(f, vals, layer["level"])
                      if kind == "mean" and layer["error"] == "within" else None)
            for x in f.x_levels:
                for g in f.groups:
                    c = (p, x, g)
                    v = [r[y] for r in vals.get(c, [])]
                    scale = max((abs(a) for a in v), default=0.0)
                    if within is not None:
                        n, unused, m, lo, hi = within[c]
                        emit(p, kind, g, x, "n", n)
                        emit(p, kind, g, x, "n_missing", missing.get(c, 0) + unused)
                        if m is not None:
                            emit(p, kind, g, x, "mean", m, scale)
                        if lo is not None:
                            emit(p, kind, g, x, "ci_low", lo, scale)
                            emit(p, kind, g, x, "ci_high", hi, scale)
                        continue
                    emit(p, kind, g, x, "n", len(v))
                    emit(p, kind, g, x, "n_missing", missing.get(c, 0))
                    if not v:
                        continue
                    if kind == "box":
                        for stat, value in box_rows(v, layer["whiskers"]):
                            emit(p, kind, g, x, stat, value, scale)
                    elif kind == "mean":
                        log = f.fig["y_scale"] == "log"
                        for stat, value in mean_rows(v, layer["error"], layer.get("level"), log):
                            emit(p, kind, g, x, stat, value, scale)
                    elif kind == "median":
                        emit(p, kind, g, x, "median", percentile(v, 50), scale)


def reference(folder, out_dir):
    with open(os.path.join(folder, "manifest.json"), encoding="utf-8") as f:
        manifest = json.load(f)
    datas = {b["name"]: Data(b, folder) for b in manifest["codebooks"]}
    result = {"figures": {}, "problems": []}
    for fig in manifest["figures"]:
        fig["where"] = tuple(fig["where"]) if fig["where"] else None
        path = os.path.join(out_dir, fig["name"] + ".summary.csv")
        summary = read_summary(path) if os.path.exists(path) else []
        if not summary:
            result["problems"].append("no summary written for figure %s" % fig["name"])
        result["figures"][fig["name"]] = reference_figure(
            fig, datas[fig["data"]], summary, result["problems"])
    json.dump(result, sys.stdout)


def main(argv):
    if len(argv) == 4 and argv[1] == "generate":
        generate(argv[2], int(argv[3]))
    elif len(argv) == 4 and argv[1] == "reference":
        reference(argv[2], argv[3])
    else:
        sys.stderr.write(__doc__)
        sys.exit(2)


if __name__ == "__main__":
    main(sys.argv)
