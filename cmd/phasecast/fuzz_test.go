package main

import (
	"strings"
	"testing"
)

// FuzzSky feeds arbitrary flag values to the sky and phase commands: the
// program must never panic (run would report exit status 3), must print one
// line on stderr for every error, and never NaN in its output.
func FuzzSky(f *testing.F) {
	f.Add("-27.85", "-69.12", "2650", "04:12:33.9", "-12:48:07", "2026-12-02T04:30:00Z", "0.0612345678")
	f.Add("90", "180", "-500", "0", "90", "1800-01-01T00:00:00Z", "1e-5")
	f.Add("-90", "-180", "9000", "23:59:59.999", "-90", "2199-12-31T23:59:59Z", "1e5")
	f.Add("NaN", "Inf", "1e400", "24:00:00", "-00:30:00", "tomorrow", "-1")
	f.Add("89.9999999", "0", "0", "359.9999999", "89.9999", "2026-06-21T12:00:00+14:00", "0.00001")
	f.Fuzz(func(t *testing.T, lat, lon, elev, ra, dec, at, period string) {
		for _, argv := range [][]string{
			{"sky", "--lat", lat, "--lon", lon, "--elev", elev, "--ra", ra, "--dec", dec, "--at", at, "--json"},
			{"phase", "--lat", lat, "--lon", lon, "--elev", elev, "--ra", ra, "--dec", dec, "--at", at,
				"--t0", "2460500.4321987", "--period", period, "--period-err", "1e-9", "--json"},
		} {
			stdout, stderr, code := runCmd(t, argv...)
			switch {
			case code == exitInternal:
				t.Fatalf("phasecast %q: internal error: %s", argv, stderr)
			case code != 0:
				if strings.Count(stderr, "\n") != 1 || stdout != "" {
					t.Fatalf("phasecast %q: exit %d, stdout %q, stderr %q: want one stderr line", argv, code, stdout, stderr)
				}
			case strings.Contains(stdout, "NaN") || strings.Contains(stdout, "Inf"):
				t.Fatalf("phasecast %q printed a non-finite value:\n%s", argv, stdout)
			}
		}
	})
}
