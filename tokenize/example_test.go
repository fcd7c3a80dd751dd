package tokenize_test

import (
	"fmt"
	"strings"

	"github.com/bowline/bowline/tokenize"
)

func ExampleTokenizer_Each() {
	tk, err := tokenize.New(tokenize.DefaultOptions())
	if err != nil {
		panic(err)
	}
	text := "The dock on Harbour Street didn’t unlock my e-bike: charged 3.50 twice!"
	var toks []string
	tk.Each([]byte(text), func(tok []byte, kind tokenize.Kind) {
		toks = append(toks, string(tok))
	})
	fmt.Println(strings.Join(toks, " | "))
	// Output:
	// the | dock | on | harbour | street | didn't | unlock | my | e | bike | charged | 3.50 | twice
}

func ExampleTokenizer_Each_options() {
	o := tokenize.DefaultOptions()
	o.Accents = tokenize.AccentsStrip
	o.Numbers = tokenize.NumbersMask
	o.MinLen = 2
	tk, err := tokenize.New(o)
	if err != nil {
		panic(err)
	}
	tk.Each([]byte("Crème brûlée at the ＧＲＵＮＧＡＳＳＥ dock: 2 ﬁne bikes, 1,000 rides"), func(tok []byte, kind tokenize.Kind) {
		fmt.Printf("%s (%v)\n", tok, kind)
	})
	fmt.Printf("%+v\n", tk.Stats())
	// Output:
	// creme (letter)
	// brulee (letter)
	// at (letter)
	// the (letter)
	// grungasse (letter)
	// dock (letter)
	// <num> (number)
	// fine (letter)
	// bikes (letter)
	// <num> (number)
	// rides (letter)
	// {Texts:1 Bytes:83 InvalidUTF8:0 NULs:0 Tokens:11 DroppedNumbers:0 DroppedLength:0}
}

func ExampleStemmer_Stem() {
	st, err := tokenize.NewStemmer("english")
	if err != nil {
		panic(err)
	}
	for _, w := range []string{"riders", "riding", "rides", "unlocked", "connection", "generously", "the"} {
		fmt.Printf("%s -> %s\n", w, st.Stem([]byte(w)))
	}
	_, err = tokenize.NewStemmer("klingon")
	fmt.Println(err)
	// Output:
	// riders -> rider
	// riding -> ride
	// rides -> ride
	// unlocked -> unlock
	// connection -> connect
	// generously -> generous
	// the -> the
	// tokenize: no stemmer for language "klingon" (known: en, es, fr, hu, no, ru, sv)
}
