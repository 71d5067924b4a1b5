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
];

/// The text of a template by name.
pub fn get(name: &str) -> Option<&'static str> {
    TEMPLATES.iter().find(|(n, _, _)| *n == name).map(|(_, _, t)| *t)
}

/// Template names, comma separated.
pub fn names() -> String {
    TEMPLATES.iter().map(|(n, _, _)| *n).collect::<Vec<_>>().join(", ")
}
