#!/bin/sh
# Regenerates the gzip test inputs of package corpus with GNU gzip
# (Debian package gzip). -n leaves out the name and time stamp, so the
# output depends only on the input and the gzip version.
set -eu
cd "$(dirname "$0")"
gzip -9 -n -c pellwick.tsv > pellwick.tsv.gz
# Two gzip members one after the other (RFC 1952 section 2.2: a gzip file
# is a series of members).
head -n 4 pellwick.tsv | gzip -9 -n -c > pellwick-members.tsv.gz
tail -n +5 pellwick.tsv | gzip -9 -n -c >> pellwick-members.tsv.gz
