//! JSON and YAML of a fit: the keys every format shares.

use super::*;

#[derive(Serialize)]
pub(super) struct FitOut {
    pub(super) law: &'static str,
    pub(super) strain: &'static str,
    pub(super) params: BTreeMap<&'static str, Option<f64>>,
    pub(super) std_errors: BTreeMap<&'static str, Option<f64>>,
    pub(super) points: usize,
    pub(super) rms_mpa: Option<f64>,
    pub(super) r2: Option<f64>,
    pub(super) aic: Option<f64>,
    pub(super) converged: bool,
    pub(super) iterations: usize,
    pub(super) schedule_law: Option<&'static str>,
    pub(super) uts_mpa: Option<f64>,
    pub(super) stress_at_reach_mpa: Option<f64>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub(super) not_finite: Vec<String>,
}

#[derive(Serialize)]
pub(super) struct ReportOut<'a> {
    pub(super) file: &'a str,
    pub(super) columns: &'a str,
    pub(super) data: &'static str,
    pub(super) points_read: usize,
    pub(super) youngs_modulus_gpa: Option<f64>,
    pub(super) youngs_modulus_std_error_gpa: Option<f64>,
    pub(super) modulus_band_mpa: Option<[f64; 2]>,
    pub(super) modulus_points: Option<usize>,
    pub(super) toe_strain: Option<f64>,
    pub(super) yield_mpa: Option<f64>,
    pub(super) yielding: Option<&'static str>,
    pub(super) upper_yield_mpa: Option<f64>,
    pub(super) lower_yield_mpa: Option<f64>,
    pub(super) lueders_strain: Option<f64>,
    pub(super) uts_mpa: Option<f64>,
    pub(super) uniform_strain: Option<f64>,
    pub(super) noise_mpa: Option<f64>,
    pub(super) points_merged_or_dropped: usize,
    pub(super) fitted_points: usize,
    pub(super) strain_from: f64,
    pub(super) strain_to: f64,
    pub(super) flow_valid_to_strain: f64,
    pub(super) reach_strain: Option<f64>,
    pub(super) standard_errors: &'static str,
    pub(super) fits: Vec<FitOut>,
    pub(super) best: Option<&'static str>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub(super) drawn_points: Vec<[f64; 2]>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub(super) fits_with_drawn_points: Vec<FitOut>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub(super) best_with_drawn_points: Option<&'static str>,
    pub(super) warnings: Vec<String>,
    pub(super) caution: &'static str,
}

pub(super) fn fit_out(f: &LawFit) -> FitOut {
    let mut not_finite = Vec::new();
    for p in &f.params {
        if !p.value.is_finite() {
            not_finite.push(format!("params.{}", p.name));
        }
        if p.std_error.is_some_and(|v| !v.is_finite()) {
            not_finite.push(format!("std_errors.{}", p.name));
        }
    }
    for (k, v) in [("rms_mpa", f.rms_mpa), ("r2", f.r2), ("aic", f.aic)] {
        if !v.is_finite() {
            not_finite.push(k.to_string());
        }
    }
    FitOut {
        not_finite,
        law: f.law.name(),
        strain: if f.law.is_total_strain_form() {
            "total"
        } else {
            "plastic"
        },
        params: f.params.iter().map(|p| (p.name, finite(p.value))).collect(),
        std_errors: f
            .params
            .iter()
            .map(|p| (p.name, p.std_error.and_then(finite)))
            .collect(),
        points: f.points,
        rms_mpa: finite(f.rms_mpa),
        r2: finite(f.r2),
        aic: finite(f.aic),
        converged: f.converged,
        iterations: f.iterations,
        schedule_law: f.flow_law.as_ref().map(FlowLaw::name),
        uts_mpa: f.uts_mpa.and_then(finite),
        stress_at_reach_mpa: f.stress_at_reach_mpa.and_then(finite),
    }
}

pub(super) fn report_out<'a>(r: &FitReport, src: &'a Source) -> ReportOut<'a> {
    ReportOut {
        file: &src.file,
        columns: &src.columns,
        data: data_name(r.data),
        points_read: r.points_read,
        youngs_modulus_gpa: r.youngs_modulus_gpa,
        youngs_modulus_std_error_gpa: r.modulus.as_ref().map(|m| m.std_error_mpa / 1000.0),
        modulus_band_mpa: r.modulus.as_ref().map(|m| [m.band_mpa.0, m.band_mpa.1]),
        modulus_points: r.modulus.as_ref().map(|m| m.points),
        toe_strain: r.toe_strain,
        yield_mpa: r.yield_mpa,
        yielding: r.yielding.as_ref().map(|y| match y {
            Yielding::Continuous { .. } => "continuous",
            Yielding::Discontinuous { .. } => "discontinuous",
        }),
        upper_yield_mpa: match r.yielding {
            Some(Yielding::Discontinuous { upper_mpa, .. }) => Some(upper_mpa),
            _ => None,
        },
        lower_yield_mpa: match r.yielding {
            Some(Yielding::Discontinuous { lower_mpa, .. }) => Some(lower_mpa),
            _ => None,
        },
        lueders_strain: match r.yielding {
            Some(Yielding::Discontinuous { lueders_strain, .. }) => Some(lueders_strain),
            _ => None,
        },
        uts_mpa: r.uts_mpa,
        uniform_strain: r.uniform_strain,
        noise_mpa: finite(r.noise_mpa),
        points_merged_or_dropped: r.cleaning.changed(),
        fitted_points: r.plastic_strain.len(),
        strain_from: r.strain_from(),
        strain_to: r.strain_to(),
        flow_valid_to_strain: r.valid_to_strain(),
        reach_strain: r.reach_strain,
        standard_errors: STD_ERROR_NOTE,
        fits: r.fits.iter().map(fit_out).collect(),
        best: r.best.map(FitLaw::name),
        drawn_points: r
            .drawn
            .iter()
            .map(|d| [d.strain, d.tensile_strength_mpa])
            .collect(),
        fits_with_drawn_points: r.drawn_fits.iter().map(fit_out).collect(),
        best_with_drawn_points: r.best_with_drawn.map(FitLaw::name),
        warnings: r.warnings.iter().map(ToString::to_string).collect(),
        caution: CAUTION,
    }
}

/// JSON: `fits[]` with `law`, `params`, `std_errors`, `rms_mpa`, `r2`, `aic`,
/// `converged`, ...; `best`, `youngs_modulus_gpa`, `yield_mpa`, `uts_mpa`,
/// `uniform_strain`, `warnings`, `caution`.
pub fn json(r: &FitReport, src: &Source) -> Result<String> {
    let mut s = serde_json::to_string_pretty(&report_out(r, src))?;
    s.push('\n');
    Ok(s)
}

/// YAML with the same keys as the JSON.
pub fn yaml(r: &FitReport, src: &Source) -> Result<String> {
    Ok(serde_yaml::to_string(&report_out(r, src))?)
}

#[derive(Serialize)]
pub(super) struct CorrelationOut {
    pub(super) between: [&'static str; 2],
    pub(super) r: f64,
}

#[derive(Serialize)]
pub(super) struct SetOut {
    pub(super) law: &'static str,
    pub(super) specimens: usize,
    pub(super) mean: BTreeMap<&'static str, f64>,
    pub(super) sd: BTreeMap<&'static str, f64>,
    pub(super) correlation: Vec<CorrelationOut>,
    pub(super) with_drawn_points: bool,
    pub(super) flow_valid_to_strain: f64,
}

#[derive(Serialize)]
pub(super) struct AllOut<'a> {
    pub(super) specimens: Vec<ReportOut<'a>>,
    pub(super) set: Option<SetOut>,
    pub(super) caution: &'static str,
}

pub(super) fn set_out(set: &Set, reports: &[FitReport]) -> SetOut {
    let sc = &set.scatter;
    SetOut {
        law: sc.law.name(),
        specimens: sc.specimens,
        mean: sc
            .names
            .iter()
            .copied()
            .zip(sc.mean.iter().copied())
            .collect(),
        sd: sc
            .names
            .iter()
            .copied()
            .zip(sc.sd.iter().copied())
            .collect(),
        correlation: sc
            .correlation
            .iter()
            .map(|&(a, b, r)| CorrelationOut { between: [a, b], r })
            .collect(),
        with_drawn_points: set.with_drawn,
        flow_valid_to_strain: reports
            .iter()
            .map(FitReport::valid_to_strain)
            .fold(0.0, f64::max),
    }
}

pub(super) fn all_out<'a>(rs: &[FitReport], srcs: &'a [Source], set: Option<&Set>) -> AllOut<'a> {
    AllOut {
        specimens: rs.iter().zip(srcs).map(|(r, s)| report_out(r, s)).collect(),
        set: set.map(|s| set_out(s, rs)),
        caution: CAUTION,
    }
}

/// JSON of one record (as [`json`]) or, for several, `specimens[]` and `set`.
pub fn json_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>) -> Result<String> {
    if rs.len() == 1 {
        return json(&rs[0], &srcs[0]);
    }
    let mut s = serde_json::to_string_pretty(&all_out(rs, srcs, set))?;
    s.push('\n');
    Ok(s)
}

/// YAML with the same keys as the JSON.
pub fn yaml_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>) -> Result<String> {
    if rs.len() == 1 {
        return yaml(&rs[0], &srcs[0]);
    }
    Ok(serde_yaml::to_string(&all_out(rs, srcs, set))?)
}
