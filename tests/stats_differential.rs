//! Differential tests of `figura::stats` against numpy and scipy on many random samples.
//!
//! `tests/differential/reference.py` draws the samples with numpy (fixed seed: different sizes
//! including n = 1 and 2, ties, negative values, large constant offsets, tiny and huge scales,
//! outliers, all-equal values) and prints reference values; each check below names the numpy or
//! scipy function that produced its reference. Values travel as IEEE-754 bit patterns, so both
//! sides see the same doubles. Tolerance: 1e-9 relative, absolute near zero (relative to the
//! quantity's natural scale, named at each check).
//!
//! Python 3 with numpy and scipy is required: if it is missing, these tests fail with a
//! message saying what to install (CI installs them); they never skip.

use std::io::Write;
use std::process::{Command, Stdio};
use std::sync::OnceLock;

use figura::stats::{self, BandwidthRule, BinRule, DensityGrid, Spread, StatError, Whiskers};
use serde_json::{json, Value};

const REL_TOL: f64 = 1e-9;

fn script() -> String {
    concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/differential/reference.py"
    )
    .to_string()
}

/// Runs the reference script and parses its JSON output; panics (fails the test) with a clear
/// message when python3, numpy or scipy is unavailable.
fn run_reference(args: &[&str], stdin: Option<String>) -> Value {
    let mut child = Command::new("python3")
        .arg(script())
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap_or_else(|e| {
            panic!("cannot run python3 ({e}); install Python 3 with numpy and scipy to run the differential tests")
        });
    if let Some(text) = stdin {
        let mut pipe = child.stdin.take().expect("stdin is piped");
        pipe.write_all(text.as_bytes())
            .expect("write to reference.py");
    } else {
        drop(child.stdin.take());
    }
    let out = child.wait_with_output().expect("wait for reference.py");
    assert!(
        out.status.success(),
        "tests/differential/reference.py {args:?} failed ({}); it needs python3 with numpy and scipy:\n{}",
        out.status,
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("reference.py prints JSON")
}

/// The `samples` references, computed once per test binary.
fn reference() -> &'static Value {
    static REFERENCE: OnceLock<Value> = OnceLock::new();
    REFERENCE.get_or_init(|| run_reference(&["samples"], None))
}

fn from_bits(v: &Value) -> f64 {
    f64::from_bits(v.as_u64().expect("a bit pattern"))
}

fn bit_list(v: &Value) -> Vec<f64> {
    v.as_array()
        .expect("a list")
        .iter()
        .map(from_bits)
        .collect()
}

fn to_bits(values: &[f64]) -> Vec<u64> {
    values.iter().map(|v| v.to_bits()).collect()
}

/// Counts comparisons so a test cannot pass by comparing nothing.
#[derive(Default)]
struct Checks {
    count: usize,
}

impl Checks {
    /// `actual` within 1e-9 relative of `expected`, or within 1e-9 · `scale` when `expected`
    /// is near zero.
    fn close(&mut self, actual: f64, expected: f64, scale: f64, what: &str) {
        self.count += 1;
        let tol = REL_TOL * expected.abs().max(scale.abs());
        assert!(
            (actual - expected).abs() <= tol,
            "{what}: got {actual:e}, reference {expected:e} (difference {:e}, tolerance {tol:e})",
            (actual - expected).abs()
        );
    }

    fn equal<T: PartialEq + std::fmt::Debug>(&mut self, actual: T, expected: T, what: &str) {
        self.count += 1;
        assert_eq!(actual, expected, "{what}");
    }
}

fn num(v: &Value) -> Option<f64> {
    v.as_f64()
}

#[test]
fn moments_and_quantiles_match_numpy() {
    let reference = reference();
    let mut checks = Checks::default();
    for sample in reference["samples"].as_array().unwrap() {
        let kind = sample["kind"].as_str().unwrap();
        let values = bit_list(&sample["values"]);
        let n = values.len();
        let what = |s: &str| format!("{kind} n={n}: {s}");
        let scale = values.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        // Reference: numpy.mean; scale: largest |value|.
        let m = stats::moments(&values).unwrap();
        checks.close(m.mean, num(&sample["mean"]).unwrap(), scale, &what("mean"));
        // Reference: numpy.std(ddof=1); undefined for n = 1.
        match num(&sample["sd"]) {
            Some(sd) => checks.close(m.sd.unwrap(), sd, 0.0, &what("sd")),
            None => checks.equal(m.sd, None, &what("sd of one value")),
        }
        // Reference: numpy.quantile(method="linear"), Hyndman & Fan definition 7.
        let sorted = stats::sorted_values(&values).unwrap();
        for pair in sample["quantiles"].as_array().unwrap() {
            let p = pair[0].as_f64().unwrap();
            let q = stats::quantile_sorted(&sorted, p).unwrap();
            checks.close(
                q,
                pair[1].as_f64().unwrap(),
                scale,
                &what(&format!("quantile {p}")),
            );
        }
        // Reference: numpy restatement of Tukey's box (quartiles by numpy.quantile).
        let b = stats::box_summary(&values, Whiskers::Tukey).unwrap();
        let r = &sample["box"];
        for (name, got) in [
            ("q1", b.q1),
            ("median", b.median),
            ("q3", b.q3),
            ("whisker_low", b.whisker_low),
            ("whisker_high", b.whisker_high),
            ("min", b.min),
            ("max", b.max),
        ] {
            checks.close(got, num(&r[name]).unwrap(), scale, &what(name));
        }
        let outliers: Vec<f64> = r["outliers"]
            .as_array()
            .unwrap()
            .iter()
            .filter_map(num)
            .collect();
        checks.equal(
            b.outliers.len(),
            outliers.len(),
            &what("number of outliers"),
        );
        for (got, want) in b.outliers.iter().zip(&outliers) {
            checks.close(*got, *want, scale, &what("outlier"));
        }
    }
    assert!(checks.count > 500, "only {} checks ran", checks.count);
}

#[test]
fn t_quantiles_match_scipy() {
    let reference = reference();
    let mut checks = Checks::default();
    for case in reference["t"].as_array().unwrap() {
        let p = case["p"].as_f64().unwrap();
        let df = case["df"].as_f64().unwrap();
        // Reference: scipy.stats.t.ppf(p, df).
        let want = case["value"].as_f64().unwrap();
        let got = stats::t_quantile(p, df).unwrap();
        checks.close(got, want, 0.0, &format!("t quantile p={p} df={df}"));
    }
    assert!(checks.count > 800, "only {} checks ran", checks.count);
}

#[test]
fn least_squares_matches_scipy_linregress() {
    let reference = reference();
    let mut checks = Checks::default();
    for case in reference["fits"].as_array().unwrap() {
        let x = bit_list(&case["x"]);
        let y = bit_list(&case["y"]);
        let n = x.len();
        let fit = stats::linear_fit(&x, &y).unwrap();
        let y_scale = y.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        // Reference: scipy.stats.linregress slope, intercept, rvalue.
        checks.close(
            fit.slope,
            num(&case["slope"]).unwrap(),
            0.0,
            &format!("n={n} slope"),
        );
        checks.close(
            fit.intercept,
            num(&case["intercept"]).unwrap(),
            y_scale,
            &format!("n={n} intercept"),
        );
        checks.close(
            fit.r.unwrap(),
            num(&case["r"]).unwrap(),
            0.0,
            &format!("n={n} r"),
        );
        // Reference: numpy, sqrt(sum of squared linregress residuals / (n - 2)).
        match num(&case["residual_sd"]) {
            Some(s) => checks.close(
                fit.residual_sd.unwrap(),
                s,
                0.0,
                &format!("n={n} residual sd"),
            ),
            None => checks.equal(fit.residual_sd, None, &format!("n={n} residual sd")),
        }
        // Reference: the mean-response band restated in numpy with scipy.stats.t.ppf.
        for point in case["band"].as_array().unwrap() {
            let x0 = from_bits(&point["x"]);
            let level = point["level"].as_f64().unwrap();
            let band = fit.mean_band(x0, level).unwrap();
            let what = format!("n={n} band at {x0} level {level}");
            checks.close(band.low, num(&point["low"]).unwrap(), y_scale, &what);
            checks.close(band.high, num(&point["high"]).unwrap(), y_scale, &what);
        }
    }
    assert!(checks.count > 40, "only {} checks ran", checks.count);
}

#[test]
fn within_subject_intervals_match_numpy_cousineau_morey() {
    let reference = reference();
    let mut checks = Checks::default();
    for case in reference["within"].as_array().unwrap() {
        let rows: Vec<Vec<Option<f64>>> = case["rows"]
            .as_array()
            .unwrap()
            .iter()
            .map(|row| {
                row.as_array()
                    .unwrap()
                    .iter()
                    .map(|v| v.as_u64().map(f64::from_bits))
                    .collect()
            })
            .collect();
        let label = format!("{} subjects x {} cells", rows.len(), rows[0].len());
        let ci: Vec<(f64, &Value)> = case["ci"]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| (c["level"].as_f64().unwrap(), &c["half_widths"]))
            .collect();
        let mut kinds = vec![(Spread::Sd, &case["sd"]), (Spread::Se, &case["se"])];
        kinds.extend(
            ci.iter()
                .map(|(level, widths)| (Spread::Ci { level: *level }, *widths)),
        );
        for (spread, widths) in kinds {
            let result = stats::within_subject_intervals(&rows, spread).unwrap();
            // Reference: numpy restatement of Cousineau (2005) with Morey (2008).
            checks.equal(
                result.n_subjects as u64,
                case["n_subjects"].as_u64().unwrap(),
                &format!("{label}: complete subjects"),
            );
            checks.equal(
                result.n_dropped as u64,
                case["n_dropped"].as_u64().unwrap(),
                &format!("{label}: dropped subjects"),
            );
            for (j, cell) in result.cells.iter().enumerate() {
                let what = format!("{label}: cell {j} {spread:?}");
                checks.close(cell.mean, num(&case["means"][j]).unwrap(), 0.0, &what);
                checks.close(cell.half_width, num(&widths[j]).unwrap(), 0.0, &what);
            }
        }
    }
    assert!(checks.count > 100, "only {} checks ran", checks.count);
}

#[test]
fn ordinal_quantiles_match_numpy_inverted_cdf() {
    let reference = reference();
    let mut checks = Checks::default();
    for case in reference["ordinal"].as_array().unwrap() {
        let counts: Vec<u64> = case["counts"]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| c.as_u64().unwrap())
            .collect();
        for pair in case["quantiles"].as_array().unwrap() {
            let p = pair[0].as_f64().unwrap();
            // Reference: numpy.quantile(method="inverted_cdf"), Hyndman & Fan definition 1.
            let want = pair[1].as_u64().unwrap() as usize;
            let got = stats::ordinal_quantile(&counts, p).unwrap();
            checks.equal(got, want, &format!("counts {counts:?} p={p}"));
        }
    }
    assert!(checks.count > 250, "only {} checks ran", checks.count);
}

#[test]
fn generator_and_bootstrap_match_python_restatement() {
    let reference = reference();
    let generator = &reference["generator"];
    let mut checks = Checks::default();
    // Reference: SplitMix64 restated in Python. The first five outputs for seed 1234567 are
    // also the widely reprinted test vector (quoted from memory):
    let published = [
        6457827717110365317_u64,
        3203168211198807973,
        9817491932198370423,
        4593380528125082431,
        16408922859458223821,
    ];
    let mut splitmix = stats::random::SplitMix64::new(1234567);
    for (i, want) in generator["splitmix_1234567"]
        .as_array()
        .unwrap()
        .iter()
        .enumerate()
    {
        let got = splitmix.next_u64();
        checks.equal(got, want.as_u64().unwrap(), "SplitMix64 seed 1234567");
        checks.equal(got, published[i], "SplitMix64 published vector");
    }
    // Reference: xoshiro256** (Blackman & Vigna 2018) restated in Python.
    let mut xoshiro = stats::random::Xoshiro256StarStar::seed_from(42);
    for want in generator["xoshiro_42"].as_array().unwrap() {
        checks.equal(
            xoshiro.next_u64(),
            want.as_u64().unwrap(),
            "xoshiro256** seed 42",
        );
    }
    // Reference: Lemire's bounded draw restated in Python.
    let bounds = [1_u64, 2, 3, 10, 1000, (1 << 63) + 1];
    for (n, want) in bounds.iter().zip(generator["below_42"].as_array().unwrap()) {
        let got = stats::random::Xoshiro256StarStar::seed_from(42).below(*n);
        checks.equal(got, want.as_u64().unwrap(), &format!("below({n})"));
    }
    // Reference: the jitter hash restated in Python; must agree to the bit.
    for case in generator["jitter"].as_array().unwrap() {
        let key = case["key"].as_u64().unwrap();
        let index = case["index"].as_u64().unwrap();
        let got = stats::jitter_offset(key, index);
        checks.equal(
            got,
            from_bits(&case["value"]),
            &format!("jitter({key}, {index})"),
        );
    }
    // Reference: percentile bootstrap restated in Python (same generator, numpy statistics,
    // numpy.quantile(method="linear") percentiles).
    for case in reference["bootstrap"].as_array().unwrap() {
        let values = bit_list(&case["values"]);
        let statistic = match case["statistic"].as_str().unwrap() {
            "mean" => stats::BootstrapStatistic::Mean,
            _ => stats::BootstrapStatistic::Median,
        };
        let settings = stats::BootstrapSettings {
            resamples: case["resamples"].as_u64().unwrap() as usize,
            seed: case["seed"].as_u64().unwrap(),
        };
        let level = case["level"].as_f64().unwrap();
        let got = stats::bootstrap_interval(&values, statistic, level, settings).unwrap();
        let scale = values.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        let what = format!("bootstrap {statistic:?} n={} level {level}", values.len());
        checks.close(got.low, num(&case["low"]).unwrap(), scale, &what);
        checks.close(got.high, num(&case["high"]).unwrap(), scale, &what);
    }
    assert!(checks.count > 500, "only {} checks ran", checks.count);
}

/// Histogram and density requests built from the Rust side's choices, answered by numpy/scipy.
#[test]
fn histograms_and_densities_match_numpy_and_scipy() {
    let reference = reference();
    let mut checks = Checks::default();
    let rules = [
        BinRule::Sturges,
        BinRule::Scott,
        BinRule::FreedmanDiaconis,
        BinRule::Count(7),
        BinRule::Count(1),
        BinRule::Width(0.3),
        BinRule::Width(2.5),
    ];
    let mut histogram_requests = Vec::new();
    let mut expected_counts = Vec::new();
    let mut density_requests = Vec::new();
    let mut own_densities = Vec::new();
    for sample in reference["samples"].as_array().unwrap() {
        let kind = sample["kind"].as_str().unwrap();
        let values = bit_list(&sample["values"]);
        let n = values.len();
        let min = values.iter().copied().fold(f64::INFINITY, f64::min);
        let max = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        for rule in rules {
            let what = format!("{kind} n={n} {rule:?}");
            let h = match stats::histogram(&values, rule) {
                Ok(h) => h,
                Err(StatError::WidthTooFine { .. }) => {
                    // Only a fixed width may be too fine, and only when it needs too many bins.
                    let BinRule::Width(w) = rule else {
                        panic!("{what}: rule width too fine")
                    };
                    checks.equal((max - min) / w > 9_999.0, true, &what);
                    continue;
                }
                Err(e) => panic!("{what}: {e}"),
            };
            // Raw rule widths, restated from their publications in numpy.
            let raw_reference = match rule {
                BinRule::Sturges => num(&sample["sturges"]),
                BinRule::Scott => num(&sample["scott_width"]),
                BinRule::FreedmanDiaconis => num(&sample["fd_width"]),
                _ => None,
            };
            if let Some(want) = raw_reference {
                checks.close(h.raw_width, want, 0.0, &format!("{what}: raw width"));
            }
            checks.equal(h.edges.len(), h.counts.len() + 1, &what);
            checks.equal(
                h.edges[0] <= min && max <= h.edges[h.edges.len() - 1],
                true,
                &what,
            );
            checks.equal(
                h.counts.iter().sum::<u64>(),
                n as u64,
                &format!("{what}: total"),
            );
            histogram_requests
                .push(json!({"values": to_bits(&values), "edges": to_bits(&h.edges)}));
            expected_counts.push((what, h.counts.clone()));
        }
        let sd = num(&sample["sd"]).unwrap_or(0.0);
        if n < 2 || sd == 0.0 {
            continue;
        }
        for (rule, reference_h) in [
            (BandwidthRule::Silverman, num(&sample["silverman"])),
            (BandwidthRule::Scott, num(&sample["scott_bandwidth"])),
            (BandwidthRule::Fixed(0.5 * sd), Some(0.5 * sd)),
        ] {
            let what = format!("{kind} n={n} {rule:?}");
            let grid = DensityGrid {
                points: 40,
                reach: 3.0,
            };
            let curve = stats::kernel_density(&values, rule, grid).unwrap();
            // Reference: Silverman (1986) eq. 3.31 and Scott's rule restated in numpy.
            checks.close(
                curve.bandwidth,
                reference_h.unwrap(),
                0.0,
                &format!("{what}: bandwidth"),
            );
            density_requests.push(json!({
                "values": to_bits(&values),
                "bandwidth": curve.bandwidth.to_bits(),
                "grid": to_bits(&curve.x),
            }));
            own_densities.push((what, curve.density));
        }
    }
    let answer = run_reference(
        &["given"],
        Some(json!({"histograms": histogram_requests, "densities": density_requests}).to_string()),
    );
    // Reference: numpy.histogram(values, bins=edges), same half-open bins with the last closed.
    let counts = answer["histograms"].as_array().unwrap();
    checks.equal(
        counts.len(),
        expected_counts.len(),
        "number of histograms answered",
    );
    for ((what, own), numpy_counts) in expected_counts.iter().zip(counts) {
        let numpy_counts: Vec<u64> = numpy_counts
            .as_array()
            .unwrap()
            .iter()
            .map(|c| c.as_u64().unwrap())
            .collect();
        checks.equal(own, &numpy_counts, &format!("{what}: counts"));
    }
    // Reference: scipy.stats.gaussian_kde with factor = h / sd(ddof=1), i.e. bandwidth h.
    let densities = answer["densities"].as_array().unwrap();
    checks.equal(
        densities.len(),
        own_densities.len(),
        "number of densities answered",
    );
    for ((what, own), scipy_density) in own_densities.iter().zip(densities) {
        let peak = own.iter().fold(0.0_f64, |m, d| m.max(*d));
        for (i, (got, want)) in own
            .iter()
            .zip(scipy_density.as_array().unwrap())
            .enumerate()
        {
            // Scale: the curve's peak, for the far tails.
            checks.close(
                *got,
                want.as_f64().unwrap(),
                peak,
                &format!("{what}: point {i}"),
            );
        }
    }
    assert!(checks.count > 3000, "only {} checks ran", checks.count);
}

// --- interval statistics: references from `reference.py inference` ------------------------

/// The `inference` references (statsmodels, scipy, numpy), computed once per test binary.
fn inference() -> &'static Value {
    static REFERENCE: OnceLock<Value> = OnceLock::new();
    REFERENCE.get_or_init(|| run_reference(&["inference"], None))
}

fn list<'a>(v: &'a Value, key: &str) -> &'a Vec<Value> {
    v[key]
        .as_array()
        .unwrap_or_else(|| panic!("{key} is a list"))
}

fn largest_magnitude(values: &[f64]) -> f64 {
    values.iter().fold(0.0_f64, |m, v| m.max(v.abs()))
}

#[test]
fn fit_inference_matches_statsmodels_ols() {
    let mut checks = Checks::default();
    for case in list(inference(), "ols") {
        let kind = case["kind"].as_str().unwrap();
        let (x, y) = (bit_list(&case["x"]), bit_list(&case["y"]));
        let logs = case["logs"].as_bool().unwrap_or(false);
        let fit = if logs {
            stats::regression::log_log_fit(&x, &y).unwrap()
        } else {
            stats::linear_fit(&x, &y).unwrap()
        };
        let params = list(case, "params");
        let bse = list(case, "bse");
        let y_scale = if logs { 1.0 } else { largest_magnitude(&y) };
        // Reference: statsmodels OLS `params` (const, x), `bse`, `rsquared`, `sqrt(scale)`.
        checks.close(fit.intercept, num(&params[0]).unwrap(), y_scale, kind);
        checks.close(fit.slope, num(&params[1]).unwrap(), 0.0, kind);
        for level_case in list(case, "levels") {
            let level = level_case["level"].as_f64().unwrap();
            let what = format!("{kind} level {level}");
            let inf = fit.inference(level).unwrap();
            checks.close(inf.intercept.se, num(&bse[0]).unwrap(), 0.0, &what);
            checks.close(inf.slope.se, num(&bse[1]).unwrap(), 0.0, &what);
            checks.close(
                inf.r_squared.unwrap(),
                num(&case["rsquared"]).unwrap(),
                0.0,
                &what,
            );
            checks.close(
                inf.residual_sd,
                num(&case["residual_sd"]).unwrap(),
                0.0,
                &what,
            );
            // Reference: statsmodels `conf_int(alpha)`, rows const and x.
            let ci = list(level_case, "conf_int");
            for (coefficient, row) in [(inf.intercept, &ci[0]), (inf.slope, &ci[1])] {
                let scale = coefficient.estimate.abs().max(coefficient.se);
                checks.close(coefficient.low, num(&row[0]).unwrap(), scale, &what);
                checks.close(coefficient.high, num(&row[1]).unwrap(), scale, &what);
            }
            // Reference: statsmodels `get_prediction(x).summary_frame(alpha)`: mean_ci_* is
            // the mean-response band, obs_ci_* the prediction interval.
            let at = bit_list(&level_case["at"]);
            for (i, &x0) in at.iter().enumerate() {
                let mean = fit.mean_band(x0, level).unwrap();
                let new = fit.prediction_band(x0, level).unwrap();
                let pairs = [
                    (mean, &level_case["mean_ci"][i]),
                    (new, &level_case["obs_ci"][i]),
                ];
                for (band, want) in pairs {
                    let what = format!("{what} band at {x0}");
                    checks.close(band.low, num(&want[0]).unwrap(), y_scale, &what);
                    checks.close(band.high, num(&want[1]).unwrap(), y_scale, &what);
                }
            }
        }
    }
    assert!(checks.count > 150, "only {} checks ran", checks.count);
}

#[test]
fn wilson_intervals_match_statsmodels() {
    let mut checks = Checks::default();
    for case in list(inference(), "wilson") {
        let k = case["k"].as_u64().unwrap();
        let n = case["n"].as_u64().unwrap();
        let level = case["level"].as_f64().unwrap();
        let got = stats::wilson_interval(k, n, level).unwrap();
        let what = format!("{k} of {n} at {level}");
        // Reference: statsmodels proportion_confint(k, n, alpha, method="wilson"); scale 1
        // (a proportion), so an end at 0 or 1 compares absolutely.
        checks.close(got.low, num(&case["low"]).unwrap(), 1.0, &what);
        checks.close(got.high, num(&case["high"]).unwrap(), 1.0, &what);
        if k == 0 {
            checks.equal(got.low, 0.0, &format!("{what}: lower end exactly 0"));
        }
        if k == n {
            checks.equal(got.high, 1.0, &format!("{what}: upper end exactly 1"));
        }
        // Relative accuracy of a small upper end, e.g. 0 of a million.
        checks.close(got.high, num(&case["high"]).unwrap(), 0.0, &what);
    }
    assert!(checks.count > 400, "only {} checks ran", checks.count);
}

#[test]
fn geometric_means_match_scipy_gmean_and_t_on_logs() {
    let mut checks = Checks::default();
    for case in list(inference(), "gmean") {
        let kind = case["kind"].as_str().unwrap();
        let values = bit_list(&case["values"]);
        // Reference: scipy.stats.gmean.
        let gm = stats::geometric_mean(&values).unwrap();
        checks.close(gm, num(&case["gmean"]).unwrap(), 0.0, kind);
        // Reference: mean ± sd, se, t·se on numpy.log, exponentiated.
        for interval in list(case, "intervals") {
            let spread = match interval["spread"].as_str().unwrap() {
                "sd" => Spread::Sd,
                "se" => Spread::Se,
                _ => Spread::Ci {
                    level: interval["level"].as_f64().unwrap(),
                },
            };
            let got = stats::geometric_mean_interval(&values, spread).unwrap();
            let what = format!("{kind} n={} {spread:?}", values.len());
            checks.close(got.mean, gm, 0.0, &what);
            checks.close(got.low, num(&interval["low"]).unwrap(), 0.0, &what);
            checks.close(got.high, num(&interval["high"]).unwrap(), 0.0, &what);
        }
    }
    assert!(checks.count > 100, "only {} checks ran", checks.count);
}

#[test]
fn median_intervals_match_scipy_binomial_ranks() {
    let reference = inference();
    let mut checks = Checks::default();
    for case in list(reference, "median_ranks") {
        let n = case["n"].as_u64().unwrap() as usize;
        let level = case["level"].as_f64().unwrap();
        let what = format!("n={n} level {level}");
        // Reference: the largest l with 1 − 2·binom.cdf(l − 1, n, 1/2) ≥ L (scipy.stats.binom).
        match (stats::median_ranks(n, level), case["rank"].as_u64()) {
            (Ok((rank, coverage)), Some(want)) => {
                checks.equal(rank as u64, want, &format!("{what}: rank"));
                let want_coverage = num(&case["coverage"]).unwrap();
                checks.close(coverage, want_coverage, 1.0, &format!("{what}: coverage"));
                checks.equal(
                    coverage >= level,
                    true,
                    &format!("{what}: reaches the level"),
                );
            }
            (Err(StatError::TooFewValues { needed, found }), None) => {
                checks.equal(found, n, &what);
                checks.equal(needed > n, true, &format!("{what}: needs more values"));
            }
            (got, want) => panic!("{what}: got {got:?}, scipy rank {want:?}"),
        }
    }
    for case in list(reference, "median_intervals") {
        let values = bit_list(&case["values"]);
        let level = case["level"].as_f64().unwrap();
        let got = stats::median_interval(&values, level).unwrap();
        let what = format!("n={} level {level}", values.len());
        // Reference: the order statistics at those ranks (numpy.sort).
        checks.equal(got.low, from_bits(&case["low"]), &what);
        checks.equal(got.high, from_bits(&case["high"]), &what);
        checks.equal(got.low <= got.median && got.median <= got.high, true, &what);
    }
    for case in list(reference, "notches") {
        let values = bit_list(&case["values"]);
        let got = stats::notch(&values).unwrap();
        let scale = largest_magnitude(&values);
        let what = format!("notch n={}", values.len());
        // Reference: median ± 1.58·IQR/√n with numpy.quantile(method="linear").
        checks.close(got.median, num(&case["median"]).unwrap(), scale, &what);
        checks.close(got.low, num(&case["low"]).unwrap(), scale, &what);
        checks.close(got.high, num(&case["high"]).unwrap(), scale, &what);
    }
    assert!(checks.count > 1500, "only {} checks ran", checks.count);
}

fn bootstrap_statistic(name: &str) -> stats::BootstrapStatistic {
    match name {
        "mean" => stats::BootstrapStatistic::Mean,
        _ => stats::BootstrapStatistic::Median,
    }
}

#[test]
fn bca_matches_numpy_restatement_exactly() {
    let mut checks = Checks::default();
    for case in list(inference(), "bca_exact") {
        let values = bit_list(&case["values"]);
        let statistic = bootstrap_statistic(case["statistic"].as_str().unwrap());
        let settings = stats::BootstrapSettings {
            resamples: case["resamples"].as_u64().unwrap() as usize,
            seed: case["seed"].as_u64().unwrap(),
        };
        let level = case["level"].as_f64().unwrap();
        let what = format!("BCa {statistic:?} n={} level {level}", values.len());
        // Reference: Efron (1987) restated in numpy with the same generator (same resamples),
        // scipy.stats.norm and numpy.quantile(method="linear").
        let got = match stats::bca_interval(&values, statistic, level, settings) {
            Ok(got) => got,
            Err(StatError::BcaUndefined) => {
                checks.equal(num(&case["low"]), None, &what);
                continue;
            }
            Err(e) => panic!("{what}: {e}"),
        };
        let scale = largest_magnitude(&values);
        checks.close(got.low, num(&case["low"]).unwrap(), scale, &what);
        checks.close(got.high, num(&case["high"]).unwrap(), scale, &what);
        checks.close(got.bias_correction, num(&case["z0"]).unwrap(), 1.0, &what);
        checks.close(got.acceleration, num(&case["a"]).unwrap(), 1.0, &what);
    }
    assert!(checks.count > 300, "only {} checks ran", checks.count);
}

#[test]
fn bca_matches_scipy_bootstrap_within_monte_carlo_error() {
    let mut checks = 0;
    for case in list(inference(), "bca_monte_carlo") {
        let kind = case["kind"].as_str().unwrap();
        let values = bit_list(&case["values"]);
        let statistic = bootstrap_statistic(case["statistic"].as_str().unwrap());
        let level = case["level"].as_f64().unwrap();
        let settings = stats::BootstrapSettings {
            resamples: 20_000,
            seed: stats::bootstrap::DEFAULT_SEED,
        };
        let got = stats::bca_interval(&values, statistic, level, settings).unwrap();
        // Reference: scipy.stats.bootstrap(method="BCa", n_resamples=20000). Both sides draw
        // their own resamples, so they agree only within Monte Carlo error, measured in units
        // of the bootstrap standard error (scipy's `standard_error`): over 30 scipy seeds on
        // these very data the sd of an end was at most 0.04 (mean) and 0.095 (median, whose
        // bootstrap distribution is lumpy), so the difference of two independent runs has sd
        // at most 0.056 and 0.134. The tolerances 0.3 and 0.6 are more than 4.4 such sds: a
        // wrong bias correction or acceleration (shifts of 0.5 or more) still fails.
        let factor = match statistic {
            stats::BootstrapStatistic::Mean => 0.3,
            stats::BootstrapStatistic::Median => 0.6,
        };
        let tolerance = factor * num(&case["standard_error"]).unwrap();
        for (end, got, want) in [
            ("low", got.low, num(&case["low"]).unwrap()),
            ("high", got.high, num(&case["high"]).unwrap()),
        ] {
            checks += 1;
            assert!(
                (got - want).abs() <= tolerance,
                "{kind} {statistic:?} level {level} {end}: got {got}, scipy {want}, \
                 tolerance {tolerance}"
            );
        }
    }
    assert!(checks >= 24, "only {checks} checks ran");
}

#[test]
fn reflected_density_matches_direct_computation() {
    let mut checks = Checks::default();
    for case in list(inference(), "reflected") {
        let values = bit_list(&case["values"]);
        let h = case["bandwidth"].as_f64().unwrap();
        let grid = bit_list(&case["grid"]);
        let got = stats::kde_bounded(&values, h, &grid, stats::Boundary::ReflectAtZero).unwrap();
        let want: Vec<f64> = list(case, "density").iter().filter_map(num).collect();
        let peak = want.iter().fold(0.0_f64, |m, d| m.max(*d));
        // Reference: Σ scipy.stats.norm.pdf((x ∓ v)/h) / (n h) for x ≥ 0, 0 below (Silverman
        // 1986 §2.10 restated); scale: the curve's peak.
        for ((x, g), w) in grid.iter().zip(&got).zip(&want) {
            checks.close(*g, *w, peak, &format!("n={} at {x}", values.len()));
        }
    }
    assert!(checks.count > 200, "only {} checks ran", checks.count);
}

#[test]
fn welch_and_paired_intervals_match_scipy() {
    let reference = inference();
    let mut checks = Checks::default();
    for (name, interval) in [
        (
            "welch",
            stats::welch_interval as fn(&[f64], &[f64], f64) -> _,
        ),
        ("paired", stats::paired_interval),
    ] {
        for case in list(reference, name) {
            let (a, b) = (bit_list(&case["a"]), bit_list(&case["b"]));
            let level = case["level"].as_f64().unwrap();
            let got = interval(&a, &b, level).unwrap();
            let what = format!("{name} n={}+{} level {level}", a.len(), b.len());
            // Reference: scipy.stats.ttest_ind(equal_var=False) / ttest_rel: df, statistic
            // and confidence_interval(confidence_level=L); scale: the interval's half-width.
            let half = (got.high - got.low) / 2.0;
            checks.close(got.df, num(&case["df"]).unwrap(), 0.0, &what);
            checks.close(got.t.unwrap(), num(&case["t"]).unwrap(), 0.0, &what);
            checks.close(got.low, num(&case["low"]).unwrap(), half, &what);
            checks.close(got.high, num(&case["high"]).unwrap(), half, &what);
        }
    }
    assert!(checks.count > 100, "only {} checks ran", checks.count);
}

#[test]
fn lowess_matches_statsmodels() {
    let mut checks = Checks::default();
    for case in list(inference(), "lowess") {
        let (x, y) = (bit_list(&case["x"]), bit_list(&case["y"]));
        let span = case["span"].as_f64().unwrap();
        let iterations = case["iterations"].as_u64().unwrap() as usize;
        let got = stats::lowess(&x, &y, span, iterations).unwrap();
        let what = format!("n={} span {span} iterations {iterations}", x.len());
        let scale = largest_magnitude(&y);
        // Reference: statsmodels lowess(y, x, frac, it, delta=0), sorted by x; scale: the
        // largest |y|, for fitted values near zero.
        for (i, (want_x, want)) in list(case, "sorted_x")
            .iter()
            .zip(list(case, "fitted"))
            .enumerate()
        {
            checks.equal(got.x[i], from_bits(want_x), &what);
            checks.close(got.fitted[i], num(want).unwrap(), scale, &what);
        }
    }
    assert!(checks.count > 1000, "only {} checks ran", checks.count);
}

#[test]
fn ecdf_matches_scipy() {
    let mut checks = Checks::default();
    for case in list(inference(), "ecdf") {
        let values = bit_list(&case["values"]);
        let got = stats::ecdf(&values).unwrap();
        let what = format!("n={}", values.len());
        // Reference: scipy.stats.ecdf(values).cdf.quantiles and .probabilities.
        let steps = bit_list(&case["steps"]);
        let proportions: Vec<f64> = list(case, "proportions").iter().filter_map(num).collect();
        checks.equal(&got.values, &steps, &what);
        for (g, w) in got.proportions.iter().zip(&proportions) {
            checks.close(*g, *w, 0.0, &what);
        }
        checks.equal(got.proportions.len(), proportions.len(), &what);
    }
    assert!(checks.count > 500, "only {} checks ran", checks.count);
}

#[test]
fn level_medians_match_numpy_inverted_cdf() {
    let reference = inference();
    let mut checks = Checks::default();
    for case in list(reference, "level_median") {
        let levels: Vec<usize> = list(case, "levels")
            .iter()
            .map(|l| l.as_u64().unwrap() as usize)
            .collect();
        for pair in case["quantiles"].as_array().unwrap() {
            let p = pair[0].as_f64().unwrap();
            // Reference: numpy.quantile(method="inverted_cdf"), Hyndman & Fan definition 1.
            let want = pair[1].as_u64().unwrap() as usize;
            let got = stats::level_quantile(&levels, p).unwrap();
            checks.equal(got, want, &format!("levels {levels:?} p={p}"));
            if p == 0.5 {
                checks.equal(stats::level_median(&levels).unwrap(), want, "median");
            }
        }
    }
    // Reference: scipy.stats.norm.ppf.
    for case in list(reference, "normal") {
        let p = case["p"].as_f64().unwrap();
        let got = stats::normal_quantile(p).unwrap();
        checks.close(
            got,
            num(&case["quantile"]).unwrap(),
            1.0,
            &format!("z({p})"),
        );
    }
    assert!(checks.count > 300, "only {} checks ran", checks.count);
}
