#!/bin/bash
# gen-learner-golden.sh regenerates testdata/learner: SVMlight rows encoded
# by bowline from the invented Pellwick demo corpus (and from the State of
# the Union corpus when testdata/sotu/raw/sotu.jsonl is present), the models
# that liblinear-train -s 0 fits on them and the held-out predictions of
# liblinear-predict (Debian package liblinear-tools 2.3.0). Package logreg
# checks its accuracy and objective against these files.
#
# The work is done by the logreg package's TestLiblinearLive, which encodes
# the rows, runs the installed liblinear tools and, given -golden-out DIR,
# writes the files into DIR.
#
# Usage: scripts/gen-learner-golden.sh [--check]
#   --check  regenerate into a temporary folder and compare the contents
#            (decompressed) with the committed files; exit status 1 on a
#            difference.
set -euo pipefail

PKG=liblinear-tools
root=$(cd "$(dirname "$0")/.." && pwd)
dest="$root/testdata/learner"
check=0
if [ "${1:-}" = "--check" ]; then check=1; fi

for tool in liblinear-train liblinear-predict; do
	if ! command -v "$tool" >/dev/null 2>&1; then
		echo "gen-learner-golden: $tool not found; install the Debian package $PKG" >&2
		exit 2
	fi
done
version=$(dpkg-query -W -f='${Version}' "$PKG" 2>/dev/null || echo unknown)
case "$version" in
2.3.0*) ;;
*) echo "gen-learner-golden: warning: $PKG version is $version, the committed files name 2.3.0" >&2 ;;
esac

out="$dest"
if [ $check = 1 ]; then
	out=$(mktemp -d)
	trap 'rm -rf "$out"' EXIT
fi
mkdir -p "$out"
cd "$root"
go test ./internal/logreg -run '^TestLiblinearLive$' -count=1 -v -args -golden-out "$out" | grep -E 'accuracy|objective|PASS|FAIL|wrote' >&2

if [ $check = 1 ]; then
	status=0
	for f in "$out"/*; do
		name=$(basename "$f")
		cat_() { case "$1" in *.gz) gzip -dc "$1" ;; *) cat "$1" ;; esac; }
		if [ ! -e "$dest/$name" ]; then
			echo "gen-learner-golden: $name is not committed" >&2
			status=1
		elif ! cmp -s <(cat_ "$f") <(cat_ "$dest/$name"); then
			echo "gen-learner-golden: $name differs from the committed file" >&2
			status=1
		fi
	done
	[ $status = 0 ] && echo "gen-learner-golden: committed files match" >&2
	exit $status
fi
echo "gen-learner-golden: files written to $dest" >&2
