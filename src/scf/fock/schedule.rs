//! Running a fixed list of chunks on the rayon pool with dynamic load balancing and a sum in
//! chunk order.
//!
//! Workers take the next chunk index from a shared counter (so a slow chunk does not hold
//! the others up), compute the chunk's partial result in an accumulator of their own, and
//! hand it to an ordered reducer: partial k is added to the total only after partials
//! 0 … k−1, whichever thread finished them. The total is therefore
//! ((p₀ + p₁) + p₂) + … on any number of threads, bit for bit. Accumulators are recycled;
//! at most about (threads + the chunks finished out of order) exist at once.

use std::collections::BTreeMap;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;

/// Something chunk partials are summed into.
pub trait Partial: Send {
    /// Reset to zero (reuse for the next chunk).
    fn clear(&mut self);
    /// self += other.
    fn add(&mut self, other: &Self);
}

struct Reducer<T> {
    next_to_add: usize,
    pending: BTreeMap<usize, T>,
    total: T,
    spare: Vec<T>,
}

/// Sum of `work(k, acc)` over chunks k = 0 … n_chunks−1, each started from a cleared
/// accumulator, added in chunk order. `new` makes a zero accumulator.
pub fn ordered_sum<T, N, W>(n_chunks: usize, new: N, work: W) -> T
where
    T: Partial,
    N: Fn() -> T + Sync,
    W: Fn(usize, &mut T) + Sync,
{
    let next = AtomicUsize::new(0);
    let state = Mutex::new(Reducer {
        next_to_add: 0,
        pending: BTreeMap::new(),
        total: new(),
        spare: Vec::new(),
    });
    let workers = rayon::current_num_threads().min(n_chunks).max(1);
    let worker = || {
        let mut acc: Option<T> = None;
        loop {
            let k = next.fetch_add(1, Ordering::Relaxed);
            if k >= n_chunks {
                break;
            }
            let mut a = match acc.take() {
                Some(a) => a,
                None => {
                    let spare = state.lock().expect("reducer poisoned").spare.pop();
                    spare.unwrap_or_else(&new)
                }
            };
            a.clear();
            // faer code that ran on this thread may have left the vector registers in a
            // state that slows the SSE-encoded loops below (see bandcast_linalg).
            bandcast_linalg::clear_vector_state();
            work(k, &mut a);
            let mut st = state.lock().expect("reducer poisoned");
            st.pending.insert(k, a);
            loop {
                let want = st.next_to_add;
                let Some(p) = st.pending.remove(&want) else {
                    break;
                };
                st.total.add(&p);
                st.spare.push(p);
                st.next_to_add += 1;
            }
            acc = st.spare.pop();
        }
    };
    if workers == 1 {
        worker();
    } else {
        rayon::scope(|s| {
            for _ in 0..workers {
                s.spawn(|_| worker());
            }
        });
    }
    let st = state.into_inner().expect("reducer poisoned");
    debug_assert_eq!(st.next_to_add, n_chunks);
    st.total
}

#[cfg(test)]
mod tests {
    use super::*;

    struct Sum(Vec<f64>);
    impl Partial for Sum {
        fn clear(&mut self) {
            self.0.iter_mut().for_each(|x| *x = 0.0);
        }
        fn add(&mut self, o: &Self) {
            self.0.iter_mut().zip(&o.0).for_each(|(a, b)| *a += b);
        }
    }

    fn run(threads: usize) -> Vec<f64> {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            ordered_sum(
                97,
                || Sum(vec![0.0; 3]),
                |k, acc| {
                    // uneven work and values whose sum depends on the order
                    let mut x = 0.0;
                    for i in 0..(k % 7) * 1000 {
                        x += ((i + k) as f64).sin() * 1e-3;
                    }
                    acc.0[0] += 1.0 / (k as f64 + 1.0) + x;
                    acc.0[1] += 1e16 * (k % 2) as f64 - 1e16 * ((k + 1) % 2) as f64;
                    acc.0[2] += k as f64;
                },
            )
            .0
        })
    }

    #[test]
    fn same_bits_on_any_thread_count() {
        let a = run(1);
        for t in [2, 3, 4] {
            let b = run(t);
            assert_eq!(
                a.iter().map(|x| x.to_bits()).collect::<Vec<_>>(),
                b.iter().map(|x| x.to_bits()).collect::<Vec<_>>()
            );
        }
        assert_eq!(a[2], (0..97).sum::<usize>() as f64);
    }
}
