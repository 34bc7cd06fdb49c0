//! Links the HDF5 C library statically when its archive `libhdf5.a` is installed beside the
//! shared one (Debian's and Ubuntu's `libhdf5-dev` ship both), else leaves the shared
//! library that `hdf5-metno-sys` chose.
//!
//! Why: the shared `libhdf5` of those distributions pulls some thirty more shared libraries
//! at start (a network client and its TLS stack among them, for a remote-file driver
//! boreflux never uses), and resolving them cost every `boreflux` process about 5 ms
//! before `main` (measured: `perf stat` of a program that only links the library, 5.6 ms
//! shared against 1.0 ms static). The archive's objects for that driver are not linked:
//! nothing boreflux calls refers to them.
//!
//! How: `hdf5-metno-sys` asks for `-lhdf5`. A directory of this build's own that holds
//! only a link to the archive is searched before the system's (the linker takes the first
//! directory holding either `libhdf5.so` or `libhdf5.a`), and the libraries the archive
//! itself needs (zlib, szip) are added. `BOREFLUX_HDF5_SHARED=1` keeps the shared library.

use std::path::{Path, PathBuf};
use std::process::Command;

fn main() {
    println!("cargo::rerun-if-changed=build.rs");
    println!("cargo::rerun-if-env-changed=BOREFLUX_HDF5_SHARED");
    println!("cargo::rerun-if-env-changed=HDF5_DIR");
    // Set when the archive is linked, for the test that checks it (`output/h5.rs`).
    println!("cargo::rustc-check-cfg=cfg(hdf5_static)");
    let target_os = std::env::var("CARGO_CFG_TARGET_OS").unwrap_or_default();
    if target_os != "linux"
        || std::env::var_os("BOREFLUX_HDF5_SHARED").is_some_and(|v| v == "1")
        || std::env::var_os("HDF5_DIR").is_some()
    {
        return;
    }
    let Some(archive) = library_dirs()
        .into_iter()
        .map(|d| d.join("libhdf5.a"))
        .find(|a| a.is_file())
    else {
        return;
    };
    // The shared libraries the archive calls (the distribution's `libhdf5-dev` depends on
    // their development packages): without them, stay with the shared HDF5.
    let system = system_dirs();
    let deps = ["sz", "z"];
    if !deps
        .iter()
        .all(|l| system.iter().any(|d| d.join(format!("lib{l}.so")).exists()))
    {
        return;
    }
    let out = PathBuf::from(std::env::var_os("OUT_DIR").expect("cargo sets OUT_DIR"));
    let dir = out.join("hdf5-static");
    let link = dir.join("libhdf5.a");
    std::fs::create_dir_all(&dir).expect("cannot create the HDF5 link directory");
    let _ = std::fs::remove_file(&link);
    if !link_to(&archive, &link) {
        return;
    }
    println!("cargo::rustc-link-search=native={}", dir.display());
    println!("cargo::rustc-cfg=hdf5_static");
    // As linker arguments, which reach every binary, test and bench of the package (a
    // `rustc-link-lib` reaches only those that use the library target) and come after the
    // archive on the command line.
    for lib in deps {
        println!("cargo::rustc-link-arg=-l{lib}");
    }
}

/// Makes `link` a symbolic link to `archive`; false where the host has none (the build then
/// keeps the shared library).
#[cfg(unix)]
fn link_to(archive: &Path, link: &Path) -> bool {
    std::os::unix::fs::symlink(archive, link).expect("cannot link the HDF5 archive");
    true
}

#[cfg(not(unix))]
fn link_to(_: &Path, _: &Path) -> bool {
    false
}

/// Where the HDF5 libraries may be: pkg-config's `-L` directories for `hdf5`, then the
/// Debian/Ubuntu locations of the serial build.
fn library_dirs() -> Vec<PathBuf> {
    let mut dirs = Vec::new();
    if let Ok(out) = Command::new("pkg-config")
        .args(["--libs-only-L", "hdf5"])
        .output()
    {
        if out.status.success() {
            let text = String::from_utf8_lossy(&out.stdout);
            dirs.extend(
                text.split_whitespace()
                    .filter_map(|f| f.strip_prefix("-L"))
                    .map(PathBuf::from),
            );
        }
    }
    dirs.extend(system_dirs().into_iter().map(|d| d.join("hdf5/serial")));
    dirs
}

/// The system's library directories: the Debian/Ubuntu multiarch one, then `/usr/lib`.
fn system_dirs() -> [PathBuf; 2] {
    let arch = std::env::var("CARGO_CFG_TARGET_ARCH").unwrap_or_default();
    [
        Path::new("/usr/lib").join(format!("{arch}-linux-gnu")),
        PathBuf::from("/usr/lib"),
    ]
}
