package report

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
)

func fieldFigures() *Figures {
	return &Figures{Command: "encode", Docs: 4, Fields: []FieldFigures{
		{Name: "zone", Kind: "category", Docs: 4, Missing: 1, MissingShare: 0.25,
			Category: &CategoryFigures{Levels: 2, LevelsSeen: 3, Other: 1, OtherShare: 0.25, Unseen: 1, UnseenShare: 0.25}},
		{Name: "age", Kind: "number", Docs: 4, Missing: 2, MissingShare: 0.5,
			Number: &NumberFigures{Values: 2, Mean: 42.5, SD: 12.5, FrozenMean: 40, FrozenSD: 14.14, Min: 30, Max: 55,
				FrozenMin: 20, FrozenMax: 60}},
		{Name: "created", Kind: "time", Docs: 4, Missing: 2, MissingShare: 0.5,
			Time: &TimeFigures{Values: 2, First: "2024-03-15T06:00:00Z", Last: "2024-03-15T06:00:00Z", Layout: "2006-01-02T15:04:05Z07:00", Zone: "UTC"}},
	}}
}

// TestFieldSection checks the table-field figures in all three renderings.
func TestFieldSection(t *testing.T) {
	f := fieldFigures()
	var text bytes.Buffer
	if err := f.WriteText(&text); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{
		"table fields\n",
		"    zone     category     4        1          25.0%\n",
		"    zone        2     3      1        25.0%       1         25.0%\n",
		"    age    42.5           40  12.5      14.14   30   55  20..60               0  0%\n",
		"    created  2024-03-15T06:00:00Z  2024-03-15T06:00:00Z  UTC\n",
	} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("text lacks %q:\n%s", want, text.String())
		}
	}
	var js bytes.Buffer
	if err := f.WriteJSON(&js); err != nil {
		t.Fatal(err)
	}
	var back struct {
		Fields []map[string]any `json:"fields"`
	}
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	// Stable names scripts read.
	if len(back.Fields) != 3 || back.Fields[0]["missing_share"] != 0.25 ||
		back.Fields[0]["category"].(map[string]any)["unseen_share"] != 0.25 ||
		back.Fields[1]["number"].(map[string]any)["frozen_mean"] != 40.0 ||
		back.Fields[1]["number"].(map[string]any)["out_of_range_share"] != 0.0 {
		t.Errorf("JSON: %s", js.String())
	}
	var html bytes.Buffer
	if err := f.WriteHTML(&html); err != nil {
		t.Fatal(err)
	}
	if h := html.String(); !strings.Contains(h, "<h2>table fields</h2>") || !strings.Contains(h, "<svg") || !strings.Contains(h, "unseen share") {
		t.Errorf("HTML lacks the table fields section or its plot")
	}
}
