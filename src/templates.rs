//! The demo workbooks shipped in sheets/, built into the binary so `new
//! --template` and the terminal start screen work anywhere. Every one is an
//! invented scenario and says so in its note.

/// The smallest workbook that computes: one free-stream station, sea-level
/// static, 10 kg/s, to build on from the keyboard.
pub const BLANK: &str = r#"#![enable(implicit_some)]
(
    format: 1,
    title: "New workbook",
    ambient: (
        condition: Standard(
            altitude: "0 m",
            offset: "0 K",
        ),
        flight: Mach("0"),
    ),
    gas: ThermallyPerfect,
    stations: [
        (
            name: "0",
            note: "free stream",
        ),
    ],
    processes: [
        (
            name: "freestream",
            to: "0",
            kind: Entry(Freestream(
                w: "10 kg/s",
            )),
        ),
    ],
)
"#;

/// Name, one-line description, file text.
pub const TEMPLATES: &[(&str, &str, &str)] = &[
    (
        "blank",
        "one free-stream station to build a workbook on from the keyboard",
        BLANK,
    ),
    (
        "turbojet",
        "single-spool turbojet on a sea-level static stand, shaft balance",
        include_str!("../sheets/turbojet.ron"),
    ),
    (
        "cooled-turbojet",
        "the turbojet with a customer bleed and turbine vane and rotor cooling air",
        include_str!("../sheets/cooled-turbojet.ron"),
    ),
    (
        "turbofan",
        "two-spool separate-flow turbofan at Mach 0.8 cruise, two shaft balances",
        include_str!("../sheets/turbofan.ron"),
    ),
    (
        "ramjet",
        "ramjet at Mach 2.5, normal-shock intake, convergent-divergent nozzle",
        include_str!("../sheets/ramjet.ron"),
    ),
    (
        "tunnel",
        "blow-down supersonic wind tunnel: choked reservoir, Mach 2 test section, diffuser shock",
        include_str!("../sheets/tunnel.ron"),
    ),
    (
        "compressor-rig",
        "compressor rig reduced from inlet and exit rakes: measured efficiency",
        include_str!("../sheets/compressor-rig.ron"),
    ),
    (
        "combustor-rig",
        "combustor rig reduced from measured exit temperature and fuel flow",
        include_str!("../sheets/combustor-rig.ron"),
    ),
    (
        "compressor-speedline",
        "compressor rig with a channel map for recorded scans and uncertainties",
        include_str!("../sheets/compressor-speedline.ron"),
    ),
];

/// The text of a template by name.
pub fn get(name: &str) -> Option<&'static str> {
    TEMPLATES
        .iter()
        .find(|(n, _, _)| *n == name)
        .map(|(_, _, t)| *t)
}

/// Template names, comma separated.
pub fn names() -> String {
    TEMPLATES
        .iter()
        .map(|(n, _, _)| *n)
        .collect::<Vec<_>>()
        .join(", ")
}
