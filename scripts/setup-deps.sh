#!/usr/bin/env bash
# Installs the system libraries boreflux needs to build (HDF5 with headers, pkg-config),
# GNU parallel for the sharded-sweep test, and checks that a Rust toolchain is present. Safe to run any number of times: it prints
# nothing and changes nothing when everything is already there.
set -euo pipefail

say() { printf 'setup-deps: %s\n' "$*" >&2; }

have_hdf5() {
    if command -v pkg-config >/dev/null 2>&1 && pkg-config --exists hdf5; then
        return 0
    fi
    # Debian/Ubuntu serial build, which hdf5-metno finds without pkg-config.
    local d
    for d in /usr/lib/*-linux-gnu/hdf5/serial; do
        [ -d "$d/include" ] && [ -d "$d/lib" ] && return 0
    done
    return 1
}

# Runs a command as root: directly when we are root, through sudo otherwise.
as_root() {
    if [ "$(id -u)" -eq 0 ]; then
        "$@"
    elif command -v sudo >/dev/null 2>&1; then
        sudo "$@"
    else
        say "need root to run '$*', and sudo is not installed; run it as root and retry"
        exit 1
    fi
}

install_hdf5() {
    case "$(uname -s)" in
        Linux)
            if command -v apt-get >/dev/null 2>&1; then
                say "installing libhdf5-dev and pkg-config with apt-get"
                as_root env DEBIAN_FRONTEND=noninteractive apt-get update -q
                as_root env DEBIAN_FRONTEND=noninteractive \
                    apt-get install -y -q libhdf5-dev pkg-config
                return 0
            fi
            ;;
        Darwin)
            if command -v brew >/dev/null 2>&1; then
                say "installing hdf5 and pkg-config with Homebrew"
                brew install hdf5 pkg-config
                return 0
            fi
            say "Homebrew (brew) not found; install it, or install HDF5 and pkg-config yourself"
            exit 1
            ;;
    esac
    say "HDF5 development files (headers + library) not found, and this system is neither"
    say "Debian/Ubuntu (apt-get) nor macOS (brew). Install HDF5 >= 1.10 with headers and"
    say "pkg-config by hand, or set HDF5_DIR to its install prefix, then run this again."
    exit 1
}

if [ -z "${HDF5_DIR:-}" ] && ! have_hdf5; then
    install_hdf5
    if ! have_hdf5; then
        say "HDF5 was installed but is still not found by pkg-config; set HDF5_DIR and retry"
        exit 1
    fi
fi

# GNU parallel: the test of the batch recipe in docs/sweeps.md runs shards with it (it is
# skipped when parallel is missing, except in CI, where it fails). Optional elsewhere.
if ! command -v parallel >/dev/null 2>&1; then
    if command -v apt-get >/dev/null 2>&1; then
        say "installing GNU parallel with apt-get (for the sharded-sweep test)"
        # A fresh machine has no package lists yet: update them first.
        as_root env DEBIAN_FRONTEND=noninteractive apt-get update -q || true
        as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -q parallel ||
            say "GNU parallel could not be installed; the sharded-sweep test will be skipped"
    elif command -v brew >/dev/null 2>&1; then
        brew install parallel || say "GNU parallel could not be installed"
    else
        say "GNU parallel not found (optional: the sharded-sweep test is skipped without it)"
    fi
fi

if ! command -v cargo >/dev/null 2>&1; then
    say "cargo not found. Install a Rust toolchain (rustup, or your system's rust/cargo"
    say "packages; Rust >= 1.80) and make sure cargo is on PATH, then run this again."
    exit 1
fi
