//! Test-data reduction (`reduce` module and the `reduce` command).
//!
//! Every expected value is computed here by hand from the scan cells and the
//! calorically perfect closed forms (gamma 1.4, as the demo sheet uses):
//!
//! * isentropic efficiency  eta = (PR^k - 1) / (Tt2/Tt1 - 1), k = (g-1)/g,
//!   with PR = pt2/pt1 (ideal exit temperature Tt1 PR^k, work cp (Tt2 - Tt1));
//! * polytropic efficiency  eta_p = k ln PR / ln(Tt2/Tt1) (the same gas,
//!   integrated along infinitesimal stages of equal efficiency);
//! * corrected flow  Wc = W sqrt(Tt1/Tref) / (pt1/pref), Tref = 288.15 K and
//!   pref = 101325 Pa (ISA sea level, ISO 2533), the sheet having no
//!   reference of its own;
//! * uncertainty by the root-sum-square of sensitivity times standard
//!   uncertainty over independent channels, U95 = 2 u_c (the large-sample
//!   coverage factor of the ASME PTC 19.1 approach), with the partial
//!   derivatives derived analytically in `eta_sensitivities`.
//!
//! Units, by definition: 1 lbm = 0.45359237 kg, g0 = 9.80665 m/s2, 1 in =
//! 0.0254 m, so 1 psi = 1 lbf/in2 = 6894.757293168 Pa; degF -> K is
//! (F + 459.67) 5/9 (a degree is 5/9 K); 1 inHg (conventional, mercury of
//! 13595.1 kg/m3 at 32 degF under g0; density from memory) = 3386.389 Pa.
//! No expected value is taken from this program's output.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use stationwise::book::Workbook;
use stationwise::engine::Engine;
use stationwise::format;
use stationwise::reduce::{self, Options, Plan, ReduceError, ScanResult};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const GAMMA: f64 = 1.4;
/// (gamma - 1) / gamma.
const K: f64 = (GAMMA - 1.0) / GAMMA;
/// Pa per psi: 0.45359237 kg x 9.80665 m/s2 / (0.0254 m)^2.
const PSI: f64 = 6894.757293168;
/// Pa per conventional inch of mercury: 13595.1 kg/m3 (from memory) x
/// 9.80665 m/s2 x 0.0254 m = 3386.38864 Pa. The product rather than the
/// rounded 3386.389: a round trip to 1e-9 needs the constant to 1e-11.
const INHG: f64 = 13_595.1 * 9.80665 * 0.0254;
/// kg per lbm (exact).
const LBM: f64 = 0.45359237;
/// Kelvin per degree Fahrenheit (a temperature difference).
const DEG_F: f64 = 5.0 / 9.0;

const ETA: &str = "process.compressor.eta_isentropic";
const ETA_P: &str = "process.compressor.eta_polytropic";
const PR: &str = "process.compressor.pressure_ratio";
const WC: &str = "process.compressor.wc_in";

/// Header of the demo channel map's scan files (ETA_TRUE, PR_TRUE are extra
/// columns the map ignores).
const HEADER: [&str; 18] = [
    "SCAN", "TIME_S", "BARO", "T1A", "T1B", "P1A", "P1B", "P1C", "W", "N", "P2A", "P2B", "P2C",
    "P2D", "T2A", "T2B", "T2C", "T2D",
];

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn demo_sheet() -> PathBuf {
    root().join("sheets/compressor-speedline.ron")
}

fn demo_scans() -> PathBuf {
    root().join("sheets/compressor-speedline-scans.csv")
}

fn demo_book() -> Workbook {
    format::load(&demo_sheet()).unwrap_or_else(|e| panic!("demo sheet: {e}"))
}

fn engine_of(book: Workbook) -> Engine {
    Engine::new(book).unwrap_or_else(|e| panic!("engine: {e:?}"))
}

fn f_to_k(f: f64) -> f64 {
    (f + 459.67) * DEG_F
}

fn k_to_f(k: f64) -> f64 {
    k / DEG_F - 459.67
}

fn strings(v: &[&str]) -> Vec<String> {
    v.iter().map(|s| s.to_string()).collect()
}

/// Reduce CSV text with the library, reading it as `open_scans` does
/// (flexible record lengths, trimmed cells); every result in order.
fn reduce_text(
    engine: &Engine,
    text: &str,
    report: &[String],
    opts: &Options,
) -> (Result<u64, ReduceError>, Vec<ScanResult>) {
    let mut reader = match reduce::ScanReader::from_text(text) {
        Ok(r) => r,
        Err(e) => return (Err(e), Vec::new()),
    };
    let mut out = Vec::new();
    let r = reduce::reduce(
        engine,
        &mut reader,
        report,
        opts,
        |s| {
            out.push(s.clone());
            Ok(())
        },
        |_| {},
    )
    .map(|(_, rows)| rows);
    (r, out)
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("cannot run stationwise {args:?}: {e}"))
}

fn temp_dir(tag: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("stationwise-reduce-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

// ---------------------------------------------------------------------------
// Scans made from a known truth.

/// The true state of one scan, in the units of the demo channel map.
#[derive(Debug, Clone, Copy)]
struct Truth {
    baro_inhg: f64,
    t1_f: f64,
    p1_psig: f64,
    w_lbm: f64,
    n_rpm: f64,
    pr: f64,
    eta: f64,
}

impl Truth {
    /// Absolute inlet total pressure, Pa.
    fn pt1(&self) -> f64 {
        self.baro_inhg * INHG + self.p1_psig * PSI
    }
    /// Exit total temperature, K: Tt2 = Tt1 (1 + (PR^k - 1)/eta), the
    /// definition of the isentropic efficiency with cp constant.
    fn tt2(&self) -> f64 {
        f_to_k(self.t1_f) * (1.0 + (self.pr.powf(K) - 1.0) / self.eta)
    }
    /// Exit gauge pressure, psig: pt2 = PR pt1, less the barometer.
    fn p2_psig(&self) -> f64 {
        (self.pr * self.pt1() - self.baro_inhg * INHG) / PSI
    }
    /// CSV cells in `HEADER` order. Probes differ, but their (weighted)
    /// means are the truth: T1 +-d; P1 +-d, 0; exit rake weights 0.2, 0.3,
    /// 0.3, 0.2 with offsets +3d, -2d, 0, 0 (0.2*3d - 0.3*2d = 0, whereas an
    /// arithmetic mean would be off by d/4); T2 +-d, +-2d. Written with
    /// Rust's shortest round-trip formatting, so no digit is lost.
    fn cells(&self, scan: usize) -> Vec<String> {
        let (t1, p1, p2, t2) = (self.t1_f, self.p1_psig, self.p2_psig(), k_to_f(self.tt2()));
        let (dt, dp) = (0.75, 0.004);
        let v = [
            self.baro_inhg,
            t1 + dt,
            t1 - dt,
            p1 + dp,
            p1 - dp,
            p1,
            self.w_lbm,
            self.n_rpm,
            p2 + 3.0 * dp,
            p2 - 2.0 * dp,
            p2,
            p2,
            t2 + dt,
            t2 - dt,
            t2 + 2.0 * dt,
            t2 - 2.0 * dt,
        ];
        let mut c = vec![scan.to_string(), format!("{}", 10.0 * scan as f64)];
        c.extend(v.iter().map(|x| format!("{x}")));
        c
    }
}

fn csv_text(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut s = header.join(",");
    s.push('\n');
    for r in rows {
        s.push_str(&r.join(","));
        s.push('\n');
    }
    s
}

/// Truths over a grid: pressure ratio 1.2 to 12, efficiency 0.70 to 0.99,
/// inlet 20 to 100 degF, barometer and inlet depression varying.
fn truths() -> Vec<Truth> {
    let mut v = Vec::new();
    for (a, &t1_f) in [20.0, 59.0, 100.0].iter().enumerate() {
        for (b, &pr) in [1.2, 2.0, 4.4, 8.0, 12.0].iter().enumerate() {
            for (c, &eta) in [0.70, 0.80, 0.86, 0.92, 0.99].iter().enumerate() {
                let i = (a * 25 + b * 5 + c) as f64;
                v.push(Truth {
                    baro_inhg: 29.1 + 0.013 * i,
                    t1_f,
                    p1_psig: -0.05 - 0.003 * i,
                    w_lbm: 20.0 + 0.1 * i,
                    n_rpm: 9000.0 + 40.0 * i,
                    pr,
                    eta,
                });
            }
        }
    }
    v
}

fn good_row(i: usize) -> Truth {
    Truth {
        baro_inhg: 29.92 - 0.01 * i as f64,
        t1_f: 59.0 + i as f64,
        p1_psig: -0.12,
        w_lbm: 26.0,
        n_rpm: 11000.0,
        pr: 4.0 + 0.1 * i as f64,
        eta: 0.84 + 0.005 * i as f64,
    }
}

// ---------------------------------------------------------------------------
// Hand reduction of a demo-layout scan row.

/// SI channel values of one scan, averaged and made absolute by hand.
#[derive(Debug, Clone, Copy)]
struct Hand {
    tt1: f64,
    pt1: f64,
    w: f64,
    tt2: f64,
    pt2: f64,
}

impl Hand {
    fn from_cells(get: impl Fn(&str) -> f64) -> Hand {
        let mean = |cols: &[&str]| cols.iter().map(|c| get(c)).sum::<f64>() / cols.len() as f64;
        let baro = get("BARO") * INHG;
        let p2 = 0.2 * get("P2A") + 0.3 * get("P2B") + 0.3 * get("P2C") + 0.2 * get("P2D");
        Hand {
            tt1: f_to_k(mean(&["T1A", "T1B"])),
            pt1: baro + mean(&["P1A", "P1B", "P1C"]) * PSI,
            w: get("W") * LBM,
            tt2: f_to_k(mean(&["T2A", "T2B", "T2C", "T2D"])),
            pt2: baro + p2 * PSI,
        }
    }
    fn pr(&self) -> f64 {
        self.pt2 / self.pt1
    }
    fn tau(&self) -> f64 {
        self.tt2 / self.tt1
    }
    fn eta(&self) -> f64 {
        (self.pr().powf(K) - 1.0) / (self.tau() - 1.0)
    }
    fn eta_p(&self) -> f64 {
        K * self.pr().ln() / self.tau().ln()
    }
    fn wc(&self) -> f64 {
        self.w * (self.tt1 / 288.15).sqrt() / (self.pt1 / 101_325.0)
    }

    /// Partial derivatives of eta = (PR^k - 1)/(tau - 1), PR = pt2/pt1,
    /// tau = Tt2/Tt1, derived by hand:
    ///   d eta/d Tt1 = (PR^k - 1) (Tt2/Tt1^2) / (tau - 1)^2 = eta tau / (Tt1 (tau - 1))
    ///   d eta/d Tt2 = -(PR^k - 1) (1/Tt1) / (tau - 1)^2 = -eta / (Tt1 (tau - 1))
    ///   d eta/d pt2 = k PR^(k-1) (1/pt1) / (tau - 1)   = k PR^k / (pt2 (tau - 1))
    ///   d eta/d pt1 = -k PR^(k-1) (pt2/pt1^2) / (tau - 1) = -k PR^k / (pt1 (tau - 1))
    ///   barometer B, with pt1 = B + g1 and pt2 = B + g2 both gauge:
    ///   d eta/d B = d eta/d pt1 + d eta/d pt2 = k PR^k/(tau - 1) (1/pt2 - 1/pt1)
    /// Flow and speed do not enter: zero.
    fn eta_sensitivities(&self) -> [(&'static str, f64); 5] {
        let (eta, tau, prk) = (self.eta(), self.tau(), self.pr().powf(K));
        let d_pt2 = K * prk / (self.pt2 * (tau - 1.0));
        let d_pt1 = -K * prk / (self.pt1 * (tau - 1.0));
        [
            ("process.inlet.tt", eta * tau / (self.tt1 * (tau - 1.0))),
            ("station.2.tt", -eta / (self.tt1 * (tau - 1.0))),
            ("process.inlet.pt", d_pt1),
            ("station.2.pt", d_pt2),
            ("barometer BARO", d_pt1 + d_pt2),
        ]
    }
}

/// The demo channel map's standard uncertainties (systematic, random) in
/// SI, converted by hand: degF differences x 5/9, psi x PSI, inHg x INHG.
fn demo_uncertainties(label: &str) -> (f64, f64) {
    match label {
        "process.inlet.tt" => (0.5 * DEG_F, 0.2 * DEG_F),
        "station.2.tt" => (1.0 * DEG_F, 0.5 * DEG_F),
        "process.inlet.pt" => (0.02 * PSI, 0.01 * PSI),
        "station.2.pt" => (0.05 * PSI, 0.02 * PSI),
        "barometer BARO" => (0.01 * INHG, 0.003 * INHG),
        other => panic!("no uncertainty for {other}"),
    }
}

/// Hand (systematic, random, U95, per-channel variance shares) of eta.
fn eta_uncertainty_by_hand(h: &Hand) -> (f64, f64, f64, Vec<(&'static str, f64)>) {
    let mut b2 = 0.0;
    let mut s2 = 0.0;
    let mut parts = Vec::new();
    for (label, theta) in h.eta_sensitivities() {
        let (b, s) = demo_uncertainties(label);
        b2 += (theta * b).powi(2);
        s2 += (theta * s).powi(2);
        parts.push((label, (theta * b).powi(2) + (theta * s).powi(2)));
    }
    let total = b2 + s2;
    for p in &mut parts {
        p.1 /= total;
    }
    parts.sort_by(|a, b| b.1.total_cmp(&a.1));
    (b2.sqrt(), s2.sqrt(), 2.0 * total.sqrt(), parts)
}

/// Hand U95 of the corrected flow Wc = W sqrt(Tt1/Tref) pref/pt1:
/// d Wc/Wc = dW/W + dTt1/(2 Tt1) - dpt1/pt1, the barometer entering through
/// pt1 only (pt2 does not appear); W's uncertainties are 0.5 % and 0.2 % of
/// the reading.
fn wc_u95_by_hand(h: &Hand) -> f64 {
    let (bt, st) = demo_uncertainties("process.inlet.tt");
    let (bp, sp) = demo_uncertainties("process.inlet.pt");
    let (bb, sb) = demo_uncertainties("barometer BARO");
    let rel2 = 0.005f64.powi(2)
        + 0.002f64.powi(2)
        + (bt * bt + st * st) / (2.0 * h.tt1).powi(2)
        + (bp * bp + sp * sp + bb * bb + sb * sb) / h.pt1.powi(2);
    2.0 * h.wc() * rel2.sqrt()
}

/// The committed demo scans: header and records.
fn demo_records() -> (Vec<String>, Vec<csv::StringRecord>) {
    let mut r = csv::Reader::from_path(demo_scans()).unwrap();
    let header: Vec<String> = r.headers().unwrap().iter().map(str::to_string).collect();
    let recs = r.records().map(|x| x.unwrap()).collect();
    (header, recs)
}

fn hand_of(header: &[String], rec: &csv::StringRecord) -> Hand {
    Hand::from_cells(|c| {
        let i = header.iter().position(|h| h == c).unwrap();
        rec[i].parse().unwrap()
    })
}

fn cell(header: &[String], rec: &csv::StringRecord, col: &str) -> f64 {
    let i = header
        .iter()
        .position(|h| h == col)
        .unwrap_or_else(|| panic!("no column {col}"));
    rec[i].parse().unwrap()
}

fn rel_close(got: f64, want: f64, rel: f64, what: &str) {
    assert!(
        (got - want).abs() <= rel * want.abs(),
        "{what}: got {got}, want {want} (relative {rel}, off by {:e})",
        ((got - want) / want).abs()
    );
}

// ---------------------------------------------------------------------------
// Round trip (acceptance 2).

#[test]
fn noiseless_scans_reduce_back_to_their_efficiencies_and_pressure_ratios() {
    let engine = engine_of(demo_book());
    let truths = truths();
    let rows: Vec<Vec<String>> = truths
        .iter()
        .enumerate()
        .map(|(i, t)| t.cells(i + 1))
        .collect();
    let text = csv_text(&HEADER, &rows);
    let report = strings(&[ETA, PR]);
    // 75 scans against a batch of 64: two batches, output must stay in order.
    let (r, out) = reduce_text(&engine, &text, &report, &Options::default());
    assert_eq!(r.unwrap(), truths.len() as u64);
    assert_eq!(out.len(), truths.len());
    for (i, (s, t)) in out.iter().zip(&truths).enumerate() {
        assert_eq!(s.row, i as u64 + 1, "results out of order");
        assert!(s.problems.is_empty(), "scan {}: {:?}", s.row, s.problems);
        let eta = s.values[0].unwrap();
        let pr = s.values[1].unwrap();
        assert!(
            (eta - t.eta).abs() <= 1e-9,
            "scan {}: eta {eta} from a truth of {} ({t:?})",
            s.row,
            t.eta
        );
        rel_close(pr, t.pr, 1e-9, &format!("scan {} pressure ratio", s.row));
    }

    // The binary, once, on the same scans written to a file.
    let dir = temp_dir("roundtrip");
    let scans = dir.join("scans.csv");
    std::fs::write(&scans, &text).unwrap();
    let out = run(&[
        "reduce",
        demo_sheet().to_str().unwrap(),
        "--scans",
        scans.to_str().unwrap(),
        "--report",
        &format!("{ETA},{PR}"),
        "--format",
        "json",
    ]);
    assert!(
        out.status.success(),
        "reduce failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let rows = v["rows"].as_array().unwrap();
    assert_eq!(rows.len(), truths.len());
    for (row, t) in rows.iter().zip(&truths) {
        let eta = row[ETA].as_f64().unwrap();
        let pr = row[PR].as_f64().unwrap();
        assert!(
            (eta - t.eta).abs() <= 1e-9,
            "binary: eta {eta} vs {}",
            t.eta
        );
        rel_close(pr, t.pr, 1e-9, "binary pressure ratio");
        assert_eq!(row["problems"], "");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

// ---------------------------------------------------------------------------
// Noise: the committed demo scans against their invented truth.

/// Chi-square quantile by the Wilson-Hilferty approximation (from memory):
/// chi2_p(nu) ~ nu (1 - 2/(9 nu) + z_p sqrt(2/(9 nu)))^3, good to a fraction
/// of a percent at nu = 299.
fn chi2_quantile(nu: f64, z: f64) -> f64 {
    let a = 2.0 / (9.0 * nu);
    nu * (1.0 - a + z * a.sqrt()).powi(3)
}

#[test]
fn demo_scan_residuals_match_the_predicted_random_uncertainty() {
    let engine = engine_of(demo_book());
    let text = std::fs::read_to_string(demo_scans()).unwrap();
    let report = strings(&[ETA]);
    let opts = Options {
        uncertainty: true,
        ..Options::default()
    };
    let (r, out) = reduce_text(&engine, &text, &report, &opts);
    assert_eq!(r.unwrap(), 300);
    let (header, recs) = demo_records();
    assert_eq!(out.len(), recs.len());

    // The generator (tests/gen/speedline_scans.py) adds zero-mean Gaussian
    // noise of the channels' random standard uncertainties and no
    // systematic offset, so eta - ETA_TRUE of scan i is, linearised, normal
    // with mean 0 and standard deviation sigma_i = the predicted random part
    // (sigma_i varies a little along the speed line, hence z_i = r_i/sigma_i).
    let n = out.len() as f64;
    let mut z = Vec::new();
    let mut resid = Vec::new();
    let mut sigma2 = 0.0;
    let mut u95 = 0.0;
    for (s, rec) in out.iter().zip(&recs) {
        assert!(s.problems.is_empty(), "scan {}: {:?}", s.row, s.problems);
        let eta = s.values[0].unwrap();
        let u = s.uncertainty[0].as_ref().unwrap();
        let r = eta - cell(&header, rec, "ETA_TRUE");
        z.push(r / u.random);
        resid.push(r);
        sigma2 += u.random * u.random / n;
        u95 += u.u95 / n;
    }
    let mean = |v: &[f64]| v.iter().sum::<f64>() / v.len() as f64;
    let var = |v: &[f64]| {
        let m = mean(v);
        v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (v.len() as f64 - 1.0)
    };
    // (n - 1) s_z^2 ~ chi-square with n - 1 degrees of freedom when the
    // model is right. The seed is fixed, so the bound is for the model, not
    // for chance: a 99.9 % two-sided interval (z = 3.2905, from memory)
    // fails one generated file in a thousand with a right model. Its
    // resolution is about +-14 % on sigma: the exit temperature's random
    // part taken as 0.35 instead of 0.5 degF fails it; dropping the inlet
    // temperature's random part (sigma about 15 % low) sits at the edge.
    let nu = n - 1.0;
    let lo = (chi2_quantile(nu, -3.2905) / nu).sqrt();
    let hi = (chi2_quantile(nu, 3.2905) / nu).sqrt();
    let ratio = var(&z).sqrt();
    eprintln!(
        "eta residuals: sd {:.3e}, predicted random sigma (rms) {:.3e}, sd(z) {ratio:.4} in [{lo:.4}, {hi:.4}], mean {:.2e}, mean U95 {u95:.3e}",
        var(&resid).sqrt(),
        sigma2.sqrt(),
        mean(&resid)
    );
    assert!(
        (lo..=hi).contains(&ratio),
        "sd of (eta - ETA_TRUE)/sigma_random = {ratio}, outside the 99.9 % interval [{lo}, {hi}]"
    );
    // Mean: z-bar ~ N(0, 1/n); 99.9 % bound 3.29/sqrt(n).
    let zbar = mean(&z);
    assert!(
        zbar.abs() <= 3.2905 / n.sqrt(),
        "mean normalised residual {zbar} is a bias"
    );
    // The mean residual against U95: by the same bound it is below
    // 3.29 sigma/sqrt(300) = 0.19 sigma, and U95 >= 2 sigma, so below
    // 0.1 U95.
    let rbar = mean(&resid);
    assert!(
        rbar.abs() < 0.1 * u95,
        "mean residual {rbar} is not small against U95 {u95}"
    );
}

// ---------------------------------------------------------------------------
// Sensitivity: analytic partials against the linearised and Monte Carlo
// uncertainty.

#[test]
fn eta_uncertainty_matches_hand_sensitivities_and_monte_carlo() {
    let book = demo_book();
    let engine = engine_of(book.clone());
    let (header, recs) = demo_records();
    let plan = Plan::new(&book, &header).unwrap();
    let report = strings(&[ETA]);
    for (k, rec) in [(0usize, &recs[0]), (149, &recs[149]), (299, &recs[299])] {
        let row = k as u64 + 1;
        let h = hand_of(&header, rec);
        let (b, s, u95, parts) = eta_uncertainty_by_hand(&h);
        let inputs = plan.inputs(&header, rec, row).unwrap();
        let mut eng = engine.clone();
        plan.apply(&mut eng, &inputs).unwrap();
        let eta = eng.value(ETA).unwrap().unwrap();
        assert!(
            (eta - h.eta()).abs() <= 1e-9,
            "row {row}: eta {eta} vs {}",
            h.eta()
        );

        let u = reduce::linear(&mut eng, &plan, &inputs, &report)[0]
            .clone()
            .unwrap();
        rel_close(u.u95, u95, 1e-4, &format!("row {row} U95 of eta"));
        rel_close(u.systematic, b, 1e-4, &format!("row {row} systematic"));
        rel_close(u.random, s, 1e-4, &format!("row {row} random"));
        assert_eq!(u.contributors[0].0, parts[0].0, "row {row} top contributor");
        for (label, share) in &parts {
            let got = u
                .contributors
                .iter()
                .find(|(l, _)| l == label)
                .unwrap_or_else(|| panic!("row {row}: no contributor {label}"))
                .1;
            assert!(
                (got - share).abs() <= 1e-4,
                "row {row}: share of {label} {got} vs {share}"
            );
        }
        // Flow and speed have no effect on eta.
        for l in ["process.inlet.w", "shaft.rig.speed"] {
            let got = u.contributors.iter().find(|(x, _)| x == l).unwrap().1;
            assert!(got.abs() < 1e-12, "row {row}: {l} share {got}");
        }

        // Monte Carlo: n samples; the sample standard deviation of a normal
        // output has a relative standard error of 1/sqrt(2 (n - 1)) (0.5 %
        // at n = 20000); eta is nearly linear over a few u, so allow four
        // standard errors.
        if k == 0 {
            let n = 20_000;
            let mc = reduce::monte_carlo(&mut eng, &plan, &inputs, &report, n, 7)[0].unwrap();
            let tol = 4.0 / (2.0 * (n as f64 - 1.0)).sqrt();
            rel_close(mc, u95, tol, "Monte Carlo U95 of eta");
            // The engine is left at the nominal scan.
            assert!((eng.value(ETA).unwrap().unwrap() - h.eta()).abs() <= 1e-9);
        }
    }
}

// ---------------------------------------------------------------------------
// Bad scan files.

fn good_rows(n: usize) -> Vec<Vec<String>> {
    (1..=n).map(|i| good_row(i).cells(i)).collect()
}

/// Every scan but `bad` reduced without problems to its truth.
fn assert_good_rows_reduced(out: &[ScanResult], bad: &[u64]) {
    for s in out {
        if bad.contains(&s.row) {
            continue;
        }
        assert!(s.problems.is_empty(), "scan {}: {:?}", s.row, s.problems);
        let t = good_row(s.row as usize);
        let eta = s.values[0].unwrap_or_else(|| panic!("scan {} not reduced", s.row));
        assert!((eta - t.eta).abs() <= 1e-9, "scan {}: eta {eta}", s.row);
    }
}

#[test]
fn missing_mapped_column_is_refused_before_any_work() {
    let engine = engine_of(demo_book());
    let header: Vec<&str> = HEADER.iter().copied().filter(|h| *h != "P2C").collect();
    let rows: Vec<Vec<String>> = good_rows(3)
        .into_iter()
        .map(|mut r| {
            r.remove(HEADER.iter().position(|h| *h == "P2C").unwrap());
            r
        })
        .collect();
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&header, &rows),
        &strings(&[ETA]),
        &Options::default(),
    );
    match r {
        Err(ReduceError::MissingColumns { missing, header }) => {
            assert_eq!(missing, vec!["P2C".to_string()]);
            assert!(
                header.contains("P2B") && !header.contains("P2C"),
                "{header}"
            );
        }
        other => panic!("expected MissingColumns, got {other:?}"),
    }
    assert!(out.is_empty(), "scans reduced despite the missing column");
    let msg = ReduceError::MissingColumns {
        missing: vec!["P2C".into()],
        header: String::new(),
    }
    .to_string();
    assert!(msg.contains("P2C"), "{msg}");
}

#[test]
fn empty_scan_file_is_refused() {
    let engine = engine_of(demo_book());
    let (r, out) = reduce_text(&engine, "", &strings(&[ETA]), &Options::default());
    match r {
        Err(ReduceError::Read(m)) => assert!(m.contains("empty"), "{m}"),
        other => panic!("expected a read error, got {other:?}"),
    }
    assert!(out.is_empty());
}

#[test]
fn text_in_a_numeric_column_is_that_row_s_problem_only() {
    let engine = engine_of(demo_book());
    let mut rows = good_rows(5);
    let col = HEADER.iter().position(|h| *h == "T2B").unwrap();
    rows[2][col] = "n/a".into();
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &rows),
        &strings(&[ETA]),
        &Options::default(),
    );
    assert_eq!(r.unwrap(), 5);
    assert_eq!(out.len(), 5);
    let bad = &out[2];
    assert_eq!(bad.row, 3);
    assert_eq!(bad.problems.len(), 1, "{:?}", bad.problems);
    let p = &bad.problems[0];
    assert!(
        p.contains("row 3") && p.contains("column T2B") && p.contains("n/a"),
        "{p}"
    );
    assert_eq!(bad.values[0], None);
    assert_good_rows_reduced(&out, &[3]);
}

#[test]
fn efficiency_above_one_is_that_row_s_problem_only() {
    let engine = engine_of(demo_book());
    let mut rows = good_rows(4);
    // Tt2 from eta = 1.05: a temperature rise smaller than the ideal one.
    rows[1] = Truth {
        eta: 1.05,
        ..good_row(2)
    }
    .cells(2);
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &rows),
        &strings(&[ETA]),
        &Options::default(),
    );
    assert_eq!(r.unwrap(), 4);
    let bad = &out[1];
    assert!(
        bad.problems
            .iter()
            .any(|p| p.contains("row 2") && p.contains("efficiency") && p.contains("above 1")),
        "{:?}",
        bad.problems
    );
    // The message carries the value: 1.0500.
    assert!(
        bad.problems.iter().any(|p| p.contains("1.0500")),
        "{:?}",
        bad.problems
    );
    assert_eq!(bad.values[0], None, "an impossible efficiency reported");
    assert_good_rows_reduced(&out, &[2]);
}

#[test]
fn gauge_channel_without_a_barometer_is_refused_before_any_work() {
    let mut book = demo_book();
    book.channels.as_mut().unwrap().barometer = None;
    let engine = engine_of(book);
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &good_rows(3)),
        &strings(&[ETA]),
        &Options::default(),
    );
    match r {
        Err(ReduceError::BadChannel { given, why }) => {
            // The first gauge channel of the map.
            assert_eq!(given, "process.inlet.pt");
            assert!(why.contains("psig") && why.contains("barometer"), "{why}");
        }
        other => panic!("expected BadChannel, got {other:?}"),
    }
    assert!(out.is_empty());
}

#[test]
fn row_with_too_few_fields_is_that_row_s_problem_only() {
    let engine = engine_of(demo_book());
    let mut rows = good_rows(5);
    // Row 4 stops after W: N and the exit channels are absent.
    let w = HEADER.iter().position(|h| *h == "W").unwrap();
    rows[3].truncate(w + 1);
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &rows),
        &strings(&[ETA]),
        &Options::default(),
    );
    assert_eq!(r.unwrap(), 5);
    let bad = &out[3];
    assert_eq!(bad.row, 4);
    assert_eq!(bad.values[0], None);
    // 9 fields of 18: SCAN ... W. A row with another field count than the
    // header cannot be matched to it column by column (a field missing in
    // the middle would shift the rest), so the row is refused whole.
    assert!(
        bad.problems
            .iter()
            .any(|p| p.contains("row 4") && p.contains("9 of the header's 18 fields")),
        "{:?}",
        bad.problems
    );
    assert_good_rows_reduced(&out, &[4]);
}

#[test]
fn binary_on_a_bad_scan_file_exits_2_and_prints_every_good_row() {
    // Rows 2 (text), 4 (eta above 1) and 5 (too few fields) are bad; the
    // other four must all be in the output, reduced to their truth.
    let mut rows = good_rows(7);
    let t2b = HEADER.iter().position(|h| *h == "T2B").unwrap();
    rows[1][t2b] = "ERR".into();
    rows[3] = Truth {
        eta: 1.05,
        ..good_row(4)
    }
    .cells(4);
    rows[4].truncate(9);
    let dir = temp_dir("bad");
    let scans = dir.join("bad.csv");
    std::fs::write(&scans, csv_text(&HEADER, &rows)).unwrap();
    let out = run(&[
        "reduce",
        demo_sheet().to_str().unwrap(),
        "--scans",
        scans.to_str().unwrap(),
        "--report",
        ETA,
    ]);
    let _ = std::fs::remove_dir_all(&dir);
    assert_eq!(
        out.status.code(),
        Some(2),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("3 of 7 scans had problems"), "{stderr}");
    let mut r = csv::Reader::from_reader(out.stdout.as_slice());
    let header: Vec<String> = r.headers().unwrap().iter().map(str::to_string).collect();
    assert_eq!(
        header,
        vec![
            "row".to_string(),
            ETA.into(),
            "problems".into(),
            "flags".into()
        ]
    );
    let recs: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(recs.len(), 7, "every scan has a row");
    for (i, rec) in recs.iter().enumerate() {
        let row = i + 1;
        assert_eq!(rec[0], row.to_string());
        if [2, 4, 5].contains(&row) {
            assert!(rec[1].is_empty(), "bad row {row} has a value {}", &rec[1]);
            assert!(
                rec[2].contains(&format!("row {row}")),
                "row {row}: {}",
                &rec[2]
            );
        } else {
            let eta: f64 = rec[1].parse().unwrap();
            assert!((eta - good_row(row).eta).abs() <= 1e-9, "row {row}: {eta}");
            assert!(rec[2].is_empty(), "row {row}: {}", &rec[2]);
        }
    }
    assert!(recs[1][2].contains("column T2B") && recs[1][2].contains("ERR"));
    assert!(recs[3][2].contains("above 1"));
    assert!(
        recs[4][2].contains("9 of the header's 18 fields"),
        "{:?}",
        recs[4]
    );
}

// ---------------------------------------------------------------------------
// The demo through the binary (acceptance 1).

#[test]
fn demo_reduce_with_uncertainty_writes_one_csv_row_per_scan() {
    let out = run(&[
        "reduce",
        demo_sheet().to_str().unwrap(),
        "--scans",
        demo_scans().to_str().unwrap(),
        "--uncertainty",
        "--format",
        "csv",
        // Round-trip figures: the checks below are at 1e-9.
        "--precision",
        "17",
    ]);
    assert!(
        out.status.success(),
        "reduce failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut r = csv::Reader::from_reader(out.stdout.as_slice());
    let header: Vec<String> = r.headers().unwrap().iter().map(str::to_string).collect();
    let col = |name: &str| {
        header
            .iter()
            // The header carries the SI unit: "station.3.tt [K]".
            .position(|h| h == name || h.starts_with(&format!("{name} [")))
            .unwrap_or_else(|| panic!("no column {name} in {header:?}"))
    };
    let recs: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    let (sh, scans) = demo_records();
    assert_eq!(recs.len(), scans.len(), "one row per scan");
    let givens = [
        "process.inlet.tt",
        "process.inlet.pt",
        "process.inlet.w",
        "shaft.rig.speed",
        "station.2.pt",
        "station.2.tt",
        "barometer BARO",
    ];
    for (i, (rec, scan)) in recs.iter().zip(&scans).enumerate() {
        assert_eq!(rec[col("row")], (i + 1).to_string());
        assert!(
            rec[col("problems")].is_empty(),
            "row {}: {}",
            i + 1,
            &rec[col("problems")]
        );
        let num = |name: &str| -> f64 {
            rec[col(name)]
                .parse()
                .unwrap_or_else(|_| panic!("row {}: {name} = {:?}", i + 1, &rec[col(name)]))
        };
        let h = hand_of(&sh, scan);
        assert!((num(ETA) - h.eta()).abs() <= 1e-9, "row {}: eta", i + 1);
        assert!(
            (num(ETA_P) - h.eta_p()).abs() <= 1e-9,
            "row {}: eta_p",
            i + 1
        );
        rel_close(
            num(WC),
            h.wc(),
            1e-9,
            &format!("row {} corrected flow", i + 1),
        );
        rel_close(
            num(&format!("{ETA}.u95")),
            eta_uncertainty_by_hand(&h).2,
            1e-4,
            "eta U95",
        );
        rel_close(
            num(&format!("{WC}.u95")),
            wc_u95_by_hand(&h),
            1e-4,
            "Wc U95",
        );
        assert!(num(&format!("{ETA_P}.u95")) > 0.0);
        for v in [ETA, ETA_P, WC] {
            let top = &rec[col(&format!("{v}.top"))];
            // "station.2.tt 56 %": a channel of the map and a percentage.
            assert!(
                top.ends_with(" %") && givens.iter().any(|g| top.starts_with(g)),
                "row {}: {v}.top = {top:?}",
                i + 1
            );
        }
        // The hand shares name the exit temperature as eta's top channel.
        let (.., parts) = eta_uncertainty_by_hand(&h);
        assert!(rec[col(&format!("{ETA}.top"))].starts_with(parts[0].0));
        assert!(rec[col(&format!("{WC}.top"))].starts_with("process.inlet.w"));
        // A compressor rig burns no fuel: its summary has no fuel flow, so
        // the default report has no fuel column at all.
        assert!(!header.iter().any(|h| h.starts_with("summary.fuel")));
    }
}

#[test]
fn demo_reduce_json_has_rows() {
    let out = run(&[
        "reduce",
        demo_sheet().to_str().unwrap(),
        "--scans",
        demo_scans().to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: Value = serde_json::from_slice(&out.stdout)
        .unwrap_or_else(|e| panic!("not JSON ({e}): {}", String::from_utf8_lossy(&out.stdout)));
    let rows = v["rows"].as_array().unwrap();
    let (sh, scans) = demo_records();
    assert_eq!(rows.len(), scans.len());
    for (i, (row, scan)) in rows.iter().zip(&scans).enumerate() {
        assert_eq!(row["row"].as_u64(), Some(i as u64 + 1));
        let h = hand_of(&sh, scan);
        let eta = row[ETA].as_f64().unwrap();
        assert!((eta - h.eta()).abs() <= 1e-9, "row {}: eta {eta}", i + 1);
        rel_close(row[PR].as_f64().unwrap(), h.pr(), 1e-9, "pressure ratio");
    }
}

/// The malformed-scan set: an unterminated quote, short and long rows, a
/// NaN cell, readings of 1e308 and below absolute zero or absolute vacuum,
/// a negative speed. Each touches only its own scan; every other scan is
/// reduced to its truth with its own row number. Where a probe is left
/// out, the remaining probes are set so that their re-weighted mean is the
/// true value, so the flagged scan must also come out at its truth (the
/// hand formulas of this file, not the program, give that truth).
#[test]
fn malformed_scans_touch_only_their_own_rows() {
    let engine = engine_of(demo_book());
    let col = |name: &str| HEADER.iter().position(|h| *h == name).unwrap();
    let mut rows = good_rows(12);
    let cell =
        |rows: &Vec<Vec<String>>, r: usize, c: &str| -> f64 { rows[r][col(c)].parse().unwrap() };
    // Row 2: an unterminated quote (it must not swallow rows 3 to 12).
    rows[1][col("T2B")] = "\"59.1".into();
    // Row 3: too few fields; row 4: too many.
    rows[2].truncate(9);
    rows[3].push("7".into());
    // Row 5: T2A reads 1e308 degF; T2B set to the true T2 so that the other
    // three average to it (t2, t2 + 2 dt, t2 - 2 dt).
    let t2 = (cell(&rows, 4, "T2A") + cell(&rows, 4, "T2B")) / 2.0;
    rows[4][col("T2A")] = "1e308".into();
    rows[4][col("T2B")] = format!("{t2}");
    // Row 6: P2A reads -100 psig (a negative absolute pressure); P2B set to
    // the true p2, so weights 0.3, 0.3, 0.2 on p2 re-weight to p2.
    let p2 = cell(&rows, 5, "P2C");
    rows[5][col("P2A")] = "-100".into();
    rows[5][col("P2B")] = format!("{p2}");
    // Row 7: T1A reads -500 degF (below absolute zero); T1B set to the mean.
    let t1 = (cell(&rows, 6, "T1A") + cell(&rows, 6, "T1B")) / 2.0;
    rows[6][col("T1A")] = "-500".into();
    rows[6][col("T1B")] = format!("{t1}");
    // Row 8: a NaN cell. Row 9: a negative speed, the channel's only probe.
    rows[7][col("P1B")] = "NaN".into();
    rows[8][col("N")] = "-11000".into();
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &rows),
        &strings(&[ETA]),
        &Options::default(),
    );
    assert_eq!(r.unwrap(), 12, "every line is a scan");
    assert_eq!(
        out.iter().map(|s| s.row).collect::<Vec<_>>(),
        (1..=12).collect::<Vec<u64>>(),
        "rows keep their own numbers"
    );
    let expect = [
        (2, "unterminated quote"),
        (3, "9 of the header's 18 fields"),
        (4, "19 of the header's 18 fields"),
        (8, "\"NaN\" is not a number"),
        (9, "no usable reading for shaft.rig.speed"),
    ];
    for (row, needle) in expect {
        let s = &out[row - 1];
        assert!(
            s.problems.iter().any(|p| p.contains(needle)),
            "row {row}: {:?}",
            s.problems
        );
        assert_eq!(s.values[0], None, "row {row}");
    }
    for (row, column) in [(5, "T2A"), (6, "P2A"), (7, "T1A")] {
        let s = &out[row - 1];
        assert_eq!(s.flags.len(), 1, "row {row}: {:?}", s.flags);
        assert!(
            s.flags[0].contains(&format!("column {column}")),
            "{:?}",
            s.flags
        );
        assert!(s.flags[0].contains("left out"), "{:?}", s.flags);
    }
    // Row 2's line was split with its quote kept as written (flagged); the
    // quoted cell is not a number, so the scan has a problem as well.
    assert!(
        out[1].flags[0].contains("column T2B: unterminated quote"),
        "{:?}",
        out[1].flags
    );
    for s in &out {
        if ![2, 5, 6, 7].contains(&s.row) {
            assert!(s.flags.is_empty(), "row {}: {:?}", s.row, s.flags);
        }
    }
    assert_good_rows_reduced(&out, &[2, 3, 4, 8, 9]);
}

/// A stray quote in a column the channel map does not read (an operator's
/// note) loses nothing: the scan is reduced to its truth and carries a flag
/// naming the column; a quote that also hides a delimiter cannot be split
/// into the header's fields and stays a problem of its own scan.
#[test]
fn unterminated_quote_in_a_note_column_is_flagged_not_dropped() {
    let engine = engine_of(demo_book());
    let mut header: Vec<&str> = HEADER.to_vec();
    header.push("NOTE");
    let mut rows = good_rows(4);
    for r in rows.iter_mut() {
        r.push("steady".into());
    }
    rows[1][header.len() - 1] = "\"valve at 3".into();
    // Row 4: the note hides a delimiter behind its unpaired quote.
    rows[3][header.len() - 1] = "\"open, then".into();
    let text = csv_text(&header, &rows);
    let (r, out) = reduce_text(&engine, &text, &strings(&[ETA]), &Options::default());
    assert_eq!(r.unwrap(), 4);
    assert!(out[1].problems.is_empty(), "{:?}", out[1].problems);
    assert!(
        out[1]
            .flags
            .iter()
            .any(|f| f.contains("column NOTE: unterminated quote")),
        "{:?}",
        out[1].flags
    );
    assert!(
        out[3]
            .problems
            .iter()
            .any(|p| p.contains("unterminated quote")),
        "{:?}",
        out[3].problems
    );
    assert_eq!(out[3].values[0], None);
    assert_good_rows_reduced(&out, &[4]);
}

/// Weights whose sum overflows (1e308 and 1.5e308, in the demo's ratios
/// 2:3:3:2) are normalised without overflow: the pressure ratio is that of
/// the demo weights.
#[test]
fn huge_probe_weights_are_normalised_without_overflow() {
    let mut book = demo_book();
    let ch = book.channels.as_mut().unwrap();
    let p2 = ch
        .map
        .iter_mut()
        .find(|c| c.given == "station.2.pt")
        .unwrap();
    p2.weights = vec![1.0e308, 1.5e308, 1.5e308, 1.0e308];
    let engine = engine_of(book);
    let (r, out) = reduce_text(
        &engine,
        &csv_text(&HEADER, &good_rows(3)),
        &strings(&[ETA]),
        &Options::default(),
    );
    assert_eq!(r.unwrap(), 3);
    assert_good_rows_reduced(&out, &[]);
}

#[test]
fn a_device_as_scan_file_is_refused_before_reading() {
    let out = run(&[
        "reduce",
        demo_sheet().to_str().unwrap(),
        "--scans",
        "/dev/zero",
    ]);
    assert_eq!(out.status.code(), Some(1), "{out:?}");
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("not a regular file"),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}
