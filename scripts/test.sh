#!/usr/bin/env bash
# Runs every test: fetches the reference data first (scripts/fetch-data.sh),
# then the Go tests with the race detector. Extra arguments go to 'go test'.
set -euo pipefail
cd "$(dirname "$0")/.."
./scripts/fetch-data.sh
go test -race "$@" ./...
