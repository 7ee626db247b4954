package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner/export"
)

// exposureArgs is an invented site, target and instrument at an instant with
// a nearly full Moon up.
var exposureArgs = []string{"exposure", "--lat", "-31.27", "--lon", "149.07", "--elev", "1150",
	"--ra", "05:41:20", "--dec", "-20:15:00", "--at", "2026-12-24T14:00:00Z",
	"--mag", "16.5", "--band", "V", "--aperture-m", "2.0", "--throughput", "0.35", "--pixel-scale", "0.4", "--seeing", "1.3"}

var exposureKeys = []string{"instant", "band", "mag", "airmass", "alt_deg", "sun_alt_deg", "moon_alt_deg", "moon_illuminated",
	"moon_phase_angle_deg", "moon_sep_deg", "extinction", "sky_mag_arcsec2", "sky_dark_mag_arcsec2", "sky_moon_mag_arcsec2",
	"sky_twilight_mag_arcsec2", "moon_brightening_mag", "zero_point_e_per_s", "enclosed_fraction", "pixels", "source_e_per_s",
	"sky_e_per_s_per_pixel", "dark_e_per_s_per_pixel", "read_noise_e", "exposure_s", "snr", "period_days", "smear_phase"}

// TestExposureJSON checks the flag plumbing against ephem for the same
// inputs, and that --snr and --exposure-s are inverse.
func TestExposureJSON(t *testing.T) {
	m := runJSON(t, append(exposureArgs, "--snr", "50", "--period", "0.185")...)
	hasKeys(t, m, exposureKeys...)

	site := ephem.Site{LatDeg: -31.27, LonEastDeg: 149.07, ElevM: 1150}
	star := ephem.Star{RADeg: (5 + 41.0/60 + 20.0/3600) * 15, DecDeg: -(20 + 15.0/60)}
	det := ephem.Detector{Band: ephem.BandV, ApertureM: 2, Throughput: 0.35, ReadNoiseE: 5, DarkEPerSPix: 0.002,
		PixelArcsec: 0.4, RadiusArcsec: 1.3, SeeingArcsec: 1.3}
	e, err := ephem.ExposureAt(site, star, time.Date(2026, 12, 24, 14, 0, 0, 0, time.UTC), det, 0.15, 21.6, 16.5)
	if err != nil {
		t.Fatal(err)
	}
	wantT, err := e.Rates.ExposureForSNR(50)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		key  string
		want float64
	}{
		{"airmass", e.Point.Airmass}, {"sky_mag_arcsec2", e.Sky.Mag}, {"sky_dark_mag_arcsec2", e.Sky.DarkMag},
		{"source_e_per_s", e.Rates.SourceEPerS}, {"pixels", e.Rates.Pixels}, {"exposure_s", wantT}, {"snr", 50},
		{"smear_phase", wantT / (0.185 * 86400)}, {"moon_sep_deg", e.Point.MoonSepDeg},
	} {
		if got := num(t, m, c.key); math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %v, ephem gives %v", c.key, got, c.want)
		}
	}
	if m["sky_twilight_mag_arcsec2"] != nil {
		t.Errorf("twilight at Sun altitude %v: %v", m["sun_alt_deg"], m["sky_twilight_mag_arcsec2"])
	}

	back := runJSON(t, append(exposureArgs, "--exposure-s", strings.TrimSpace(f(wantT, 9)))...)
	if got := num(t, back, "snr"); math.Abs(got-50) > 1e-6 {
		t.Errorf("S/N of the solved exposure = %v, want 50", got)
	}
	if back["smear_phase"] != nil {
		t.Errorf("smear without --period: %v", back["smear_phase"])
	}
}

// TestExposureText checks the human report's lines.
func TestExposureText(t *testing.T) {
	stdout, stderr, code := runCmd(t, append(exposureArgs, "--snr", "50", "--period", "0.185")...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"sky (V)", "mag/arcsec²", "phase angle", "exposure", "s for S/N 50.0", "smear", "of the orbit", safetyNote} {
		if !strings.Contains(stdout, want) {
			t.Errorf("report lacks %q:\n%s", want, stdout)
		}
	}
}

func TestExposureBadInput(t *testing.T) {
	replace := func(flag, value string) []string {
		out := append([]string(nil), exposureArgs...)
		for i := range out {
			if out[i] == flag {
				out[i+1] = value
				return out
			}
		}
		return append(out, flag, value)
	}
	cases := []struct {
		name string
		argv []string
		want []string
	}{
		{"negative snr", replace("--snr", "-5"), []string{"--snr -5", "0 < S/N"}},
		{"zero aperture", append(replace("--aperture-m", "0"), "--snr", "50"), []string{"--aperture-m 0", "0 < aperture ≤ 50"}},
		{"bright magnitude", append(replace("--mag", "-3"), "--snr", "50"), []string{"--mag -3", "−2..30"}},
		{"faint magnitude", append(replace("--mag", "31"), "--snr", "50"), []string{"--mag 31", "−2..30"}},
		{"unknown band", append(replace("--band", "Q"), "--snr", "50"), []string{"--band Q", "U, B, V, R, I, g, r, i or z"}},
		{"both modes", append(replace("--snr", "50"), "--exposure-s", "60"), []string{"exactly one of --snr"}},
		{"neither mode", exposureArgs, []string{"exactly one of --snr"}},
		{"daytime", append(replace("--at", "2026-12-24T08:00:00Z"), "--snr", "50"), []string{"sun altitude", "daytime"}},
		{"no efficiency", append(removeFlag(exposureArgs, "--throughput"), "--snr", "50"), []string{"missing --zero-point"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			stdout, stderr, code := runCmd(t, c.argv...)
			if code != exitUsage || stdout != "" {
				t.Fatalf("exit %d, stdout %q, stderr %q; want exit %d", code, stdout, stderr, exitUsage)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
		})
	}
}

// removeFlag returns argv without flag and its value.
func removeFlag(argv []string, flag string) []string {
	var out []string
	for i := 0; i < len(argv); i++ {
		if argv[i] == flag {
			i++
			continue
		}
		out = append(out, argv[i])
	}
	return out
}

func TestExposureBelowHorizon(t *testing.T) {
	argv := append(removeFlag(exposureArgs, "--at"), "--at", "2026-12-24T03:00:00Z", "--snr", "50")
	_, stderr, code := runCmd(t, argv...)
	if code != exitUsage || !strings.Contains(stderr, "altitude -34.66°") || !strings.Contains(stderr, "above the horizon") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

// snrPlanCSV is an invented 88-minute binary with an S/N goal and a second,
// faint one whose S/N the smear limit never allows.
const snrPlanCSV = `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority,band,mag,snr,max_smear
SNR-A,04:12:33.9,-12:48:07,2460500.4321987,0.0612345678,0.25;0.75,0.06,60,20,1,V,17.5,40,
SNR-B,04:20:00,-10:00:00,2460500.1,0.0612345678,0.5,0.05,60,20,2,V,23,100,0.02
`

var planInstrumentArgs = []string{"--aperture-m", "1.5", "--throughput", "0.3", "--pixel-scale", "0.35", "--seeing", "1.1"}

// TestPlanSizesBySNR: with an instrument, plan sizes the S/N goal's blocks,
// shows their S/N and sky, and lists the unreachable goal with its reason.
func TestPlanSizesBySNR(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", snrPlanCSV)
	argv := args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath}, planInstrumentArgs)
	m := runJSON(t, argv...)
	blocks, _ := m["blocks"].([]any)
	if len(blocks) == 0 {
		t.Fatalf("no blocks: %v", m)
	}
	exposures := map[string]bool{}
	for _, bv := range blocks {
		b := bv.(map[string]any)
		if b["sized_by_snr"] != true || b["snr"] == nil || b["sky_mag_arcsec2"] == nil {
			t.Fatalf("block not sized: %v", b)
		}
		if snr := num(t, b, "snr"); snr < 36 || snr > 44 {
			t.Errorf("block S/N %v, goal 40", snr)
		}
		exposures[b["exposure_s"].(json.Number).String()] = true
	}
	if len(exposures) < 2 {
		t.Errorf("exposures %v: want them to vary through the night", exposures)
	}
	unsched, _ := m["unscheduled"].([]any)
	found := false
	for _, uv := range unsched {
		u := uv.(map[string]any)
		if u["target"] == "SNR-B" && u["reason_code"] == "snr_unreachable" && strings.Contains(u["reason"].(string), "best S/N reachable is") {
			found = true
		}
	}
	if !found {
		t.Errorf("SNR-B not listed as snr_unreachable: %v", unsched)
	}
	stdout, stderr, code := runCmd(t, argv...)
	if code != 0 || stderr != "" || !strings.Contains(stdout, "S/N 4") || !strings.Contains(stdout, "(sized)") {
		t.Errorf("text plan: exit %d, stderr %q\n%s", code, stderr, stdout)
	}
	// Without the instrument the typed 60 s exposures are used.
	plain := runJSON(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath})...)
	for _, bv := range plain["blocks"].([]any) {
		b := bv.(map[string]any)
		if num(t, b, "exposure_s") != 60 || b["snr"] != nil {
			t.Errorf("without an instrument: %v", b)
		}
	}
}

func TestPlanInstrumentBadInput(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", snrPlanCSV)
	base := args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath})
	cases := []struct {
		name string
		argv []string
		want string
	}{
		{"no aperture", append(append([]string(nil), base...), "--throughput", "0.3"), "missing --aperture-m"},
		{"no efficiency", append(append([]string(nil), base...), "--aperture-m", "1.5", "--pixel-scale", "0.35"), "missing --zero-point"},
		{"bad list", append(append([]string(nil), base...), "--aperture-m", "1.5", "--pixel-scale", "0.35", "--zero-point", "H=1e9"), "--zero-point H=1e9"},
		{"zero aperture", append(append([]string(nil), base...), "--aperture-m", "0", "--pixel-scale", "0.35", "--throughput", "0.3"), "--aperture-m 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, c.argv...)
			if code != exitUsage || !strings.Contains(stderr, c.want) {
				t.Errorf("exit %d, stderr %q; want %q", code, stderr, c.want)
			}
		})
	}
}

// TestWindowsSizeBySNR: with an instrument, windows carry the S/N sizing in
// JSON and CSV, and an S/N the smear limit never allows gives no exposures.
func TestWindowsSizeBySNR(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", snrPlanCSV)
	base := args([]string{"windows"}, siteArgs, []string{"--tz", "America/Santiago", "--targets", csvPath,
		"--from", "2026-12-01", "--to", "2026-12-03"}, planInstrumentArgs)
	m := runJSON(t, base...)
	sized, short := 0, 0
	for _, wv := range m["windows"].([]any) {
		w := wv.(map[string]any)
		sz, ok := w["sizing"].(map[string]any)
		if !ok {
			t.Fatalf("%s window without sizing: %v", w["target"], w)
		}
		switch w["target"] {
		case "SNR-A":
			if sz["snr_reached"] != true || num(t, sz, "snr") < 40 || num(t, w, "whole_exposures") == 0 {
				t.Errorf("SNR-A window %v", w)
			}
			sized++
		case "SNR-B":
			if sz["snr_reached"] != false || num(t, sz, "snr") >= 100 || num(t, w, "whole_exposures") != 0 {
				t.Errorf("SNR-B window %v", w)
			}
			short++
		}
	}
	if sized == 0 || short == 0 {
		t.Errorf("%d sized and %d short windows", sized, short)
	}
	stdout, stderr, code := runCmd(t, append(base, "--format", "csv")...)
	if code != 0 || stderr != "" || !strings.HasPrefix(stdout, strings.Join(append(append([]string(nil), export.WindowsCSVHeader...), export.WindowsCSVSizing...), ",")+"\n") {
		t.Errorf("csv: exit %d, stderr %q\n%.300s", code, stderr, stdout)
	}
}

// TestRunSizesBySNR: run passes the instrument to every night, whose blocks
// then carry their S/N sizing in the JSON.
func TestRunSizesBySNR(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", snrPlanCSV)
	argv := args([]string{"run"}, siteArgs, []string{"--tz", "America/Santiago", "--dates", "2026-12-01,2026-12-02",
		"--targets", csvPath, "--json"}, planInstrumentArgs)
	stdout, stderr, code := runCmd(t, argv...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	if n := strings.Count(stdout, `"sized_by_snr": true`); n < 4 {
		t.Errorf("%d sized blocks in the run's JSON", n)
	}
}
