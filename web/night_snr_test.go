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

// TestDemoWindowsSNR lists a fixed week of the demo's queue windows with
// the default instrument: windows of S/N goals say the sized exposure and
// its S/N, in the page and in the JSON export.
func TestDemoWindowsSNR(t *testing.T) {
	d := newDemo(t)
	q := "site=" + i64s(d.info.Site.ID) + "&list=" + i64s(d.info.List.ID) + "&from=2026-12-01&to=2026-12-07"
	resp, body := d.get(t, "/windows?"+q)
	if resp.StatusCode != http.StatusOK || !regexp.MustCompile(`× \d+\.\d s \(S/N \d+, sky \d+\.\d\d mag/arcsec²\)`).MatchString(body) {
		t.Errorf("windows page: %d, no sized exposure shown", resp.StatusCode)
	}
	resp, body = d.get(t, "/windows.json?"+q)
	if resp.StatusCode != http.StatusOK || !regexp.MustCompile(`"snr": \d`).MatchString(body) || !regexp.MustCompile(`"sky_mag_arcsec2": \d`).MatchString(body) {
		t.Errorf("windows JSON: %d, no snr or sky member:\n%.2000s", resp.StatusCode, body)
	}
}
