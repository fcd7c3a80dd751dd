#!/bin/bash
# bench.sh measures bowline's speed and memory against the segmentation
# floor (one bare, single-goroutine pass of github.com/blevesearch/segment
# over the same file) and prints each figure as a ratio, with the targets.
#
# Usage: scripts/bench.sh [--big] [--demo] [CORPUS]
#   CORPUS  a lines file (default: the State of the Union addresses cut into
#           three-sentence documents, repeated 10 times, about 108 MB; needs
#           scripts/fetch-sotu.sh)
#   --demo  measure on the invented Pellwick demo corpus instead (200,000
#           generated tickets, text column only, about 31 MB)
#   --big   also measure peak RSS of hashing-mode encode on a corpus 10
#           times larger (about 430 MB of disk in a temporary folder)
# Each figure, the floor included, is the best of 5 runs: the machines
# this runs on are shared, and a run slowed by a neighbour says nothing
# about the code. Needs /usr/bin/time (Debian "time").
set -euo pipefail
cd "$(dirname "$0")/.."
big=0
demo=0
while [ $# -gt 0 ]; do
  case "$1" in
    --big) big=1; shift ;;
    --demo) demo=1; shift ;;
    *) break ;;
  esac
done
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
go build -o "$tmp/bowline" ./cmd/bowline
go build -o "$tmp/segfloor" ./internal/tools/segfloor
corpus=${1:-}
if [ -z "$corpus" ] && [ $demo = 1 ]; then
  go run ./internal/demo/demotsv --docs 200000 2>/dev/null | tail -n +2 | cut -f5 >"$tmp/corpus.txt"
  corpus=$tmp/corpus.txt
elif [ -z "$corpus" ]; then
  sh scripts/fetch-sotu.sh
  go run ./internal/tools/benchcorpus -o "$tmp/corpus.txt" -copies 10
  corpus=$tmp/corpus.txt
fi
bytes=$(stat -c %s "$corpus")
B=$tmp/bowline
floor=$(for i in 1 2 3 4 5; do "$tmp/segfloor" "$corpus" | sed 's/.*floor_mb_per_sec //'; done | sort -g | tail -1)

# best WALL RSS: best wall seconds of 3 runs and the peak RSS (KiB) of that run
best() {
  local bw="" brss=""
  for i in 1 2 3 4 5; do
    /usr/bin/time -f "%e %M" -o "$tmp/t" "$@" >/dev/null 2>"$tmp/err" || { cat "$tmp/err" >&2; exit 1; }
    read -r w rss <"$tmp/t"
    if [ -z "$bw" ] || awk "BEGIN{exit !($w < $bw)}"; then bw=$w; brss=$rss; fi
  done
  echo "$bw $brss"
}
row() { # name seconds rss target
  awk -v n="$1" -v s="$2" -v r="$3" -v b="$bytes" -v f="$floor" -v t="$4" \
    'BEGIN{m=b/1e6/s; printf "%-44s %8.1f MB/s %6.2fx floor  %7.1f MiB   target %s\n", n, m, m/f, r/1024, t}'
}
F="--words 1-2 --stop en --progress never"
"$B" learn "$corpus" --hash 2^20 $F -o "$tmp/hash.json" 2>/dev/null
"$B" learn "$corpus" --hash 2^20 --stem en $F -o "$tmp/hash-stem.json" 2>/dev/null
"$B" learn "$corpus" $F -o "$tmp/vocab.json" 2>/dev/null

echo "corpus $corpus: $bytes bytes; segmentation floor $floor MB/s; $(nproc) cores"
read -r h2 h2rss < <(best "$B" encode --spec "$tmp/hash.json" "$corpus" -o "$tmp/h2.svm" --workers 2 --progress never)
read -r h1 h1rss < <(best "$B" encode --spec "$tmp/hash.json" "$corpus" -o "$tmp/h1.svm" --workers 1 --progress never)
read -r v2 v2rss < <(best "$B" encode --spec "$tmp/vocab.json" "$corpus" -o "$tmp/v2.svm" --workers 2 --progress never)
read -r l2 l2rss < <(best "$B" learn "$corpus" $F -o "$tmp/vocab2.json" --workers 2)
read -r s2 s2rss < <(best "$B" encode --spec "$tmp/hash-stem.json" "$corpus" -o "$tmp/s2.svm" --workers 2 --progress never)
row "encode, hashing 2^20, 2 workers" "$h2" "$h2rss" ">= 2.0x (stretch 3x), RSS < 100 MiB"
row "encode, hashing 2^20, 1 worker" "$h1" "$h1rss" "-"
row "encode, vocabulary, 2 workers" "$v2" "$v2rss" ">= 1.6x"
row "learn, vocabulary, 2 workers" "$l2" "$l2rss" ">= 1.2x"
row "encode, hashing 2^20 + --stem en, 2 workers" "$s2" "$s2rss" "<= 20% more time than without"
awk -v a="$h1" -v b="$h2" 'BEGIN{printf "%-44s %8.2fx                                  target >= 1.7x\n", "2 workers versus 1 (hashing encode)", a/b}'
awk -v a="$h2" -v b="$s2" 'BEGIN{printf "%-44s %+7.1f%%                                  target <= +20%%\n", "time added by --stem en", 100*(b/a-1)}'
for w in 1 3 4; do "$B" encode --spec "$tmp/hash.json" "$corpus" -o "$tmp/hw$w.svm" --workers $w --progress never 2>/dev/null; done
same=yes
for w in 1 3 4; do cmp -s "$tmp/h2.svm" "$tmp/hw$w.svm" || same=no; done
cmp -s "$tmp/h1.svm" "$tmp/h2.svm" || same=no
echo "rows byte-identical for --workers 1, 2, 3, 4 and across runs: $same"
if [ $big = 1 ]; then
  for i in $(seq 10); do cat "$corpus"; done >"$tmp/big.txt"
  read -r bg bgrss < <(best "$B" encode --spec "$tmp/hash.json" "$tmp/big.txt" -o /dev/null --workers 2 --progress never)
  awk -v a="$h2rss" -v b="$bgrss" 'BEGIN{printf "%-44s %7.1f MiB vs %.1f MiB: %+.1f%%            target <= +10%%\n", "peak RSS, 10x corpus vs 1x (hashing encode)", b/1024, a/1024, 100*(b/a-1)}'
fi
