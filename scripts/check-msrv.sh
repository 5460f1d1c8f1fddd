#!/usr/bin/env bash
# The minimum Rust version stated in Cargo.toml (`rust-version` of the workspace) against the
# dependencies in Cargo.lock: fails, naming each package, when one declares a `rust-version`
# newer than ours. Every locked package counts (build, dev and every platform's), since
# `cargo test` builds them all. Reads `cargo metadata`; needs python3.
set -euo pipefail
cd "$(dirname "$0")/.."
command -v python3 >/dev/null || { echo "FAIL: python3 not found (check-msrv reads cargo metadata with it)"; exit 1; }

cargo metadata --format-version 1 --locked | python3 -c '
import json, sys

meta = json.load(sys.stdin)
members = set(meta["workspace_members"])

def version(text):
    parts = [int(p) for p in text.split(".")]
    return tuple(parts + [0] * (3 - len(parts)))

ours = {p["name"]: p.get("rust_version") for p in meta["packages"] if p["id"] in members}
missing = sorted(name for name, v in ours.items() if not v)
if missing:
    print("FAIL: no rust-version in " + ", ".join(missing))
    sys.exit(1)
msrv_text = min(ours.values(), key=version)
msrv = version(msrv_text)
newer = sorted(
    (version(p["rust_version"]), p["name"], p["version"], p["rust_version"])
    for p in meta["packages"]
    if p["id"] not in members and p.get("rust_version") and version(p["rust_version"]) > msrv
)
checked = sum(1 for p in meta["packages"] if p["id"] not in members)
if newer:
    print(f"FAIL: rust-version is {msrv_text}, but these locked dependencies need a newer Rust:")
    for _, name, ver, needs in newer:
        print(f"  {name} {ver} needs Rust {needs}")
    print("Raise rust-version in Cargo.toml to the largest of these, or lock older versions.")
    sys.exit(1)
print(f"rust-version {msrv_text}: none of the {checked} locked dependencies needs a newer Rust")
'
