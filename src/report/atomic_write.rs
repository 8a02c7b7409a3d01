//! Output files are written whole or not at all: a temporary file beside the target,
//! then a rename.

use std::io::Write;
use std::path::Path;

use crate::error::{Error, Result};

pub fn write_atomic(path: &Path, contents: &[u8]) -> Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let fname = path
        .file_name()
        .ok_or_else(|| Error::input_at(path, None, "not a file name"))?
        .to_string_lossy()
        .into_owned();
    let tmp = dir.join(format!(".{fname}.{}.tmp", std::process::id()));
    let result = (|| -> std::io::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(contents)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    result.map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        Error::input_at(path, None, format!("cannot write the output file: {e}"))
    })
}

#[cfg(test)]
mod tests {
    #[test]
    fn writes_whole_file() {
        let dir = std::env::temp_dir().join(format!("bandcast-aw-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("out.txt");
        super::write_atomic(&p, b"hello").unwrap();
        assert_eq!(std::fs::read(&p).unwrap(), b"hello");
        assert!(super::write_atomic(&dir.join("no/such/dir/x.txt"), b"x").is_err());
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
