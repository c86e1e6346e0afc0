//! The options of `coldpass fit`: columns, units, specimen, checks, drawn-wire points and the law to emit.

use super::*;

/// Arguments of `coldpass fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Tensile records: CSV (comma, semicolon or tab) with a header row;
    /// lines starting with `#` are notes. Several files are several
    /// specimens of one material: each is fitted, then the set.
    #[arg(value_name = "FILE.csv", required = true, num_args = 1..)]
    pub files: Vec<PathBuf>,
    /// What the record holds: engineering strain and stress (elastic part
    /// included), or true plastic strain and true stress already converted.
    #[arg(long, value_enum, default_value_t = DataArg::Engineering)]
    pub data: DataArg,
    /// Strain column (header name); default: the column whose header contains `strain`.
    #[arg(long, value_name = "NAME")]
    pub strain_col: Option<String>,
    /// Stress column (header name); default: the header containing `stress`.
    #[arg(long, value_name = "NAME")]
    pub stress_col: Option<String>,
    /// Force column (header name); default: the header containing `force` or `load`.
    #[arg(long, value_name = "NAME")]
    pub force_col: Option<String>,
    /// Extension column (header name); default: the header containing `extension`.
    #[arg(long, value_name = "NAME")]
    pub extension_col: Option<String>,
    /// Strain given as a fraction or in percent; default: percent when the
    /// strain header contains `%` or `percent`.
    #[arg(long, value_enum)]
    pub strain_unit: Option<StrainUnit>,
    /// Stress unit; default: from the header (`MPa`, `N/mm2`, `ksi`, `psi`), else MPa.
    #[arg(long, value_enum)]
    pub stress_unit: Option<StressUnit>,
    /// Force unit; default: from the header (`N`, `kN`, `lbf`), else N.
    #[arg(long, value_enum)]
    pub force_unit: Option<ForceUnit>,
    /// Extension unit; default: from the header (`mm`, `in`), else mm.
    #[arg(long, value_enum)]
    pub extension_unit: Option<ExtensionUnit>,
    /// Extensometer gauge length L0, mm (for force and extension records).
    #[arg(long, value_name = "MM")]
    pub gauge_length_mm: Option<f64>,
    /// Original specimen diameter d0, mm (area pi d0^2 / 4).
    #[arg(long, value_name = "MM", conflicts_with = "area_mm2")]
    pub diameter_mm: Option<f64>,
    /// Original cross-section A0, mm^2 (instead of --diameter-mm).
    #[arg(long, value_name = "MM2")]
    pub area_mm2: Option<f64>,
    /// Shear modulus G, GPa (1 to 300): warn when Hollomon K is outside G/1000 to G/100.
    #[arg(long, value_name = "GPA")]
    pub shear_modulus_gpa: Option<f64>,
    /// Material class: warn when Young's modulus is far from the class's.
    #[arg(long, value_enum)]
    pub material: Option<MaterialArg>,
    /// Accumulated true strain the schedule reaches (0 to 10; the demo copper
    /// schedules reach about 3 to 3.5): shows each law's stress there and how
    /// far past the tensile test that is.
    #[arg(long, value_name = "STRAIN")]
    pub reach_strain: Option<f64>,
    /// A drawn-wire point, `STRAIN:MPA`: the tensile strength (MPa) of wire
    /// drawn from the tested rod to that true strain; repeat for more.
    #[arg(long, value_name = "STRAIN:MPA")]
    pub drawn_point: Vec<String>,
    /// A drawn-wire point, `D0_MM:D_MM:MPA`: start and drawn diameters and
    /// the drawn wire's tensile strength; strain 2 ln(d0/d).
    #[arg(long, value_name = "D0:D:MPA")]
    pub drawn_wire: Vec<String>,
    /// Law for --emit-law; default: the best by AIC (with the drawn-wire
    /// points when given). The total-strain forms are written as
    /// `perfectly-plastic` and `linear`.
    #[arg(long, value_name = "NAME", value_parser = law_parser())]
    pub law: Option<FitLaw>,
    /// Write the chosen law as a `flow:` block (with `flow_valid_to_strain`
    /// and `flow_scatter`) for a schedule file (the name must end in .yaml or .yml).
    #[arg(long, value_name = "FILE.yaml", value_parser = crate::commands::options::law_yaml_path)]
    pub emit_law: Option<PathBuf>,
    /// Let --emit-law write a law whose fit did not converge.
    #[arg(long)]
    pub allow_unconverged: bool,
    /// Units of the table, the HTML page and the --plot chart: si (MPa, GPa)
    /// or us (ksi, Msi; a stress parameter such as `k_mpa` also shown in
    /// ksi). JSON, YAML, CSV and the emitted law stay SI, as their keys say.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    pub units: Units,
    #[command(flatten)]
    pub report: ReportArgs,
}

/// What the two columns hold.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum DataArg {
    /// Engineering strain and stress.
    Engineering,
    /// True plastic strain and true stress.
    True,
}

/// Unit of the strain column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StrainUnit {
    /// 0.25 means 25 %.
    Fraction,
    /// 25 means 25 %.
    Percent,
}

/// Unit of the stress column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StressUnit {
    /// Megapascal.
    Mpa,
    /// Newton per square millimetre (= MPa).
    #[value(name = "n-mm2")]
    NMm2,
    /// Kilopound per square inch (6.894757 MPa).
    Ksi,
    /// Pound per square inch.
    Psi,
}

impl StressUnit {
    pub(super) fn mpa(self) -> f64 {
        match self {
            StressUnit::Mpa | StressUnit::NMm2 => 1.0,
            StressUnit::Ksi => PSI_MPA * 1000.0,
            StressUnit::Psi => PSI_MPA,
        }
    }
    pub(super) fn name(self) -> &'static str {
        match self {
            StressUnit::Mpa => "MPa",
            StressUnit::NMm2 => "N/mm2",
            StressUnit::Ksi => "ksi",
            StressUnit::Psi => "psi",
        }
    }
}

/// One psi in MPa: 4.4482216152605 N / (25.4 mm)^2 (exact by the
/// definitions of the pound-force and the inch), the core's factor that
/// files and reports use too.
pub(super) const PSI_MPA: f64 = coldpass::size::quantity::PA_PER_PSI * 1.0e-6;

/// Unit of the force column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ForceUnit {
    /// Newtons.
    N,
    /// Kilonewtons.
    Kn,
    /// Pound-force (4.4482216152605 N).
    Lbf,
}

impl ForceUnit {
    pub(super) fn newtons(self) -> f64 {
        match self {
            ForceUnit::N => 1.0,
            ForceUnit::Kn => 1000.0,
            ForceUnit::Lbf => coldpass::size::quantity::N_PER_LBF,
        }
    }
    pub(super) fn name(self) -> &'static str {
        match self {
            ForceUnit::N => "N",
            ForceUnit::Kn => "kN",
            ForceUnit::Lbf => "lbf",
        }
    }
}

/// Unit of the extension column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ExtensionUnit {
    /// Millimetres.
    Mm,
    /// Inches (25.4 mm).
    In,
}

/// Material classes for the modulus check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MaterialArg {
    /// Carbon and low-alloy steel (200-210 GPa).
    Steel,
    /// Austenitic stainless steel (190-200 GPa).
    Stainless,
    /// Copper (110-130 GPa).
    Copper,
    /// Brass (97-110 GPa).
    Brass,
    /// Aluminium (68-72 GPa).
    Aluminium,
    /// Titanium (105-120 GPa).
    Titanium,
    /// Nickel (200-210 GPa).
    Nickel,
}

impl MaterialArg {
    pub(super) fn class(self) -> MaterialClass {
        match self {
            MaterialArg::Steel => MaterialClass::Steel,
            MaterialArg::Stainless => MaterialClass::Stainless,
            MaterialArg::Copper => MaterialClass::Copper,
            MaterialArg::Brass => MaterialClass::Brass,
            MaterialArg::Aluminium => MaterialClass::Aluminium,
            MaterialArg::Titanium => MaterialClass::Titanium,
            MaterialArg::Nickel => MaterialClass::Nickel,
        }
    }
}

/// `--law`: one of the core's law names ([`FitLaw::name`]), so the list lives
/// in one place; `--help` and a wrong name list them all.
pub(super) fn law_parser() -> impl TypedValueParser<Value = FitLaw> {
    PossibleValuesParser::new(FitLaw::ALL.map(FitLaw::name))
        .try_map(|name| FitLaw::from_name(&name).ok_or_else(|| format!("no law is named '{name}'")))
}
