#!/usr/bin/env bash
# Runs the unit tests (every src/**/*.test.ts; no database or Redis needed) under Node 22 LTS.
# The Node binary comes from the npm registry, which ships it as the package node-<platform>-<arch>
# (the `node` package only picks that one in an install script, and install scripts may be disabled).
# It is installed once into a cache folder (STEMWISE_NODE22_DIR); a failed download stops with a message.
set -euo pipefail
cd "$(dirname "$0")/.."

dir="${STEMWISE_NODE22_DIR:-$(node -p "require('node:os').tmpdir()")/stemwise-node22}"
pkg="node-$(node -p process.platform)-$(node -p process.arch)"
bin="$dir/node_modules/$pkg/bin/node"

if [ ! -x "$bin" ]; then
  echo "test:node22: installing $pkg@22 into $dir"
  if ! npm install --prefix "$dir" --no-save --no-package-lock --no-audit --no-fund --loglevel=error "$pkg@22" >&2; then
    echo "test:node22: FAILED: could not install $pkg@22 from the npm registry; the unit tests did not run on Node 22" >&2
    exit 1
  fi
fi
version="$("$bin" --version)"
case "$version" in
  v22.*) ;;
  *) echo "test:node22: FAILED: $bin is $version, not Node 22" >&2; exit 1 ;;
esac

echo "test:node22: unit tests on Node $version"
# Vitest starts its test workers with the Node that runs it (process.execPath), so all of them are Node 22.
PATH="$(dirname "$bin"):$PATH" exec "$bin" node_modules/vitest/vitest.mjs run /src/ "$@"
