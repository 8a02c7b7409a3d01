//! A small hand-written SVG line-plot printer for spectra: curves, sticks with labels, an
//! energy axis with ticks and units. Photoelectron spectra on a binding-energy axis are
//! drawn with the energy increasing to the left (common practice); `Plot::increase_left`
//! chooses the direction.

use std::fmt::Write;

/// A curve.
#[derive(Debug, Clone)]
pub struct Series {
    pub name: String,
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub color: String,
    pub stroke_width: f64,
    /// Light fill under the curve.
    pub fill: bool,
    pub dashed: bool,
}

/// A vertical line from the axis to `height` (y units) with a label above it.
#[derive(Debug, Clone)]
pub struct StickMark {
    pub x: f64,
    pub height: f64,
    pub label: String,
    pub color: String,
}

#[derive(Debug, Clone)]
pub struct Plot {
    pub title: String,
    pub subtitle: String,
    pub x_label: String,
    pub y_label: String,
    pub series: Vec<Series>,
    pub sticks: Vec<StickMark>,
    /// Energy increases to the left (binding-energy convention).
    pub increase_left: bool,
    /// Horizontal range; default: the range of all series and sticks.
    pub x_range: Option<(f64, f64)>,
    pub width: f64,
    pub height: f64,
}

/// The project's colour cycle (chosen for contrast on white and for colour-blind readers:
/// blue, orange, teal, purple, brown, grey).
pub const PALETTE: [&str; 6] = [
    "#1f5fa8", "#d9731a", "#198a7a", "#7b4fa0", "#8c5a2b", "#5f6670",
];

/// Escape text for SVG/HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// Tick positions: steps of 1, 2 or 5 × 10^k giving about `target` intervals.
pub fn nice_ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, f64) {
    let span = (hi - lo).abs().max(1e-12);
    let raw = span / target.max(1) as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|f| f * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let first = (lo / step).ceil() * step;
    let mut t = Vec::new();
    let mut v = first;
    while v <= hi + 1e-9 * step {
        t.push(if v.abs() < 1e-12 * step { 0.0 } else { v });
        v += step;
    }
    (t, step)
}

/// Ticks every `step` inside [lo, hi].
fn nice_ticks_step(lo: f64, hi: f64, step: f64) -> (Vec<f64>, f64) {
    let mut t = Vec::new();
    let mut k = (lo / step).ceil();
    while k * step <= hi + 1e-9 * step {
        t.push(k * step);
        k += 1.0;
    }
    (t, step)
}

fn fmt_tick(v: f64, step: f64) -> String {
    let decimals = if step >= 1.0 {
        0
    } else {
        (-step.log10().floor()) as usize
    };
    format!("{v:.decimals$}")
}

/// Where things go on the page: margins, the plot area, and the data ranges.
struct Frame {
    w: f64,
    h: f64,
    /// Left and top margins, plot-area width and height (px).
    ml: f64,
    mt: f64,
    pw: f64,
    ph: f64,
    /// Horizontal data range shown.
    x0: f64,
    x1: f64,
    /// Data value at the top of the plot area (room left above for the labels).
    ytop: f64,
    increase_left: bool,
}

impl Frame {
    fn px(&self, x: f64) -> f64 {
        let t = (x - self.x0) / (self.x1 - self.x0);
        if self.increase_left {
            self.ml + self.pw * (1.0 - t)
        } else {
            self.ml + self.pw * t
        }
    }
    fn py(&self, y: f64) -> f64 {
        self.mt + self.ph * (1.0 - y / self.ytop)
    }
    fn inside(&self, x: f64) -> bool {
        x >= self.x0 && x <= self.x1
    }
}

/// Labels of sticks drawn together: (label x px, highest stick, labels, colour).
type LabelGroup = (f64, f64, Vec<String>, String);

impl Plot {
    /// Render to a standalone SVG document (no external resources).
    pub fn render(&self) -> String {
        self.render_clip("plotarea")
    }

    /// Render with `clip` as the id of the plot-area clip path (unique per panel when
    /// several plots share one document).
    fn render_clip(&self, clip: &str) -> String {
        let mut f = self.frame();
        let vis = self.visible_sticks(&f);
        let groups = label_groups(&f, &vis);
        let label_x = label_positions(&groups);
        // Room above the curves for the rotated labels (≈ 6 px per character at 10.5 px).
        let longest = groups
            .iter()
            .map(|g| g.2.join(", ").chars().count())
            .max()
            .unwrap_or(0) as f64;
        let room = ((6.0 * longest + 14.0) / f.ph).clamp(0.12, 0.6);
        f.ytop = self.y_max(&f) / (1.0 - room);
        let mut o = String::new();
        self.header(&mut o, &f, clip);
        self.axes(&mut o, &f);
        self.curves(&mut o, &f, clip);
        sticks(&mut o, &f, &vis);
        self.stick_labels(&mut o, &f, &groups, &label_x);
        self.legend(&mut o, &f);
        o.push_str("</svg>\n");
        o
    }

    /// Page geometry and the horizontal range (`x_range`, or all series and sticks).
    fn frame(&self) -> Frame {
        let (w, h) = (self.width, self.height);
        let (ml, mr, mt, mb) = (60.0, 30.0, 64.0, 58.0);
        let (x0, x1) = self.x_range.unwrap_or_else(|| {
            let mut lo = f64::INFINITY;
            let mut hi = f64::NEG_INFINITY;
            for s in &self.series {
                for &x in &s.x {
                    lo = lo.min(x);
                    hi = hi.max(x);
                }
            }
            for s in &self.sticks {
                lo = lo.min(s.x);
                hi = hi.max(s.x);
            }
            if !lo.is_finite() {
                (0.0, 1.0)
            } else if hi > lo {
                (lo, hi)
            } else {
                (lo - 1.0, hi + 1.0)
            }
        });
        Frame {
            w,
            h,
            ml,
            mt,
            pw: w - ml - mr,
            ph: h - mt - mb,
            x0,
            x1,
            ytop: 1.0,
            increase_left: self.increase_left,
        }
    }

    /// The largest value shown (curves inside the range, every stick); 1 when none is > 0.
    fn y_max(&self, f: &Frame) -> f64 {
        let mut ymax: f64 = 0.0;
        for s in &self.series {
            for (&x, &y) in s.x.iter().zip(&s.y) {
                if f.inside(x) {
                    ymax = ymax.max(y);
                }
            }
        }
        for s in &self.sticks {
            ymax = ymax.max(s.height);
        }
        if !(ymax > 0.0) {
            ymax = 1.0;
        }
        ymax
    }

    /// Sticks inside the range, in drawing order (left to right on the page).
    fn visible_sticks(&self, f: &Frame) -> Vec<&StickMark> {
        let mut vis: Vec<&StickMark> = self.sticks.iter().filter(|s| f.inside(s.x)).collect();
        vis.sort_by(|a, b| f.px(a.x).total_cmp(&f.px(b.x)));
        vis
    }

    /// Document start, background, title, subtitle and the clip region of the plot area.
    fn header(&self, o: &mut String, f: &Frame, clip: &str) {
        let (w, h, ml, mt, pw, ph) = (f.w, f.h, f.ml, f.mt, f.pw, f.ph);
        let _ = writeln!(
            o,
            r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="Helvetica, Arial, sans-serif">"#
        );
        let _ = writeln!(
            o,
            r##"<rect x="0" y="0" width="{w}" height="{h}" fill="#ffffff"/>"##
        );
        let _ = writeln!(
            o,
            r##"<text x="{ml}" y="24" font-size="16" font-weight="bold" fill="#222">{}</text>"##,
            escape(&self.title)
        );
        if !self.subtitle.is_empty() {
            let _ = writeln!(
                o,
                r##"<text x="{ml}" y="42" font-size="11.5" fill="#555">{}</text>"##,
                escape(&self.subtitle)
            );
        }
        // clip region for curves
        let _ = writeln!(
            o,
            r#"<defs><clipPath id="{clip}"><rect x="{ml}" y="{mt}" width="{pw}" height="{ph}"/></clipPath></defs>"#
        );
    }

    /// Ticks, grid lines, both axes and their titles.
    fn axes(&self, o: &mut String, f: &Frame) {
        let (h, ml, mt, pw, ph) = (f.h, f.ml, f.mt, f.pw, f.ph);
        let (ticks, step) = nice_ticks(f.x0, f.x1, 8);
        // minor ticks halfway (or a fifth of the way for 5 × 10^k steps)
        let minor = if (step / 10f64.powf(step.log10().floor()) - 5.0).abs() < 1e-9 {
            step / 5.0
        } else {
            step / 2.0
        };
        let (mticks, _) = nice_ticks_step(f.x0, f.x1, minor);
        for t in &mticks {
            let x = f.px(*t);
            let _ = writeln!(
                o,
                r##"<line x1="{x:.1}" y1="{:.1}" x2="{x:.1}" y2="{:.1}" stroke="#333" stroke-width="0.8"/>"##,
                mt + ph,
                mt + ph + 3.0
            );
        }
        for t in &ticks {
            let x = f.px(*t);
            let _ = writeln!(
                o,
                r##"<line x1="{x:.1}" y1="{mt}" x2="{x:.1}" y2="{:.1}" stroke="#eceef1" stroke-width="1"/>"##,
                mt + ph
            );
            let _ = writeln!(
                o,
                r##"<line x1="{x:.1}" y1="{:.1}" x2="{x:.1}" y2="{:.1}" stroke="#333" stroke-width="1"/>"##,
                mt + ph,
                mt + ph + 5.0
            );
            let _ = writeln!(
                o,
                r##"<text x="{x:.1}" y="{:.1}" font-size="12" text-anchor="middle" fill="#333">{}</text>"##,
                mt + ph + 19.0,
                fmt_tick(*t, step)
            );
        }
        let _ = writeln!(
            o,
            r##"<line x1="{ml}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="#333" stroke-width="1.2"/>"##,
            mt + ph,
            ml + pw,
            mt + ph
        );
        let _ = writeln!(
            o,
            r##"<line x1="{ml}" y1="{mt}" x2="{ml}" y2="{:.1}" stroke="#333" stroke-width="1.2"/>"##,
            mt + ph
        );
        let arrow = if self.increase_left { "← " } else { "" };
        let arrow_r = if self.increase_left { "" } else { " →" };
        let _ = writeln!(
            o,
            r##"<text x="{:.1}" y="{:.1}" font-size="13" text-anchor="middle" fill="#222">{arrow}{}{arrow_r}</text>"##,
            ml + pw / 2.0,
            h - 14.0,
            escape(&self.x_label)
        );
        let _ = writeln!(
            o,
            r##"<text x="18" y="{:.1}" font-size="13" text-anchor="middle" fill="#222" transform="rotate(-90 18 {:.1})">{}</text>"##,
            mt + ph / 2.0,
            mt + ph / 2.0,
            escape(&self.y_label)
        );
    }

    /// Every series as a path (with a light fill under it when asked).
    fn curves(&self, o: &mut String, f: &Frame, clip: &str) {
        for s in &self.series {
            let mut d = String::new();
            let mut first = true;
            for (&x, &y) in s.x.iter().zip(&s.y) {
                if !f.inside(x) {
                    continue;
                }
                let _ = write!(
                    d,
                    "{}{:.2},{:.2} ",
                    if first { "M" } else { "L" },
                    f.px(x),
                    f.py(y.max(0.0))
                );
                first = false;
            }
            if d.is_empty() {
                continue;
            }
            if s.fill {
                let xs: Vec<f64> = s.x.iter().cloned().filter(|&x| f.inside(x)).collect();
                let (a, b) = (xs[0], xs[xs.len() - 1]);
                let _ = writeln!(
                    o,
                    r#"<path d="{d}L{:.2},{:.2} L{:.2},{:.2} Z" fill="{}" fill-opacity="0.12" stroke="none" clip-path="url(#{clip})"/>"#,
                    f.px(b),
                    f.py(0.0),
                    f.px(a),
                    f.py(0.0),
                    s.color
                );
            }
            let dash = if s.dashed {
                r#" stroke-dasharray="5,3""#
            } else {
                ""
            };
            let _ = writeln!(
                o,
                r#"<path d="{d}" fill="none" stroke="{}" stroke-width="{}"{dash} stroke-linejoin="round" clip-path="url(#{clip})"/>"#,
                s.color, s.stroke_width
            );
        }
    }

    /// The rotated labels of the stick groups, above the sticks and every curve near them.
    fn stick_labels(&self, o: &mut String, f: &Frame, groups: &[LabelGroup], label_x: &[f64]) {
        for (g, &lx) in groups.iter().zip(label_x) {
            let text = g.2.join(", ");
            let mut top = f.py(g.1);
            for s in &self.series {
                for (&sx, &sy) in s.x.iter().zip(&s.y) {
                    if f.inside(sx) && (f.px(sx) - lx).abs() < 6.0 {
                        top = top.min(f.py(sy.max(0.0)));
                    }
                }
            }
            let y = (top - 5.0).max(f.mt + 4.0);
            let fill = if g.3.starts_with('#') && g.3 != "#444" {
                g.3.as_str()
            } else {
                "#222"
            };
            let _ = writeln!(
                o,
                r##"<text x="{lx:.2}" y="{y:.2}" font-size="10.5" fill="{fill}" transform="rotate(-90 {lx:.2} {y:.2})">{}</text>"##,
                escape(&text)
            );
        }
    }

    /// The legend of the named series, in the corner away from the high-energy side.
    fn legend(&self, o: &mut String, f: &Frame) {
        let mut ly = f.mt + 12.0;
        for s in self.series.iter().filter(|s| !s.name.is_empty()) {
            let lx = if self.increase_left {
                f.ml + 12.0
            } else {
                f.ml + f.pw - 190.0
            };
            let dash = if s.dashed {
                r#" stroke-dasharray="5,3""#
            } else {
                ""
            };
            let _ = writeln!(
                o,
                r#"<line x1="{lx:.1}" y1="{ly:.1}" x2="{:.1}" y2="{ly:.1}" stroke="{}" stroke-width="{}"{dash}/>"#,
                lx + 22.0,
                s.color,
                s.stroke_width.max(1.5)
            );
            let _ = writeln!(
                o,
                r##"<text x="{:.1}" y="{:.1}" font-size="11.5" fill="#222">{}</text>"##,
                lx + 28.0,
                ly + 4.0,
                escape(&s.name)
            );
            ly += 16.0;
        }
    }
}

/// Several plots stacked in one SVG document under a common title: one panel per element
/// of an XPS spectrum, each with its own energy range (its `title` names the panel, its
/// `subtitle` is not drawn: the figure's is).
pub fn render_panels(title: &str, subtitle: &str, panels: &[Plot]) -> String {
    let width = panels.iter().map(|p| p.width).fold(0.0, f64::max);
    let top = 50.0;
    let height = top + panels.iter().map(|p| p.height).sum::<f64>();
    let mut o = String::new();
    let _ = writeln!(
        o,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" viewBox="0 0 {width} {height}" font-family="Helvetica, Arial, sans-serif">"#
    );
    let _ = writeln!(
        o,
        r##"<rect x="0" y="0" width="{width}" height="{height}" fill="#ffffff"/>"##
    );
    let _ = writeln!(
        o,
        r##"<text x="60" y="24" font-size="16" font-weight="bold" fill="#222">{}</text>"##,
        escape(title)
    );
    let _ = writeln!(
        o,
        r##"<text x="60" y="42" font-size="11.5" fill="#555">{}</text>"##,
        escape(subtitle)
    );
    let mut y = top;
    for (k, p) in panels.iter().enumerate() {
        let panel = Plot {
            subtitle: String::new(),
            ..p.clone()
        };
        let svg = panel.render_clip(&format!("plotarea{}", k + 1));
        // the panel as a nested <svg> placed at its offset
        let _ = write!(
            o,
            "{}",
            svg.replacen("<svg ", &format!(r#"<svg x="0" y="{y}" "#), 1)
        );
        y += p.height;
    }
    o.push_str("</svg>\n");
    o
}

/// Sticks as vertical lines from the axis.
fn sticks(o: &mut String, f: &Frame, vis: &[&StickMark]) {
    for s in vis {
        let x = f.px(s.x);
        let _ = writeln!(
            o,
            r#"<line x1="{x:.2}" y1="{:.2}" x2="{x:.2}" y2="{:.2}" stroke="{}" stroke-width="1.6"/>"#,
            f.py(0.0),
            f.py(s.height),
            s.color
        );
    }
}

/// Labels of same-coloured sticks closer than 13 px are merged ("a, b"); groups without
/// text are dropped; the rest ordered left to right.
fn label_groups(f: &Frame, vis: &[&StickMark]) -> Vec<LabelGroup> {
    let mut groups: Vec<LabelGroup> = Vec::new();
    for s in vis {
        let x = f.px(s.x);
        if let Some(g) = groups
            .iter_mut()
            .rev()
            .take(4)
            .find(|g| g.3 == s.color && (x - g.0).abs() < 13.0)
        {
            if !g.2.contains(&s.label) {
                g.2.push(s.label.clone());
            }
            g.1 = g.1.max(s.height);
            continue;
        }
        groups.push((x, s.height, vec![s.label.clone()], s.color.clone()));
    }
    groups.retain(|g| g.2.iter().any(|l| !l.is_empty()));
    groups.sort_by(|a, b| a.0.total_cmp(&b.0));
    groups
}

/// Label x positions: beside each group's sticks, staggered sideways to stay 12 px apart.
fn label_positions(groups: &[LabelGroup]) -> Vec<f64> {
    let mut label_x: Vec<f64> = Vec::with_capacity(groups.len());
    for g in groups {
        let want = g.0 + 3.5;
        let x = match label_x.last() {
            Some(&prev) if want - prev < 12.0 => prev + 12.0,
            _ => want,
        };
        label_x.push(x);
    }
    label_x
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ticks_are_round() {
        let (t, s) = nice_ticks(11.3, 19.8, 8);
        assert_eq!(s, 2.0);
        assert_eq!(t, vec![12.0, 14.0, 16.0, 18.0]);
        let (_, s) = nice_ticks(285.0, 295.0, 8);
        assert_eq!(s, 2.0);
    }

    #[test]
    fn direction_and_escaping() {
        let p = Plot {
            title: "a < b".into(),
            subtitle: String::new(),
            x_label: "Binding energy (eV)".into(),
            y_label: "Intensity".into(),
            series: vec![Series {
                name: "x".into(),
                x: vec![10.0, 20.0],
                y: vec![1.0, 2.0],
                color: PALETTE[0].into(),
                stroke_width: 1.5,
                fill: false,
                dashed: false,
            }],
            sticks: vec![],
            increase_left: true,
            x_range: None,
            width: 800.0,
            height: 500.0,
        };
        let s = p.render();
        assert!(s.contains("a &lt; b"));
        // first point (x = 10) is drawn at the right edge when energy increases to the left
        assert!(s.contains("M770.00,"), "{s}");
    }
}
