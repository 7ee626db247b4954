package web

import (
	"net/http"
	"regexp"
	"testing"
)

// TestDemoNightSNR plans a fixed night of the demo scenario (a date in the
// address, so any test clock gives the same night) with the demo site's
// default instrument: blocks of S/N goals show their S/N and the sky used,
// and the S/N-sized exposure lengths differ from block to block.
func TestDemoNightSNR(t *testing.T) {
	d := newDemo(t)
	path := "/night?site=" + i64s(d.info.Site.ID) + "&list=" + i64s(d.info.List.ID) + "&date=2026-12-01"
	resp, body := d.get(t, path)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("%s: %d", path, resp.StatusCode)
	}
	snr := regexp.MustCompile(`data-testid="block-snr">S/N (\d+) per exposure, sky (\d+\.\d\d) mag/arcsec² \(exposure sized`).FindAllStringSubmatch(body, -1)
	if len(snr) < 2 {
		t.Fatalf("%d S/N-sized blocks on the demo night, want at least 2:\n%s", len(snr), body)
	}
	exps := map[string]bool{}
	for _, m := range regexp.MustCompile(`<td class="num">\s*\d+ × ([0-9.]+) s \+ [0-9.]+ s\s*<br/?><small data-testid="block-snr">S/N \d+ per exposure, sky [0-9.]+ mag/arcsec² \(exposure sized`).FindAllStringSubmatch(body, -1) {
		exps[m[1]] = true
	}
	t.Logf("S/N-sized exposures: %v", exps)
	if len(exps) < 2 {
		t.Errorf("S/N-sized exposure lengths %v: want at least two different ones", exps)
	}
	// The second instrument by name, and an unknown one refused naming
	// the field and the accepted names.
	resp, body = d.get(t, path+"&instrument=Slit+spectrograph+%28invented%29")
	if resp.StatusCode != http.StatusOK || !regexp.MustCompile(`<option value="Slit spectrograph \(invented\)" selected`).MatchString(body) {
		t.Errorf("second instrument: %d", resp.StatusCode)
	}
	resp, body = d.get(t, path+"&instrument=Camera")
	if resp.StatusCode != http.StatusUnprocessableEntity || !regexp.MustCompile(`Camera.*Imager \(invented\)`).MatchString(body) {
		t.Errorf("unknown instrument: %d", resp.StatusCode)
	}
}
