package planner_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"phasecast/planner"
)

// FuzzParseObservedCSV feeds arbitrary text to the observed-log parser: it
// must never panic; it either returns exposures that are all usable (a
// target name, a finite positive length, a mid-time) or a *TableError and
// no exposure at all.
func FuzzParseObservedCSV(f *testing.F) {
	for _, s := range []string{
		"target,start_utc,exposure_s,n_exposures,overhead_s,status,note\nRS-01,2026-04-15T01:00:00Z,300,3,20,ok,fine\n",
		"mid_utc,target,exposure_s\n2026-04-15T03:00:00Z,RS-03,600\n",
		"target,start_utc,exposure_s\n\"RS,1\",2026-04-15T01:00:00-03:00,1e2\n",
		"target,start_utc,mid_utc,exposure_s\n",
		"target,start_utc,exposure_s,n_exposures\nA,2026-04-15T01:00:00Z,NaN,10001\n",
		"\ufefftarget,start_utc,exposure_s\n# comment\n\nA,2026-04-15 01:00:00,5\n",
		"target,start_utc,exposure_s\nA,\"unterminated,5\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		got, err := planner.ParseObservedCSV(strings.NewReader(in))
		if err != nil {
			var te *planner.TableError
			if !errors.As(err, &te) || len(te.Cells) == 0 {
				t.Fatalf("error %v is not a *TableError with cells", err)
			}
			if got != nil {
				t.Fatalf("%d exposures returned with an error", len(got))
			}
			return
		}
		for i, e := range got {
			if strings.TrimSpace(e.Target) == "" || e.Mid.IsZero() || math.IsNaN(e.ExposureS) || math.IsInf(e.ExposureS, 0) || e.ExposureS <= 0 || e.Line < 2 {
				t.Fatalf("exposure %d unusable: %+v", i, e)
			}
		}
	})
}
