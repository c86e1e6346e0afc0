//! The pass columns every people's format shares (table, HTML, compare):
//! each named by its JSON key, with its header words, what it measures (so the
//! unit can be shown in the chosen system) and how to read it from a step.
//! `--columns` picks from these keys; the table's default set, the full set
//! and the HTML page's set are lists of them.

use coldpass::evaluation::{StepKind, StepReport};

use super::units::{Quantity, Units};

/// How a column reads its value from a step.
#[derive(Debug, Clone, Copy)]
pub enum Read {
    /// A number in the core's unit, with its SI decimals.
    Num(fn(&StepReport) -> Option<f64>, usize),
    /// Text.
    Text(fn(&StepReport) -> String),
}

/// One pass column.
#[derive(Debug, Clone, Copy)]
pub struct Column {
    /// The JSON key (nested keys joined by a dot), also the CSV column.
    pub key: &'static str,
    /// Header words before the unit: the key's own words (`_` read as a
    /// space, the unit left to the header's unit), some left out where the
    /// table is narrow (`entry` for `entry_diameter_mm`), never other words
    /// (see [`words_of_key`]).
    pub words: &'static str,
    /// What the figure measures.
    pub quantity: Quantity,
    /// How to read it.
    pub read: Read,
    /// Whether an anneal row shows it (sizes, strain and flow stress only).
    pub on_anneal: bool,
}

impl Column {
    /// Header: the words and the unit (`exit mm`, `exit in`).
    pub fn header(&self, units: Units) -> String {
        let unit = self.quantity.label(units);
        if unit.is_empty() {
            self.words.to_string()
        } else {
            format!("{} {unit}", self.words)
        }
    }

    /// The cell of `r`: the figure in `units`, `-` when there is none, empty
    /// on an anneal row for a column an anneal does not have.
    pub fn cell(&self, r: &StepReport, units: Units) -> String {
        if r.kind == StepKind::Anneal && !self.on_anneal {
            return String::new();
        }
        match self.read {
            Read::Text(f) => f(r),
            Read::Num(f, digits) => super::fixed(
                f(r).map(|v| self.quantity.convert(v, units)),
                self.quantity.decimals(digits, units),
            ),
        }
    }
}

const fn num(
    key: &'static str,
    words: &'static str,
    quantity: Quantity,
    f: fn(&StepReport) -> Option<f64>,
    digits: usize,
    on_anneal: bool,
) -> Column {
    Column {
        key,
        words,
        quantity,
        read: Read::Num(f, digits),
        on_anneal,
    }
}

fn die_size(r: &StepReport) -> String {
    match r.kind {
        StepKind::Anneal => "anneal".into(),
        StepKind::Draw => r.die_size.clone().unwrap_or_default(),
    }
}

/// The flags of a step, joined by `sep`.
pub fn flags(r: &StepReport, sep: &str) -> String {
    r.flags
        .iter()
        .map(|f| f.name())
        .collect::<Vec<_>>()
        .join(sep)
}

use Quantity as Q;

/// Every pass column, in the order of the JSON keys.
pub const ALL: &[Column] = &[
    Column {
        key: "step",
        words: "step",
        quantity: Q::Plain,
        read: Read::Text(|r| r.step.to_string()),
        on_anneal: true,
    },
    Column {
        key: "die_size",
        words: "die size",
        quantity: Q::Plain,
        read: Read::Text(die_size),
        on_anneal: true,
    },
    num(
        "entry_diameter_mm",
        "entry",
        Q::Length,
        |r| Some(r.entry_diameter_mm),
        3,
        true,
    ),
    num(
        "exit_diameter_mm",
        "exit",
        Q::Length,
        |r| Some(r.exit_diameter_mm),
        3,
        true,
    ),
    num(
        "area_reduction",
        "reduction",
        Q::Percent,
        |r| r.area_reduction,
        1,
        false,
    ),
    num(
        "elongation",
        "elongation",
        Q::Plain,
        |r| r.elongation,
        3,
        false,
    ),
    num(
        "cumulative_reduction",
        "cum. red.",
        Q::Percent,
        |r| Some(r.cumulative_reduction),
        1,
        false,
    ),
    num(
        "pass_strain",
        "pass strain",
        Q::Plain,
        |r| r.pass_strain,
        3,
        false,
    ),
    num(
        "strain_before",
        "strain before",
        Q::Plain,
        |r| Some(r.strain_before),
        3,
        false,
    ),
    num(
        "strain_after",
        "strain after",
        Q::Plain,
        |r| Some(r.strain_after),
        3,
        true,
    ),
    num(
        "flow_stress_entry_mpa",
        "entry flow",
        Q::Stress,
        |r| r.flow_stress_entry_mpa,
        0,
        false,
    ),
    num(
        "mean_flow_stress_mpa",
        "mean flow",
        Q::Stress,
        |r| r.mean_flow_stress_mpa,
        0,
        false,
    ),
    num(
        "flow_stress_exit_mpa",
        "exit flow",
        Q::Stress,
        |r| Some(r.flow_stress_exit_mpa),
        0,
        true,
    ),
    num("delta", "Delta", Q::Plain, |r| r.delta, 2, false),
    num(
        "semi_angle_deg",
        "semi-angle",
        Q::Degrees,
        |r| r.semi_angle_deg,
        1,
        false,
    ),
    num(
        "friction",
        "friction mu",
        Q::Plain,
        |r| r.friction,
        3,
        false,
    ),
    num(
        "friction_factor",
        "friction factor m",
        Q::Plain,
        |r| r.friction_factor,
        3,
        false,
    ),
    num(
        "back_tension_mpa",
        "back tension",
        Q::Stress,
        |r| r.back_tension_mpa,
        0,
        false,
    ),
    num(
        "draw_stress_mpa.ideal",
        "ideal",
        Q::Stress,
        |r| r.draw_stress_mpa.map(|d| d.ideal),
        0,
        false,
    ),
    num(
        "draw_stress_mpa.efficiency",
        "efficiency",
        Q::Stress,
        |r| r.draw_stress_mpa.and_then(|d| d.efficiency),
        0,
        false,
    ),
    num(
        "draw_stress_mpa.sachs",
        "sachs",
        Q::Stress,
        |r| r.draw_stress_mpa.map(|d| d.sachs),
        0,
        false,
    ),
    num(
        "draw_stress_mpa.siebel",
        "siebel",
        Q::Stress,
        |r| r.draw_stress_mpa.map(|d| d.siebel),
        0,
        false,
    ),
    num(
        "draw_stress_mpa.redundant",
        "redundant",
        Q::Stress,
        |r| r.draw_stress_mpa.map(|d| d.redundant),
        0,
        false,
    ),
    num(
        "draw_stress_mpa.upper_bound",
        "upper-bound",
        Q::Stress,
        |r| r.draw_stress_mpa.map(|d| d.upper_bound),
        0,
        false,
    ),
    num(
        "governing_draw_stress_mpa",
        "draw stress",
        Q::Stress,
        |r| r.governing_draw_stress_mpa,
        0,
        false,
    ),
    num(
        "draw_ratio",
        "draw ratio",
        Q::Plain,
        |r| r.draw_ratio,
        3,
        false,
    ),
    num(
        "optimum_semi_angle_deg",
        "optimum",
        Q::Degrees,
        |r| r.optimum_semi_angle_deg,
        1,
        false,
    ),
    num("force_kn", "force", Q::Force, |r| r.force_kn, 2, false),
    num(
        "exit_speed_m_s",
        "exit speed",
        Q::Speed,
        |r| r.exit_speed_m_s,
        2,
        false,
    ),
    num("power_kw", "power", Q::Power, |r| r.power_kw, 1, false),
    num(
        "temperature_rise_c",
        "temperature rise",
        Q::TemperatureRise,
        |r| r.temperature_rise_c,
        0,
        false,
    ),
    num(
        "wire_temperature_c",
        "wire temperature",
        Q::Temperature,
        |r| r.wire_temperature_c,
        0,
        false,
    ),
    num(
        "net_pull_kn",
        "net pull",
        Q::Force,
        |r| r.net_pull_kn,
        2,
        false,
    ),
    num(
        "wire_temperature_entry_c",
        "wire temperature entry",
        Q::Temperature,
        |r| r.wire_temperature_entry_c,
        0,
        false,
    ),
    num(
        "wire_temperature_no_cooling_c",
        "wire temperature no cooling",
        Q::Temperature,
        |r| r.wire_temperature_no_cooling_c,
        0,
        false,
    ),
    num(
        "entry_yield_mpa",
        "entry yield",
        Q::Stress,
        |r| r.entry_yield_mpa,
        0,
        false,
    ),
    num(
        "tensile_strength_mpa",
        "tensile strength",
        Q::Stress,
        |r| r.tensile_strength_mpa,
        0,
        false,
    ),
    Column {
        key: "block",
        words: "block",
        quantity: Q::Plain,
        read: Read::Text(|r| r.block.map(|b| b.to_string()).unwrap_or_default()),
        on_anneal: false,
    },
    Column {
        key: "flags",
        words: "flags",
        quantity: Q::Plain,
        read: Read::Text(|r| flags(r, ", ")),
        on_anneal: false,
    },
];

/// The column with JSON key `key`.
pub fn find(key: &str) -> Option<&'static Column> {
    ALL.iter().find(|c| c.key == key)
}

/// The columns named by `keys`, or an error naming the unknown key and listing
/// the allowed ones.
pub fn pick(keys: &[String]) -> Result<Vec<&'static Column>, String> {
    keys.iter()
        .map(|k| {
            if k.trim().is_empty() {
                return Err(format!(
                    "--columns: an empty name (two commas together, or a comma at an end) in '{}'; \
                     name the columns by their JSON keys, comma-separated, e.g. step,exit_diameter_mm,draw_ratio,flags",
                    keys.join(",")
                ));
            }
            // Keys are lower case; a name typed in capitals means the same key.
            find(&k.trim().to_ascii_lowercase()).ok_or_else(|| {
                format!(
                    "--columns: no column is named '{}'; the columns are (JSON keys): {}",
                    k.trim(),
                    ALL.iter().map(|c| c.key).collect::<Vec<_>>().join(", ")
                )
            })
        })
        .collect()
}

/// The columns named by `keys`, which are all known (a fixed list in the code).
pub fn fixed_set(keys: &[&str]) -> Vec<&'static Column> {
    keys.iter()
        .map(|k| find(k).unwrap_or_else(|| panic!("column '{k}' is in the registry")))
        .collect()
}

/// The figures a person reads first: the default table, chosen so that a
/// 25-pass schedule fits 120 columns (the semi-angle, an input, is left to
/// `--wide`).
pub const FIRST: &[&str] = &[
    "step",
    "die_size",
    "exit_diameter_mm",
    "area_reduction",
    "cumulative_reduction",
    "strain_after",
    "flow_stress_exit_mpa",
    "governing_draw_stress_mpa",
    "draw_ratio",
    "power_kw",
    "wire_temperature_c",
    "flags",
];

/// Whether header `words` are made of the words of JSON `key` only (the
/// project's rule: one name in every format): each word, in lower case and
/// with a hyphen read as a space, is one of the key's (split at `_` and
/// `.`), a symbol beside it (`mu`, `m`) or a shortening of one (`cum.`,
/// `red.`). `%` (a fraction or probability shown in percent) is a unit.
pub fn words_of_key(words: &str, key: &str) -> bool {
    let key_words: Vec<&str> = key.split(['_', '.']).collect();
    words
        .to_lowercase()
        .replace('-', " ")
        .split_whitespace()
        .all(|w| {
            let w = match w {
                "cum." => "cumulative",
                "red." => "reduction",
                other => other,
            };
            key_words.contains(&w) || matches!(w, "mu" | "m" | "%")
        })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headers_are_the_words_of_their_keys() {
        for c in ALL {
            assert!(
                words_of_key(c.words, c.key),
                "column {}: header '{}' has words its key has not",
                c.key,
                c.words
            );
        }
        // The rule refuses a word the key lacks.
        assert!(!words_of_key(
            "wire temperature in",
            "wire_temperature_entry_c"
        ));
        assert!(!words_of_key("shear factor m", "friction_factor"));
        // The no-cooling bound names what it bounds, as its key does.
        assert_eq!(
            find("wire_temperature_no_cooling_c")
                .unwrap()
                .header(Units::Si),
            "wire temperature no cooling C"
        );
    }

    #[test]
    fn keys_are_unique_and_sets_are_known() {
        let mut keys: Vec<&str> = ALL.iter().map(|c| c.key).collect();
        keys.sort_unstable();
        let n = keys.len();
        keys.dedup();
        assert_eq!(keys.len(), n, "duplicate column key");
        assert_eq!(fixed_set(FIRST).len(), FIRST.len());
        let e = pick(&["exit_diameter_mm".into(), "nope".into()]).unwrap_err();
        assert!(e.contains("'nope'") && e.contains("draw_ratio"), "{e}");
        let e = pick(&["step".into(), "".into(), "flags".into()]).unwrap_err();
        assert!(
            e.contains("an empty name") && e.contains("'step,,flags'"),
            "{e}"
        );
        assert_eq!(pick(&["Draw_Ratio".into()]).unwrap()[0].key, "draw_ratio");
    }
}
