package stopwords

import (
	"bytes"
	"embed"
	"fmt"
	"slices"
	"strings"
	"sync"
)

// The built-in lists live in data/<lang>.txt, one word per line in the
// published order, each file headed by '#' lines naming the source and
// licence ("# Source: ..." is what [Source] returns). scripts/gen-stopwords.sh
// regenerates them from Debian liblingua-stopwords-perl.
//
// The negation keep-lists live in data/negations-<lang>.txt. They are
// bowline's own choice, not part of any published list; every word in them
// also occurs in that language's list.
//
//go:embed data/*.txt
var dataFS embed.FS

type builtinList struct {
	words     []string
	negations []string
	source    string
}

var builtins = sync.OnceValue(loadBuiltins)

func loadBuiltins() map[string]*builtinList {
	entries, err := dataFS.ReadDir("data")
	if err != nil {
		panic("stopwords: embedded data: " + err.Error())
	}
	m := make(map[string]*builtinList)
	for _, e := range entries {
		name := e.Name()
		lang, ok := strings.CutSuffix(name, ".txt")
		if !ok || strings.HasPrefix(name, "negations-") {
			continue
		}
		raw := mustRead("data/" + name)
		words, err := ReadList(bytes.NewReader(raw), "data/"+name)
		if err != nil {
			panic("stopwords: embedded data: " + err.Error())
		}
		l := &builtinList{words: words}
		for line := range strings.Lines(string(raw)) {
			if s, ok := strings.CutPrefix(line, "# Source: "); ok {
				l.source = strings.TrimSpace(s)
				break
			}
		}
		neg := "data/negations-" + lang + ".txt"
		if b, err := dataFS.ReadFile(neg); err == nil {
			l.negations, err = ReadList(bytes.NewReader(b), neg)
			if err != nil {
				panic("stopwords: embedded data: " + err.Error())
			}
		}
		m[lang] = l
	}
	return m
}

func mustRead(name string) []byte {
	b, err := dataFS.ReadFile(name)
	if err != nil {
		panic("stopwords: embedded data: " + err.Error())
	}
	return b
}

// Languages returns the codes of the built-in lists, sorted.
func Languages() []string {
	m := builtins()
	langs := make([]string, 0, len(m))
	for lang := range m {
		langs = append(langs, lang)
	}
	slices.Sort(langs)
	return langs
}

// Builtin returns the words of the built-in list for lang (a code from
// [Languages], case-insensitive) in the published order, duplicates
// included. The caller may modify the returned slice.
func Builtin(lang string) ([]string, error) {
	l := builtins()[strings.ToLower(lang)]
	if l == nil {
		return nil, fmt.Errorf("stopwords: no built-in list for language %q (known: %s)",
			lang, strings.Join(Languages(), " "))
	}
	return slices.Clone(l.words), nil
}

// Source returns one line naming the published source and licence of the
// built-in list for lang, or "" if there is no such list.
func Source(lang string) string {
	if l := builtins()[strings.ToLower(lang)]; l != nil {
		return l.source
	}
	return ""
}

// Negations returns the negation keep-list for lang: the words of its
// built-in list that negate (for English "no", "nor", "not", "cannot" and
// the list's n't forms). The keep-lists are bowline's own choice. It returns
// nil for an unknown language.
func Negations(lang string) []string {
	if l := builtins()[strings.ToLower(lang)]; l != nil {
		return slices.Clone(l.negations)
	}
	return nil
}
