//! Text printers of `spectrum` and `assign` (the tables on stdout).

use std::fmt::Write;
use std::path::Path;

use super::html::tidy;
use super::runs::{region_name, AssignRun, SpectrumRun};
use crate::spectrum::note::Note;
use crate::spectrum::predicted::Stick;

/// A hint a command adds after a note (e.g. which of its options changes it).
pub type NoteHint<'a> = &'a dyn Fn(&Note) -> Option<String>;

fn note_lines(o: &mut String, notes: &[Note], hint: NoteHint) {
    for n in notes {
        match hint(n) {
            Some(h) => {
                let _ = writeln!(o, "note: {n} {h}");
            }
            None => {
                let _ = writeln!(o, "note: {n}");
            }
        }
    }
}

/// The spectrum table: title, bands by binding energy, bands left out, notes, the curve's
/// range, and the files written (`written`: what, path).
pub fn spectrum_table(run: &SpectrumRun, written: &[(&str, &Path)], hint: NoteHint) -> String {
    let b = run.spectrum;
    let mut o = String::new();
    let _ = writeln!(o, "{}", run.title());
    let _ = writeln!(o, "{}", run.subtitle());
    o.push('\n');
    let imax = b.sticks.iter().map(|s| s.intensity).fold(0.0, f64::max);
    let wlabel = b
        .sticks
        .iter()
        .map(|s| s.label.chars().count())
        .max()
        .unwrap_or(4)
        .max(4);
    let _ = writeln!(
        o,
        "  {:<wlabel$}  {:>10}  {:>10}  {:>9}  {:>9}",
        "band", "BE (eV)", "KE (eV)", "rel. int.", "Γ_L (eV)"
    );
    let mut sorted: Vec<&Stick> = b.sticks.iter().collect();
    sorted.sort_by(|x, y| x.binding_ev.total_cmp(&y.binding_ev));
    for s in sorted {
        let _ = writeln!(
            o,
            "  {:<wlabel$}  {:>10.2}  {:>10.2}  {:>9.1}  {:>9.2}",
            s.label,
            s.binding_ev,
            s.kinetic_ev,
            if imax > 0.0 {
                100.0 * s.intensity / imax
            } else {
                0.0
            },
            s.lorentzian_fwhm_ev
        );
    }
    for e in &b.excluded {
        let _ = writeln!(
            o,
            "  {:<wlabel$}  {:>10.2}  (not reached: {})",
            e.label, e.binding_ev, e.reason
        );
    }
    note_lines(&mut o, &b.notes, hint);
    let _ = writeln!(
        o,
        "region: {}; curve: {} points, {:.2}–{:.2} eV",
        region_name(run.region),
        b.curve.energy_ev.len(),
        b.curve.energy_ev[0],
        b.curve.energy_ev.last().unwrap()
    );
    for (what, p) in written {
        let _ = writeln!(o, "wrote {what}: {}", p.display());
    }
    o
}

/// The assignment table: alignment, pairs with confidences, unmatched peaks and bands,
/// notes, and the reminder that predictions guide a measurement.
pub fn assignment_table(run: &AssignRun, hint: NoteHint) -> String {
    let cmp = &run.assignment.comparison;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "Assignment of {} against {} ({} / {})",
        run.molecule, run.measured_file, run.method, run.basis
    );
    let _ = writeln!(
        o,
        "alignment: aligned = {:.4} × predicted {} {:.3} eV;  {} peaks found ({} background, Savitzky–Golay {} points)",
        cmp.scale,
        if cmp.shift_ev < 0.0 { "−" } else { "+" },
        cmp.shift_ev.abs(),
        cmp.peaks.len(),
        cmp.background,
        cmp.smoothing_window
    );
    o.push('\n');
    let w = cmp
        .assignments
        .iter()
        .map(|a| a.label.chars().count())
        .chain(
            cmp.unseen_bands
                .iter()
                .map(|b| b.label.chars().count() + 10),
        )
        .max()
        .unwrap_or(8)
        .max(8);
    let _ = writeln!(
        o,
        "  {:>9}  {:<w$}  {:>9}  {:>9}  {:>8}  {:>10}",
        "measured", "band(s)", "predicted", "aligned", "residual", "confidence"
    );
    for a in &cmp.assignments {
        let flag = if a.low_confidence {
            match &a.alternative {
                Some(alt) => format!("  LOW (or {alt})"),
                None => "  LOW".into(),
            }
        } else {
            String::new()
        };
        let _ = writeln!(
            o,
            "  {:>9.2}  {:<w$}  {:>9.2}  {:>9.2}  {:>+8.2}  {:>10.2}{flag}",
            a.measured_ev,
            a.label,
            a.predicted_ev,
            a.aligned_ev,
            tidy(a.residual_ev),
            a.confidence
        );
    }
    for p in &cmp.unassigned_peaks {
        let _ = writeln!(o, "  {:>9.2}  {:<w$}", p.energy_ev, "(no band)");
    }
    for b in cmp.unseen_bands.iter().filter(|b| b.inside_window) {
        let _ = writeln!(
            o,
            "  {:>9}  {:<w$}  {:>9.2}  {:>9.2}",
            "",
            format!("{} (no peak)", b.label),
            b.predicted_ev,
            b.aligned_ev
        );
    }
    note_lines(&mut o, &cmp.notes, hint);
    o.push_str("Predictions guide a measurement; they do not replace it.\n");
    o
}
