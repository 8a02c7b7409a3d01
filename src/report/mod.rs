//! Printers and output files: results are plain structs; these render them as text
//! (`text`), JSON (`json`, serde structs only; keys in docs/json.md), CSV (`csv`), SVG
//! (`svg`, with the plots of each command in `figures`) and HTML (`html`). `runs` holds what
//! a printer is given besides the result (method, basis, inputs, titles).
pub mod atomic_write;
pub mod csv;
pub mod figures;
pub mod html;
pub mod json;
pub mod runs;
pub mod svg;
pub mod text;
pub mod vibronic;

pub use atomic_write::write_atomic;
