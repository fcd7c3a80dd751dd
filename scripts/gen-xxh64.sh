#!/bin/bash
# gen-xxh64.sh regenerates testdata/hashing/xxh64.tsv: XXH64 (seed 0) of a set
# of sample keys as printed by xxhsum -H1 from the Debian package xxhash
# (0.8.1-1). Package hashing checks its hash values against this file.
#
# Each key is produced with bash's printf from the format strings below and
# piped to "xxhsum -H1" on standard input; the file records the key's bytes in
# lower-case hex (so that empty, non-ASCII and non-UTF-8 keys are unambiguous)
# and the 16-digit hash that xxhsum prints.
#
# Usage: scripts/gen-xxh64.sh [--check]
#   --check  regenerate into a temporary file and compare with the committed
#            file instead of overwriting it (exit status 1 on a difference).
set -euo pipefail

PKG=xxhash
root=$(cd "$(dirname "$0")/.." && pwd)
out="$root/testdata/hashing/xxh64.tsv"
check=0
if [ "${1:-}" = "--check" ]; then check=1; fi

if ! command -v xxhsum >/dev/null 2>&1; then
	echo "gen-xxh64: xxhsum not found; install the Debian package $PKG" >&2
	exit 2
fi
version=$(dpkg-query -W -f='${Version}' "$PKG" 2>/dev/null || echo unknown)
if [ "$version" != "0.8.1-1" ]; then
	echo "gen-xxh64: warning: $PKG version is $version, the committed file names 0.8.1-1" >&2
fi

# Keys as printf format strings (no % signs). Invented text only.
keys=(
	''
	'a'
	'abc'
	'bike'
	'dock'
	'the dock was full'
	'Pellwick Bike Share'
	'w:refund'
	'w:late fee'
	'c:#bi'
	'c:ke#'
	'\x00'
	'\x00\x00\x00\x00'
	'\xff\xfe\xfd'
	'\t\n\r'
	'caf\xc3\xa9'
	'\xc3\xa9'
	'na\xc3\xafve r\xc3\xa9sum\xc3\xa9'
	'\xe8\x87\xaa\xe8\xbb\xa2\xe8\xbb\x8a'
	'\xe9\xa7\x90\xe8\xbc\xaa\xe5\xa0\xb4\xe3\x81\xae\xe8\x87\xaa\xe8\xbb\xa2\xe8\xbb\x8a\xe3\x81\x8c\xe5\xa3\x8a\xe3\x82\x8c\xe3\x81\xa6\xe3\x81\x84\xe3\x81\xbe\xe3\x81\x99'
	'\xf0\x9f\x9a\xb2'
	'\xf0\x9f\x9a\xb2\xf0\x9f\x98\x80 ride'
)
# ASCII keys of every length from 1 to 40 bytes, crossing XXH64's 32-byte
# stripe boundary.
ascii='dock-station-07-billing-app-late-fee-rid'
for n in $(seq 1 40); do keys+=("${ascii:0:n}"); done
# Keys of two-byte characters: 2 to 40 bytes.
for n in $(seq 1 20); do
	k=''
	for _ in $(seq 1 "$n"); do k+='\xc3\xa9'; done
	keys+=("$k")
done
# Longer keys: several 32-byte stripes plus a tail of each remainder class.
for n in 63 64 65 100 127 128 129 1000; do
	k=''
	for i in $(seq 0 $((n - 1))); do k+="${ascii:$((i % 40)):1}"; done
	keys+=("$k")
done

tmp=$(mktemp)
trap 'rm -f "$tmp"' EXIT
{
	printf '# key_hex\txxh64\n'
	for k in "${keys[@]}"; do
		hex=$(printf "$k" | od -An -v -tx1 | tr -d ' \n')
		sum=$(printf "$k" | xxhsum -H1 | cut -d' ' -f1)
		printf '%s\t%s\n' "$hex" "$sum"
	done
} >"$tmp"

if [ $check = 1 ]; then
	if cmp -s "$tmp" "$out"; then
		echo "gen-xxh64: $out is up to date"
		exit 0
	fi
	echo "gen-xxh64: $out differs from a fresh run:" >&2
	diff "$out" "$tmp" >&2 || true
	exit 1
fi
cp "$tmp" "$out"
echo "gen-xxh64: wrote $out ($(($(wc -l <"$out") - 1)) keys)"
