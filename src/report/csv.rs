//! CSV printer of a broadened spectrum: one row per grid point, columns energy, total,
//! then one column per input (mixture component).

use std::fmt::Write;

use crate::spectrum::broaden::Curve;
use crate::spectrum::photon::Axis;

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// CSV text of `curve` (header line, then rows).
pub fn curve_csv(curve: &Curve) -> String {
    let mut o = String::new();
    let e = match curve.axis {
        Axis::Binding => "binding_energy_ev",
        Axis::Kinetic => "kinetic_energy_ev",
    };
    o.push_str(e);
    o.push_str(",intensity");
    let with_components = curve.components.len() > 1;
    if with_components {
        for n in &curve.component_names {
            o.push(',');
            o.push_str(&csv_field(n));
        }
    }
    o.push('\n');
    for i in 0..curve.energy_ev.len() {
        let _ = write!(o, "{:.4},{:.6e}", curve.energy_ev[i], curve.total[i]);
        if with_components {
            for c in &curve.components {
                let _ = write!(o, ",{:.6e}", c[i]);
            }
        }
        o.push('\n');
    }
    o
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn header_and_rows() {
        let c = Curve {
            axis: Axis::Binding,
            energy_ev: vec![1.0, 2.0],
            total: vec![0.5, 1.5],
            components: vec![vec![0.5, 1.0], vec![0.0, 0.5]],
            component_names: vec!["a".into(), "b,c".into()],
        };
        let s = curve_csv(&c);
        let lines: Vec<&str> = s.lines().collect();
        assert_eq!(lines[0], "binding_energy_ev,intensity,a,\"b,c\"");
        assert_eq!(lines.len(), 3);
        assert!(lines[2].starts_with("2.0000,1.5"));
    }
}
