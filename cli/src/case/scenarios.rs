//! Shipped example cases for `boreflux new --scenario NAME`, compiled in from `cases/`.

/// (name, JSON text) of every shipped scenario; the first is the default demo.
pub fn scenarios() -> &'static [(&'static str, &'static str)] {
    &[
        (
            "municipal-sand-gravel",
            include_str!("../../../cases/municipal-sand-gravel.json"),
        ),
        (
            "domestic-fine-sand-pvc",
            include_str!("../../../cases/domestic-fine-sand-pvc.json"),
        ),
        (
            "monitoring-silty-sand",
            include_str!("../../../cases/monitoring-silty-sand.json"),
        ),
        (
            "irrigation-pump-surge",
            include_str!("../../../cases/irrigation-pump-surge.json"),
        ),
        (
            "irrigation-table",
            include_str!("../../../cases/irrigation-table.json"),
        ),
        (
            "jetting-wire-wrap",
            include_str!("../../../cases/jetting-wire-wrap.json"),
        ),
        (
            "staged-development",
            include_str!("../../../cases/staged-development.json"),
        ),
        ("swab-deep", include_str!("../../../cases/swab-deep.json")),
    ]
}

/// Files a scenario refers to, as (scenario, file name relative to the case, contents):
/// `new` must write them beside the case for it to load.
pub fn scenario_companions() -> &'static [(&'static str, &'static str, &'static str)] {
    &[(
        "irrigation-table",
        "irrigation-table.csv",
        include_str!("../../../cases/irrigation-table.csv"),
    )]
}
