#!/bin/sh
# Copies the Unicode word break test file from Debian package unicode-data
# into testdata/uax29 and regenerates testdata/uax29/differences.txt.
set -eu
cd "$(dirname "$0")/.."
src=/usr/share/unicode/auxiliary/WordBreakTest.txt
if [ ! -f "$src" ]; then
	echo "gen-uax29: $src missing (apt-get install unicode-data)" >&2
	exit 1
fi
cp "$src" testdata/uax29/WordBreakTest.txt
go test ./tokenize -run '^TestUAX29WordBreak$' -count=1 -update-uax29 >/dev/null
