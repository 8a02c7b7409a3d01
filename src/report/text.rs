//! Text printers of `spectrum`, `assign`, `ionize` and `core` (the tables on stdout).

use std::fmt::Write;
use std::path::Path;

use super::html::tidy;
use super::json::{reference_name, GUIDANCE};
use super::runs::{region_name, AssignRun, SpectrumRun};
use crate::core_level::{CoreResult, CoreTimings};
use crate::ionization::valence::ValenceResult;
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
        .map(|s| s.display_label().chars().count())
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
            s.display_label(),
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
    let _ = writeln!(
        o,
        "shift uncertainty: {};  {} degree(s) of freedom left;  noise σ {:.3e}, peaks need prominence ≥ {:.3e}",
        cmp.shift_sd_ev
            .map_or("unknown (no degree of freedom left)".to_string(), |s| format!("± {s:.3} eV")),
        cmp.degrees_of_freedom.max(0),
        cmp.noise,
        cmp.peak_threshold
    );
    if let Some((lo, hi)) = cmp.shift_bounds_ev {
        let _ = writeln!(
            o,
            "plausible shift for {}: {lo:+.2} … {hi:+.2} eV",
            run.method
        );
    }
    let _ = writeln!(
        o,
        "verdict: {} — {}",
        cmp.verdict.name(),
        cmp.verdict_reason
    );
    o.push('\n');
    let w = cmp
        .assignments
        .iter()
        .map(|a| run.display_label(&a.label).chars().count())
        .chain(
            cmp.unseen_bands
                .iter()
                .map(|b| run.display_label(&b.label).chars().count() + 10),
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
            run.display_label(&a.label),
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
            format!("{} (no peak)", run.display_label(&b.label)),
            b.predicted_ev,
            b.aligned_ev
        );
    }
    shape_lines(&mut o, cmp);
    note_lines(&mut o, &cmp.notes, hint);
    o.push_str("Predictions guide a measurement; they do not replace it.\n");
    o
}

/// Per pair, the measured and predicted band width and, with a vibronic envelope, the
/// progression (spacing and visible quanta) or that the trace does not resolve it.
fn shape_lines(o: &mut String, cmp: &crate::spectrum::compare::Comparison) {
    let with: Vec<_> = cmp
        .assignments
        .iter()
        .filter_map(|a| a.shape.as_ref().map(|s| (a, s)))
        .collect();
    if with.is_empty() {
        return;
    }
    let _ = writeln!(o, "\nband shapes (measured / predicted):");
    for (a, s) in with {
        let mut line = format!(
            "  {:>9.2}  {}: width {:.2} / {:.2} eV",
            a.measured_ev, a.label, s.width_measured_ev, s.width_predicted_ev
        );
        if let Some(p) = &s.progression {
            if p.resolved {
                let sp = |d: Option<f64>| d.map_or("–".to_string(), |d| format!("{d:.3}"));
                line.push_str(&format!(
                    "; progression spacing {} / {} eV, {} / {} visible quanta",
                    sp(p.measured_spacing_ev),
                    sp(p.predicted_spacing_ev),
                    p.measured_maxima,
                    p.predicted_maxima
                ));
            } else {
                line.push_str(
                    "; progression not resolved at this resolution (envelope width only)",
                );
            }
        }
        line.push_str(&format!("; mismatch {:.2}", s.mismatch));
        let _ = writeln!(o, "{line}");
    }
}

/// The `bandcast ionize` table: title, reference, bands (? where the order is in doubt),
/// the doubtful pairs, notes and warnings, and the guidance sentence.
pub fn ionize_table(r: &ValenceResult, molecule: &str) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{molecule}: valence ionization by {} in {}{}",
        r.method,
        r.basis,
        r.point_group
            .as_ref()
            .map(|g| format!(", point group {g}"))
            .unwrap_or_default()
    );
    let _ = writeln!(
        s,
        "reference {} energy {:.8} Eh",
        reference_name(r.reference).to_uppercase(),
        r.reference_energy
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "  {:<8} {:>8} {:>4} {:>6} {:>8}  {:<12} make-up",
        "band", "IE (eV)", "deg", "weight", "Koopmans", "character"
    );
    for (k, b) in r.bands.iter().enumerate() {
        let flag = if r
            .uncertain_pairs
            .iter()
            .any(|p| p.first == k || p.second == k)
        {
            " ?"
        } else {
            ""
        };
        let pole = b
            .pole_strength
            .or(b.one_hole_weight)
            .map(|p| format!("{p:.3}"))
            .unwrap_or_else(|| "-".into());
        let makeup: Vec<String> = b
            .makeup
            .iter()
            .filter(|m| m.fraction >= 0.05)
            .take(4)
            .map(|m| format!("{} {} {:.0}%", m.atom, m.shell, 100.0 * m.fraction))
            .collect();
        let _ = writeln!(
            s,
            "  {:<8} {:>8.3} {:>4} {:>6} {:>8.3}  {:<12} {}{}",
            b.label,
            b.ie_ev,
            b.degeneracy,
            pole,
            r.koopmans_ev[k],
            b.character.as_deref().unwrap_or("-"),
            if makeup.is_empty() {
                "-".to_string()
            } else {
                makeup.join(", ")
            },
            flag
        );
        if let Some(note) = &b.character_note {
            let _ = writeln!(
                s,
                "  {:<8} {:>8} {:>4} {:>6} {:>8}  ↳ {note}",
                "", "", "", "", ""
            );
        }
    }
    if !r.uncertain_pairs.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(s, "order uncertain (marked ?):");
        for p in &r.uncertain_pairs {
            let _ = writeln!(s, "  {} / {}: {}", p.labels[0], p.labels[1], p.reason);
        }
    }
    if !r.notes.is_empty() || !r.warnings.is_empty() {
        let _ = writeln!(s);
        for n in &r.notes {
            let _ = writeln!(s, "note: {n}");
        }
        for w in &r.warnings {
            let _ = writeln!(s, "warning: {w}");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "{GUIDANCE}");
    s
}

fn opt(v: Option<f64>, width: usize, digits: usize) -> String {
    match v {
        // No "-0.00" for a shift that is zero to print precision.
        Some(x) if x.abs() < 0.5 * 10f64.powi(-(digits as i32)) => {
            format!("{:>width$.digits$}", 0.0)
        }
        Some(x) => format!("{x:>width$.digits$}"),
        None => format!("{:>width$}", "–"),
    }
}

/// The `bandcast core` table: title, reference energies, one line per core level, notes.
pub fn core_table(r: &CoreResult) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "Core levels of {} — {} basis, {} ({} functions)\n",
        if r.molecule.is_empty() {
            "molecule"
        } else {
            &r.molecule
        },
        r.basis,
        r.core_basis,
        r.n_basis
    ));
    match r.neutral_energy_hartree {
        Some(e) => s.push_str(&format!("Neutral Hartree–Fock energy {e:.8} Eh\n")),
        None => s.push_str(
            "Neutral Hartree–Fock energy: one per hole (each hole's basis has the core \
             flexibility on its own atom; see JSON)\n",
        ),
    }
    s.push_str(&format!("J and K: {}\n", r.integrals.describe()));
    for rf in &r.references {
        s.push_str(&format!(
            "Shift reference: {} {} of {} (atom {}) at {:.2} eV\n",
            rf.element, rf.shell, rf.molecule, rf.atom, rf.dscf_ev
        ));
    }
    s.push('\n');
    let has_mp2 = r.core_levels.iter().any(|l| l.dmp2_ev.is_some());
    let has_rel = r
        .core_levels
        .iter()
        .any(|l| l.relativistic_correction_ev.is_some());
    let we = r
        .core_levels
        .iter()
        .map(|l| l.environment.chars().count())
        .max()
        .unwrap_or(0)
        .max(11);
    s.push_str(&format!(
        "level      {:<we$}  Koopmans/eV  ΔSCF/eV",
        "environment"
    ));
    if has_rel {
        s.push_str("  rel./eV  ΔSCF+rel/eV");
    }
    if has_mp2 {
        s.push_str("  ΔMP2/eV");
    }
    let has_cc = r.core_levels.iter().any(|l| l.cc.dccsd_ev.is_some());
    let has_t = r.core_levels.iter().any(|l| l.cc.dccsdt_ev.is_some());
    if has_cc {
        s.push_str(" ΔCCSD/eV");
    }
    if has_t {
        s.push_str(" ΔCCSD(T)/eV");
    }
    if has_cc {
        s.push_str(" binding/eV");
    }
    s.push_str("  shift/eV   ⟨S²⟩   hole  localised  kept start\n");
    for l in &r.core_levels {
        s.push_str(&format!(
            "{:<10} {:<we$}  {:>11.2} {:>8.2}",
            l.label, l.environment, l.koopmans_ev, l.dscf_ev
        ));
        if has_rel {
            s.push_str(&format!(
                " {} {}",
                opt(l.relativistic_correction_ev, 8, 2),
                opt(l.dscf_relativistic_ev, 12, 2)
            ));
        }
        if has_mp2 {
            s.push_str(&format!(" {}", opt(l.dmp2_ev, 8, 2)));
        }
        if has_cc {
            s.push_str(&format!(" {}", opt(l.cc.dccsd_ev, 8, 2)));
        }
        if has_t {
            s.push_str(&format!(" {}", opt(l.cc.dccsdt_ev, 11, 2)));
        }
        if has_cc {
            s.push_str(&format!(" {:>10.2}", l.cc.binding_ev));
        }
        s.push_str(&format!(
            " {}  {:>6.3}  {:>4.2}  {:<9}  {}\n",
            opt(l.shift_ev, 8, 2),
            l.s2,
            l.hole_population,
            if l.localised { "yes" } else { "no" },
            l.start
        ));
    }
    let mut notes: Vec<String> = r.notes.iter().map(|n| n.to_string()).collect();
    for l in &r.core_levels {
        for n in l.notes.iter() {
            notes.push(format!("{}: {n}", l.label));
        }
        if let (Some(a), Some(b), true) = (l.shift_ev, l.cc.shift_binding_ev, has_cc) {
            notes.push(format!(
                "{}: shift {a:.2} eV (ΔSCF), {b:.2} eV ({}, non-relativistic)",
                l.label, l.cc.method
            ));
        }
        if let (Some(a), Some(b)) = (l.shift_ev, l.shift_dmp2_ev) {
            notes.push(format!(
                "{}: shift {a:.2} eV (ΔSCF), {b:.2} eV (ΔMP2)",
                l.label
            ));
        }
    }
    notes.push(
        "hole = Löwdin population of the final vacancy on the atom; predictions guide a \
         measurement, they do not replace it"
            .into(),
    );
    s.push('\n');
    for n in notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s
}

fn secs(cpu: Option<f64>) -> String {
    cpu.map(|c| format!("{c:.1}")).unwrap_or_else(|| "?".into())
}

/// Stage timings of a run, one line per stage (for `--verbose` and `bandcast bench core`).
pub fn core_timings_text(t: &CoreTimings) -> String {
    let mut s = format!(
        "  total {:.2} s wall, {} CPU-s; Fock builds: {}\n",
        t.total_s,
        secs(t.total_cpu_s),
        t.fock_builder
    );
    if t.shared_bytes > 0 {
        s.push_str(&format!(
            "  shared quartets (no shell on a hole atom): {:.2} s wall, {} CPU-s, {:.1} MiB\n",
            t.shared_s,
            secs(t.shared_cpu_s),
            t.shared_bytes as f64 / (1u64 << 20) as f64
        ));
    }
    for (kind, list) in [("neutral", &t.neutrals), ("hole", &t.holes)] {
        for h in list {
            s.push_str(&format!(
                "  {kind:<7} {:<12} {:>4} fn {:>8.2} s wall {:>8} CPU-s {:>4} iterations\n",
                h.label,
                h.n_basis,
                h.seconds,
                secs(h.cpu_seconds),
                h.iterations
            ));
        }
    }
    s
}
