//! The `bandcast._native` extension: one function that runs a bandcast command through the
//! same library code as the command line and returns its `--json` output. The Python
//! package around it (`python/bandcast/`) turns keyword options into arguments and the JSON
//! into dictionaries.

use pyo3::create_exception;
use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;

create_exception!(
    _native,
    InputError,
    PyValueError,
    "Bad input: the command line's exit code 2."
);
create_exception!(
    _native,
    ComputationError,
    PyRuntimeError,
    "The computation failed: the command line's exit code 1."
);

/// Run `bandcast ARGS…` (ARGS must include `--json`) and return what it prints.
#[pyfunction]
fn run(py: Python<'_>, args: Vec<String>) -> PyResult<String> {
    let result = py.detach(|| bandcast::cli::run_capturing_json(&args));
    result.map_err(|e| match e.exit_code() {
        2 => InputError::new_err(e.to_string()),
        _ => ComputationError::new_err(e.to_string()),
    })
}

#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(run, m)?)?;
    m.add("InputError", m.py().get_type::<InputError>())?;
    m.add("ComputationError", m.py().get_type::<ComputationError>())?;
    Ok(())
}
