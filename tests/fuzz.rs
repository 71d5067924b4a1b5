//! A time-bounded mutation fuzzer for what users type and load: the
//! workbook parser (and, for files that parse, the engine and the canonical
//! writer) and the unit parser. Seeds are the demo sheets; mutations flip,
//! delete, duplicate and splice bytes and insert tokens that have broken
//! parsers before (quotes, brackets, huge and odd numbers, unit symbols).
//!
//! Nothing may panic; a file that parses must survive write-then-parse
//! with the same canonical text. In CI it runs for a few seconds; a longer
//! run: `SW_FUZZ_SECONDS=1800 cargo test --release --test fuzz -- --nocapture`.
//! A failing input is written to the system's temporary folder and named.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use stationwise::units::{self, Quantity};
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::time::{Duration, Instant};

struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        // SplitMix64.
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: usize) -> usize {
        if n == 0 {
            0
        } else {
            (self.next() % n as u64) as usize
        }
    }
}

const TOKENS: &[&str] = &[
    "\"",
    "(",
    ")",
    "[",
    "]",
    ",",
    ":",
    "1e308",
    "-1e308",
    "4.9e-324",
    "nan",
    "inf",
    "-0",
    "0",
    "1e-300",
    "99999999999999999999",
    "psig",
    "barg",
    "degF",
    "degR",
    "R",
    "K",
    "%",
    "kPa",
    "lbm/s",
    "rpm",
    "m2",
    "in2",
    "Some(",
    "None",
    "#![enable(implicit_some)]",
    "//",
    "/*",
    "\\",
    "\u{2212}",
    "日本",
    "\u{0}",
    "\n",
    "format: 9",
    "Standard(",
    "Measured(",
    "Matched",
    "Supersonic",
];

fn mutate(rng: &mut Rng, seeds: &[Vec<u8>], base: &[u8]) -> Vec<u8> {
    let mut v = base.to_vec();
    for _ in 0..1 + rng.below(4) {
        let n = v.len();
        match rng.below(6) {
            0 if n > 0 => {
                let i = rng.below(n);
                v[i] ^= 1 << rng.below(8);
            }
            1 if n > 0 => {
                let i = rng.below(n);
                let len = 1 + rng.below(64.min(n - i));
                v.drain(i..i + len);
            }
            2 if n > 0 => {
                let i = rng.below(n);
                let len = 1 + rng.below(64.min(n - i));
                let piece: Vec<u8> = v[i..i + len].to_vec();
                let at = rng.below(v.len());
                v.splice(at..at, piece);
            }
            3 => {
                let t = TOKENS[rng.below(TOKENS.len())].as_bytes();
                let at = rng.below(v.len() + 1);
                v.splice(at..at, t.iter().copied());
            }
            4 => {
                // Replace a quoted value with a token.
                let t = TOKENS[rng.below(TOKENS.len())];
                let s = String::from_utf8_lossy(&v).to_string();
                let quotes: Vec<usize> = s.match_indices('"').map(|(i, _)| i).collect();
                if quotes.len() >= 2 {
                    let k = rng.below(quotes.len() / 2) * 2;
                    if let (Some(&a), Some(&b)) = (quotes.get(k), quotes.get(k + 1)) {
                        let mut out = s[..=a].to_string();
                        out.push_str(t);
                        out.push_str(&s[b..]);
                        v = out.into_bytes();
                    }
                }
            }
            _ => {
                // Splice lines of another seed.
                let other = &seeds[rng.below(seeds.len())];
                if !other.is_empty() && n > 0 {
                    let a = rng.below(other.len());
                    let len = rng.below(256.min(other.len() - a));
                    let at = rng.below(n);
                    v.splice(at..at, other[a..a + len].iter().copied());
                }
            }
        }
    }
    v
}

fn workbook_case(bytes: &[u8]) {
    let Ok(text) = std::str::from_utf8(bytes) else {
        return;
    };
    if let Ok(book) = format::parse(text) {
        let canon = format::to_text(&book);
        let again =
            format::parse(&canon).unwrap_or_else(|e| panic!("canonical text does not parse: {e}"));
        assert_eq!(
            format::to_text(&again),
            canon,
            "write-then-parse changed the text"
        );
        if let Ok(mut e) = Engine::new(book) {
            let _ = e.problems();
            for (p, ..) in e.book().givens().into_iter().take(3) {
                let _ = e.set_si(&p, 1.0e300);
                let _ = e.set_given(&p, "-1");
            }
        }
    }
}

const QUANTITIES: [Quantity; 8] = [
    Quantity::Temperature,
    Quantity::TemperatureDifference,
    Quantity::Pressure,
    Quantity::MassFlow,
    Quantity::Area,
    Quantity::Ratio,
    Quantity::RotationalSpeed,
    Quantity::Angle,
];

fn unit_text(rng: &mut Rng) -> (String, Quantity) {
    let mut s = String::new();
    for _ in 0..1 + rng.below(4) {
        match rng.below(3) {
            0 => s.push_str(&format!("{}", f64::from_bits(rng.next()))),
            1 => s.push_str(TOKENS[rng.below(TOKENS.len())]),
            _ => s.push_str(&format!("{}.{}", rng.below(1000), rng.below(100))),
        }
        if rng.below(2) == 0 {
            s.push(' ');
        }
    }
    (s, QUANTITIES[rng.below(QUANTITIES.len())])
}

fn unit_case(s: &str, q: Quantity) {
    if let Ok(p) = units::parse(s, q, "fuzz") {
        assert!(p.si.is_finite(), "{s:?} parsed to {}", p.si);
    }
}

#[test]
fn parsers_survive_mutated_input() {
    let seconds: u64 = std::env::var("SW_FUZZ_SECONDS")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(8);
    let mut seeds: Vec<Vec<u8>> = Vec::new();
    for e in std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/sheets")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "ron") {
            seeds.push(std::fs::read(p).unwrap());
        }
    }
    seeds.sort();
    let seed: u64 = std::env::var("SW_FUZZ_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(1, |d| d.as_nanos() as u64)
        });
    let mut rng = Rng(seed);
    let end = Instant::now() + Duration::from_secs(seconds);
    let (mut books, mut unit_inputs) = (0u64, 0u64);
    let quiet = std::panic::take_hook();
    std::panic::set_hook(Box::new(|_| {}));
    let mut failure = None;
    while Instant::now() < end && failure.is_none() {
        let base = seeds[rng.below(seeds.len())].clone();
        let input = mutate(&mut rng, &seeds, &base);
        if catch_unwind(AssertUnwindSafe(|| workbook_case(&input))).is_err() {
            failure = Some(("workbook", input));
            break;
        }
        books += 1;
        for _ in 0..8 {
            let (text, q) = unit_text(&mut rng);
            if catch_unwind(AssertUnwindSafe(|| unit_case(&text, q))).is_err() {
                failure = Some(("unit", format!("{q:?}: {text}").into_bytes()));
                break;
            }
            unit_inputs += 1;
        }
    }
    std::panic::set_hook(quiet);
    if let Some((what, input)) = failure {
        let p = std::env::temp_dir().join(format!("stationwise-fuzz-{what}-{seed}.txt"));
        let _ = std::fs::write(&p, &input);
        // Run it again with the hook restored, to show the panic.
        if what == "workbook" {
            workbook_case(&input);
        }
        panic!(
            "{what} input panicked (seed {seed}); input saved to {}",
            p.display()
        );
    }
    eprintln!(
        "fuzz: {books} workbooks and {unit_inputs} unit strings in {seconds} s, seed {seed}, no panic"
    );
}
