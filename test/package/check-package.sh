#!/usr/bin/env bash
# The package as a user gets it: `npm pack` (which builds dist/ through `prepare`), the tarball
# installed with npm into an empty folder — offline, from the lockfile install-tarball.mjs
# writes out of the project's — then the installed command, and two scripts that import
# `singleshot`, run the demo in code and read its tables: one in TypeScript, typechecked against
# the shipped declarations (skipLibCheck off) and then run, one in plain JavaScript.
#
#   bash test/package/check-package.sh
#
# Needs `npm ci` of the project first (its cache holds every dependency's tarball).
# Prints "package: PASSED" or stops at the first failing step (exit ≠ 0).
set -euo pipefail
REPO="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
WORK="$(mktemp -d /tmp/singleshot-package.XXXXXX)"
cd "$REPO"
npm pack --silent --pack-destination "$WORK" > "$WORK/pack.out"
TARBALL="$WORK/$(tail -n 1 "$WORK/pack.out")"
echo "packed: $TARBALL ($(du -k "$TARBALL" | cut -f1) kB)"
node test/package/install-tarball.mjs "$TARBALL" "$WORK/app"
cp test/package/consumer/* "$WORK/app/"
cd "$WORK/app"
echo "installed: singleshot $(./node_modules/.bin/singleshot --version)"
./node_modules/.bin/tsc -p tsconfig.json
echo "typecheck against the shipped types: clean"
node out/use-from-typescript.js
node use-from-javascript.mjs
echo "package: PASSED"
