//! Which molecules a shard runs: molecule j (from 0, manifest order) belongs to shard
//! (j mod N) + 1, so shards get similar mixes of sizes. The shard comes from `--shard I/N`
//! (I from 1 to N) or from a scheduler's job-array variables.

use crate::error::{Error, Result};

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// 1-based.
    pub index: usize,
    pub count: usize,
}

impl Shard {
    pub const ALL: Shard = Shard { index: 1, count: 1 };

    /// Parse `I/N`.
    pub fn parse(text: &str) -> Result<Shard> {
        let bad = || {
            Error::input(format!(
                "shard '{text}' is not I/N with 1 ≤ I ≤ N (e.g. 3/10)"
            ))
        };
        let (i, n) = text.split_once('/').ok_or_else(bad)?;
        let (index, count): (usize, usize) = (
            i.trim().parse().map_err(|_| bad())?,
            n.trim().parse().map_err(|_| bad())?,
        );
        if index == 0 || count == 0 || index > count {
            return Err(bad());
        }
        Ok(Shard { index, count })
    }

    /// The shard of a job-array task from the environment, if there is one: Slurm
    /// (`SLURM_ARRAY_TASK_ID`, `SLURM_ARRAY_TASK_MIN`, `SLURM_ARRAY_TASK_COUNT`) or Grid
    /// Engine (`SGE_TASK_ID`, `SGE_TASK_FIRST`, `SGE_TASK_LAST`, `SGE_TASK_STEPSIZE`).
    /// Task ids may start at any number; the shard index is the task's position.
    pub fn from_env(get: impl Fn(&str) -> Option<String>) -> Result<Option<(Shard, &'static str)>> {
        let num = |k: &str| -> Result<Option<i64>> {
            match get(k) {
                None => Ok(None),
                Some(v) if v.trim().is_empty() || v == "undefined" => Ok(None),
                Some(v) => v
                    .trim()
                    .parse()
                    .map(Some)
                    .map_err(|_| Error::input(format!("{k}='{v}' is not a whole number"))),
            }
        };
        if let (Some(id), Some(count)) =
            (num("SLURM_ARRAY_TASK_ID")?, num("SLURM_ARRAY_TASK_COUNT")?)
        {
            let min = num("SLURM_ARRAY_TASK_MIN")?.unwrap_or(0);
            let index = id - min + 1;
            if count < 1 || index < 1 || index > count {
                return Err(Error::input(format!(
                    "the Slurm array variables do not describe a task of a contiguous array (id {id}, min {min}, count {count}): give --shard I/N"
                )));
            }
            return Ok(Some((
                Shard {
                    index: index as usize,
                    count: count as usize,
                },
                "Slurm job array",
            )));
        }
        if let (Some(id), Some(first), Some(last)) = (
            num("SGE_TASK_ID")?,
            num("SGE_TASK_FIRST")?,
            num("SGE_TASK_LAST")?,
        ) {
            let step = num("SGE_TASK_STEPSIZE")?.unwrap_or(1).max(1);
            let count = (last - first) / step + 1;
            let index = (id - first) / step + 1;
            if count < 1 || index < 1 || index > count {
                return Err(Error::input(
                    "the Grid Engine task variables are inconsistent: give --shard I/N",
                ));
            }
            return Ok(Some((
                Shard {
                    index: index as usize,
                    count: count as usize,
                },
                "Grid Engine task array",
            )));
        }
        Ok(None)
    }

    /// Does this shard run molecule `j` (0-based manifest order)?
    pub fn owns(&self, j: usize) -> bool {
        j % self.count == self.index - 1
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shards_partition_the_molecules() {
        let n = 4;
        for j in 0..23 {
            let owners = (1..=n)
                .filter(|&i| Shard { index: i, count: n }.owns(j))
                .count();
            assert_eq!(owners, 1, "molecule {j} has exactly one shard");
        }
        assert!(Shard::parse("0/3").is_err());
        assert!(Shard::parse("4/3").is_err());
        assert_eq!(Shard::parse("2/3").unwrap(), Shard { index: 2, count: 3 });
    }

    #[test]
    fn slurm_arrays_starting_anywhere() {
        let env = |id: &'static str, min: &'static str, count: &'static str| {
            move |k: &str| match k {
                "SLURM_ARRAY_TASK_ID" => Some(id.to_string()),
                "SLURM_ARRAY_TASK_MIN" => Some(min.to_string()),
                "SLURM_ARRAY_TASK_COUNT" => Some(count.to_string()),
                _ => None,
            }
        };
        let (s, _) = Shard::from_env(env("0", "0", "10")).unwrap().unwrap();
        assert_eq!(
            s,
            Shard {
                index: 1,
                count: 10
            }
        );
        let (s, _) = Shard::from_env(env("10", "1", "10")).unwrap().unwrap();
        assert_eq!(
            s,
            Shard {
                index: 10,
                count: 10
            }
        );
        assert!(Shard::from_env(env("12", "1", "10")).is_err());
        assert!(Shard::from_env(|_| None).unwrap().is_none());
    }
}
