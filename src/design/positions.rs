//! Where things are in a design text: a small RON scanner that finds every `name: value`
//! entry with its dotted path (`strip.material.poisson_ratio`), the byte span of its value
//! and the line and column where the value starts. Error messages use it to point at the
//! offending value, the saver to replace a changed value in place, and the reader to
//! refuse deep nesting before anything else looks at the text.
//!
//! The scanner streams (it keeps no token list) and visits each byte once, so it runs in
//! time linear in the text and memory linear in the number of entries.

use std::ops::Range;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Kind {
    Ident,
    Colon,
    Comma,
    Open,
    Close,
    /// Any other value: a number, a string, a char, a run of other characters.
    Atom,
}

#[derive(Clone, Debug)]
struct Token {
    kind: Kind,
    span: Range<usize>,
    line: usize,
    column: usize,
}

/// Something left open at the end of the text.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Unclosed {
    /// `"string"` or `"comment"`.
    pub what: &'static str,
    pub line: usize,
    pub column: usize,
}

/// A streaming tokenizer over the text's bytes; all delimiters are ASCII, so every span
/// ends on a char boundary.
struct Scanner<'a> {
    bytes: &'a [u8],
    i: usize,
    line: usize,
    column: usize,
    unclosed: Option<Unclosed>,
}

impl<'a> Scanner<'a> {
    fn new(text: &'a str) -> Scanner<'a> {
        Scanner {
            bytes: text.as_bytes(),
            i: 0,
            line: 1,
            column: 1,
            unclosed: None,
        }
    }

    /// Moves to byte `to`, counting lines and (char) columns on the way.
    fn advance_to(&mut self, to: usize) {
        let to = to.min(self.bytes.len());
        for &b in &self.bytes[self.i..to] {
            if b == b'\n' {
                self.line += 1;
                self.column = 1;
            } else if b & 0xC0 != 0x80 {
                self.column += 1;
            }
        }
        self.i = to;
    }

    fn at(&self, k: usize) -> Option<u8> {
        self.bytes.get(k).copied()
    }

    /// End of the quoted literal opened at `start` (one past its closing quote), or `None`
    /// when the text ends first.
    fn quoted_end(&self, start: usize, quote: u8) -> Option<usize> {
        let mut j = start + 1;
        while j < self.bytes.len() {
            match self.bytes[j] {
                b'\\' => j += 2,
                b if b == quote => return Some(j + 1),
                _ => j += 1,
            }
        }
        None
    }

    /// End of a raw or byte string at `start` (`r"..."`, `r#"..."#`, `b"..."`, `br#"..."#`),
    /// or `None` when there is none there.
    fn raw_string_end(&self, start: usize) -> Option<usize> {
        let b = self.bytes;
        let mut j = start;
        if b.get(j) == Some(&b'b') {
            j += 1;
        }
        let raw = b.get(j) == Some(&b'r');
        if raw {
            j += 1;
        }
        let hashes = b[j.min(b.len())..]
            .iter()
            .take_while(|&&c| c == b'#')
            .count();
        if (!raw && hashes > 0) || j == start {
            return None;
        }
        j += hashes;
        if b.get(j) != Some(&b'"') {
            return None;
        }
        j += 1;
        while j < b.len() {
            if b[j] == b'\\' && !raw {
                j += 2;
                continue;
            }
            if b[j] == b'"'
                && b[j + 1..]
                    .iter()
                    .take(hashes)
                    .filter(|&&c| c == b'#')
                    .count()
                    == hashes
            {
                return Some(j + 1 + hashes);
            }
            j += 1;
        }
        Some(b.len())
    }

    fn next_token(&mut self) -> Option<Token> {
        loop {
            let c = self.at(self.i)?;
            let next = self.at(self.i + 1);
            let (start, line, column) = (self.i, self.line, self.column);
            let token = |kind, end: usize| Token {
                kind,
                span: start..end,
                line,
                column,
            };
            match c {
                b' ' | b'\t' | b'\n' | b'\r' => self.advance_to(self.i + 1),
                b'/' if next == Some(b'/') => {
                    let end = self.bytes[start..]
                        .iter()
                        .position(|&b| b == b'\n')
                        .map_or(self.bytes.len(), |p| start + p);
                    self.advance_to(end);
                }
                b'/' if next == Some(b'*') => {
                    let mut depth = 0usize;
                    let mut j = start;
                    let mut closed = false;
                    while j < self.bytes.len() {
                        if self.bytes[j] == b'/' && self.at(j + 1) == Some(b'*') {
                            depth += 1;
                            j += 2;
                        } else if self.bytes[j] == b'*' && self.at(j + 1) == Some(b'/') {
                            depth -= 1;
                            j += 2;
                            if depth == 0 {
                                closed = true;
                                break;
                            }
                        } else {
                            j += 1;
                        }
                    }
                    if !closed && self.unclosed.is_none() {
                        self.unclosed = Some(Unclosed {
                            what: "comment",
                            line,
                            column,
                        });
                    }
                    self.advance_to(j);
                }
                b'"' | b'\'' => {
                    let end = match self.quoted_end(start, c) {
                        Some(end) => end,
                        None => {
                            if self.unclosed.is_none() {
                                self.unclosed = Some(Unclosed {
                                    what: "string",
                                    line,
                                    column,
                                });
                            }
                            self.bytes.len()
                        }
                    };
                    self.advance_to(end);
                    return Some(token(Kind::Atom, end));
                }
                b'r' | b'b' if matches!(next, Some(b'"' | b'#' | b'r')) => {
                    if let Some(end) = self.raw_string_end(start) {
                        self.advance_to(end);
                        return Some(token(Kind::Atom, end));
                    }
                    return Some(self.ident(start, line, column));
                }
                b'a'..=b'z' | b'A'..=b'Z' | b'_' => return Some(self.ident(start, line, column)),
                b':' | b',' | b'(' | b'[' | b'{' | b')' | b']' | b'}' => {
                    let kind = match c {
                        b':' => Kind::Colon,
                        b',' => Kind::Comma,
                        b'(' | b'[' | b'{' => Kind::Open,
                        _ => Kind::Close,
                    };
                    self.advance_to(start + 1);
                    return Some(token(kind, start + 1));
                }
                _ => {
                    let mut j = start + 1;
                    while let Some(&b) = self.bytes.get(j) {
                        let comment = b == b'/' && matches!(self.at(j + 1), Some(b'/' | b'*'));
                        if b.is_ascii_whitespace() || b":,()[]{}\"'".contains(&b) || comment {
                            break;
                        }
                        j += 1;
                    }
                    self.advance_to(j);
                    return Some(token(Kind::Atom, j));
                }
            }
        }
    }

    /// An identifier at `start`, `r#name` included.
    fn ident(&mut self, start: usize, line: usize, column: usize) -> Token {
        let mut j = start;
        if self.at(j) == Some(b'r') && self.at(j + 1) == Some(b'#') {
            j += 2;
        }
        while let Some(b) = self.at(j) {
            if b.is_ascii_alphanumeric() || b == b'_' {
                j += 1;
            } else {
                break;
            }
        }
        let j = j.max(start + 1);
        self.advance_to(j);
        Token {
            kind: Kind::Ident,
            span: start..j,
            line,
            column,
        }
    }
}

/// One `name: value` entry of the text.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Entry {
    /// Dotted path, e.g. `strip.material.poisson_ratio`.
    pub path: String,
    /// Byte span of the value, from its first token to its last (variant name and
    /// brackets included).
    pub value: Range<usize>,
    /// 1-based line and column where the value starts.
    pub line: usize,
    pub column: usize,
    /// Whether the value holds no named entries of its own (a number, a string,
    /// `Grade("...")`, `Clamped`).
    pub leaf: bool,
}

/// Every `name: value` entry in the text, in order. A bracket opened right after
/// `name:` (possibly after a variant name such as `Custom` or `Some`) nests the paths
/// inside it under `name`.
pub(crate) fn entries(text: &str) -> Vec<Entry> {
    let mut scanner = Scanner::new(text);
    let mut found: Vec<Entry> = Vec::new();
    // Per open bracket: the path prefix it nests under, if any.
    let mut stack: Vec<Option<String>> = Vec::new();
    // Entries whose value is still being read, with the bracket depth they sit at.
    let mut open: Vec<(usize, usize)> = Vec::new();
    let mut pending: Option<String> = None;
    let mut last_end = 0usize;
    let mut previous: Option<Token> = None;
    let mut awaiting_value: Option<(String, usize)> = None;
    let finish =
        |found: &mut Vec<Entry>, open: &mut Vec<(usize, usize)>, depth: usize, end: usize| {
            while let Some(&(k, d)) = open.last() {
                if d < depth {
                    break;
                }
                found[k].value.end = end.max(found[k].value.start);
                open.pop();
            }
        };
    while let Some(tok) = scanner.next_token() {
        let depth = stack.len();
        if let Some((path, at_depth)) = awaiting_value.take() {
            // The first token after `name:` starts the value.
            if let Some(&(k, _)) = open.last() {
                found[k].leaf = false;
            }
            found.push(Entry {
                path,
                value: tok.span.start..tok.span.end,
                line: tok.line,
                column: tok.column,
                leaf: true,
            });
            open.push((found.len() - 1, at_depth));
        }
        match tok.kind {
            Kind::Colon => {
                if let Some(prev) = previous.as_ref().filter(|p| p.kind == Kind::Ident) {
                    let name = &text[prev.span.clone()];
                    let name = name.strip_prefix("r#").unwrap_or(name);
                    let prefix = stack.iter().rev().flatten().next();
                    let path = match prefix {
                        Some(p) => format!("{p}.{name}"),
                        None => name.to_string(),
                    };
                    // An entry left open at this depth ended before its name.
                    finish(&mut found, &mut open, depth, last_end);
                    pending = Some(path.clone());
                    awaiting_value = Some((path, depth));
                }
            }
            Kind::Open => {
                let nest = pending.take();
                stack.push(nest);
            }
            Kind::Close => {
                finish(&mut found, &mut open, depth, last_end);
                stack.pop();
                pending = None;
            }
            Kind::Comma => {
                finish(&mut found, &mut open, depth, last_end);
                pending = None;
            }
            Kind::Ident | Kind::Atom => {}
        }
        last_end = tok.span.end;
        previous = Some(tok);
    }
    finish(&mut found, &mut open, 0, last_end);
    found
}

/// 1-based `(line, column)` of the value of the field at `path` (e.g.
/// `strip.material.poisson_ratio`), or `None` when the text does not spell it out.
pub fn locate(text: &str, path: &str) -> Option<(usize, usize)> {
    entries(text)
        .into_iter()
        .find(|e| e.path == path)
        .map(|e| (e.line, e.column))
}

/// The deepest entry whose value span holds byte `offset`.
pub(crate) fn entry_at(text: &str, offset: usize) -> Option<Entry> {
    entries(text)
        .into_iter()
        .filter(|e| e.value.start <= offset && offset <= e.value.end)
        .max_by_key(|e| e.path.matches('.').count())
}

/// The top-level `format` number as written, when it is a plain unsigned integer.
pub(crate) fn declared_format(text: &str) -> Option<u32> {
    let entry = entries(text).into_iter().find(|e| e.path == "format")?;
    let written = &text[entry.value];
    if !written.bytes().all(|b| b.is_ascii_digit() || b == b'_') {
        return None;
    }
    written.replace('_', "").parse().ok()
}

/// Where the text first nests brackets deeper than `max` (outside strings and comments),
/// as 1-based `(line, column)` of the bracket that goes too deep; and a string or
/// comment that the text never closes. Linear time, no allocation per token.
pub(crate) fn too_deep(text: &str, max: usize) -> (Option<(usize, usize)>, Option<Unclosed>) {
    let mut scanner = Scanner::new(text);
    let mut depth = 0usize;
    while let Some(tok) = scanner.next_token() {
        match tok.kind {
            Kind::Open => {
                depth += 1;
                if depth > max {
                    return (Some((tok.line, tok.column)), scanner.unclosed);
                }
            }
            Kind::Close => depth = depth.saturating_sub(1),
            _ => {}
        }
    }
    (None, scanner.unclosed)
}

/// 1-based `(line, column)` of the bracket that closes the outermost value (where a field
/// that is missing altogether would go).
pub(crate) fn top_level_end(text: &str) -> Option<(usize, usize)> {
    let mut scanner = Scanner::new(text);
    let mut depth = 0usize;
    while let Some(tok) = scanner.next_token() {
        match tok.kind {
            Kind::Open => depth += 1,
            Kind::Close => {
                depth = depth.saturating_sub(1);
                if depth == 0 {
                    return Some((tok.line, tok.column));
                }
            }
            _ => {}
        }
    }
    None
}

/// The first double-quoted string that starts before byte `before` and runs over a line
/// end: where a missing closing quote really is (the parser only notices lines later,
/// where the swallowed text ends). `(line, column)` of its opening quote.
pub(crate) fn string_across_lines(text: &str, before: usize) -> Option<(usize, usize)> {
    let mut scanner = Scanner::new(text);
    while let Some(tok) = scanner.next_token() {
        if tok.span.start >= before {
            break;
        }
        let written = &text[tok.span.clone()];
        if tok.kind == Kind::Atom && written.starts_with('"') && written.contains('\n') {
            return Some((tok.line, tok.column));
        }
    }
    None
}

/// Byte offset of 1-based `(line, column)` (column in chars), clamped to the text.
pub(crate) fn offset_of(text: &str, line: usize, column: usize) -> usize {
    let mut start = 0usize;
    for _ in 1..line {
        match text[start..].find('\n') {
            Some(p) => start += p + 1,
            None => return text.len(),
        }
    }
    text[start..]
        .char_indices()
        .nth(column.saturating_sub(1))
        .map_or(text.len(), |(i, _)| start + i)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locator_follows_nesting() {
        let text = "Design(\n  strip: (count: 6, material: Custom(name: \"a, b\", poisson_ratio: 0.3)),\n  bore: (pipe: Some((nps: \"2\", schedule: \"40\"))),\n)";
        assert_eq!(locate(text, "strip.count"), Some((2, 18)));
        assert_eq!(locate(text, "strip.material.poisson_ratio"), Some((2, 67)));
        assert_eq!(locate(text, "bore.pipe.schedule"), Some((3, 42)));
        assert_eq!(locate(text, "count"), None);
        assert_eq!(locate(text, "bore.pipe"), Some((3, 16)));
    }

    #[test]
    fn locator_skips_comments_and_strings() {
        let text = "Design( // friction: 9\n /* nested /* friction: 8 */ */ title: \"friction: 7\",\n friction: 0.3)";
        assert_eq!(locate(text, "friction"), Some((3, 12)));
        assert_eq!(locate(text, "title"), Some((2, 40)));
    }

    #[test]
    fn value_spans_cover_the_whole_value() {
        let text = "(a: 1.5e3, b: Grade(\"x\"), c: (d: -inf, e: r#\"q\"#), f: Hinged /* c */)";
        let found = entries(text);
        let spans: Vec<(&str, &str, bool)> = found
            .iter()
            .map(|e| (e.path.as_str(), &text[e.value.clone()], e.leaf))
            .collect();
        assert_eq!(
            spans,
            [
                ("a", "1.5e3", true),
                ("b", "Grade(\"x\")", true),
                ("c", "(d: -inf, e: r#\"q\"#)", false),
                ("c.d", "-inf", true),
                ("c.e", "r#\"q\"#", true),
                ("f", "Hinged", true),
            ]
        );
    }

    #[test]
    fn declared_format_is_read_before_parsing() {
        assert_eq!(declared_format("Design(\n  format: 12,\n)"), Some(12));
        assert_eq!(declared_format("(format:1_0)"), Some(10));
        assert_eq!(declared_format("(strip: (format: 3))"), None);
        assert_eq!(declared_format("(format: \"1\")"), None);
        assert_eq!(declared_format("(format: 1.0)"), None);
    }

    #[test]
    fn nesting_is_counted_outside_strings_and_comments() {
        assert_eq!(too_deep("((( )))", 3), (None, None));
        assert_eq!(too_deep("(\n ((( )))", 3).0, Some((2, 4)));
        assert_eq!(
            too_deep("( \"((((\" // ((((\n /* (((( */ )", 1),
            (None, None)
        );
        let (_, open) = too_deep("(a: \"never closed)", 8);
        assert_eq!(
            open,
            Some(Unclosed {
                what: "string",
                line: 1,
                column: 5
            })
        );
    }

    #[test]
    fn a_string_over_a_line_end_is_found_where_it_opens() {
        let text = "(\n a: \"open,\n b: 1,\n c: \"x\")";
        assert_eq!(string_across_lines(text, text.len()), Some((2, 5)));
        assert_eq!(string_across_lines("(a: \"x\")", 8), None);
    }

    #[test]
    fn offsets_follow_lines_and_chars() {
        let text = "ab\nçd\n";
        assert_eq!(offset_of(text, 2, 2), 5);
        assert_eq!(offset_of(text, 1, 1), 0);
        assert_eq!(offset_of(text, 9, 1), text.len());
    }
}
