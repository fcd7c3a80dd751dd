package main

import (
	"fmt"
	"io"
	"regexp"
	"sort"
	"strings"

	"github.com/bowline/bowline/spec"
)

func runInspect(args []string, stdout, stderr io.Writer) error {
	c := newCommand("inspect", "SPEC [flags]", "Shows a spec: fingerprint, settings, size, top terms by document count.")
	var top int
	var fmap string
	c.fs.IntVar(&top, "top", 20, "how many top terms to list")
	c.fs.StringVar(&fmap, "feature-map", "", "also write the feature map (index, feature, document count) to FILE")
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.pos) != 1 {
		return usagef("bowline inspect needs one spec file")
	}
	s, err := spec.Load(c.pos[0])
	if err != nil {
		return err
	}
	writeInspect(stdout, s, top)
	if fmap != "" {
		return writeFeatureMap(fmap, s, 1)
	}
	return nil
}

func writeInspect(w io.Writer, s *spec.Spec, top int) {
	ct := &s.Content
	fmt.Fprintf(w, "spec         %s\n", s.Fingerprint)
	if s.Parent != "" {
		fmt.Fprintf(w, "parent       %s\n", s.Parent)
	}
	fmt.Fprintf(w, "written by   %s (schema %d)\n", s.Tool, spec.SchemaVersion)
	fmt.Fprintf(w, "mode         %s\n", ct.Mode)
	fmt.Fprintf(w, "columns      %d\n", s.Columns())
	fmt.Fprintf(w, "trained on   %d documents\n", ct.Docs)
	fmt.Fprintf(w, "\ninput        format %s, text %s", ct.Input.Format, strings.Join(ct.Input.Text, ", "))
	if ct.Input.Label != "" {
		fmt.Fprintf(w, ", label %s", ct.Input.Label)
	}
	if ct.Input.ID != "" {
		fmt.Fprintf(w, ", id %s", ct.Input.ID)
	}
	fmt.Fprintln(w)
	t := ct.Tokens
	fmt.Fprintf(w, "tokens       unicode %s, case %s, accents %s, numbers %s, length %d-%d\n", t.Unicode, t.Case, t.Accents, t.Numbers, t.MinLen, t.MaxLen)
	stop := "none"
	if len(ct.Stop.Words) > 0 {
		neg := "negations kept"
		if !ct.Stop.KeepNegations {
			neg = "negations dropped"
		}
		stop = fmt.Sprintf("%d words from %s, %s", len(ct.Stop.Words), strings.Join(ct.Stop.Sources, ", "), neg)
	}
	fmt.Fprintf(w, "stop words   %s\n", stop)
	fmt.Fprintf(w, "stem         %s\n", ct.Stem)
	fmt.Fprintf(w, "n-grams      words %s, chars %s\n", ct.NGrams.Words, ct.NGrams.Chars)
	fmt.Fprintf(w, "weights      tf %s, idf %s, norm %s\n", ct.Weights.TF, ct.Weights.IDF, ct.Weights.Norm)
	switch ct.Labels.Kind {
	case "string":
		fmt.Fprintf(w, "labels       ")
		for i, l := range ct.Labels.Map {
			if i > 0 {
				fmt.Fprint(w, ", ")
			}
			fmt.Fprintf(w, "%s=%d", l, i+1)
		}
		fmt.Fprintln(w)
	default:
		fmt.Fprintf(w, "labels       %s\n", ct.Labels.Kind)
	}
	if h := ct.Hashing; h != nil {
		fmt.Fprintf(w, "hashing      width %d, seed %d, signed %v\n", h.Width, h.Seed, h.Signed)
		return
	}
	v := ct.Vocabulary
	fmt.Fprintf(w, "vocabulary   %d keys; min-docs %d, max-doc-share %g, max-terms %d, unseen %s\n", len(v.Keys), v.MinDocs, v.MaxDocShare, v.MaxTerms, v.Unseen)
	per := map[int]int{}
	for _, o := range v.Orders {
		per[o]++
	}
	var codes []int
	for k := range per {
		codes = append(codes, k)
	}
	sort.Ints(codes)
	fmt.Fprintf(w, "per order   ")
	for _, k := range codes {
		fmt.Fprintf(w, " %s %d", spec.OrderLabel(k), per[k])
	}
	fmt.Fprintln(w)
	if top > len(v.Keys) {
		top = len(v.Keys)
	}
	if top > 0 {
		fmt.Fprintf(w, "\ntop %d terms by document count\n", top)
		for i := 0; i < top; i++ {
			fmt.Fprintf(w, "  %6d  %-8d %s\n", i+1, v.DocCounts[i], v.Keys[i])
		}
	}
	var risky []string
	for _, k := range v.Keys {
		if looksPersonal(k) {
			risky = append(risky, k)
		}
	}
	if len(risky) > 0 {
		fmt.Fprintf(w, "\ncaution: %d kept keys look like e-mail addresses, URLs with queries or long digit runs, e.g. %s\n", len(risky), strings.Join(firstN(risky, 5), ", "))
		fmt.Fprintln(w, "a spec carries strings from the training text; raise --min-docs or use --hash before shipping it")
	}
}

var personal = regexp.MustCompile(`[^\s@]+@[^\s@]+\.[a-z]{2,}|https?\S*\?\S+|\d{7,}`)

func looksPersonal(k string) bool { return personal.MatchString(k) }

func firstN(s []string, n int) []string {
	if len(s) > n {
		return s[:n]
	}
	return s
}
