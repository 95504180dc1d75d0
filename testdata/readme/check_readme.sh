#!/usr/bin/env bash
# Runs every "$ " command of README.md, in order, in a clean copy of the
# repository (the files git tracks, nothing made by earlier runs), and
# compares the output with the lines the README shows (see main.go here
# for the rules). The install line runs too, into a fresh GOPATH, so the
# walkthroughs use the wavsieve it installs and nothing already on PATH.
set -euo pipefail
cd "$(dirname "$0")/../.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
mkdir -p "$work/repo" "$work/gopath"
if git rev-parse --is-inside-work-tree >/dev/null 2>&1; then
  git ls-files -z | tar --null -T - -cf - | tar -xf - -C "$work/repo"
else
  tar --exclude=./out -cf - . | tar -xf - -C "$work/repo"
fi
go build -o "$work/readme" ./testdata/readme

# Share the module and build caches (fast, and no network), but install
# into a GOPATH of our own.
export GOMODCACHE="$(go env GOMODCACHE)" GOCACHE="$(go env GOCACHE)"
export GOPATH="$work/gopath"
unset GOBIN
# Drop any folder holding a wavsieve from PATH, so only the README's
# install line can put one there.
clean=""
IFS=: read -ra dirs <<<"$PATH"
for d in "${dirs[@]}"; do
  [ -n "$d" ] && [ ! -x "$d/wavsieve" ] && clean="${clean:+$clean:}$d"
done
export PATH="$clean"

cd "$work/repo"
"$work/readme" README.md
