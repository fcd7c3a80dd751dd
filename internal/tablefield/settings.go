package tablefield

import (
	"errors"
	"fmt"
	"strings"
	"time"
	_ "time/tzdata" // --time-zone works on machines without a zoneinfo database

	"github.com/bowline/bowline/spec"
)

// MaxLevels bounds the distinct levels one category field may have in a
// training corpus.
const MaxLevels = 100000

// ParseCategory returns the settings of a category field (--category NAME).
func ParseCategory(arg string) (spec.TableField, error) {
	if arg == "" {
		return spec.TableField{}, errors.New("empty field name")
	}
	return spec.TableField{Name: arg, Kind: spec.KindCategory, Category: &spec.Category{}}, nil
}

// ParseNumber returns the settings of a number field from
// "NAME[:log|:standard|:log,standard]", with the missing-value sentinels.
func ParseNumber(arg string, sentinels []string) (spec.TableField, error) {
	name, tr, _ := strings.Cut(arg, ":")
	if name == "" {
		return spec.TableField{}, fmt.Errorf("%q: empty field name", arg)
	}
	n := &spec.Number{Sentinels: append([]string(nil), sentinels...)}
	if tr != "" {
		for _, t := range strings.Split(tr, ",") {
			switch t {
			case "log":
				n.Log = true
			case "standard":
				n.Standard = true
			default:
				return spec.TableField{}, fmt.Errorf("%q: unknown transform %q (want log, standard or log,standard)", arg, t)
			}
		}
	}
	return spec.TableField{Name: name, Kind: spec.KindNumber, Number: n}, nil
}

// ParseTime returns the settings of a time field from "NAME[:LAYOUT]"
// (RFC 3339 when no layout is given) read in the IANA zone.
func ParseTime(arg, zone string) (spec.TableField, error) {
	name, layout, _ := strings.Cut(arg, ":")
	if name == "" {
		return spec.TableField{}, fmt.Errorf("%q: empty field name", arg)
	}
	if layout == "" {
		layout = time.RFC3339
	}
	if zone == "" {
		zone = "UTC"
	}
	if _, err := time.LoadLocation(zone); err != nil {
		return spec.TableField{}, fmt.Errorf("time zone %q: %v", zone, err)
	}
	return spec.TableField{Name: name, Kind: spec.KindTime, Time: &spec.Time{Layout: layout, Zone: zone}}, nil
}
