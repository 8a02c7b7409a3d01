//! The one library entry: dispatch a request to the valence methods or the core levels.

use super::notice::Notice;
use super::prediction::Prediction;
use super::request::{CoreMethod, MethodChoice, Request};
use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::ionization::notice::ValenceNotice;
use crate::ionization::valence::{self, ValenceOptions};
use crate::ionization::{Method, Region};
use crate::system::StageEstimate;

/// What a running prediction reports while it works.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Progress {
    /// Core levels: `done` of `total` distinct holes are finished.
    CoreHoles { done: usize, total: usize },
}

/// Predict the bands of `request.molecule`; `progress` is called as stages finish.
pub fn predict(request: &Request, progress: &(dyn Fn(Progress) + Sync)) -> Result<Prediction> {
    match request.region {
        Region::Valence => predict_valence(request),
        Region::Core => predict_core(request, progress),
    }
}

/// The default rule in words, for the note that says which method it chose.
fn default_rule_text(mol: &Molecule) -> String {
    if mol.multiplicity == 1 {
        crate::ionization::default_method::rule_text()
    } else {
        "default method for open shells: dscf (the correlated methods here are closed-shell \
         only)"
            .into()
    }
}

/// The valence options of a request (the method filled in by the caller).
fn valence_options(req: &Request, method: Method) -> ValenceOptions {
    ValenceOptions {
        method,
        count: req.options.count,
        window_ev: req.options.window_max_ev,
        memory_bytes: req.memory_bytes(),
        ..ValenceOptions::default()
    }
}

/// The memory estimate of each stage of the request, from the molecule and basis alone
/// (before any integral): the SCF, then the valence method's MO integrals and amplitudes
/// (the default method as the default rule would choose it), or the core levels' stages
/// (`core_level::memory`: SCF, fitting tensor, ΔMP2 transformation, coupled cluster). Refuses with `Error::TooLarge` when a valence job cannot fit at all.
pub fn memory_estimates(req: &Request) -> Result<Vec<StageEstimate>> {
    use crate::ionization::default_method;
    match (req.region, req.method) {
        (Region::Valence, MethodChoice::Valence(m)) => Ok(default_method::stage_estimates(
            req.molecule,
            req.basis,
            &valence_options(req, m),
            m,
        )),
        (Region::Valence, _) => Ok(default_method::plan_before_work(
            req.molecule,
            req.basis,
            &valence_options(req, Method::Koopmans),
        )?
        .estimates),
        (Region::Core, _) => crate::core_level::memory::stage_estimates(
            req.molecule,
            req.basis,
            &core_options(req, core_method(req)?),
        ),
    }
}

fn predict_valence(req: &Request) -> Result<Prediction> {
    let mol = req.molecule;
    let (method, defaulted) = match req.method {
        MethodChoice::Valence(m) => (m, false),
        MethodChoice::Default => (
            crate::ionization::default_method::choose_with(
                mol,
                req.basis,
                &valence_options(req, Method::Koopmans),
            )
            .method,
            true,
        ),
        MethodChoice::Core(m) => {
            return Err(Error::input(format!(
                "{} is a core-level method; valence bands are computed by {}",
                m.name(),
                Method::ALL.map(Method::name).join(", ")
            )))
        }
    };
    let opts = valence_options(req, method);
    // symmetric within the tolerance → exactly symmetric (the detection `core` uses too)
    use crate::analysis::symmetry::{symmetrize_job, DEFAULT_TOLERANCE};
    let job = symmetrize_job(mol, req.basis, DEFAULT_TOLERANCE);
    let mut r = valence::predict(&job.molecule, &job.basis, &opts)?;
    r.notes
        .extend(ValenceNotice::for_symmetrised(&job, DEFAULT_TOLERANCE));
    let mut notes: Vec<Notice> = r
        .notes
        .iter()
        .map(|n| Notice::MethodNote(n.to_string()))
        .collect();
    if defaulted {
        notes.push(Notice::DefaultMethodChosen {
            method: method.name().into(),
            n_basis: req.basis.n_basis,
            rule: default_rule_text(mol),
        });
    }
    Ok(Prediction {
        region: Region::Valence,
        method: method.name().into(),
        method_defaulted: defaulted,
        basis: req.basis.name.clone(),
        n_basis: req.basis.n_basis,
        bands: r.bands,
        notes,
        warnings: r
            .warnings
            .iter()
            .map(|w| Notice::MethodWarning(w.to_string()))
            .collect(),
    })
}

/// The core method of a request (dscf by default).
fn core_method(req: &Request) -> Result<CoreMethod> {
    match req.method {
        MethodChoice::Default => Ok(CoreMethod::Dscf),
        MethodChoice::Core(m) => Ok(m),
        MethodChoice::Valence(m) => Err(Error::input(format!(
            "core levels are computed by dscf or dmp2, not '{}'",
            m.name()
        ))),
    }
}

/// The core-level options of a request.
fn core_options(req: &Request, method: CoreMethod) -> crate::core_level::CoreOptions {
    use crate::core_level::{CoreOptions, TargetSelection};
    let mut opts = CoreOptions {
        mp2: method == CoreMethod::Dmp2,
        thorough: !req.options.quick,
        photon_ev: req.options.photon_ev,
        memory_bytes: req.options.memory_bytes,
        ..CoreOptions::default()
    };
    if let Some(atoms) = &req.options.atoms {
        opts.targets = TargetSelection::Atoms(atoms.clone());
    } else if let Some(z) = req.options.element {
        opts.targets = TargetSelection::Element(z);
    }
    opts
}

fn predict_core(req: &Request, progress: &(dyn Fn(Progress) + Sync)) -> Result<Prediction> {
    let method = core_method(req)?;
    let opts = core_options(req, method);
    let r = core_levels(req.molecule, req.basis, &opts, progress)?;
    Ok(Prediction {
        region: Region::Core,
        method: method.name().into(),
        method_defaulted: req.method == MethodChoice::Default,
        basis: req.basis.name.clone(),
        n_basis: r.n_basis,
        bands: r.bands(),
        notes: r
            .notes
            .iter()
            .map(|n| Notice::MethodNote(n.to_string()))
            .collect(),
        warnings: Vec::new(),
    })
}

/// The one call into the core-level code (the path to fix when it moves).
fn core_levels(
    mol: &Molecule,
    basis: &BasisSet,
    opts: &crate::core_level::CoreOptions,
    progress: &(dyn Fn(Progress) + Sync),
) -> Result<crate::core_level::CoreResult> {
    crate::core_level::predict_with_progress(mol, basis, opts, &|done, total| {
        progress(Progress::CoreHoles { done, total })
    })
}
