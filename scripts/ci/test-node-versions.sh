#!/usr/bin/env bash
# Runs tests on Node versions other than the machine's: by default the oldest version package.json's
# `engines` declares (20.19.0) and the newest long-term-support line (26). Each Node comes from the
# npm registry's `node` package (Linux binaries of every release), installed once into .ci-node/<version>.
# The dependencies installed by the machine's npm are used as they are (none of them is native code
# built for one Node version; h5wasm is WebAssembly).
#
# Usage: scripts/ci/test-node-versions.sh [--full] [version ...]
#   default     the packed-tarball test (install from `npm pack`, then run, build and synth from there)
#               and the representative subset below, on each version;
#   --full      the whole vitest suite on each version instead of the subset.
# Exit status: non-zero if any version fails; every version is run regardless.
set -uo pipefail
cd "$(dirname "$0")/../.."

full=false
if [ "${1:-}" = "--full" ]; then full=true; shift; fi
versions=("$@")
if [ ${#versions[@]} -eq 0 ]; then versions=(20.19.0 26); fi

# The parts where Node versions differ in what they offer: worker threads and module loading (the
# command line, the audit pool, the reduction workers), streams and file handles (readers), crypto
# (fingerprints, the result cache, the version chain), and the packed package itself.
subset=(
  test/cli
  test/report/buildCache.test.ts
  test/report/resultCacheTrust.test.ts
  test/ingest
  test/archive
  test/synth
)

status=0
for version in "${versions[@]}"; do
  dir=".ci-node/$version"
  mkdir -p .ci-node
  if [ ! -x "$dir/node_modules/.bin/node" ]; then
    npm install --prefix "$dir" --no-audit --no-fund --no-save "node@$version" >"$dir.install.log" 2>&1 || {
      echo "could not install node@$version (see $dir.install.log)"; status=1; continue; }
  fi
  bin="$(cd "$(dirname "$(readlink -f "$dir/node_modules/.bin/node")")" && pwd)"
  echo "== Node $("$bin/node" --version) ($dir)"
  if $full; then targets=(); else targets=("${subset[@]}"); fi
  # The Node folder first on PATH: vitest, its forks, npm and every spawned `node` use this version.
  if ! PATH="$bin:$PATH" node node_modules/vitest/vitest.mjs run "${targets[@]}"; then
    echo "== FAILED on Node $version"
    status=1
  fi
done
exit $status
