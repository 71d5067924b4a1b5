//! Users' comments in a workbook file, kept across load, edit and save.
//!
//! The workbook is read with serde, which forgets comments, and written in
//! canonical layout. This module reads the comments of the text as the user
//! left it, ties each one to an *anchor* (a place in the structure, named by
//! a path such as `processes / [intake] / kind / Duct / Recovery /
//! recovery`), and puts them back into the canonical text the program
//! writes.
//!
//! Path segments: a struct field by its name; a list item by the string in
//! its `name` field, else its `row` field, else its position; a map entry by
//! its key; a tuple member by its position; an enum variant that wraps
//! something by the variant's name (so comments under a mode that is no
//! longer chosen lose their place and fall back, see below).
//!
//! Where a comment belongs:
//! 1. comment lines before an element (field, list item, map entry, tuple
//!    member) lead that element;
//! 2. a comment starting on the line where an element ends (after the
//!    element or its comma) trails that element; one right after an opening
//!    bracket trails the opening line of that container;
//! 3. comments after the last element of a container, before its closing
//!    bracket, are the container's inner-end comments;
//! 4. comments before the root `(` lead the root; comments after the root's
//!    closing `)` stay at the end of the file.
//!
//! The header line the program writes on line 1 is not a user comment.
//!
//! An anchor missing from the new text (the element was deleted, or its
//! mode changed) falls back to the nearest ancestor that still exists: at
//! the end of its contents when it has brackets, else just before it. No
//! comment is ever dropped, and comments that land in the same place keep
//! their order in the file.

use std::collections::HashMap;

/// The first line the program writes in every workbook file (the same text
/// as the format module's header; repeated so this file stands alone).
const HEADER: &str = super::HEADER;

/// One level of indentation in canonical text.
const INDENT: &str = "    ";

/// Brackets nested deeper than this are stepped over without anchors, so
/// hostile input cannot exhaust the stack.
const MAX_DEPTH: usize = 128;

/// One step of an anchor path.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
enum Seg {
    /// A struct field, by name.
    Field(String),
    /// A list item by its `name` (or `row`) string; the number counts
    /// earlier items of the same list with the same name.
    Name(String, usize),
    /// A list item or tuple member without a name, by position.
    Index(usize),
    /// A map entry, by its key.
    Key(String),
    /// An enum variant wrapping a tuple or struct.
    Variant(String),
}

/// Where a comment sits relative to the element named by its path.
#[derive(Debug, Clone, PartialEq)]
enum Place {
    /// On its own line(s) before the element.
    Leading(Vec<Seg>),
    /// At the end of the element's last line.
    Trailing(Vec<Seg>),
    /// At the end of the line that opens the element's brackets.
    OpenLine(Vec<Seg>),
    /// Before the line that closes the element's brackets.
    Inner(Vec<Seg>),
    /// After everything.
    End,
}

impl Place {
    fn path_mut(&mut self) -> Option<&mut Vec<Seg>> {
        match self {
            Place::Leading(p) | Place::Trailing(p) | Place::OpenLine(p) | Place::Inner(p) => {
                Some(p)
            }
            Place::End => None,
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
struct Held {
    /// The comment as written, `//` or `/*` included (line comments without
    /// trailing blanks; block comments with `\n` line ends).
    text: String,
    place: Place,
}

/// Users' comments of a workbook file, each anchored to the element it
/// precedes or trails.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Comments {
    /// In file order.
    held: Vec<Held>,
}

impl Comments {
    /// Read the comments of workbook text. Never panics; on text it cannot
    /// follow it keeps what it could (every comment it saw is kept,
    /// anchored as well as it can).
    pub fn collect(text: &str) -> Comments {
        let (toks, raw) = lex(text);
        let tree = Tree::new(toks);
        let held = raw
            .iter()
            .map(|c| Held {
                text: c.text.clone(),
                place: tree.place_of(c),
            })
            .collect();
        Comments { held }
    }

    /// Whether no comment is held.
    pub fn is_empty(&self) -> bool {
        self.held.is_empty()
    }

    /// Number of comments held.
    pub fn len(&self) -> usize {
        self.held.len()
    }

    /// The comment texts, in file order (for a diff of comments).
    pub fn texts(&self) -> Vec<String> {
        self.held.iter().map(|h| h.text.clone()).collect()
    }

    /// Put the comments into canonical text (as written by the program)
    /// and return the result. Every held comment appears exactly once.
    pub fn apply(&self, canonical: &str) -> String {
        if self.held.is_empty() {
            return canonical.to_string();
        }
        let (toks, _) = lex(canonical);
        let tree = Tree::new(toks);
        let ends_with_newline = canonical.ends_with('\n');
        let body = canonical.strip_suffix('\n').unwrap_or(canonical);
        let lines: Vec<&str> = if canonical.is_empty() {
            Vec::new()
        } else {
            body.split('\n').collect()
        };
        let layout = Layout::new(&tree.toks, lines.len());

        // Sort every comment into a line slot; held is in file order, so
        // each slot's list is in file order too.
        let mut before: Vec<Vec<usize>> = vec![Vec::new(); lines.len() + 2];
        let mut after: Vec<Vec<usize>> = vec![Vec::new(); lines.len() + 2];
        let mut end: Vec<usize> = Vec::new();
        let real = |l: usize| (1..=lines.len()).contains(&l).then_some(l);
        for (i, h) in self.held.iter().enumerate() {
            let slot = match tree.slot_of(&h.place) {
                Slot::Before(l) => real(layout.before_line(l)).and_then(|l| before.get_mut(l)),
                Slot::After(l) => real(layout.after_line(l)).and_then(|l| after.get_mut(l)),
                Slot::End => None,
            };
            match slot {
                Some(list) => list.push(i),
                None => end.push(i),
            }
        }
        // Only block comments that stay on one line can be followed by
        // another comment on the same line; after a line comment or a block
        // spanning lines, the rest join the comments put before the next
        // line (in file order), which is where reading the text back would
        // anchor them.
        for line in 1..=lines.len() {
            let Some(list) = after.get_mut(line) else {
                continue;
            };
            let keep = list
                .iter()
                .position(|&i| self.held.get(i).is_some_and(|h| !inline_block(&h.text)))
                .map_or(list.len(), |p| p + 1);
            let moved = list.split_off(keep.min(list.len()));
            if moved.is_empty() {
                continue;
            }
            match before.get_mut(line + 1) {
                Some(next) if line < lines.len() => {
                    next.extend(moved);
                    next.sort_unstable();
                }
                _ => {
                    end.extend(moved);
                    end.sort_unstable();
                }
            }
        }

        let text_of = |i: usize| self.held.get(i).map_or("", |h| h.text.as_str());
        let mut out: Vec<String> = Vec::new();
        for (k, line) in lines.iter().enumerate() {
            let n = k + 1;
            if let Some(list) = before.get(n)
                && !list.is_empty()
            {
                let indent = layout.indent(line, n);
                for &i in list {
                    push_own_lines(&mut out, &indent, text_of(i));
                }
            }
            let (content, cr) = match line.strip_suffix('\r') {
                Some(c) => (c, "\r"),
                None => (*line, ""),
            };
            let mut joined = content.to_string();
            let mut tail: Vec<String> = Vec::new();
            for &i in after.get(n).map_or(&[][..], |v| v.as_slice()) {
                let mut parts = text_of(i).split('\n');
                joined.push_str("  ");
                joined.push_str(parts.next().unwrap_or(""));
                tail.extend(parts.map(str::to_string));
            }
            joined.push_str(cr);
            out.push(joined);
            out.extend(tail);
        }
        for &i in &end {
            push_own_lines(&mut out, "", text_of(i));
        }
        let mut result = out.join("\n");
        if ends_with_newline || (canonical.is_empty() && !result.is_empty()) {
            result.push('\n');
        }
        result
    }

    /// A list item was renamed: items of the top-level list `list`
    /// ("stations", "processes", "results", ...) identified by `old` are
    /// now `new`, so their comments follow.
    pub fn rename(&mut self, list: &str, old: &str, new: &str) {
        for h in &mut self.held {
            let Some(path) = h.place.path_mut() else {
                continue;
            };
            if let [Seg::Field(f), Seg::Name(name, _), ..] = path.as_mut_slice()
                && f == list
                && name == old
            {
                *name = new.to_string();
            }
        }
    }
}

/// A comment on its own line(s): first line at `indent`, inner lines of a
/// block comment as written.
fn push_own_lines(out: &mut Vec<String>, indent: &str, text: &str) {
    let mut parts = text.split('\n');
    out.push(format!("{indent}{}", parts.next().unwrap_or("")));
    out.extend(parts.map(str::to_string));
}

/// A block comment on one line (something may follow it on that line).
fn inline_block(text: &str) -> bool {
    text.starts_with("/*") && !text.contains('\n')
}

// ---------------------------------------------------------------- tokens

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Tk {
    Open(char),
    Close(char),
    Colon,
    Comma,
    Ident,
    Str,
    /// Numbers and char literals.
    Literal,
    /// Anything else (a stray character).
    Other,
}

#[derive(Debug, Clone)]
struct Token {
    kind: Tk,
    /// 1-based line where the token starts and where it ends.
    line: usize,
    end_line: usize,
    /// The decoded value of a string; the text of anything else.
    value: String,
}

#[derive(Debug, Clone)]
struct RawComment {
    text: String,
    line: usize,
    /// Index of the first token after the comment.
    next: usize,
}

/// Split RON text into tokens and comments. Attributes such as
/// `#![enable(implicit_some)]` are skipped.
fn lex(text: &str) -> (Vec<Token>, Vec<RawComment>) {
    let mut lx = Lexer {
        text,
        chars: text.char_indices().collect(),
        i: 0,
        line: 1,
        toks: Vec::new(),
        comments: Vec::new(),
        header_seen: false,
    };
    lx.run();
    (lx.toks, lx.comments)
}

struct Lexer<'a> {
    text: &'a str,
    chars: Vec<(usize, char)>,
    /// Index into `chars`.
    i: usize,
    line: usize,
    toks: Vec<Token>,
    comments: Vec<RawComment>,
    header_seen: bool,
}

impl<'a> Lexer<'a> {
    fn peek(&self, k: usize) -> Option<char> {
        self.chars.get(self.i + k).map(|&(_, c)| c)
    }

    fn bump(&mut self) {
        if let Some(c) = self.peek(0) {
            if c == '\n' {
                self.line += 1;
            }
            self.i += 1;
        }
    }

    fn bump_n(&mut self, n: usize) {
        for _ in 0..n {
            self.bump();
        }
    }

    fn offset(&self, i: usize) -> usize {
        self.chars.get(i).map_or(self.text.len(), |&(o, _)| o)
    }

    fn slice(&self, from: usize, to: usize) -> &'a str {
        self.text
            .get(self.offset(from)..self.offset(to))
            .unwrap_or("")
    }

    fn token(&mut self, kind: Tk, start: usize, line: usize, value: String) {
        let value = if kind == Tk::Str {
            value
        } else {
            self.slice(start, self.i).to_string()
        };
        self.toks.push(Token {
            kind,
            line,
            end_line: self.line,
            value,
        });
    }

    fn run(&mut self) {
        while let Some(c) = self.peek(0) {
            let start = self.i;
            let line = self.line;
            match c {
                '\u{feff}' => self.bump(),
                c if c.is_whitespace() => self.bump(),
                '/' if self.peek(1) == Some('/') => self.line_comment(start, line),
                '/' if self.peek(1) == Some('*') => self.block_comment(start, line),
                '#' if self.peek(1) == Some('!') && self.peek(2) == Some('[') => self.attribute(),
                '"' => self.string(start, line),
                'b' if self.peek(1) == Some('"') => {
                    self.bump();
                    self.string(start, line);
                }
                'r' | 'b' if self.raw_string(start, line) => {}
                '\'' => self.char_literal(start, line),
                c if c.is_ascii_digit() => self.number(start, line),
                '-' | '+' | '.' if self.peek(1).is_some_and(|d| d.is_ascii_digit()) => {
                    self.number(start, line)
                }
                '-' | '+' if self.peek(1).is_some_and(char::is_alphabetic) => {
                    self.number(start, line)
                }
                c if c.is_alphabetic() || c == '_' => self.ident(start, line),
                '(' | '[' | '{' => {
                    self.bump();
                    self.token(Tk::Open(c), start, line, String::new());
                }
                ')' | ']' | '}' => {
                    self.bump();
                    self.token(Tk::Close(c), start, line, String::new());
                }
                ':' => {
                    self.bump();
                    self.token(Tk::Colon, start, line, String::new());
                }
                ',' => {
                    self.bump();
                    self.token(Tk::Comma, start, line, String::new());
                }
                _ => {
                    self.bump();
                    self.token(Tk::Other, start, line, String::new());
                }
            }
        }
    }

    fn comment(&mut self, text: String, line: usize) {
        // The program's own first line is not the user's (also when the user
        // put something above it): the first comment before the root that
        // reads exactly like it is dropped, or saving would double it.
        if !self.header_seen && self.toks.is_empty() && text == HEADER {
            self.header_seen = true;
            return;
        }
        self.comments.push(RawComment {
            text,
            line,
            next: self.toks.len(),
        });
    }

    fn line_comment(&mut self, start: usize, line: usize) {
        while self.peek(0).is_some_and(|c| c != '\n') {
            self.bump();
        }
        let text = self.slice(start, self.i).trim_end().to_string();
        self.comment(text, line);
    }

    /// `/* ... */`, nested as RON allows. One left open at the end of the
    /// text is closed here, so that writing it back cannot swallow what
    /// follows it.
    fn block_comment(&mut self, start: usize, line: usize) {
        self.bump_n(2);
        let mut depth = 1usize;
        while depth > 0 {
            match (self.peek(0), self.peek(1)) {
                (None, _) => break,
                (Some('/'), Some('*')) => {
                    depth += 1;
                    self.bump_n(2);
                }
                (Some('*'), Some('/')) => {
                    depth -= 1;
                    self.bump_n(2);
                }
                _ => self.bump(),
            }
        }
        let mut text = self.slice(start, self.i).replace("\r\n", "\n");
        for _ in 0..depth {
            text.push_str(" */");
        }
        self.comment(text, line);
    }

    /// `#![...]`: skipped up to its closing bracket (or the end of line).
    fn attribute(&mut self) {
        self.bump_n(2);
        let mut depth = 0usize;
        while let Some(c) = self.peek(0) {
            if c == '\n' {
                break;
            }
            self.bump();
            match c {
                '[' => depth += 1,
                ']' => {
                    depth = depth.saturating_sub(1);
                    if depth == 0 {
                        break;
                    }
                }
                _ => {}
            }
        }
    }

    /// A string at `"` (any `b` prefix already taken). A string never
    /// closed becomes a stray `"` so that the comments after it are seen.
    fn string(&mut self, start: usize, line: usize) {
        let quote = self.i;
        self.bump();
        let mut value = String::new();
        loop {
            match self.peek(0) {
                None => {
                    self.i = quote + 1;
                    self.line = line;
                    self.token(Tk::Other, start, line, String::new());
                    return;
                }
                Some('"') => {
                    self.bump();
                    break;
                }
                Some('\\') => {
                    self.bump();
                    self.escape(&mut value);
                }
                Some(c) => {
                    value.push(c);
                    self.bump();
                }
            }
        }
        self.token(Tk::Str, start, line, value);
    }

    fn escape(&mut self, value: &mut String) {
        let Some(c) = self.peek(0) else {
            return;
        };
        self.bump();
        match c {
            'n' => value.push('\n'),
            't' => value.push('\t'),
            'r' => value.push('\r'),
            '0' => value.push('\0'),
            'u' if self.peek(0) == Some('{') => {
                self.bump();
                let mut hex = String::new();
                while let Some(d) = self.peek(0) {
                    if d == '}' {
                        self.bump();
                        break;
                    }
                    if !d.is_ascii_hexdigit() || hex.len() >= 6 {
                        break;
                    }
                    hex.push(d);
                    self.bump();
                }
                if let Some(ch) = u32::from_str_radix(&hex, 16).ok().and_then(char::from_u32) {
                    value.push(ch);
                }
            }
            'x' => {
                let mut hex = String::new();
                while hex.len() < 2 && self.peek(0).is_some_and(|d| d.is_ascii_hexdigit()) {
                    hex.extend(self.peek(0));
                    self.bump();
                }
                if let Some(ch) = u32::from_str_radix(&hex, 16).ok().and_then(char::from_u32) {
                    value.push(ch);
                }
            }
            other => value.push(other),
        }
    }

    /// `r"..."`, `r#"..."#` (and `br` forms), or a raw identifier `r#name`.
    /// Returns false (consuming nothing) when neither is there.
    fn raw_string(&mut self, start: usize, line: usize) -> bool {
        let mut j = usize::from(self.peek(0) == Some('b'));
        if self.peek(j) != Some('r') {
            return false;
        }
        j += 1;
        let mut hashes = 0usize;
        while self.peek(j) == Some('#') {
            hashes += 1;
            j += 1;
        }
        if self.peek(j) != Some('"') {
            if j == 2 && hashes == 1 && self.peek(2).is_some_and(|c| c.is_alphabetic() || c == '_')
            {
                // A raw identifier: the value is the name without `r#`.
                self.bump_n(2);
                let from = self.i;
                while self
                    .peek(0)
                    .is_some_and(|c| c.is_alphanumeric() || c == '_')
                {
                    self.bump();
                }
                let name = self.slice(from, self.i).to_string();
                self.toks.push(Token {
                    kind: Tk::Ident,
                    line,
                    end_line: self.line,
                    value: name,
                });
                return true;
            }
            return false;
        }
        let body = j + 1;
        let mut k = body;
        loop {
            match self.peek(k) {
                None => return false,
                Some('"') if (1..=hashes).all(|h| self.peek(k + h) == Some('#')) => break,
                Some(_) => k += 1,
            }
        }
        let value = self.slice(self.i + body, self.i + k).to_string();
        self.bump_n(k + 1 + hashes);
        self.token(Tk::Str, start, line, value);
        true
    }

    fn char_literal(&mut self, start: usize, line: usize) {
        let len = match (self.peek(1), self.peek(2)) {
            (Some('\\'), _) => (3..14)
                .find(|&k| self.peek(k) == Some('\''))
                .filter(|&k| (2..k).all(|m| self.peek(m) != Some('\n')))
                .map(|k| k + 1),
            (Some(c), Some('\'')) if c != '\'' && c != '\n' => Some(3),
            _ => None,
        };
        match len {
            Some(n) => {
                self.bump_n(n);
                self.token(Tk::Literal, start, line, String::new());
            }
            None => {
                self.bump();
                self.token(Tk::Other, start, line, String::new());
            }
        }
    }

    fn number(&mut self, start: usize, line: usize) {
        let mut prev = self.peek(0);
        self.bump();
        while let Some(c) = self.peek(0) {
            let exponent_sign = (c == '+' || c == '-') && matches!(prev, Some('e' | 'E'));
            if c.is_alphanumeric() || c == '_' || c == '.' || exponent_sign {
                prev = Some(c);
                self.bump();
            } else {
                break;
            }
        }
        self.token(Tk::Literal, start, line, String::new());
    }

    fn ident(&mut self, start: usize, line: usize) {
        while self
            .peek(0)
            .is_some_and(|c| c.is_alphanumeric() || c == '_')
        {
            self.bump();
        }
        self.token(Tk::Ident, start, line, String::new());
    }
}

// ----------------------------------------------------------------- walk

/// An element of the text: its path and the tokens it covers (its trailing
/// comma included), with the brackets of its value when it has some.
#[derive(Debug, Clone)]
struct Node {
    path: Vec<Seg>,
    first: usize,
    last: usize,
    open: Option<usize>,
    close: Option<usize>,
}

/// Tokens and their elements, parents before children.
struct Tree {
    toks: Vec<Token>,
    nodes: Vec<Node>,
    /// Path to the first element with that path.
    index: HashMap<Vec<Seg>, usize>,
}

/// The brackets of a value, when it has some.
#[derive(Debug, Clone, Copy)]
struct Extent {
    open: Option<usize>,
    close: Option<usize>,
}

/// A line position in the output text.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Slot {
    /// On own lines just before this (1-based) line.
    Before(usize),
    /// Appended to this line.
    After(usize),
    /// After the last line.
    End,
}

impl Tree {
    fn new(toks: Vec<Token>) -> Tree {
        let pair = pairs(&toks);
        let mut w = Walker {
            toks: &toks,
            pair,
            pos: 0,
            nodes: Vec::new(),
            expecting: Vec::new(),
        };
        w.root();
        let nodes = w.nodes;
        let mut index = HashMap::new();
        for (i, n) in nodes.iter().enumerate() {
            index.entry(n.path.clone()).or_insert(i);
        }
        Tree { toks, nodes, index }
    }

    /// The outermost element starting at token `t`.
    fn starting_at(&self, t: usize) -> Option<&Node> {
        self.nodes.iter().find(|n| n.first == t)
    }

    /// The innermost element ending at token `t` (after `)),` that is the
    /// field or item owning the comma, not the variants inside it).
    fn ending_at(&self, t: usize) -> Option<&Node> {
        self.nodes.iter().rev().find(|n| n.last == t)
    }

    /// The innermost element covering token `t` (nodes are in pre-order,
    /// so the last one covering `t` is the deepest).
    fn innermost(&self, t: usize) -> Option<&Node> {
        self.nodes
            .iter()
            .rev()
            .find(|n| n.first <= t && t <= n.last)
    }

    /// A comment next to token `t` that no element covers: before the root
    /// it leads the root, otherwise it goes to the end.
    fn outside(&self, t: usize) -> Place {
        match self.nodes.first() {
            Some(root) if t < root.first => Place::Leading(root.path.clone()),
            _ => Place::End,
        }
    }

    /// The anchor of a comment, from the tokens around it.
    fn place_of(&self, c: &RawComment) -> Place {
        let prev = c
            .next
            .checked_sub(1)
            .and_then(|i| self.toks.get(i).map(|t| (i, t)));
        if let Some((i, t)) = prev
            && t.end_line == c.line
        {
            // Same line as the token before it: after an opening bracket it
            // belongs to that opening line, otherwise it trails the element
            // that ends there (or, mid-element, the element around it).
            let place = if matches!(t.kind, Tk::Open(_)) {
                self.innermost(i).map(|n| Place::OpenLine(n.path.clone()))
            } else {
                self.ending_at(i)
                    .or_else(|| self.innermost(i))
                    .map(|n| Place::Trailing(n.path.clone()))
            };
            return place.unwrap_or_else(|| self.outside(i));
        }
        // On its own line: it leads what follows, or closes a container.
        let i = c.next;
        let Some(t) = self.toks.get(i) else {
            return Place::End;
        };
        if let Some(n) = self.starting_at(i) {
            return Place::Leading(n.path.clone());
        }
        match self.innermost(i) {
            Some(n) if matches!(t.kind, Tk::Close(_)) => Place::Inner(n.path.clone()),
            Some(n) => Place::Leading(n.path.clone()),
            None => self.outside(i),
        }
    }

    fn line_of(&self, t: usize) -> Option<usize> {
        self.toks.get(t).map(|t| t.line)
    }

    fn end_line_of(&self, t: usize) -> Option<usize> {
        self.toks.get(t).map(|t| t.end_line)
    }

    /// Where an anchor goes in this (canonical) text.
    fn slot_of(&self, place: &Place) -> Slot {
        let found = |p: &[Seg]| self.index.get(p).and_then(|&i| self.nodes.get(i));
        let slot = match place {
            Place::Leading(p) => found(p).and_then(|n| self.line_of(n.first).map(Slot::Before)),
            Place::Trailing(p) => found(p).and_then(|n| self.end_line_of(n.last).map(Slot::After)),
            Place::OpenLine(p) => found(p).and_then(|n| match n.open {
                Some(o) => self.line_of(o).map(Slot::After),
                None => self.end_line_of(n.last).map(Slot::After),
            }),
            Place::Inner(p) => found(p).and_then(|n| self.inner_slot(n)),
            Place::End => return Slot::End,
        };
        if let Some(s) = slot {
            return s;
        }
        // The anchor is gone: the nearest ancestor that is still there
        // takes the comment.
        let path: &[Seg] = match place {
            Place::Leading(p) | Place::Trailing(p) | Place::OpenLine(p) | Place::Inner(p) => p,
            Place::End => &[],
        };
        for k in (0..path.len()).rev() {
            if let Some(n) = path.get(..k).and_then(found)
                && let Some(s) = self.inner_slot(n)
            {
                return s;
            }
        }
        Slot::End
    }

    /// The end of an element's contents (before its closing line), or, for
    /// an element without brackets, just before it.
    fn inner_slot(&self, n: &Node) -> Option<Slot> {
        match n.close {
            Some(c) => self.line_of(c).map(Slot::Before),
            None => self.line_of(n.first).map(Slot::Before),
        }
    }
}

/// For every bracket, the index of its partner (when it has one).
fn pairs(toks: &[Token]) -> Vec<Option<usize>> {
    let mut pair = vec![None; toks.len()];
    let mut stack: Vec<(usize, char)> = Vec::new();
    for (i, t) in toks.iter().enumerate() {
        match t.kind {
            Tk::Open(c) => stack.push((i, c)),
            Tk::Close(c) => {
                let want = opener(c);
                if let Some(k) = stack.iter().rposition(|&(_, o)| o == want) {
                    if let Some(&(j, _)) = stack.get(k) {
                        if let Some(p) = pair.get_mut(j) {
                            *p = Some(i);
                        }
                        if let Some(p) = pair.get_mut(i) {
                            *p = Some(j);
                        }
                    }
                    stack.truncate(k);
                }
            }
            _ => {}
        }
    }
    pair
}

fn opener(close: char) -> char {
    match close {
        ')' => '(',
        ']' => '[',
        _ => '{',
    }
}

fn starts_value(k: Option<Tk>) -> bool {
    matches!(
        k,
        Some(Tk::Open(_) | Tk::Ident | Tk::Str | Tk::Literal | Tk::Other)
    )
}

/// A forgiving recursive walk: it follows RON as the program writes it and
/// steps over what it does not expect (missing commas, stray brackets).
struct Walker<'t> {
    toks: &'t [Token],
    pair: Vec<Option<usize>>,
    pos: usize,
    nodes: Vec<Node>,
    /// Closing brackets the open containers wait for, innermost last.
    expecting: Vec<char>,
}

impl Walker<'_> {
    fn kind(&self, i: usize) -> Option<Tk> {
        self.toks.get(i).map(|t| t.kind)
    }

    fn value_at(&self, i: usize) -> String {
        self.toks
            .get(i)
            .map(|t| t.value.clone())
            .unwrap_or_default()
    }

    fn begin(&mut self, path: Vec<Seg>, first: usize) -> usize {
        self.nodes.push(Node {
            path,
            first,
            last: first,
            open: None,
            close: None,
        });
        self.nodes.len() - 1
    }

    fn finish(&mut self, id: usize, ext: Extent) {
        let last = self.pos.saturating_sub(1);
        if let Some(n) = self.nodes.get_mut(id) {
            n.last = last.max(n.first);
            n.open = ext.open;
            n.close = ext.close;
        }
    }

    fn skip_comma(&mut self) {
        if self.kind(self.pos) == Some(Tk::Comma) {
            self.pos += 1;
        }
    }

    fn root(&mut self) {
        while self.pos < self.toks.len() && !starts_value(self.kind(self.pos)) {
            self.pos += 1;
        }
        if self.pos < self.toks.len() {
            let id = self.begin(Vec::new(), self.pos);
            let ext = self.value(&[], 0);
            self.finish(id, ext);
        }
    }

    /// One value at `pos` (which starts a value).
    fn value(&mut self, path: &[Seg], depth: usize) -> Extent {
        let first = self.pos;
        match self.kind(first) {
            Some(Tk::Open(c)) => {
                if depth >= MAX_DEPTH {
                    return self.step_over();
                }
                match c {
                    '(' => self.group(path, depth, false),
                    '[' => self.list(path, depth),
                    _ => self.map(path, depth),
                }
            }
            Some(Tk::Ident) if self.kind(first + 1) == Some(Tk::Open('(')) => {
                let name = self.value_at(first);
                self.pos += 1;
                if depth >= MAX_DEPTH {
                    return self.step_over();
                }
                if name == "Some" {
                    // Written bare in canonical text (implicit_some).
                    return self.group(path, depth, true);
                }
                let mut vpath = path.to_vec();
                vpath.push(Seg::Variant(name));
                let id = self.begin(vpath.clone(), first);
                let ext = self.group(&vpath, depth, true);
                self.finish(id, ext);
                ext
            }
            _ => {
                self.pos += 1;
                Extent {
                    open: None,
                    close: None,
                }
            }
        }
    }

    /// Past a bracketed group without looking inside.
    fn step_over(&mut self) -> Extent {
        let open = self.pos;
        let close = self.pair.get(open).copied().flatten();
        self.pos = close.map_or(self.toks.len(), |c| c + 1);
        Extent {
            open: Some(open),
            close,
        }
    }

    /// Handle a closing bracket met inside a container expecting `want`:
    /// true when the container ends here (its own bracket is consumed; one
    /// an outer container waits for is left to it); a bracket nobody waits
    /// for is stepped over.
    fn at_close(&mut self, got: char, want: char, close: &mut Option<usize>) -> bool {
        if got == want {
            *close = Some(self.pos);
            self.pos += 1;
            true
        } else if self.expecting.contains(&got) {
            true
        } else {
            self.pos += 1;
            false
        }
    }

    /// `( ... )`: struct fields and/or tuple members. Inside a variant
    /// (`flatten`), a lone member adds no segment of its own, so
    /// `Entry(Freestream(...))` reads as `Entry / Freestream`.
    fn group(&mut self, path: &[Seg], depth: usize, flatten: bool) -> Extent {
        let open = self.pos;
        self.pos += 1;
        let lone = flatten && self.lone_member(open);
        self.expecting.push(')');
        let mut close = None;
        let mut index = 0usize;
        loop {
            let at = self.pos;
            match self.kind(at) {
                None => break,
                Some(Tk::Close(c)) => {
                    self.expecting.pop();
                    let done = self.at_close(c, ')', &mut close);
                    self.expecting.push(')');
                    if done {
                        break;
                    }
                }
                Some(Tk::Comma | Tk::Colon) => self.pos += 1,
                Some(Tk::Ident) if self.kind(at + 1) == Some(Tk::Colon) => {
                    self.field(path, depth);
                }
                Some(_) => {
                    if lone && index == 0 {
                        self.value(path, depth + 1);
                        self.skip_comma();
                    } else {
                        let mut mpath = path.to_vec();
                        mpath.push(Seg::Index(index));
                        self.element(mpath, depth);
                    }
                    index += 1;
                }
            }
        }
        self.expecting.pop();
        Extent {
            open: Some(open),
            close,
        }
    }

    /// Whether the group opened at `open` holds exactly one unnamed value.
    fn lone_member(&self, open: usize) -> bool {
        let Some(end) = self.pair.get(open).copied().flatten() else {
            return false;
        };
        let first = open + 1;
        if first >= end
            || (self.kind(first) == Some(Tk::Ident) && self.kind(first + 1) == Some(Tk::Colon))
        {
            return false;
        }
        let mut commas = 0usize;
        let mut last_comma = None;
        let mut j = first;
        while j < end {
            match self.kind(j) {
                Some(Tk::Open(_)) => match self.pair.get(j).copied().flatten() {
                    Some(c) => j = c,
                    None => return false,
                },
                Some(Tk::Comma) => {
                    commas += 1;
                    last_comma = Some(j);
                }
                _ => {}
            }
            j += 1;
        }
        commas == 0 || (commas == 1 && last_comma == Some(end - 1))
    }

    /// `name: value,`
    fn field(&mut self, path: &[Seg], depth: usize) {
        let first = self.pos;
        let mut fpath = path.to_vec();
        fpath.push(Seg::Field(self.value_at(first)));
        let id = self.begin(fpath.clone(), first);
        self.pos += 2;
        let ext = if starts_value(self.kind(self.pos)) {
            self.value(&fpath, depth + 1)
        } else {
            Extent {
                open: None,
                close: None,
            }
        };
        self.skip_comma();
        self.finish(id, ext);
    }

    /// A list item or tuple member: `value,`
    fn element(&mut self, path: Vec<Seg>, depth: usize) {
        let id = self.begin(path.clone(), self.pos);
        let ext = self.value(&path, depth + 1);
        self.skip_comma();
        self.finish(id, ext);
    }

    /// `[ ... ]`
    fn list(&mut self, path: &[Seg], depth: usize) -> Extent {
        let open = self.pos;
        self.pos += 1;
        self.expecting.push(']');
        let mut close = None;
        let mut index = 0usize;
        let mut seen: Vec<String> = Vec::new();
        loop {
            let at = self.pos;
            match self.kind(at) {
                None => break,
                Some(Tk::Close(c)) => {
                    self.expecting.pop();
                    let done = self.at_close(c, ']', &mut close);
                    self.expecting.push(']');
                    if done {
                        break;
                    }
                }
                Some(Tk::Comma | Tk::Colon) => self.pos += 1,
                Some(_) => {
                    let seg = match self.identity(at) {
                        Some(name) => {
                            let n = seen.iter().filter(|s| **s == name).count();
                            seen.push(name.clone());
                            Seg::Name(name, n)
                        }
                        None => Seg::Index(index),
                    };
                    index += 1;
                    let mut ipath = path.to_vec();
                    ipath.push(seg);
                    self.element(ipath, depth);
                }
            }
        }
        self.expecting.pop();
        Extent {
            open: Some(open),
            close,
        }
    }

    /// The `name` (else `row`) string of a list item that is a struct,
    /// read ahead without walking it.
    fn identity(&self, at: usize) -> Option<String> {
        let open = match self.kind(at) {
            Some(Tk::Open('(')) => at,
            Some(Tk::Ident) if self.kind(at + 1) == Some(Tk::Open('(')) => at + 1,
            _ => return None,
        };
        let end = self
            .pair
            .get(open)
            .copied()
            .flatten()
            .unwrap_or(self.toks.len());
        let mut row = None;
        let mut j = open + 1;
        while j < end {
            match self.kind(j) {
                Some(Tk::Open(_)) => match self.pair.get(j).copied().flatten() {
                    Some(c) => j = c + 1,
                    None => break,
                },
                Some(Tk::Ident)
                    if self.kind(j + 1) == Some(Tk::Colon) && self.kind(j + 2) == Some(Tk::Str) =>
                {
                    let key = self.value_at(j);
                    if key == "name" {
                        return Some(self.value_at(j + 2));
                    }
                    if key == "row" && row.is_none() {
                        row = Some(self.value_at(j + 2));
                    }
                    j += 3;
                }
                // A closing bracket here is a stray one: stop looking.
                Some(Tk::Close(_)) => break,
                _ => j += 1,
            }
        }
        row
    }

    /// `{ key: value, ... }`
    fn map(&mut self, path: &[Seg], depth: usize) -> Extent {
        let open = self.pos;
        self.pos += 1;
        self.expecting.push('}');
        let mut close = None;
        loop {
            let at = self.pos;
            match self.kind(at) {
                None => break,
                Some(Tk::Close(c)) => {
                    self.expecting.pop();
                    let done = self.at_close(c, '}', &mut close);
                    self.expecting.push('}');
                    if done {
                        break;
                    }
                }
                Some(Tk::Comma | Tk::Colon) => self.pos += 1,
                Some(_) => {
                    let mut epath = path.to_vec();
                    epath.push(Seg::Key(self.value_at(at)));
                    let id = self.begin(epath.clone(), at);
                    self.value(&epath, depth + 1);
                    let mut ext = Extent {
                        open: None,
                        close: None,
                    };
                    if self.kind(self.pos) == Some(Tk::Colon) {
                        self.pos += 1;
                        if starts_value(self.kind(self.pos)) {
                            ext = self.value(&epath, depth + 1);
                        }
                    }
                    self.skip_comma();
                    self.finish(id, ext);
                }
            }
        }
        self.expecting.pop();
        Extent {
            open: Some(open),
            close,
        }
    }
}

/// Per-line facts of the canonical text needed to place comments.
struct Layout {
    /// Kind of the first token starting on each line (index = line).
    first: Vec<Option<Tk>>,
    /// For a line inside a token spanning lines, where that token starts.
    inside: Vec<Option<usize>>,
    /// For a line a token continues past, where that token ends.
    continues: Vec<Option<usize>>,
}

impl Layout {
    fn new(toks: &[Token], lines: usize) -> Layout {
        let mut first = vec![None; lines + 2];
        let mut inside = vec![None; lines + 2];
        let mut continues = vec![None; lines + 2];
        for t in toks {
            if let Some(f) = first.get_mut(t.line)
                && f.is_none()
            {
                *f = Some(t.kind);
            }
            for l in t.line..t.end_line {
                if let Some(c) = continues.get_mut(l) {
                    *c = Some(t.end_line);
                }
                if let Some(s) = inside.get_mut(l + 1) {
                    *s = Some(t.line);
                }
            }
        }
        Layout {
            first,
            inside,
            continues,
        }
    }

    /// A line to put comments before, moved up out of any token that
    /// spans lines (canonical text has none; this is a safeguard).
    fn before_line(&self, mut line: usize) -> usize {
        while let Some(start) = self.inside.get(line).copied().flatten() {
            if start >= line {
                break;
            }
            line = start;
        }
        line
    }

    /// A line to append comments to, moved down past any token that spans
    /// lines.
    fn after_line(&self, mut line: usize) -> usize {
        while let Some(end) = self.continues.get(line).copied().flatten() {
            if end <= line {
                break;
            }
            line = end;
        }
        line
    }

    /// Indentation for comments on their own lines before `line`: that of
    /// the line, one level deeper when the line closes a container.
    fn indent(&self, text: &str, line: usize) -> String {
        let trimmed = text.trim_start();
        let ws = text.get(..text.len() - trimmed.len()).unwrap_or("");
        match self.first.get(line).copied().flatten() {
            Some(Tk::Close(_)) => format!("{ws}{INDENT}"),
            _ => ws.to_string(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A small invented workbook in canonical layout.
    const CANON: &str = r#"// stationwise workbook: RON text; values keep the units they were typed in.
#![enable(implicit_some)]
(
    format: 1,
    title: "Demo stand // bay 2",
    gas: ThermallyPerfect,
    stations: [
        (
            name: "0",
            note: "free stream",
        ),
        (
            name: "2",
            note: "compressor face",
        ),
        (
            name: "3",
            note: "compressor exit",
        ),
    ],
    processes: [
        (
            name: "freestream",
            to: "0",
            kind: Entry(Freestream(
                w: "12 kg/s",
            )),
        ),
        (
            name: "intake",
            from: "0",
            to: "2",
            kind: Duct(Recovery(
                recovery: "0.99",
            )),
        ),
        (
            name: "compressor",
            from: "2",
            to: "3",
            kind: Compressor((
                mode: Design(
                    pressure_ratio: "8",
                    efficiency: "0.85",
                    basis: Isentropic,
                ),
                shaft: "spool",
            )),
        ),
    ],
)
"#;

    /// Edits of a text, by its 1-based line numbers.
    enum Op {
        /// Insert a line before this line (several keep their order).
        Ins(usize, &'static str),
        /// Append to this line.
        Add(usize, &'static str),
        /// Replace this line.
        Set(usize, &'static str),
        /// Remove this line.
        Del(usize),
    }

    fn edit(base: &str, ops: &[Op]) -> String {
        let mut out = String::new();
        let count = base.lines().count();
        for n in 1..=count + 1 {
            for op in ops {
                if let Op::Ins(m, s) = op
                    && *m == n
                {
                    out.push_str(s);
                    out.push('\n');
                }
            }
            let Some(line) = base.lines().nth(n - 1) else {
                break;
            };
            if ops.iter().any(|op| matches!(op, Op::Del(m) if *m == n)) {
                continue;
            }
            let mut line = line.to_string();
            for op in ops {
                match op {
                    Op::Set(m, s) if *m == n => line = s.to_string(),
                    Op::Add(m, s) if *m == n => line.push_str(s),
                    _ => {}
                }
            }
            out.push_str(&line);
            out.push('\n');
        }
        out
    }

    fn lines(s: &str) -> Vec<&str> {
        s.lines().collect()
    }

    fn save(user: &str, canonical: &str) -> String {
        Comments::collect(user).apply(canonical)
    }

    fn path(segs: &[Seg]) -> Vec<Seg> {
        segs.to_vec()
    }

    fn field(s: &str) -> Seg {
        Seg::Field(s.to_string())
    }

    fn named(s: &str) -> Seg {
        Seg::Name(s.to_string(), 0)
    }

    fn variant(s: &str) -> Seg {
        Seg::Variant(s.to_string())
    }

    #[test]
    fn edit_helper_keeps_the_base() {
        assert_eq!(edit(CANON, &[]), CANON);
    }

    #[test]
    fn leading_comment_on_a_station_item() {
        let user = edit(
            CANON,
            &[Op::Ins(
                12,
                "   // the compressor face, behind the bellmouth",
            )],
        );
        let c = Comments::collect(&user);
        assert_eq!(c.len(), 1);
        assert_eq!(
            c.held[0].place,
            Place::Leading(path(&[field("stations"), named("2")]))
        );
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[10..14],
            [
                "        ),",
                "        // the compressor face, behind the bellmouth",
                "        (",
                "            name: \"2\",",
            ]
        );
        let want = edit(
            CANON,
            &[Op::Ins(
                12,
                "        // the compressor face, behind the bellmouth",
            )],
        );
        assert_eq!(lines(&out), lines(&want));
    }

    #[test]
    fn trailing_comment_on_a_field_line() {
        let user = edit(CANON, &[Op::Add(14, " // rake plane")]);
        let out = save(&user, CANON);
        assert_eq!(
            lines(&out)[13],
            "            note: \"compressor face\",  // rake plane"
        );
        assert_eq!(
            lines(&out),
            lines(&edit(CANON, &[Op::Add(14, "  // rake plane")]))
        );
    }

    #[test]
    fn comment_before_a_process_kind() {
        let user = edit(
            CANON,
            &[Op::Ins(33, "// intake recovery from the model test")],
        );
        let c = Comments::collect(&user);
        assert_eq!(
            c.held[0].place,
            Place::Leading(path(&[field("processes"), named("intake"), field("kind")]))
        );
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[31..34],
            [
                "            to: \"2\",",
                "            // intake recovery from the model test",
                "            kind: Duct(Recovery(",
            ]
        );
        assert_eq!(out.lines().count(), CANON.lines().count() + 1);
    }

    #[test]
    fn comment_inside_a_variant() {
        let user = edit(CANON, &[Op::Add(34, " // from rig 3")]);
        let c = Comments::collect(&user);
        assert_eq!(
            c.held[0].place,
            Place::Trailing(path(&[
                field("processes"),
                named("intake"),
                field("kind"),
                variant("Duct"),
                variant("Recovery"),
                field("recovery"),
            ]))
        );
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[32..35],
            [
                "            kind: Duct(Recovery(",
                "                recovery: \"0.99\",  // from rig 3",
                "            )),",
            ]
        );
    }

    #[test]
    fn inner_end_comment_in_the_stations_list() {
        let user = edit(
            CANON,
            &[Op::Ins(20, "  // station 4 comes with the combustor")],
        );
        let c = Comments::collect(&user);
        assert_eq!(c.held[0].place, Place::Inner(path(&[field("stations")])));
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[18..21],
            [
                "        ),",
                "        // station 4 comes with the combustor",
                "    ],",
            ]
        );
    }

    #[test]
    fn block_comments() {
        let user = edit(
            CANON,
            &[
                Op::Ins(29, "    /* Intake: bellmouth"),
                Op::Ins(29, "           calibrated /* twice */ in the rig */"),
                Op::Add(32, " /* design point */"),
                Op::Add(21, " /* in flow order */"),
            ],
        );
        let c = Comments::collect(&user);
        assert_eq!(
            c.texts(),
            [
                "/* in flow order */",
                "/* Intake: bellmouth\n           calibrated /* twice */ in the rig */",
                "/* design point */",
            ]
        );
        let out = c.apply(CANON);
        assert_eq!(lines(&out)[20], "    processes: [  /* in flow order */");
        assert_eq!(
            lines(&out)[27..33],
            [
                "        ),",
                "        /* Intake: bellmouth",
                "           calibrated /* twice */ in the rig */",
                "        (",
                "            name: \"intake\",",
                "            from: \"0\",",
            ]
        );
        assert_eq!(
            lines(&out)[33],
            "            to: \"2\",  /* design point */"
        );
    }

    #[test]
    fn comment_holding_quotes_and_brackets() {
        let user = edit(
            CANON,
            &[
                Op::Ins(9, "            // the \"zero\" station (far upstream"),
                Op::Add(10, " /* ends \") here [ */"),
            ],
        );
        let c = Comments::collect(&user);
        assert_eq!(c.len(), 2);
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[7..11],
            [
                "        (",
                "            // the \"zero\" station (far upstream",
                "            name: \"0\",",
                "            note: \"free stream\",  /* ends \") here [ */",
            ]
        );
        // The structure after them was still followed.
        assert_eq!(lines(&out)[11..], lines(CANON)[10..]);
    }

    #[test]
    fn slashes_in_strings_are_not_comments() {
        assert!(Comments::collect(CANON).is_empty());
        let text = "(note: r#\"x // y\"#, c: '/', d: \"/* no */ \\\" //\", e: b\"//\") // real";
        let c = Comments::collect(text);
        assert_eq!(c.texts(), ["// real"]);
        assert_eq!(c.held[0].place, Place::Trailing(Vec::new()));
    }

    #[test]
    fn renamed_station_keeps_its_comments() {
        let user = edit(
            CANON,
            &[Op::Ins(12, "        // face"), Op::Add(14, " // rake")],
        );
        let renamed = edit(
            CANON,
            &[
                Op::Set(13, "            name: \"2a\","),
                Op::Set(32, "            to: \"2a\","),
                Op::Set(39, "            from: \"2a\","),
            ],
        );
        let mut c = Comments::collect(&user);
        let before = c.clone();
        c.rename("stations", "2", "2a");
        assert_eq!(c.texts(), before.texts());
        let out = c.apply(&renamed);
        let want = edit(
            CANON,
            &[
                Op::Set(13, "            name: \"2a\","),
                Op::Set(32, "            to: \"2a\","),
                Op::Set(39, "            from: \"2a\","),
                Op::Ins(12, "        // face"),
                Op::Add(14, "  // rake"),
            ],
        );
        assert_eq!(lines(&out), lines(&want));
        // Without the rename they are orphans, kept at the end of the list.
        let lost = before.apply(&renamed);
        assert_eq!(
            lines(&lost)[18..22],
            ["        ),", "        // face", "        // rake", "    ],",]
        );
        // A rename in another list changes nothing.
        let mut other = before.clone();
        other.rename("processes", "2", "2a");
        assert_eq!(other, before);
    }

    #[test]
    fn deleted_station_comment_stays_in_the_list() {
        let user = edit(
            CANON,
            &[
                Op::Ins(16, "        // exit rake, 12 probes"),
                Op::Add(18, " // see sheet B"),
            ],
        );
        let gone = [Op::Del(16), Op::Del(17), Op::Del(18), Op::Del(19)];
        let canon = edit(CANON, &gone);
        let out = save(&user, &canon);
        assert_eq!(
            lines(&out)[13..18],
            [
                "            note: \"compressor face\",",
                "        ),",
                "        // exit rake, 12 probes",
                "        // see sheet B",
                "    ],",
            ]
        );
        assert_eq!(out.lines().count(), canon.lines().count() + 2);
    }

    #[test]
    fn changed_mode_falls_back() {
        let user = edit(CANON, &[Op::Add(34, " // from rig 3")]);
        // Another mode of the same kind: the comment stays inside `Duct`.
        let other_mode = edit(
            CANON,
            &[
                Op::Set(33, "            kind: Duct(LossCoefficient("),
                Op::Set(34, "                k: \"0.3\","),
            ],
        );
        let out = save(&user, &other_mode);
        assert_eq!(
            lines(&out)[32..37],
            [
                "            kind: Duct(LossCoefficient(",
                "                k: \"0.3\",",
                "                // from rig 3",
                "            )),",
                "        ),",
            ]
        );
        // Another kind without brackets: the comment goes before `kind`.
        let other_kind = edit(
            CANON,
            &[
                Op::Set(33, "            kind: NormalShock,"),
                Op::Del(34),
                Op::Del(35),
            ],
        );
        let out = save(&user, &other_kind);
        assert_eq!(
            lines(&out)[31..35],
            [
                "            to: \"2\",",
                "            // from rig 3",
                "            kind: NormalShock,",
                "        ),",
            ]
        );
        // A mode without givens, written on one line: before `kind` too.
        let unit_mode = edit(
            CANON,
            &[
                Op::Set(33, "            kind: Duct(MeasuredExit),"),
                Op::Del(34),
                Op::Del(35),
            ],
        );
        let out = save(&user, &unit_mode);
        assert_eq!(
            lines(&out)[32..34],
            [
                "            // from rig 3",
                "            kind: Duct(MeasuredExit),"
            ]
        );
    }

    #[test]
    fn header_is_not_doubled() {
        let user = edit(CANON, &[Op::Add(4, " // version 1")]);
        let c = Comments::collect(&user);
        assert_eq!(c.texts(), ["// version 1"]);
        let out = c.apply(CANON);
        assert_eq!(out.lines().filter(|l| *l == HEADER).count(), 1);
        assert_eq!(lines(&out)[0], HEADER);
        // The same words elsewhere are the user's and are kept.
        let copied = edit(CANON, &[Op::Ins(4, HEADER)]);
        assert_eq!(Comments::collect(&copied).len(), 1);
        assert_eq!(
            save(&copied, CANON),
            edit(
                CANON,
                &[Op::Ins(
                    4,
                    "    // stationwise workbook: RON text; values keep the units they were typed in."
                )]
            )
        );
    }

    #[test]
    fn root_leading_and_end_of_file_comments() {
        let user = edit(
            CANON,
            &[
                Op::Ins(2, "// bench 4, March"),
                Op::Ins(3, "  /* owner: test cell */"),
                Op::Ins(52, "// end of sheet"),
            ],
        );
        let c = Comments::collect(&user);
        assert_eq!(c.held[0].place, Place::Leading(Vec::new()));
        assert_eq!(c.held[2].place, Place::End);
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[..5],
            [
                HEADER,
                "#![enable(implicit_some)]",
                "// bench 4, March",
                "/* owner: test cell */",
                "(",
            ]
        );
        assert_eq!(lines(&out)[52..], [")", "// end of sheet"]);
        assert!(out.ends_with("// end of sheet\n"));
    }

    #[test]
    fn two_comments_meeting_on_one_line() {
        // In the user's file the two closing brackets are on separate lines;
        // canonical text puts them on one, where a line comment cannot be
        // followed by another.
        let user = edit(
            CANON,
            &[
                Op::Set(27, "            ) // freestream by the pitot"),
                Op::Ins(28, "            ), /* a */ // entry"),
            ],
        );
        let c = Comments::collect(&user);
        assert_eq!(c.len(), 3);
        let out = c.apply(CANON);
        assert_eq!(
            lines(&out)[25..30],
            [
                "                w: \"12 kg/s\",",
                "            )),  // freestream by the pitot",
                "            /* a */",
                "            // entry",
                "        ),",
            ]
        );
        assert_eq!(save(&out, CANON), out);
    }

    #[test]
    fn saving_twice_is_byte_identical() {
        let user = edit(
            CANON,
            &[
                Op::Ins(3, "// bench 4"),
                Op::Add(4, " /* v1 */"),
                Op::Add(7, " // all stations"),
                Op::Ins(12, "        /* face"),
                Op::Ins(12, "   of the compressor */"),
                Op::Add(14, " /* a */ /* b */ // c"),
                Op::Ins(16, "        // exit"),
                Op::Add(18, " // gone soon"),
                Op::Ins(20, "        // more later"),
                Op::Add(34, " // from rig 3"),
                Op::Set(
                    45,
                    "                    basis: Isentropic, // or polytropic",
                ),
                Op::Ins(48, "                // shaft shared with the turbine"),
                Op::Ins(52, "/* end */"),
            ],
        );
        let changed = edit(
            CANON,
            &[
                Op::Del(16),
                Op::Del(17),
                Op::Del(18),
                Op::Del(19),
                Op::Set(13, "            name: \"2a\","),
                Op::Set(33, "            kind: NormalShock,"),
                Op::Del(34),
                Op::Del(35),
                Op::Set(42, "                mode: Measured,"),
                Op::Del(43),
                Op::Del(44),
                Op::Del(45),
                Op::Del(46),
            ],
        );
        for canon in [CANON.to_string(), changed] {
            let c = Comments::collect(&user);
            let once = c.apply(&canon);
            let again = Comments::collect(&once);
            assert_eq!(again.len(), c.len());
            let twice = again.apply(&canon);
            assert_eq!(once, twice);
            assert_eq!(Comments::collect(&twice).apply(&canon), twice);
            for t in c.texts() {
                assert_eq!(once.matches(t.as_str()).count(), 1, "{t}");
            }
        }
        // Unchanged text with canonical comments is a fixed point.
        let once = save(&user, CANON);
        assert_eq!(
            lines(&once)[16..20],
            [
                "            note: \"compressor face\",  /* a */  /* b */  // c",
                "        ),",
                "        // exit",
                "        (",
            ]
        );
    }

    #[test]
    fn no_comments_leave_the_text_unchanged() {
        let c = Comments::collect(CANON);
        assert!(c.is_empty());
        assert_eq!(c.len(), 0);
        assert_eq!(c.apply(CANON), CANON);
        assert_eq!(Comments::default().apply("(\n)\n"), "(\n)\n");
        assert_eq!(Comments::default().apply(""), "");
    }

    #[test]
    fn syntax_error_keeps_comments() {
        let broken = r#"// stationwise workbook: RON text; values keep the units they were typed in.
#![enable(implicit_some)]
// my rig
(
    format: 1
    stations: [
        // first
        (
            name: "0",
            note: "free stream",   // upstream
        ]
        (
            name: "2",   // face
    "unclosed,
    /* lost */"#;
        let c = Comments::collect(broken);
        assert_eq!(
            c.texts(),
            [
                "// my rig",
                "// first",
                "// upstream",
                "// face",
                "/* lost */"
            ]
        );
        let out = c.apply(CANON);
        for t in c.texts() {
            assert_eq!(out.matches(t.as_str()).count(), 1, "{t}");
        }
        assert_eq!(lines(&out)[2..4], ["// my rig", "("]);
        assert_eq!(
            lines(&out)[8..12],
            [
                "        // first",
                "        (",
                "            name: \"0\",",
                "            note: \"free stream\",  // upstream",
            ]
        );
        let n = out.lines().count();
        assert_eq!(
            lines(&out)[n - 4..],
            ["    ],", "    // face", ")", "/* lost */"]
        );
        // Other odd text never panics.
        for text in [
            "",
            "/* open",
            "\"",
            "r#\"",
            "'",
            "((((",
            "))]]}}",
            "#![",
            "(a: [1, {\"k\": ( // x\n",
        ] {
            let c = Comments::collect(text);
            let _ = c.apply(text);
            let _ = c.apply(CANON);
        }
        assert_eq!(Comments::collect("( /* open").texts(), ["/* open */"]);
    }

    #[test]
    fn results_rows_are_named_by_row() {
        let with_rows = |first: &str, second: &str| {
            format!(
                "(\n    results: [\n        (\n            row: \"{first}\",\n            values: [\n                (\"tt\", 288.15),\n            ],\n        ),\n        (\n            row: \"{second}\",\n            values: [],\n        ),\n    ],\n)\n"
            )
        };
        let user = with_rows("0", "summary").replace(
            "                (\"tt\", 288.15),\n",
            "                (\"tt\", 288.15), // pitot\n",
        );
        let c = Comments::collect(&user);
        assert_eq!(
            c.held[0].place,
            Place::Trailing(path(&[
                field("results"),
                named("0"),
                field("values"),
                Seg::Index(0),
            ]))
        );
        // The rows swap places; the comment follows its row.
        let out = c.apply(&with_rows("summary", "0").replace(
            "values: [],",
            "values: [\n                (\"tt\", 288.15),\n            ],",
        ));
        assert!(out.contains("            row: \"0\",\n            values: [\n                (\"tt\", 288.15),  // pitot\n"));
    }

    #[test]
    fn a_comment_at_every_line_is_kept_and_stable() {
        // Own-line and end-of-line comments around every line of the body,
        // all at once and one at a time.
        let base: Vec<&str> = CANON.lines().collect();
        let mut all = String::new();
        let mut count = 0;
        for (k, line) in base.iter().enumerate() {
            if k >= 2 {
                all.push_str(&format!("/* before {k} */\n"));
                all.push_str(&format!("{line} // after {k}\n"));
                count += 2;
            } else {
                all.push_str(line);
                all.push('\n');
            }
        }
        all.push_str("// the end\n");
        count += 1;
        let c = Comments::collect(&all);
        assert_eq!(c.len(), count);
        let once = c.apply(CANON);
        assert_eq!(Comments::collect(&once).apply(CANON), once);
        for t in c.texts() {
            assert_eq!(once.matches(&format!("{t}\n")).count(), 1, "{t}");
        }
        // Taking the comments out again gives the canonical text back.
        let stripped: Vec<&str> = once
            .lines()
            .filter(|l| !l.trim_start().starts_with("/* before"))
            .map(|l| l.split("  // after").next().unwrap_or(l))
            .filter(|l| *l != "// the end")
            .collect();
        assert_eq!(stripped, base);
        for k in 2..base.len() {
            for one in [
                edit(CANON, &[Op::Ins(k + 1, "// single")]),
                edit(CANON, &[Op::Add(k + 1, " // single")]),
            ] {
                let once = save(&one, CANON);
                assert_eq!(once.matches("// single").count(), 1, "line {k}");
                assert_eq!(save(&once, CANON), once, "line {k}");
            }
        }
    }

    #[test]
    fn map_entries_are_keyed() {
        let user = "(\n    extra: {\n        // first key\n        \"a\": 1,\n        \"b\": 2,\n    },\n)\n";
        let c = Comments::collect(user);
        assert_eq!(
            c.held[0].place,
            Place::Leading(path(&[field("extra"), Seg::Key("a".to_string())]))
        );
        let canon = "(\n    extra: {\n        \"b\": 2,\n        \"a\": 1,\n    },\n)\n";
        assert_eq!(
            c.apply(canon),
            "(\n    extra: {\n        \"b\": 2,\n        // first key\n        \"a\": 1,\n    },\n)\n"
        );
    }
}
