//! Reading a schedule file's text before and after serde: a shape check that
//! refuses deep nesting and YAML tags before the parser spends time on them,
//! and the rewriting of the parser's messages into the file's own words
//! (the key as written, the value cut to [`SHOWN_CHARS`], what is allowed),
//! with no internal type names.

/// Deepest nesting allowed (flow brackets `[`/`{`, or block levels). A
/// schedule needs about five (`material.flow.points[i][j]`); YAML parsing
/// time grows with the square of the depth, so depth is refused first.
pub const MAX_NESTING: usize = 32;

/// Longest value quoted back in a message, characters.
pub const SHOWN_CHARS: usize = 60;

/// Refuses nesting deeper than [`MAX_NESTING`] and YAML tags (`!name`),
/// which no key of the file uses, with the line where it happens. One pass
/// over the text, before the YAML parser sees it.
pub fn check_shape(text: &str) -> Result<(), String> {
    let mut flow_depth = 0usize;
    let mut indents: Vec<usize> = Vec::new();
    for (n, line) in text.lines().enumerate() {
        let line_no = n + 1;
        let indent = line.len() - line.trim_start_matches(' ').len();
        let rest = &line[indent..];
        if flow_depth == 0 && !rest.is_empty() && !rest.starts_with('#') {
            while indents.last().is_some_and(|&i| i >= indent) {
                indents.pop();
            }
            indents.push(indent);
            // `- - - x` nests one level per dash on the same line.
            let mut dashes = 0;
            let mut r = rest;
            while let Some(t) = r.strip_prefix("- ").or_else(|| r.strip_prefix("? ")) {
                dashes += 1;
                r = t.trim_start_matches(' ');
            }
            if indents.len() + dashes > MAX_NESTING {
                return Err(too_deep(line_no));
            }
        }
        scan_line(line, line_no, &mut flow_depth)?;
    }
    Ok(())
}

/// Counts flow brackets outside quotes and comments, and finds tags. A tag
/// or a quote counts only where a value starts (line start, after `: `,
/// `- `, `? `, `[`, `{` or `,`): inside plain text (`label: rod !`) `!` and
/// `'` are ordinary characters.
fn scan_line(line: &str, line_no: usize, depth: &mut usize) -> Result<(), String> {
    let bytes = line.as_bytes();
    let mut i = 0;
    let mut node_start = true;
    let mut after_space = true;
    while i < bytes.len() {
        let c = bytes[i];
        let next_is_space = bytes.get(i + 1).is_none_or(|b| *b == b' ' || *b == b'\t');
        match c {
            b'#' if after_space => return Ok(()),
            b'\'' | b'"' if node_start => {
                // Skip the quoted text (to the end of the line when unclosed:
                // the parser reports that itself).
                match line[i + 1..].find(c as char) {
                    Some(j) => i += j + 2,
                    None => return Ok(()),
                }
                node_start = false;
                after_space = false;
                continue;
            }
            b'[' | b'{' => {
                *depth += 1;
                if *depth > MAX_NESTING {
                    return Err(too_deep(line_no));
                }
                node_start = true;
            }
            b']' | b'}' => {
                *depth = depth.saturating_sub(1);
                node_start = false;
            }
            b',' if *depth > 0 => node_start = true,
            b'!' if node_start => {
                return Err(format!(
                    "line {line_no}: `{}` is a YAML tag (`!name`); coldpass files use no tags: write the value plainly (quote it if it starts with `!`)",
                    cut(line[i..].split_whitespace().next().unwrap_or("!"))
                ));
            }
            b':' if next_is_space => node_start = true,
            b'-' | b'?' if node_start && next_is_space => {}
            b' ' | b'\t' => {}
            _ => node_start = false,
        }
        after_space = c == b' ' || c == b'\t';
        i += 1;
    }
    Ok(())
}

fn too_deep(line_no: usize) -> String {
    format!(
        "line {line_no}: the values are nested more than {MAX_NESTING} levels deep (brackets or indentation); a schedule needs about five: is this the right file?"
    )
}

/// `s` cut to [`SHOWN_CHARS`] characters, saying how long it was.
pub fn cut(s: &str) -> String {
    let n = s.chars().count();
    if n <= SHOWN_CHARS {
        s.to_string()
    } else {
        let head: String = s.chars().take(SHOWN_CHARS - 3).collect();
        format!("{head}... ({n} characters)")
    }
}

/// The parser's message in the file's words: the key path as written, the
/// value as written in the file (cut), and what is allowed.
pub fn explain(err: &serde_yaml::Error, text: &str) -> String {
    let full = err.to_string();
    let loc = err.location();
    let (body, mut at) = match &loc {
        Some(l) => {
            let suffix = format!(" at line {} column {}", l.line(), l.column());
            match full.strip_suffix(&suffix) {
                Some(b) => (
                    b.to_string(),
                    format!(" at line {} column {}", l.line(), l.column()),
                ),
                None => (full.clone(), String::new()),
            }
        }
        None => (full.clone(), String::new()),
    };
    let (mut path, mut msg) = split_path(&body);
    let mut written = loc
        .as_ref()
        .and_then(|l| token_at(text, l.line(), l.column()));
    // A flow law's own errors come as `flow: <inner message>` at the block's
    // mark; the inner message carries the better path and mark when it has one.
    for law_key in ["flow", "annealed_flow"] {
        if let Some(m) = msg.strip_prefix(&format!("{law_key}: ")) {
            path = join(&path, law_key);
            msg = m.to_string();
            written = None;
            at = String::new();
            if let Some((inner, line, column)) = inner_mark(&msg) {
                let (p, m) = split_path(&inner);
                if !p.is_empty() {
                    path = p;
                }
                msg = m;
                written = token_at(text, line, column);
                at = format!(" at line {line} column {column}");
            }
        }
    }
    let (key, said) = rewrite(&path, &msg, written.as_deref());
    let out = if key.is_empty() {
        format!("{said}{at}")
    } else if said.starts_with("= ") {
        // A value and its rule: `` `key.path` = value: allowed ... ``.
        format!("`{key}` {said}{at}")
    } else {
        format!("{key}: {said}{at}")
    };
    cut_quoted(&out)
}

/// `message at line L column C` split into the message and its mark.
fn inner_mark(msg: &str) -> Option<(String, usize, usize)> {
    let i = msg.rfind(" at line ")?;
    let (line, column) = msg[i + 9..].split_once(" column ")?;
    Some((
        msg[..i].to_string(),
        line.parse().ok()?,
        column.parse().ok()?,
    ))
}

fn join(path: &str, key: &str) -> String {
    if path.is_empty() {
        key.to_string()
    } else {
        format!("{path}.{key}")
    }
}

/// Splits `material.flow.law: message` into the key path and the message.
fn split_path(body: &str) -> (String, String) {
    if let Some((head, rest)) = body.split_once(": ") {
        let is_path = !head.is_empty()
            && head
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || matches!(c, '_' | '.' | '[' | ']'));
        if is_path {
            return (head.to_string(), rest.to_string());
        }
    }
    (String::new(), body.to_string())
}

/// The value written at `line`, `column` (1-based), up to the end of the
/// line or a comment, cut.
fn token_at(text: &str, line: usize, column: usize) -> Option<String> {
    let l = text.lines().nth(line.checked_sub(1)?)?;
    let rest: String = l.chars().skip(column.checked_sub(1)?).collect();
    let rest = match rest.find(" #") {
        Some(i) => &rest[..i],
        None => &rest[..],
    };
    let mut t = rest.trim();
    // A mark at a block's first key (`exit: [7]`): the value after the key.
    if let Some((k, v)) = t.split_once(": ") {
        if !k.is_empty() && k.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
            t = v.trim();
        }
    }
    let t = match t.chars().next() {
        Some('[' | '{' | '"' | '\'') | None => t,
        Some(_) => t.split([',', '}', ']']).next().unwrap_or(t).trim(),
    };
    (!t.is_empty()).then(|| cut(t))
}

/// Allowed names of the file's word-valued keys.
fn names_for(path: &str) -> Option<&'static str> {
    let last = path.rsplit('.').next().unwrap_or(path);
    match last {
        "method" => Some(
            "one of `ideal`, `efficiency`, `sachs`, `siebel`, `redundant`, `upper-bound`, `max`",
        ),
        "strategy" => Some("one of `equal-ratio`, `equal-strain`, `tapered`"),
        "beyond" => Some("one of `slope`, `flat`"),
        "law" => Some(LAW_NAMES),
        _ => None,
    }
}

const LAW_NAMES: &str =
    "one of `perfectly-plastic`, `linear`, `hollomon`, `ludwik`, `swift`, `voce`, `points`";

const LAW_FORM: &str =
    "a flow law: a block of keys such as {law: hollomon, k_mpa: 530, n: 0.26}, where law is";

const DIAMETER_FORM: &str =
    "a diameter: a number of mm (8.0), or text with a unit or gauge (\"8 mm\", \"0.315 in\", \"AWG 10\", \"AWG 4/0\")";

/// What a serde "expected ..." phrase means, in the file's words.
fn allowed(path: &str, expected: &str) -> String {
    let e = expected.trim();
    if e.contains("YAML tag") || e.starts_with("unit variant") || e.contains("enum Method") {
        return names_for(path).map_or_else(|| "a plain word".to_string(), str::to_string);
    }
    if e.contains("FlowLawSpec") || e.contains("tagged enum") {
        return format!("{LAW_FORM} {LAW_NAMES}");
    }
    if e.contains("SizeText") {
        return DIAMETER_FORM.to_string();
    }
    match e {
        "f64" | "a number" | "a float" => "a number (such as 0.05 or 8)".into(),
        "u32" | "a whole number" if path.ends_with("max_passes") => {
            "a whole number from 1 to 200".into()
        }
        "u32" | "a whole number" => "a whole number from 0 to 4294967295".into(),
        "a string" | "a borrowed string" | "text" => "text".into(),
        "a sequence" => "a list (one `- item` per line, or [a, b])".into(),
        "any value" => "a number of ordinary size".into(),
        "string or map" => {
            names_for(path).map_or_else(|| "a plain word".to_string(), str::to_string)
        }
        _ if e.starts_with("struct ") => "a block of keys (`key: value` lines)".into(),
        _ if e.contains("elements in sequence") || e.contains("array of length") => {
            "a pair [strain, stress_mpa]".into()
        }
        _ => e
            .replace("expected f64", "a number")
            .replace("u32", "a whole number"),
    }
}

/// The key to name and the message for one parser error.
fn rewrite(path: &str, msg: &str, written: Option<&str>) -> (String, String) {
    let mut key = path.to_string();
    // A step's and the start's diameter: the key the user wrote.
    let diameter_key = |key: &str| -> String {
        if key.ends_with(']') && key.contains("passes[") {
            format!("{key}.exit")
        } else if key == "start" || key == "target" {
            format!("{key}.diameter")
        } else {
            key.to_string()
        }
    };
    if key.is_empty() && msg.ends_with("expected struct ScheduleFile") {
        let got = msg.trim_start_matches("invalid type: ");
        let kind = got.split([' ', ',']).next().unwrap_or("text");
        let kind = match kind {
            "string" => "plain text",
            "sequence" => "a list",
            other => other,
        };
        return (
            key,
            format!("this is not a schedule file: it reads as {kind}, where a schedule is YAML blocks of keys (material:, start:, dies:, limits:, passes:); is it a CSV or another kind of file?"),
        );
    }
    if msg.contains("untagged enum SizeText") {
        key = diameter_key(&key);
        let value = written.map_or_else(|| "this".to_string(), strip_key);
        return (key, format!("= {value}: allowed {DIAMETER_FORM}"));
    }
    if let Some(rest) = msg.strip_prefix("`diameter` = ") {
        let (value, rule) = rest.split_once(" is not allowed: ").unwrap_or((rest, ""));
        return (
            diameter_key(&key),
            format!("= {value}: {}", crate::schedule::rule_words(rule)),
        );
    }
    // A core range error (a flow law's `n`, say): the parameter joined to
    // the block that holds it.
    if let Some((name, rest)) = msg.strip_prefix('`').and_then(|m| m.split_once("` = ")) {
        if let Some((value, rule)) = rest.split_once(" is not allowed: ") {
            let last = key.rsplit('.').next().unwrap_or(&key);
            if !key.is_empty() && last != name {
                key = join(&key, name);
            } else if key.is_empty() {
                key = name.to_string();
            }
            return (
                key,
                format!("= {value}: {}", crate::schedule::rule_words(rule)),
            );
        }
    }
    if msg == "repetition limit exceeded" {
        return (
            key,
            "the file's aliases (`*name`) repeat their anchors (`&name`) so often that it would expand to more than a hundred times its size; write the values out".into(),
        );
    }
    if msg == "unknown anchor" {
        let alias = written.map(|w| format!("`{w}` ")).unwrap_or_default();
        return (
            key,
            format!("the alias {alias}names no anchor (`&name`) defined before it"),
        );
    }
    if msg == "recursion limit exceeded" {
        return (
            key,
            format!("the values are nested too deep (more than {MAX_NESTING} levels)"),
        );
    }
    if msg.starts_with("deserializing from YAML containing more than one document") {
        return (key, "the file holds more than one YAML document (a `---` line between them); give one schedule per file".into());
    }
    if let Some(rest) = msg.strip_prefix("missing field ") {
        return (key, format!("the key {rest} is missing"));
    }
    if let Some(rest) = msg.strip_prefix("unknown field ") {
        let (name, list) = rest.split_once(", expected ").unwrap_or((rest, ""));
        let list = list.trim_start_matches("one of ");
        let allowed = if list.is_empty() {
            "this block takes no keys".to_string()
        } else {
            format!("the keys here are {list}")
        };
        return (key, format!("unknown field {}: {allowed}", cut(name)));
    }
    if let Some(rest) = msg.strip_prefix("unknown variant ") {
        let (name, list) = rest.split_once(", expected ").unwrap_or((rest, ""));
        let last = key.rsplit('.').next().unwrap_or("");
        if last.ends_with("[0]") && (last.starts_with("flow") || last.starts_with("annealed_flow"))
        {
            key = key.trim_end_matches("[0]").to_string();
            return (key, format!("a list is not {LAW_FORM} {LAW_NAMES}"));
        }
        return (
            key,
            format!("= {}: allowed {list}", cut(name.trim_matches('`'))),
        );
    }
    if let Some(rest) = msg
        .strip_prefix("invalid type: ")
        .or_else(|| msg.strip_prefix("invalid value: "))
    {
        let (got, expected) = rest.rsplit_once(", expected ").unwrap_or((rest, ""));
        let allowed = allowed(&key, expected);
        if got.starts_with("unit value") {
            return (key, format!("= nothing: allowed {allowed}"));
        }
        // A block list or mapping has its mark at its first item: name its kind.
        let block = (got.starts_with("sequence") || got.starts_with("map"))
            && !written.is_some_and(|w| w.starts_with(['[', '{']));
        let shown = match written {
            Some(w) if !block => cut(&strip_key(w)),
            _ if block => serde_value(got),
            _ => cut(&serde_value(got)),
        };
        let hint = hint(&shown, got, expected);
        return (key, format!("= {shown}: allowed {allowed}{hint}"));
    }
    if let Some(rest) = msg.strip_prefix("invalid length ") {
        let n = rest.split(',').next().unwrap_or(rest);
        let allowed = allowed(&key, rest.split_once("expected ").map_or("", |x| x.1));
        return (key, format!("{n} values given where {allowed} is needed"));
    }
    (key, plain(msg))
}

/// A value written with its key (`exit: [7]` when the mark is at the step).
fn strip_key(w: &str) -> String {
    w.trim_start_matches("- ").to_string()
}

/// serde's rendering of a value (`integer `16``, `string "x"`, `sequence`).
fn serde_value(got: &str) -> String {
    let got = got.split(" as ").next().unwrap_or(got);
    for p in ["integer ", "floating point ", "string ", "boolean "] {
        if let Some(v) = got.strip_prefix(p) {
            return v.trim_matches('`').to_string();
        }
    }
    match got {
        "sequence" => "a list".into(),
        "map" => "a block of keys".into(),
        other => other.to_string(),
    }
}

/// A word on why a value that looks right is refused.
fn hint(shown: &str, got: &str, expected: &str) -> String {
    let lower = shown.to_ascii_lowercase();
    let number = expected.contains("number") || expected.contains("f64");
    if number && (lower.starts_with("0x") || lower.starts_with("0o") || lower.starts_with("0b")) {
        return " (a hexadecimal, octal or binary integer is not read as a number: write it in decimal)".into();
    }
    if number && got.starts_with("string") && shown.starts_with(['"', '\'']) {
        return " (write the number without quotes)".into();
    }
    if got.contains("u128") || got.contains("i128") {
        return " (this whole number is far outside any allowed range)".into();
    }
    String::new()
}

/// Internal words left in any other message.
fn plain(msg: &str) -> String {
    msg.replace("expected f64", "expected a number")
        .replace("expected u32", "expected a whole number")
        .replace("expected a borrowed string", "expected text")
        .replace("internally tagged enum FlowLawSpec", "a flow law")
        .replace("untagged enum SizeText", "a diameter")
}

/// Cuts every backquoted or double-quoted stretch longer than [`SHOWN_CHARS`].
fn cut_quoted(s: &str) -> String {
    let mut out = String::with_capacity(s.len().min(4096));
    let mut rest = s;
    while let Some(i) = rest.find(['`', '"']) {
        let q = rest[i..].chars().next().unwrap_or('"');
        out.push_str(&rest[..=i]);
        let after = &rest[i + 1..];
        match after.find(q) {
            Some(j) => {
                out.push_str(&cut(&after[..j]));
                out.push(q);
                rest = &after[j + 1..];
            }
            None => {
                out.push_str(&cut(after));
                return out;
            }
        }
    }
    out.push_str(rest);
    if out.chars().count() > 4 * SHOWN_CHARS + 400 {
        return cut_long(&out);
    }
    out
}

/// A last bound on a message's length.
fn cut_long(s: &str) -> String {
    let head: String = s.chars().take(4 * SHOWN_CHARS + 400).collect();
    format!("{head}...")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn deep_brackets_are_refused_with_the_line() {
        let text = format!("title: {}{}\n", "[".repeat(100_000), "]".repeat(100_000));
        let e = check_shape(&text).unwrap_err();
        assert!(e.contains("line 1") && e.contains("nested"), "{e}");
        assert!(check_shape("points: [[0, 80], [0.5, 200]]\n").is_ok());
    }

    #[test]
    fn a_bang_inside_plain_text_is_not_a_tag() {
        assert!(check_shape("label: Copper rod, annealed !\ntitle: Smith's mill!\n").is_ok());
        assert!(check_shape("label: !x\n").is_err());
        assert!(check_shape("passes:\n  - !x 3\n").is_err());
        assert!(check_shape("flow: {law: !x}\n").is_err());
    }

    #[test]
    fn quoted_brackets_and_apostrophes_do_not_count() {
        let text = format!("title: \"{}\"\nlabel: Smith's [mill\n", "[".repeat(100));
        assert!(check_shape(&text).is_ok());
    }

    #[test]
    fn the_parsers_limits_are_named_in_the_files_words() {
        let (_, m) = rewrite("material.flow", "repetition limit exceeded", None);
        assert!(m.contains("aliases") && m.contains("anchors"), "{m}");
        let (_, m) = rewrite("", "recursion limit exceeded", None);
        assert!(m.contains("nested too deep"), "{m}");
    }

    #[test]
    fn long_values_are_cut() {
        let long = "x".repeat(10_000);
        let c = cut_quoted(&format!("a `{long}` b"));
        assert!(c.len() < 200 && c.contains("10000 characters"), "{c}");
    }
}
