#!/usr/bin/env bash
# Checks that the workspace builds with its declared minimum supported Rust version
# (`rust-version` in the Cargo.tomls). rustup cannot fetch another toolchain on every
# machine, so this uses Debian's packaged Rust 1.85.0 (rustc-web and cargo-web of
# bookworm). The packages are downloaded and unpacked under target/msrv/toolchain; only
# their shared libraries (libllvm19, libhttp-parser2.9, libpcre3) are installed into the
# system, so the `cargo` on the PATH stays the one the developer chose.
#
# What is checked (docs/ and DEVELOPERS.md say the same):
# - boreflux-solver and boreflux-verify (rust-version 1.85) with `cargo check` under 1.85.0;
# - the CLI (rust-version 1.85.1, the HDF5 binding's own minimum) under 1.85.0 with
#   `--ignore-rust-version`: 1.85.1 is a patch release with no language or library change
#   on Linux, so 1.85.0 compiling it is the nearest check this machine allows.
# Clippy's `incompatible_msrv` lint (run by `make lint`) reports standard-library items
# newer than the declared version.
#
# Skipped, with a message, where apt-get is missing (not Debian); set MSRV_CHECK=0 to skip.
set -euo pipefail
cd "$(dirname "$0")/.."

say() { printf 'msrv-check: %s\n' "$*" >&2; }

if [ "${MSRV_CHECK:-1}" = "0" ]; then
    say "skipped (MSRV_CHECK=0)"
    exit 0
fi
if ! command -v apt-get >/dev/null 2>&1 || ! command -v dpkg-deb >/dev/null 2>&1; then
    say "skipped: needs Debian's apt-get and dpkg-deb to fetch Rust 1.85.0"
    exit 0
fi

VERSION="1.85.0+dfsg3-1~deb12u3"
DIR="$PWD/target/msrv"
ROOT="$DIR/toolchain"

as_root() {
    if [ "$(id -u)" -eq 0 ]; then "$@"; else sudo "$@"; fi
}

if [ ! -x "$ROOT/usr/bin/rustc" ] || [ ! -x "$ROOT/usr/bin/cargo" ]; then
    say "fetching Debian's Rust $VERSION into $ROOT"
    as_root env DEBIAN_FRONTEND=noninteractive apt-get update -q >/dev/null
    as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends \
        libllvm19 libhttp-parser2.9 libpcre3 >/dev/null
    rm -rf "$DIR/debs" "$ROOT"
    mkdir -p "$DIR/debs" "$ROOT"
    (
        cd "$DIR/debs"
        # apt-get download runs as the calling user; root's sandbox user needs write access.
        chmod 777 .
        apt-get download -q \
            "rustc-web=$VERSION" "cargo-web=$VERSION" \
            "libstd-rust-web-dev=$VERSION" "libstd-rust-web-1.85=$VERSION" >/dev/null
    )
    for deb in "$DIR"/debs/*.deb; do
        dpkg-deb -x "$deb" "$ROOT"
    done
fi

export LD_LIBRARY_PATH="$ROOT/usr/lib/x86_64-linux-gnu${LD_LIBRARY_PATH:+:$LD_LIBRARY_PATH}"
export RUSTC="$ROOT/usr/bin/rustc" RUSTDOC="$ROOT/usr/bin/rustdoc"
export CARGO_TARGET_DIR="$DIR/build"
CARGO="$ROOT/usr/bin/cargo"
say "$("$RUSTC" --version)"
"$CARGO" check --locked -p boreflux-solver -p boreflux-verify --all-targets
"$CARGO" check --locked -p boreflux --all-targets --ignore-rust-version
say "ok: the workspace compiles with Rust 1.85.0"
