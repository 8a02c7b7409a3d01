//! In-core Fock builds: every unique, Schwarz-significant shell quartet (8-fold symmetry at
//! shell level) is computed once and kept in memory, already multiplied by its degeneracy;
//! each build only contracts the stored blocks with the densities.

use rayon::prelude::*;

use bandcast_linalg::Mat;

use super::digest::{Accumulator, Densities};
use super::quartets::{degeneracy, QuartetPlan};
use super::schedule::ordered_sum;
use super::source::EriSource;
use super::{FockBuilder, Jk};
use crate::error::{Error, Result};

/// Stored blocks of one chunk: quartet shell indices and their values (times the
/// degeneracy), concatenated.
struct ChunkStore {
    quartets: Vec<[u32; 4]>,
    values: Vec<f64>,
}

pub struct InCoreFock {
    n: usize,
    sizes: Vec<usize>,
    offsets: Vec<usize>,
    chunks: Vec<ChunkStore>,
    bytes: usize,
}

impl InCoreFock {
    /// Bytes the store would need for this plan.
    pub fn estimate_bytes(plan: &QuartetPlan) -> usize {
        plan.n_integrals * 8 + plan.n_quartets * 16
    }

    /// Compute and store all significant unique quartets, or refuse if they exceed `budget`.
    pub fn new(src: &dyn EriSource, plan: &QuartetPlan, budget: usize) -> Result<Self> {
        let need = Self::estimate_bytes(plan);
        if need > budget {
            return Err(Error::TooLarge(format!(
                "in-core ERIs need {}, over the memory budget of {}",
                crate::system::format_bytes(need as f64),
                crate::system::format_bytes(budget as f64)
            )));
        }
        let sizes = src.shell_sizes().to_vec();
        // Exact sizes per chunk, so each store is allocated once.
        let chunk_len = |range: &std::ops::Range<usize>| {
            let (mut nq, mut nv) = (0, 0);
            for p in range.clone() {
                let (a, b) = plan.pairs[p];
                for r in 0..=p {
                    if plan.q[p] * plan.q[r] >= plan.threshold {
                        let (c, d) = plan.pairs[r];
                        nq += 1;
                        nv += sizes[a] * sizes[b] * sizes[c] * sizes[d];
                    }
                }
            }
            (nq, nv)
        };
        let chunks: Vec<ChunkStore> = plan
            .chunks
            .par_iter()
            .with_max_len(1)
            .map(|range| {
                bandcast_linalg::clear_vector_state();
                let (nq, nv) = chunk_len(range);
                let mut st = ChunkStore {
                    quartets: Vec::with_capacity(nq),
                    values: Vec::with_capacity(nv),
                };
                let mut buf = Vec::new();
                for p in range.clone() {
                    let (a, b) = plan.pairs[p];
                    for r in 0..=p {
                        if plan.q[p] * plan.q[r] < plan.threshold {
                            continue;
                        }
                        let (c, d) = plan.pairs[r];
                        src.quartet(a, b, c, d, &mut buf);
                        let g = degeneracy(a, b, c, d);
                        st.quartets.push([a as u32, b as u32, c as u32, d as u32]);
                        st.values.extend(buf.iter().map(|v| v * g));
                    }
                }
                st
            })
            .collect();
        let bytes = chunks
            .iter()
            .map(|c| c.values.len() * 8 + c.quartets.len() * 16)
            .sum();
        Ok(InCoreFock {
            n: src.n_basis(),
            sizes,
            offsets: src.shell_offsets().to_vec(),
            chunks,
            bytes,
        })
    }

    pub fn bytes(&self) -> usize {
        self.bytes
    }
}

impl FockBuilder for InCoreFock {
    fn describe(&self) -> String {
        format!(
            "in-core ({:.1} MiB of unique integrals)",
            self.bytes as f64 / (1u64 << 20) as f64
        )
    }

    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>> {
        let dens = Densities::new(densities, &self.sizes, &self.offsets);
        let (n, sizes, offsets, chunks) = (self.n, &self.sizes, &self.offsets, &self.chunks);
        let total = ordered_sum(
            chunks.len(),
            || Accumulator::new(n, densities.len()),
            |k, acc| {
                let st = &chunks[k];
                let mut pos = 0;
                for q in &st.quartets {
                    let [a, b, c, d] = q.map(|x| x as usize);
                    let size = [sizes[a], sizes[b], sizes[c], sizes[d]];
                    let len = size[0] * size[1] * size[2] * size[3];
                    acc.add_block(
                        &st.values[pos..pos + len],
                        [offsets[a], offsets[b], offsets[c], offsets[d]],
                        size,
                        1.0,
                        &dens,
                    );
                    pos += len;
                }
            },
        );
        Ok(total.finish())
    }
}
