//! Per-thread cache of the blocks of general-contraction family quartets.
//!
//! The engine computes a quartet of family pairs (F_a F_b|F_c F_d) for all member pairs at
//! once (the primitive work is shared). Callers ask for the members one at a time, usually
//! close together (any loop over bra pairs in order does), so the whole set is kept here and
//! the later members are copies. The values do not depend on which member was asked first,
//! so results are the same whatever the call order or thread count.
//!
//! One arena of values per thread, indexed by (bra unit, ket unit) through a hash map with a
//! cheap multiplicative hash; everything is dropped when the arena exceeds `LIMIT` values or
//! when another engine uses the cache.

use std::collections::HashMap;
use std::hash::{BuildHasherDefault, Hasher};

/// Values kept per thread before the cache is cleared (32 MiB).
pub const LIMIT: usize = 4 << 20;

/// Fibonacci hashing of one u64 key (keys are pairs of small integers).
#[derive(Default)]
pub struct KeyHasher(u64);

impl Hasher for KeyHasher {
    fn finish(&self) -> u64 {
        self.0
    }
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.0 = (self.0.rotate_left(8) ^ b as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15);
        }
    }
    fn write_u64(&mut self, x: u64) {
        self.0 = (x ^ (x >> 29)).wrapping_mul(0x9E37_79B9_7F4A_7C15);
    }
}

#[derive(Default)]
pub struct FamilyCache {
    engine: u64,
    index: HashMap<u64, usize, BuildHasherDefault<KeyHasher>>,
    arena: Vec<f64>,
}

impl FamilyCache {
    /// The `len` values stored for `key` of engine `engine`, computed by `compute` (which
    /// fills a zeroed slice) when absent.
    pub fn get_or_compute(
        &mut self,
        engine: u64,
        key: u64,
        len: usize,
        compute: impl FnOnce(&mut [f64]),
    ) -> &[f64] {
        if self.engine != engine {
            self.index.clear();
            self.arena.clear();
            self.engine = engine;
        }
        let start = match self.index.get(&key) {
            Some(&s) => s,
            None => {
                if self.arena.len() + len > LIMIT {
                    self.index.clear();
                    self.arena.clear();
                }
                let s = self.arena.len();
                self.arena.resize(s + len, 0.0);
                compute(&mut self.arena[s..s + len]);
                self.index.insert(key, s);
                s
            }
        };
        &self.arena[start..start + len]
    }
}
