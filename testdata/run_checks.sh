#!/usr/bin/env bash
# Every test of the project, in the order CI runs them: go vet, short fuzz
# runs, the report in headless Chromium, the README's commands as printed,
# a Slurm job array, and the Go tests. A check that needs a Debian package
# installs it when run as root, and otherwise says it is skipped.
set -euo pipefail
cd "$(dirname "$0")/.."
go vet ./...
go test -run '^$' -fuzz '^FuzzReader$' -fuzztime 20000x ./process/wavio
go test -run '^$' -fuzz '^FuzzWriterChunks$' -fuzztime 5000x ./process/wavio
go test -run '^$' -fuzz '^FuzzSpec$' -fuzztime 3000x ./design
bash testdata/report/browser_check.sh
bash testdata/readme/check_readme.sh
bash testdata/cluster/slurm_check.sh
go test ./...
