//! Reading a dataset from disk (command line and tests; not in the browser).
//!
//! A dataset reads only files inside its own folder: the manifest's names are checked
//! first ([`super::file_name_problem`]), and each file is then resolved (links followed)
//! and must still lie inside the manifest's folder, be a regular file and be at most
//! [`MAX_FILE_BYTES`] long. A refusal names the file as the manifest gives it and never
//! shows anything of what the file holds.

use super::{Dataset, Sources, MANIFEST, MAX_FILE_BYTES};
use crate::error::{DatasetError, Location, Problem};
use std::path::{Path, PathBuf};

fn refuse(name: &str, message: String) -> DatasetError {
    DatasetError {
        problems: vec![Problem::new(name, Location::File, None, message)],
        more: vec![],
    }
}

/// Read `path`, which must resolve to a regular file inside `folder` (when given).
fn read(path: &Path, name: &str, folder: Option<&Path>) -> Result<String, DatasetError> {
    let cannot = |e: std::io::Error| refuse(name, format!("cannot read {}: {e}", path.display()));
    let resolved = path.canonicalize().map_err(cannot)?;
    if let Some(folder) = folder {
        if !resolved.starts_with(folder) {
            return Err(refuse(
                name,
                "is outside the dataset's folder (a link that leads elsewhere): a dataset \
                 reads only the files in its own folder"
                    .into(),
            ));
        }
    }
    let meta = std::fs::metadata(&resolved).map_err(cannot)?;
    if !meta.is_file() {
        return Err(refuse(
            name,
            "expected a file, found a folder or a device".into(),
        ));
    }
    if meta.len() > MAX_FILE_BYTES {
        return Err(refuse(
            name,
            format!(
                "is {} bytes long; a dataset's files may be at most {MAX_FILE_BYTES} bytes",
                meta.len()
            ),
        ));
    }
    let bytes = std::fs::read(&resolved).map_err(cannot)?;
    String::from_utf8(bytes).map_err(|e| {
        refuse(
            name,
            format!(
                "expected text in UTF-8; byte {} is not valid UTF-8",
                e.utf8_error().valid_up_to() + 1
            ),
        )
    })
}

/// Load a dataset from its manifest's path, or a folder holding `dataset.json`.
pub fn load_path(path: &Path) -> Result<Dataset, DatasetError> {
    let manifest_path: PathBuf = if path.is_dir() {
        path.join(MANIFEST)
    } else {
        path.to_path_buf()
    };
    let manifest = read(&manifest_path, MANIFEST, None)?;
    // The manifest was read, so its resolved path and folder exist.
    let folder = manifest_path
        .canonicalize()
        .ok()
        .and_then(|p| p.parent().map(Path::to_path_buf))
        .ok_or_else(|| refuse(MANIFEST, "cannot find the manifest's folder".into()))?;
    let files = super::manifest_files(&manifest)?;
    let dir = manifest_path.parent().unwrap_or(Path::new("."));
    let load = |name: &str| read(&dir.join(name), name, Some(&folder));
    let districts = load(&files.districts);
    let electorate = load(&files.electorate);
    let poll = files.poll.as_deref().map(load).transpose();
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
