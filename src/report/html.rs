//! Self-contained HTML report of an assignment: inline CSS, inline SVG, no scripts and no
//! external resources, so the file can be mailed or archived as it is.

use std::fmt::Write;

use super::figures::overlay_figure;
use super::runs::{region_name, AssignRun};
use super::svg::escape;
use crate::spectrum::compare::Comparison;

/// What the report says about how the prediction was made.
#[derive(Debug, Clone)]
pub struct ReportContext {
    pub molecule: String,
    pub method: String,
    pub basis: String,
    pub photon: String,
    pub measured_file: String,
    pub region: String,
}

const CSS: &str = "body{font-family:Helvetica,Arial,sans-serif;max-width:1000px;margin:24px auto;\
color:#222;padding:0 16px}h1{font-size:22px;margin-bottom:4px}.verdict{padding:6px 10px;border-left:4px solid #888}.verdict.good{border-color:#2a2}.verdict.doubtful{border-color:#d90}.verdict.nomatch{border-color:#c22}.meta{color:#555;font-size:14px}\
table{border-collapse:collapse;margin:12px 0;font-size:14px}th,td{border-bottom:1px solid #dde;\
padding:5px 12px;text-align:right}th{background:#f2f4f7}td.l,th.l{text-align:left}\
tr.low td{background:#fff4e0}.note{border-left:4px solid #d9731a;background:#fdf7ef;padding:8px 12px;\
font-size:14px}.small{font-size:12.5px;color:#555}";

/// Round to the printed 0.01 eV so that −0.004 prints as +0.00, not −0.00.
pub fn tidy(v: f64) -> f64 {
    (v * 100.0).round() / 100.0 + 0.0
}

/// The report page of an assignment run (overlay plot included).
pub fn assignment_page(run: &AssignRun) -> String {
    let ctx = ReportContext {
        molecule: run.molecule.clone(),
        method: run.method.clone(),
        basis: run.basis.clone(),
        photon: run
            .photon
            .map(|p| p.name())
            .unwrap_or_else(|| "not given".into()),
        measured_file: match &run.measured_comment {
            Some(c) => format!("{} — its header says: {c}", run.measured_file),
            None => run.measured_file.clone(),
        },
        region: region_name(run.region).into(),
    };
    assignment_report(
        &ctx,
        &run.assignment.comparison,
        &overlay_figure(run),
        &|l| run.display_label(l),
    )
}

/// The report page. `svg` is an inline SVG document (from `figures::overlay_figure`);
/// `label` turns a pair's label into the one shown (with the chemical environment).
pub fn assignment_report(
    ctx: &ReportContext,
    cmp: &Comparison,
    svg: &str,
    label: &dyn Fn(&str) -> String,
) -> String {
    let mut o = String::new();
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Band assignment: {}</title><style>{CSS}</style></head><body>\n",
        escape(&ctx.molecule)
    );
    let _ = writeln!(o, "<h1>Band assignment: {}</h1>", escape(&ctx.molecule));
    let _ = writeln!(
        o,
        "<p class=\"verdict {}\"><b>Verdict: {}</b> &mdash; {}</p>",
        match cmp.verdict {
            crate::spectrum::verdict::Verdict::Good => "good",
            crate::spectrum::verdict::Verdict::Doubtful => "doubtful",
            crate::spectrum::verdict::Verdict::DoesNotMatch => "nomatch",
        },
        cmp.verdict.name(),
        escape(&cmp.verdict_reason)
    );
    let _ = writeln!(
        o,
        "<p class=\"meta\">Prediction: {} / {} &middot; {} region &middot; photon: {} &middot; measured: {}</p>",
        escape(&ctx.method),
        escape(&ctx.basis),
        escape(&ctx.region),
        escape(&ctx.photon),
        escape(&ctx.measured_file)
    );
    // strip the XML prolog-free svg as is
    o.push_str(svg);
    let _ = writeln!(
        o,
        "<p class=\"meta\">Alignment: aligned = {:.4} &times; predicted {} {:.3} eV &middot; background: {} &middot; smoothing: Savitzky&ndash;Golay, {} points, quadratic</p>",
        cmp.scale,
        if cmp.shift_ev < 0.0 { "&minus;" } else { "+" },
        cmp.shift_ev.abs(),
        escape(&cmp.background),
        cmp.smoothing_window
    );
    let _ = writeln!(
        o,
        "<p class=\"meta\">Shift uncertainty: {} &middot; {} degree(s) of freedom left{} &middot; noise &sigma; {:.3e}, peaks need a prominence of {:.3e}</p>",
        cmp.shift_sd_ev
            .map_or("unknown".to_string(), |s| format!("&plusmn;{s:.3} eV")),
        cmp.degrees_of_freedom.max(0),
        cmp.shift_bounds_ev.map_or(String::new(), |(lo, hi)| format!(
            " &middot; plausible shift for the method {lo:+.2} &hellip; {hi:+.2} eV"
        )),
        cmp.noise,
        cmp.peak_threshold
    );
    o.push_str("<table><tr><th>measured (eV)</th><th class=\"l\">assigned band(s)</th><th>predicted (eV)</th><th>aligned (eV)</th><th>residual (eV)</th><th>confidence</th><th class=\"l\"></th></tr>\n");
    for a in &cmp.assignments {
        let flag = if a.low_confidence {
            match &a.alternative {
                Some(alt) => format!("low &mdash; could be {}", escape(alt)),
                None => "low".to_string(),
            }
        } else {
            String::new()
        };
        let _ = writeln!(
            o,
            "<tr{}><td>{:.2}</td><td class=\"l\">{}</td><td>{:.2}</td><td>{:.2}</td><td>{:+.2}</td><td>{:.2}</td><td class=\"l\">{}</td></tr>",
            if a.low_confidence { " class=\"low\"" } else { "" },
            a.measured_ev,
            escape(&label(&a.label)),
            a.predicted_ev,
            a.aligned_ev,
            tidy(a.residual_ev),
            a.confidence,
            flag
        );
    }
    for p in &cmp.unassigned_peaks {
        let _ = writeln!(
            o,
            "<tr><td>{:.2}</td><td class=\"l\"><i>no band</i></td><td></td><td></td><td></td><td></td><td class=\"l\"></td></tr>",
            p.energy_ev
        );
    }
    for b in cmp.unseen_bands.iter().filter(|b| b.inside_window) {
        let _ = writeln!(
            o,
            "<tr><td></td><td class=\"l\">{} <i>(no peak)</i></td><td>{:.2}</td><td>{:.2}</td><td></td><td></td><td class=\"l\"></td></tr>",
            escape(&label(&b.label)),
            b.predicted_ev,
            b.aligned_ev
        );
    }
    o.push_str("</table>\n");
    if !cmp.notes.is_empty() {
        o.push_str("<ul class=\"small\">");
        for n in &cmp.notes {
            let _ = write!(o, "<li>{}</li>", escape(&n.to_string()));
        }
        o.push_str("</ul>\n");
    }
    o.push_str(
        "<p class=\"small\">Confidence is a probability calibrated on synthetic He I traces \
         (docs/spectrum-and-assign.md): from the cost margin of each pair over the best \
         assignment that forbids it, the method's error and the intensity agreement. Below \
         0.5, or when the pair changes as the prediction moves within its method's error, \
         it is flagged low.</p>\n\
         <p class=\"note\">These are predictions from an approximate electronic-structure method. \
         They guide a measurement and its interpretation; they do not replace it. Check \
         assignments flagged low against other evidence (intensities at a second photon \
         energy, isotope or substitution series, angular distributions).</p>\n",
    );
    o.push_str("</body></html>\n");
    o
}

/// The page of `bandcast spectrum --html`: the figure (one panel per core level when there
/// are several), the bands with their chemical environments, the bands left out and notes.
pub fn spectrum_page(run: &super::runs::SpectrumRun, flip: bool) -> String {
    let b = run.spectrum;
    let title = run.title();
    let mut o = String::new();
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>{}</title><style>{CSS}</style></head><body>\n",
        escape(&title)
    );
    let _ = writeln!(o, "<h1>{}</h1>", escape(&title));
    let _ = writeln!(o, "<p class=\"meta\">{}</p>", escape(&run.subtitle()));
    o.push_str(&super::figures::spectrum_figure(run, flip));
    let imax = b.sticks.iter().map(|s| s.intensity).fold(0.0, f64::max);
    let mut sorted: Vec<_> = b.sticks.iter().collect();
    sorted.sort_by(|x, y| x.binding_ev.total_cmp(&y.binding_ev));
    o.push_str("<table><tr><th class=\"l\">band</th><th class=\"l\">environment</th><th>BE (eV)</th><th>KE (eV)</th><th>rel. int.</th><th>&Gamma;<sub>L</sub> (eV)</th></tr>\n");
    for s in sorted {
        let _ = writeln!(
            o,
            "<tr><td class=\"l\">{}</td><td class=\"l\">{}</td><td>{:.2}</td><td>{:.2}</td><td>{:.1}</td><td>{:.2}</td></tr>",
            escape(&s.label),
            escape(s.environment.as_deref().unwrap_or("")),
            s.binding_ev,
            s.kinetic_ev,
            if imax > 0.0 { 100.0 * s.intensity / imax } else { 0.0 },
            s.lorentzian_fwhm_ev
        );
    }
    for e in &b.excluded {
        let _ = writeln!(
            o,
            "<tr><td class=\"l\">{}</td><td class=\"l\"></td><td>{:.2}</td><td colspan=\"3\" class=\"l\"><i>not reached: {}</i></td></tr>",
            escape(&e.label),
            e.binding_ev,
            escape(&e.reason)
        );
    }
    o.push_str("</table>\n");
    if !b.notes.is_empty() {
        o.push_str("<ul class=\"small\">");
        for n in &b.notes {
            let _ = write!(o, "<li>{}</li>", escape(&n.to_string()));
        }
        o.push_str("</ul>\n");
    }
    o.push_str(
        "<p class=\"small\">Environments are named from each atom's bonded neighbours \
         (covalent radii, standard valences), as XPS components are usually named; they label \
         the lines, they are not computed from the wavefunction.</p>\n\
         <p class=\"note\">These are predictions from an approximate electronic-structure method. \
         They guide a measurement and its interpretation; they do not replace it.</p>\n",
    );
    o.push_str("</body></html>\n");
    o
}

// --- vibronic bands (`spectrum --vibronic --html`; figure shared with report::vibronic) ---

/// Lines listed per band on the vibronic page (strongest first, shown by energy).
const VIBRONIC_PAGE_LINES: usize = 10;

/// Self-contained page of `bandcast spectrum --vibronic --html`: the envelope with the
/// progression sticks under it (the same figure as `--svg`: `vibronic::vibronic_plot`),
/// then per band its positions, progression-forming modes, strongest lines and notes.
pub fn vibronic_page(
    molecule: &str,
    basis: &str,
    point_group: &str,
    temperature_k: f64,
    bands: &[crate::vibronic::band::VibronicBand],
    curve: &super::vibronic::CurveJson,
) -> String {
    use super::vibronic::{electronic, quanta_text, temperature_text, vibronic_plot};
    let mut o = String::new();
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Vibronic bands: {}</title><style>{CSS}</style></head><body>\n",
        escape(molecule)
    );
    let _ = writeln!(o, "<h1>Vibronic bands: {}</h1>", escape(molecule));
    let _ = writeln!(
        o,
        "<p class=\"meta\">Energies: {} &middot; harmonic modes HF/{} &middot; neutral point group {} &middot; {} &middot; Gaussian {:.3} eV FWHM</p>",
        escape(&electronic(bands)),
        escape(basis),
        escape(point_group),
        escape(&temperature_text(temperature_k)),
        curve.fwhm_ev
    );
    o.push_str(&vibronic_plot(molecule, bands, curve).render());
    for b in bands {
        let name = b
            .label
            .clone()
            .unwrap_or_else(|| format!("orbital {}", b.orbital));
        let _ = writeln!(
            o,
            "<h2>{} <span class=\"small\">(orbital {}, {} model, lines hold {:.1} %)</span></h2>",
            escape(&name),
            b.orbital,
            match b.model {
                crate::vibronic::band::BandModel::Duschinsky => "Duschinsky",
                crate::vibronic::band::BandModel::LinearCoupling => "linear coupling",
            },
            100.0 * b.captured_fraction
        );
        let _ = writeln!(
            o,
            "<table><tr><th>adiabatic (eV)</th><th>vertical (eV)</th><th>maximum (eV)</th><th>mean quanta</th></tr><tr><td>{:.3}</td><td>{:.3}</td><td>{:.3}</td><td>{:.2}</td></tr></table>",
            b.adiabatic_ev, b.vertical_ev, b.maximum_ev, b.mean_total_quanta
        );
        if !b.progression_modes.is_empty() {
            o.push_str("<table><tr><th>mode</th><th>cm&#8315;&sup1; (ion)</th><th class=\"l\">irrep</th><th>quanta at maximum</th><th>mean quanta</th></tr>\n");
            for m in &b.progression_modes {
                let _ = writeln!(
                    o,
                    "<tr><td>{}</td><td>{:.1}</td><td class=\"l\">{}</td><td>{}</td><td>{:.2}</td></tr>",
                    m.mode,
                    m.wavenumber_cm1,
                    escape(&m.irrep),
                    m.quanta_at_maximum,
                    m.mean_quanta
                );
            }
            o.push_str("</table>\n");
        }
        let mut strongest: Vec<_> = b.lines.iter().collect();
        strongest.sort_by(|x, y| y.intensity.total_cmp(&x.intensity));
        strongest.truncate(VIBRONIC_PAGE_LINES);
        strongest.sort_by(|x, y| x.energy_ev.total_cmp(&y.energy_ev));
        o.push_str(
            "<table><tr><th>line (eV)</th><th>intensity</th><th class=\"l\">quanta</th></tr>\n",
        );
        for l in strongest {
            let _ = writeln!(
                o,
                "<tr><td>{:.3}</td><td>{:.4}</td><td class=\"l\">{}</td></tr>",
                l.energy_ev,
                l.intensity,
                escape(&quanta_text(l))
            );
        }
        o.push_str("</table>\n");
        if !b.notes.is_empty() {
            o.push_str("<ul class=\"small\">");
            for n in &b.notes {
                let _ = write!(o, "<li>{}</li>", escape(&n.to_string()));
            }
            o.push_str("</ul>\n");
        }
    }
    let _ = writeln!(
        o,
        "<p class=\"note\">{}</p>",
        escape(super::vibronic::VIBRONIC_GUIDANCE)
    );
    o.push_str("</body></html>\n");
    o
}
