//! Where the store lives when the caller does not say.

use std::ffi::OsString;
use std::path::{Path, PathBuf};

use crate::error::CacheError;

/// Environment variable naming the cache directory.
pub const DIR_ENV: &str = "KERNSTEP_CACHE_DIR";

/// Resolves the cache directory: `explicit` if given, else `$KERNSTEP_CACHE_DIR` if set and
/// non-empty, else the platform cache directory plus `kernstep` (on Linux
/// `$XDG_CACHE_HOME/kernstep` or `~/.cache/kernstep`).
pub fn default_dir(explicit: Option<&Path>) -> Result<PathBuf, CacheError> {
    let platform = directories::BaseDirs::new().map(|b| b.cache_dir().join("kernstep"));
    resolve_dir(explicit, std::env::var_os(DIR_ENV), platform)
}

/// The resolution rule of [`default_dir`] with its inputs passed in (testable without
/// touching the process environment).
pub fn resolve_dir(
    explicit: Option<&Path>,
    env_value: Option<OsString>,
    platform: Option<PathBuf>,
) -> Result<PathBuf, CacheError> {
    if let Some(dir) = explicit {
        return Ok(dir.to_owned());
    }
    match env_value {
        Some(v) if !v.is_empty() => Ok(PathBuf::from(v)),
        _ => platform.ok_or(CacheError::NoDefaultDir),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn explicit_then_env_then_platform() {
        let p = |s: &str| PathBuf::from(s);
        let plat = Some(p("/plat/kernstep"));
        let env = Some(OsString::from("/env"));
        assert_eq!(
            resolve_dir(Some(&p("/x")), env.clone(), plat.clone()).unwrap(),
            p("/x")
        );
        assert_eq!(resolve_dir(None, env, plat.clone()).unwrap(), p("/env"));
        assert_eq!(
            resolve_dir(None, Some(OsString::new()), plat.clone()).unwrap(),
            p("/plat/kernstep")
        );
        assert_eq!(resolve_dir(None, None, plat).unwrap(), p("/plat/kernstep"));
        assert!(matches!(
            resolve_dir(None, None, None),
            Err(CacheError::NoDefaultDir)
        ));
    }
}
