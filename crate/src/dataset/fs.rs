//! Reading a dataset from disk (command line and tests; not in the browser).

use super::{Dataset, Sources, MANIFEST};
use crate::error::{DatasetError, Location, Problem};
use std::path::{Path, PathBuf};

fn read(path: &Path, name: &str) -> Result<String, DatasetError> {
    std::fs::read_to_string(path).map_err(|e| DatasetError {
        problems: vec![Problem::new(
            name,
            Location::File,
            None,
            format!("cannot read {}: {e}", path.display()),
        )],
        more: vec![],
    })
}

/// Load a dataset from its manifest's path, or a folder holding `dataset.json`.
pub fn load_path(path: &Path) -> Result<Dataset, DatasetError> {
    let manifest_path: PathBuf = if path.is_dir() {
        path.join(MANIFEST)
    } else {
        path.to_path_buf()
    };
    let dir = manifest_path.parent().unwrap_or(Path::new("."));
    let manifest = read(&manifest_path, MANIFEST)?;
    let files = super::manifest_files(&manifest)?;
    let districts = read(&dir.join(&files.districts), &files.districts);
    let electorate = read(&dir.join(&files.electorate), &files.electorate);
    let poll = files
        .poll
        .as_ref()
        .map(|p| read(&dir.join(p), p))
        .transpose();
    let mut error = DatasetError::default();
    for r in [&districts, &electorate] {
        if let Err(e) = r {
            error.problems.extend(e.problems.iter().cloned());
        }
    }
    if let Err(e) = &poll {
        error.problems.extend(e.problems.iter().cloned());
    }
    if !error.is_empty() {
        return Err(error);
    }
    let (Ok(districts), Ok(electorate), Ok(poll)) = (districts, electorate, poll) else {
        return Err(error);
    };
    Dataset::from_sources(&Sources {
        manifest: &manifest,
        districts: &districts,
        electorate: &electorate,
        poll: poll.as_deref(),
    })
}
