package tablefield

import (
	"math"
	"testing"
)

// TestPeriodicZone reads a time in a named zone: 05:00 UTC on 15 March
// 2024 is 06:00 in Oslo (CET, UTC+1, before the change to summer time on
// the last Sunday of March, EU Directive 2000/84/EC).
func TestPeriodicZone(t *testing.T) {
	f, err := ParseTime("created", "Europe/Oslo")
	if err != nil {
		t.Fatal(err)
	}
	fc, err := newCodec(&f)
	if err != nil {
		t.Fatal(err)
	}
	tm, miss, err := fc.when([]byte("2024-03-15T05:00:00Z"))
	if err != nil || miss {
		t.Fatal(err, miss)
	}
	p := Periodic(tm)
	if p[0] != 1 || math.Abs(p[1]) > 1e-15 {
		t.Errorf("hour sin, cos = %v, %v; want 1, 0", p[0], p[1])
	}
	// A layout without a zone is read in the field's zone.
	f2, _ := ParseTime("d:2006-01-02 15:04", "Europe/Oslo")
	fc2, _ := newCodec(&f2)
	tm, _, err = fc2.when([]byte("2024-03-15 06:00"))
	if err != nil || tm.Hour() != 6 || tm.Location().String() != "Europe/Oslo" {
		t.Errorf("%v %v", tm, err)
	}
	if _, err := ParseTime("x", "Mars/Olympus"); err == nil {
		t.Error("unknown zone accepted")
	}
}
