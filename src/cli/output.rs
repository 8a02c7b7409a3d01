//! Where a command's JSON goes: stdout, or a buffer when the caller captures it
//! (`cli::run_capturing_json`, used by the Python module). One function for every command,
//! so the captured text is byte for byte what the command line prints.

use std::cell::RefCell;

use crate::Result;

thread_local! {
    static CAPTURED: RefCell<Option<String>> = const { RefCell::new(None) };
}

/// Print one JSON document (followed by a newline), or keep it when capturing.
pub fn emit_json(text: &str) {
    let kept = CAPTURED.with(|c| {
        if let Some(buf) = c.borrow_mut().as_mut() {
            buf.push_str(text);
            buf.push('\n');
            true
        } else {
            false
        }
    });
    if !kept {
        println!("{text}");
    }
}

/// Run `f` with JSON output captured; the text it emitted.
pub fn capture(f: impl FnOnce() -> Result<()>) -> Result<String> {
    CAPTURED.with(|c| *c.borrow_mut() = Some(String::new()));
    let r = f();
    let text = CAPTURED.with(|c| c.borrow_mut().take()).unwrap_or_default();
    r.map(|_| text)
}
