package vocab

import (
	"math/rand/v2"
	"strings"
	"testing"
)

func wordOrder(code int) (int, bool) { return code, code >= 1 && code <= 16 }

func TestIndexFindsEveryKey(t *testing.T) {
	keys := []string{"bike", "dock bike", "a|bike", "b|dock", "b|dock bike", "#<bi", "dock bike ride", "abcdefgh", "abcdefghi abcdefgh", "x y"}
	orders := []int{1, 2, 1, 1, 2, 103, 3, 1, 2, 1}
	// One field without prefix: "a|bike" cannot be a word of one field's
	// tokens, so it is found by its bytes, like the character n-gram, the
	// trigram and the odd unigram "x y".
	x, err := NewIndex(keys, orders, nil, wordOrder)
	if err != nil {
		t.Fatal(err)
	}
	id := func(w string) int32 { return x.Word([]byte(w)) }
	if c := x.Unigram(0, id("bike")); c != 0 {
		t.Errorf("bike: %d", c)
	}
	if c := x.Bigram(0, id("dock"), id("bike")); c != 1 {
		t.Errorf("dock bike: %d", c)
	}
	if c := x.Bigram(0, id("bike"), id("dock")); c != -1 {
		t.Errorf("bike dock: %d", c)
	}
	if c := x.Unigram(0, id("dock")); c != -1 {
		t.Errorf("dock alone is no column: %d", c)
	}
	if c := x.Unigram(0, id("abcdefgh")); c != 7 {
		t.Errorf("8-byte word: %d", c)
	}
	if c := x.Bigram(0, id("abcdefghi"), id("abcdefgh")); c != 8 {
		t.Errorf("9-byte word: %d", c)
	}
	if id("ride") != -1 || id("") != -1 {
		t.Error("a word of no unigram or bigram key has an id")
	}
	for i, k := range []string{"a|bike", "b|dock", "#<bi", "dock bike ride", "x y"} {
		if c, ok := x.Lookup([]byte(k)); !ok || keys[c] != k {
			t.Errorf("%d: Lookup(%q) = %d %v", i, k, c, ok)
		}
	}
	if !x.OddWordKeys() {
		t.Error("unigram key with a space not reported as odd")
	}

	// Two fields: prefixes route keys to their field.
	x, err = NewIndex(keys, orders, []string{"a|", "b|"}, wordOrder)
	if err != nil {
		t.Fatal(err)
	}
	if c := x.Unigram(0, x.Word([]byte("bike"))); c != 2 {
		t.Errorf("a|bike: %d", c)
	}
	if c := x.Unigram(1, x.Word([]byte("dock"))); c != 3 {
		t.Errorf("b|dock: %d", c)
	}
	if c := x.Bigram(1, x.Word([]byte("dock")), x.Word([]byte("bike"))); c != 4 {
		t.Errorf("b|dock bike: %d", c)
	}
	if c := x.Unigram(1, x.Word([]byte("bike"))); c != -1 {
		t.Errorf("b|bike is no key: %d", c)
	}
	if c, ok := x.Lookup([]byte("bike")); !ok || c != 0 {
		t.Errorf("unprefixed key under two fields: %d %v", c, ok)
	}
}

func TestIndexRefusesDuplicates(t *testing.T) {
	for _, keys := range [][]string{{"bike", "bike"}, {"dock bike", "dock bike"}, {"#<b", "#<b"}} {
		orders := []int{1, 1}
		if strings.Contains(keys[0], " ") {
			orders = []int{2, 2}
		}
		if keys[0][0] == '#' {
			orders = []int{102, 102}
		}
		if _, err := NewIndex(keys, orders, nil, wordOrder); err == nil || !strings.Contains(err.Error(), "twice") {
			t.Errorf("%q: %v", keys, err)
		}
	}
}

// TestPairTableAgainstMap checks the open-addressing table against Go's map
// on random keys, through growth.
func TestPairTableAgainstMap(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	var tab pairTable
	ref := map[uint64]int32{}
	for i := range 50000 {
		k := r.Uint64()%20000 + 1
		_, had := ref[k]
		if tab.Insert(k, int32(i)) == had {
			t.Fatalf("Insert(%d) added=%v, key present=%v", k, !had, had)
		}
		if !had {
			ref[k] = int32(i)
		}
	}
	if tab.Len() != len(ref) {
		t.Fatalf("Len %d, want %d", tab.Len(), len(ref))
	}
	for k := uint64(1); k <= 20001; k++ {
		v, ok := tab.Get(k)
		w, wok := ref[k]
		if ok != wok || v != w {
			t.Fatalf("Get(%d) = %d %v, want %d %v", k, v, ok, w, wok)
		}
	}
}

// TestIndexWordsByLength: words on both sides of the packed limits (8, 9,
// 16 and 17 bytes) get ids and columns; a key word holding NUL, which no
// token holds, is found by its bytes and does not take the column of the
// word it would pack like.
func TestIndexWordsByLength(t *testing.T) {
	keys := []string{"abcdefgh", "abcdefghi", "abcdefghijklmnop", "abcdefghijklmnopq",
		"abcdefghijklmnop abcdefghijklmnopq", "ab", "ab\x00", "abcdefghij\x00", "abcdefghij"}
	orders := []int{1, 1, 1, 1, 2, 1, 1, 1, 1}
	x, err := NewIndex(keys, orders, nil, wordOrder)
	if err != nil {
		t.Fatal(err)
	}
	id := func(w string) int32 { return x.Word([]byte(w)) }
	for col, k := range keys {
		switch {
		case strings.Contains(k, "\x00"):
			if c, ok := x.Lookup([]byte(k)); !ok || c != col {
				t.Errorf("%q: Lookup = %d %v, want %d", k, c, ok, col)
			}
		case orders[col] == 1:
			if c := x.Unigram(0, id(k)); int(c) != col {
				t.Errorf("%q: column %d, want %d", k, c, col)
			}
		}
	}
	if c := x.Bigram(0, id("abcdefghijklmnop"), id("abcdefghijklmnopq")); c != 4 {
		t.Errorf("bigram of a 16- and a 17-byte word: %d", c)
	}
	if id("abcdefghijklmno") != -1 || id("abcdefghijklmnopqr") != -1 {
		t.Error("a word of no key has an id")
	}
}
