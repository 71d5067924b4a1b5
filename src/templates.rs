//! The demo workbooks shipped in sheets/, built into the binary so `new
//! --template` and the terminal start screen work anywhere. Every one is an
//! invented scenario and says so in its note.

/// Name, one-line description, file text.
pub const TEMPLATES: &[(&str, &str, &str)] = &[
    (
        "turbojet",
        "single-spool turbojet on a sea-level static stand, shaft balance",
        include_str!("../sheets/turbojet.ron"),
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
