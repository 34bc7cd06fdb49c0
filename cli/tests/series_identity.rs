//! The shipped scenarios give bit-identical `/series` and `/cycles` datasets to the digests
//! recorded in `cli/tests/data/series-digests.json`: a refactoring of the writers or the solver
//! that changes any written number, or any dataset name, fails here.
//!
//! The digests were recorded from the `boreflux` binary built at commit e022fe4 (before the
//! output schema) and recorded again when water-column inertia and damage removal changed the
//! numbers (the merge of the output schema with them), by running this test with
//! `BOREFLUX_RECORD_DIGESTS=1 BOREFLUX_BIN=<that binary>`; a deliberate change of the numbers
//! records them again the same way with the new binary, and says so in its commit. They were
//! recorded again when the well row's root finder changed to Newton from a lazy bracket
//! (roots equal to round-off; where an adaptive run's step choice flipped on that round-off,
//! its series moved within the time-step error control: `scripts/compare-series.py`).
//! Recorded again when cycle jumping began to hold decaying heads that move less than the
//! steps' tolerance over a jump: only the monitoring demo changed (it jumps 30 cycles
//! instead of 24; series within 1.4e-4 of the earlier build at common step times, headline
//! figures within 1.2e-6 of full stepping).
//! Digest: FNV-1a (64 bit) over the length and the IEEE-754 bits of every value, in file order.

use hdf5::File;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

fn fnv1a(values: &[f64]) -> String {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    let mut eat = |x: u64| {
        for b in x.to_le_bytes() {
            h ^= u64::from(b);
            h = h.wrapping_mul(0x0100_0000_01b3);
        }
    };
    eat(values.len() as u64);
    for v in values {
        eat(v.to_bits());
    }
    format!("{h:016x}")
}

/// Every dataset below `group`, by path, with its digest.
fn digests(file: &File, group: &str, out: &mut BTreeMap<String, String>) {
    let g = file.group(group).unwrap();
    for name in g.member_names().unwrap() {
        let path = format!("{group}/{name}");
        if let Ok(ds) = file.dataset(&path) {
            let v: Vec<f64> = ds.read_raw::<f64>().unwrap();
            out.insert(path, fnv1a(&v));
        } else {
            digests(file, &path, out);
        }
    }
}

fn scenarios(root: &Path) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root.join("cases"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "json"))
        .collect();
    v.sort();
    v
}

#[test]
fn shipped_scenarios_write_the_recorded_series_bit_for_bit() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let data = root.join("cli/tests/data/series-digests.json");
    let bin = std::env::var_os("BOREFLUX_BIN").map_or_else(
        || PathBuf::from(env!("CARGO_BIN_EXE_boreflux")),
        PathBuf::from,
    );
    let dir = tempfile::tempdir().unwrap();
    let mut found: BTreeMap<String, BTreeMap<String, String>> = BTreeMap::new();
    for case in scenarios(&root) {
        let stem = case.file_stem().unwrap().to_string_lossy().into_owned();
        let out = dir.path().join(format!("{stem}.h5"));
        let status = std::process::Command::new(&bin)
            .arg("run")
            .arg(&case)
            .arg("-o")
            .arg(&out)
            .arg("--json")
            .stdout(std::process::Stdio::null())
            .status()
            .unwrap();
        assert!(status.success(), "{stem}: run failed");
        let file = File::open(&out).unwrap();
        let mut d = BTreeMap::new();
        digests(&file, "series", &mut d);
        digests(&file, "cycles", &mut d);
        found.insert(stem, d);
    }
    if std::env::var_os("BOREFLUX_RECORD_DIGESTS").is_some() {
        let text = serde_json::to_string_pretty(&found).unwrap();
        std::fs::write(&data, text + "\n").unwrap();
        return;
    }
    let recorded: BTreeMap<String, BTreeMap<String, String>> =
        serde_json::from_str(&std::fs::read_to_string(&data).unwrap()).unwrap();
    assert_eq!(
        recorded.keys().collect::<Vec<_>>(),
        found.keys().collect::<Vec<_>>(),
        "the shipped scenarios changed"
    );
    for (case, want) in &recorded {
        let got = &found[case];
        assert_eq!(
            want.keys().collect::<Vec<_>>(),
            got.keys().collect::<Vec<_>>(),
            "{case}: the datasets written changed"
        );
        for (path, digest) in want {
            assert_eq!(&got[path], digest, "{case}: {path} changed");
        }
    }
}
