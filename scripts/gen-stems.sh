#!/bin/sh
# Regenerates testdata/stems/<lang>.tsv.gz ("word<TAB>stem") with the
# Snowball reference stemmer, stemwords (Debian libstemmer-tools 2.2.0),
# from Debian word lists. See testdata/stems/PROVENANCE.md.
#
# Needs: stemwords (libstemmer-tools), perl, gzip, and the word lists of
# wamerican, wfrench, wspanish, wswedish, wnorwegian, hunspell-ru, hunspell-hu.
set -eu
cd "$(dirname "$0")/.."
out=testdata/stems
export LC_ALL=C

need() {
	if [ ! -f "$1" ]; then
		echo "gen-stems: $1 missing (apt-get install $2)" >&2
		exit 1
	fi
}
for c in stemwords perl iconv gzip; do command -v $c >/dev/null || { echo "gen-stems: $c missing" >&2; exit 1; }; done

# words FILE EVERY ENCODING: the entries of a word list, lowercased, keeping only
# entries made of letters, marks and apostrophes (what a bowline token can
# be), deduplicated and sorted bytewise, then every EVERY-th of them.
# Hunspell lists (.dic) lose their count line and their "/flags" parts.
words() {
	case "$1" in *.dic) dic=1 ;; *) dic=0 ;; esac
	iconv -f "$3" -t UTF-8 "$1" >"$tmp/utf8"
	perl -CSD -ne '
		chomp; s/\r$//;
		s{[/\t ].*}{} if $dic;
		next if $. == 1 && $dic;
		$_ = lc $_;
		print "$_\n" if /^[\p{L}\p{M}\x27]+$/;
	' -s -- -dic="$dic" "$tmp/utf8" >"$tmp/list"
	sort -u "$tmp/list" | awk -v n="$2" '(NR - 1) % n == 0'
}

# gen CODE LANGUAGE FILE PACKAGE EVERY ENCODING
gen() {
	need "$3" "$4"
	tmp=$(mktemp -d)
	words "$3" "$5" "$6" >"$tmp/words"
	stemwords -l "$2" -i "$tmp/words" -o "$tmp/stems"
	paste "$tmp/words" "$tmp/stems" | gzip -n -9 >"$out/$1.tsv.gz"
	rm -rf "$tmp"
}

gen en english /usr/share/dict/american-english wamerican 1 UTF-8
gen es spanish /usr/share/dict/spanish wspanish 2 UTF-8
gen fr french /usr/share/dict/french wfrench 8 UTF-8
gen sv swedish /usr/share/dict/swedish wswedish 3 ISO-8859-1
gen no norwegian /usr/share/dict/bokmaal wnorwegian 20 ISO-8859-1
gen ru russian /usr/share/hunspell/ru_RU.dic hunspell-ru 4 UTF-8
gen hu hungarian /usr/share/hunspell/hu_HU.dic hunspell-hu 2 UTF-8
