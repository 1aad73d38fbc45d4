//! Atomic output and the `--data-out` JSON.

use std::path::Path;

use super::error::ReportError;
use super::model::{ReportModel, ReportTime};

/// Writes `bytes` to `path` through a temporary file in the same directory that is renamed into
/// place (see [`crate::fsio::write_atomic`]: the Ctrl-C handler removes it when interrupted), so a
/// reader never sees a partial file and a failure leaves none behind.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), ReportError> {
    if path.is_dir() {
        return Err(ReportError::io(
            "write",
            path,
            std::io::Error::new(std::io::ErrorKind::IsADirectory, "is a directory"),
        ));
    }
    crate::fsio::write_bytes_atomic(path, bytes).map_err(|e| ReportError::io("write", path, e))
}

/// The numbers behind the report (the model itself, numbers as numbers; missing or
/// non-finite values as `null`) as pretty JSON: the bytes of the `--data-out` file.
pub fn data_json_bytes(model: &ReportModel) -> Result<Vec<u8>, ReportError> {
    let mut bytes = serde_json::to_vec_pretty(model)
        .map_err(|e| ReportError::Model(format!("cannot serialise the report data: {e}")))?;
    bytes.push(b'\n');
    Ok(bytes)
}

/// Writes [`data_json_bytes`] atomically.
pub fn write_data_json(model: &ReportModel, path: &Path) -> Result<(), ReportError> {
    write_atomic(path, &data_json_bytes(model)?)
}

/// The report date from `SOURCE_DATE_EPOCH`, if that variable is set (reproducible builds
/// convention); an unusable value is an error rather than silently ignored.
pub fn timestamp_from_env() -> Result<Option<ReportTime>, ReportError> {
    match std::env::var("SOURCE_DATE_EPOCH") {
        Ok(v) => ReportTime::from_source_date_epoch(&v)
            .map(Some)
            .map_err(ReportError::Timestamp),
        Err(std::env::VarError::NotPresent) => Ok(None),
        Err(std::env::VarError::NotUnicode(_)) => Err(ReportError::Timestamp(
            "SOURCE_DATE_EPOCH is not valid text".to_string(),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_and_leaves_no_temporary_files() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("out.pdf");
        write_atomic(&p, b"one").unwrap();
        write_atomic(&p, b"two").unwrap();
        assert_eq!(std::fs::read(&p).unwrap(), b"two");
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
    }

    #[test]
    fn unwritable_target_is_an_error_naming_the_path() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("missing-dir").join("out.pdf");
        let e = write_atomic(&p, b"x").unwrap_err().to_string();
        assert!(e.contains("missing-dir"), "{e}");
        let e = write_atomic(dir.path(), b"x").unwrap_err().to_string();
        assert!(e.contains("directory"), "{e}");
    }

    #[test]
    fn data_json_keeps_numbers_as_numbers() {
        let model = crate::report::example::example_model(1);
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("data.json");
        write_data_json(&model, &p).unwrap();
        let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&p).unwrap()).unwrap();
        let q = &v["sites"][0]["projection"][0]["seasons"][0]["points"][0]["omega_ar"]["p50"];
        assert!(q.is_f64(), "{q}");
    }
}
