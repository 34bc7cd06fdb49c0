//! The run file's structure outside the per-step, per-cycle and per-run outputs: its
//! groups, the root attributes, the grid and the head profiles (docs/formats.md, "HDF5
//! layout"). The writers and the report's reader take these names from here.

use super::{entry, Entry, Place, Unit};

/// A group of the run file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Group {
    /// Per-step series.
    Series,
    /// Per-cycle values.
    Cycles,
    /// The radial grid.
    Grid,
    /// Head profiles.
    Snapshots,
    /// Development progress.
    Progress,
    /// Headline figures and texts (attributes).
    Summary,
    /// Per-cycle envelopes of the per-step series (`output.store`).
    Envelopes,
    /// Jumps over whole cycles (`numerics.multiscale`).
    Jumps,
    /// Events of the run (warnings' moments, partings, stage starts, cake jumps).
    Events,
}

impl Group {
    /// The group's name.
    pub const fn name(self) -> &'static str {
        match self {
            Group::Series => "series",
            Group::Cycles => "cycles",
            Group::Grid => "grid",
            Group::Snapshots => "snapshots",
            Group::Progress => "progress",
            Group::Summary => "summary",
            Group::Envelopes => "envelopes",
            Group::Jumps => "jumps",
            Group::Events => "events",
        }
    }

    /// The group's absolute path, `/<group>`.
    pub fn path(self) -> String {
        format!("/{}", self.name())
    }

    /// The absolute path of a member, `/<group>/<member>`.
    pub fn member(self, member: &str) -> String {
        format!("/{}/{member}", self.name())
    }
}

/// A string attribute of the run file's root group.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RootAttr {
    /// Version of boreflux that wrote the file.
    ToolVersion,
    /// When the run was written.
    CreatedUtc,
    /// Case title.
    Title,
    /// Case description.
    Description,
    /// The resolved case.
    CaseJson,
    /// The case file's path.
    CaseFile,
}

impl RootAttr {
    /// All, in file order.
    pub const ALL: [RootAttr; 6] = [
        RootAttr::ToolVersion,
        RootAttr::CreatedUtc,
        RootAttr::Title,
        RootAttr::Description,
        RootAttr::CaseJson,
        RootAttr::CaseFile,
    ];

    /// The attribute name.
    pub const fn name(self) -> &'static str {
        match self {
            RootAttr::ToolVersion => "tool_version",
            RootAttr::CreatedUtc => "created_utc",
            RootAttr::Title => "title",
            RootAttr::Description => "description",
            RootAttr::CaseJson => "case_json",
            RootAttr::CaseFile => "case_file",
        }
    }

    /// What it holds.
    pub const fn description(self) -> &'static str {
        match self {
            RootAttr::ToolVersion => "version of boreflux that wrote the file",
            RootAttr::CreatedUtc => "when the file was written, RFC 3339 in UTC",
            RootAttr::Title => "the case title",
            RootAttr::Description => "the case description",
            RootAttr::CaseJson => "the resolved case (SI, every default filled in) as JSON",
            RootAttr::CaseFile => "the case file's path as given on the command line",
        }
    }
}

/// A dataset of `/grid`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GridData {
    /// Node radii.
    RCenter,
    /// Face radii.
    RFace,
    /// Zone of each cell.
    Zone,
}

impl GridData {
    /// All, in file order.
    pub const ALL: [GridData; 3] = [GridData::RCenter, GridData::RFace, GridData::Zone];

    /// Its schema entry; `name` is the path below `/grid`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            GridData::RCenter => s(
                "r_center",
                Unit::M,
                "node radii (geometric mean of the faces)",
                "N values, docs/numerics.md",
            ),
            GridData::RFace => s(
                "r_face",
                Unit::M,
                "face radii, screen to outer radius",
                "N + 1 values, docs/numerics.md",
            ),
            GridData::Zone => s(
                "zone",
                Unit::One,
                "zone of each cell: 1 pack, 3 invaded, 4 formation",
                "N values, zone index",
            ),
        }
    }

    /// The HDF5 path, `/grid/<name>`.
    pub fn path(self) -> String {
        Group::Grid.member(&self.entry().name)
    }
}

/// A dataset of `/snapshots` (head profiles).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SnapshotData {
    /// Times of the profiles.
    Time,
    /// Cell heads, time × cell.
    Head,
}

impl SnapshotData {
    /// All, in file order.
    pub const ALL: [SnapshotData; 2] = [SnapshotData::Time, SnapshotData::Head];

    /// Its schema entry; `name` is the path below `/snapshots`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            SnapshotData::Time => s(
                "time",
                Unit::S,
                "times of the head profiles",
                "every N-th step (run --snapshot-every)",
            ),
            SnapshotData::Head => s(
                "head",
                Unit::M,
                "cell heads (time x cell), inner to outer",
                "solved heads at those steps",
            ),
        }
    }

    /// The HDF5 path, `/snapshots/<name>`.
    pub fn path(self) -> String {
        Group::Snapshots.member(&self.entry().name)
    }
}

/// The Markdown tables of the file's structure (part of [`super::markdown`]).
pub fn markdown(out: &mut String, table: &dyn Fn(&mut String, &str, Vec<Entry>)) {
    out.push_str(
        "Root attributes of a run file (`/`, strings):\n\n| name | description |\n| --- | --- |\n",
    );
    for a in RootAttr::ALL {
        out.push_str(&format!("| `{}` | {} |\n", a.name(), a.description()));
    }
    out.push('\n');
    table(
        out,
        "Grid (`/grid/<name>`):",
        GridData::ALL.into_iter().map(GridData::entry).collect(),
    );
    table(
        out,
        "Head profiles (`/snapshots/<name>`):",
        SnapshotData::ALL
            .into_iter()
            .map(SnapshotData::entry)
            .collect(),
    );
}
