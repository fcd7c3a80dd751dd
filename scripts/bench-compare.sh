#!/bin/bash
# bench-compare.sh BEFORE AFTER CORPUS: the figures of bench.sh (ratios to
# the segmentation floor, peak RSS) for two bowline binaries, their runs
# interleaved so that both meet the same machine, best of 5 each. It also
# checks that both binaries write the same specs and rows. Build BEFORE
# from an older commit (git worktree add /tmp/old REV; cd /tmp/old; go build
# -o /tmp/bowline-old ./cmd/bowline). Needs /usr/bin/time (Debian "time").
set -euo pipefail
A=$(realpath "$1"); B=$(realpath "$2"); corpus=$(realpath "$3")
cd "$(dirname "$0")/.."
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
F="--words 1-2 --stop en --progress never"
seg=$tmp/segfloor; go build -o "$seg" ./internal/tools/segfloor
floor=$(for i in 1 2 3 4 5; do $seg "$corpus" | sed 's/.*floor_mb_per_sec //'; done | sort -g | tail -1)
bytes=$(stat -c %s "$corpus")
for X in A B; do
  bin=${!X}
  "$bin" learn "$corpus" --hash 2^20 $F -o "$tmp/$X-hash.json" 2>/dev/null
  "$bin" learn "$corpus" --hash 2^20 --stem en $F -o "$tmp/$X-hashstem.json" 2>/dev/null
  "$bin" learn "$corpus" $F -o "$tmp/$X-vocab.json" 2>/dev/null
done
cmp "$tmp/A-vocab.json" "$tmp/B-vocab.json" && echo "vocabulary specs identical"
cmp "$tmp/A-hash.json" "$tmp/B-hash.json" && echo "hashing specs identical"
declare -A best
run() { # key bin args...
  local key=$1; shift
  /usr/bin/time -f "%e %M" -o "$tmp/t" "$@" >/dev/null 2>"$tmp/err" || { cat "$tmp/err"; exit 1; }
  read -r w rss <"$tmp/t"
  if [ -z "${best[$key]:-}" ] || awk "BEGIN{exit !($w < ${best[$key]%% *})}"; then best[$key]="$w $rss"; fi
}
for i in 1 2 3 4 5; do
  for X in A B; do
    bin=${!X}
    run "$X h2" "$bin" encode --spec "$tmp/$X-hash.json" "$corpus" -o "$tmp/$X-h2.svm" --workers 2 --progress never
    run "$X h1" "$bin" encode --spec "$tmp/$X-hash.json" "$corpus" -o "$tmp/$X-h1.svm" --workers 1 --progress never
    run "$X v2" "$bin" encode --spec "$tmp/$X-vocab.json" "$corpus" -o "$tmp/$X-v2.svm" --workers 2 --progress never
    run "$X l2" "$bin" learn "$corpus" $F -o "$tmp/$X-l.json" --workers 2
    run "$X s2" "$bin" encode --spec "$tmp/$X-hashstem.json" "$corpus" -o "$tmp/$X-s2.svm" --workers 2 --progress never
  done
done
cmp "$tmp/A-h2.svm" "$tmp/B-h2.svm" && cmp "$tmp/A-v2.svm" "$tmp/B-v2.svm" && echo "rows identical"
echo "corpus $bytes bytes; floor $floor MB/s; load $(cut -d' ' -f1-3 /proc/loadavg)"
printf "%-34s %22s %22s\n" figure before after
for k in h2 h1 v2 l2 s2; do
  read -r wa ra <<<"${best[A $k]}"; read -r wb rb <<<"${best[B $k]}"
  awk -v k="$k" -v wa=$wa -v wb=$wb -v ra=$ra -v rb=$rb -v b=$bytes -v f=$floor 'BEGIN{
    n["h2"]="encode hashing 2^20, 2 workers"; n["h1"]="encode hashing 2^20, 1 worker"; n["v2"]="encode vocabulary, 2 workers"; n["l2"]="learn vocabulary, 2 workers"; n["s2"]="encode hashing + --stem en, 2w";
    printf "%-34s %6.2fx %6.1f MiB     %6.2fx %6.1f MiB\n", n[k], b/1e6/wa/f, ra/1024, b/1e6/wb/f, rb/1024}'
done
