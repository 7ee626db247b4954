package web

// Hostile input at the web layer (issue "Proof under load, faults and
// hostile input"): the CSV exports a spreadsheet user opens (target list,
// night plan) are checked for formula-like cells with invented targets whose
// names are formulas; uploads over the limit, deep JSON and oversize cells
// are refused with a short answer and nothing written. The cell neutraliser
// itself, export.SafeCSVCell, is fuzzed in planner/export (FuzzSafeCSVCell).

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"math"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// hostileFormulas are cells a spreadsheet would run (OWASP "CSV Injection").
var hostileFormulas = []string{"=cmd|' /C calc'!A0", "+1+cmd|' /C calc'!A0", "-1+1", "@SUM(A1:A2)", "=HYPERLINK(\"http://x\")", "-2-3"}

// hostileNumber is the tests' own idea of a cell a spreadsheet reads as a
// value despite a leading sign: a decimal number or a sexagesimal angle.
var hostileNumber = regexp.MustCompile(`^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$|^[+-]?\d{1,3}[: ]\d{1,2}([: ]\d{1,2}(\.\d*)?)?$`)

// hostileRunnable reports whether a spreadsheet would take cell for a
// formula: it starts with = + - @, a tab or a CR and is not a plain number
// or sexagesimal angle.
func hostileRunnable(cell string) bool {
	return cell != "" && strings.ContainsRune("=+-@\t\r", rune(cell[0])) && !hostileNumber.MatchString(cell)
}

// hostileCSVCells fails unless b is CSV and returns every runnable cell.
func hostileCSVCells(tb testing.TB, b []byte) (records int, runnable []string) {
	tb.Helper()
	r := csv.NewReader(bytes.NewReader(b))
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	if err != nil {
		tb.Fatalf("export is not CSV: %v", err)
	}
	for i, rec := range recs {
		for j, c := range rec {
			if hostileRunnable(c) {
				runnable = append(runnable, fmt.Sprintf("record %d field %d: %q", i+1, j+1, c))
			}
		}
	}
	return len(recs), runnable
}

// hostileFormulaList makes a site and a list of invented binaries around the
// sky whose names (and notes) are spreadsheet formulas.
func hostileFormulaList(tb testing.TB, h *harness) (siteID, listID int64) {
	tb.Helper()
	ctx := context.Background()
	owner := h.actor("owner")
	st, err := h.store.CreateSite(ctx, owner, h.teamID, store.SiteInput{Name: "=Hostile Ridge", Zone: "America/Phoenix",
		Site: ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}, Constraints: planner.DefaultConstraints()})
	if err != nil {
		tb.Fatal(err)
	}
	l, err := h.store.CreateList(ctx, owner, h.teamID, store.ListInput{Name: "@Hostile list"})
	if err != nil {
		tb.Fatal(err)
	}
	n := 12
	for i := range n {
		t0, err := store.ParseEpoch(fmt.Sprintf("2460400.%06d", 123457+i*7919), ephem.StdBJDTDB, ephem.FormJD)
		if err != nil {
			tb.Fatal(err)
		}
		name := hostileFormulas[i%len(hostileFormulas)] + fmt.Sprint(i)
		tg := planner.Target{Name: name, RADeg: float64(i*360) / float64(n), DecDeg: float64(i%5)*10 - 10, Priority: 1 + i%5,
			Tags: []string{"=tag"}, Notes: "=notes()",
			Ephem: ephem.Ephemeris{PeriodDays: 0.05 + 0.013*float64(i), T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
			Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.1, ExposureS: 60, OverheadS: 5}, {Center: 0.75, HalfWidth: 0.1, ExposureS: 60, OverheadS: 5}}}
		if _, err := h.store.CreateTarget(ctx, owner, l.ID, store.TargetInput{Target: tg, T0: t0}); err != nil {
			tb.Fatalf("CreateTarget %q: %v", name, err)
		}
	}
	return st.ID, l.ID
}

// TestHostileExportsNeutraliseFormulas: the list export (CSV) and the night
// export (CSV) of targets named like formulas hold no runnable cell.
func TestHostileExportsNeutraliseFormulas(t *testing.T) {
	h := newHarness(t)
	siteID, listID := hostileFormulaList(t, h)
	c := h.client("viewer")
	t.Run("ListCSV", func(t *testing.T) {
		resp, body := h.get(c, fmt.Sprintf("/lists/%d/export.csv", listID))
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("status %d: %.300s", resp.StatusCode, body)
		}
		n, bad := hostileCSVCells(t, []byte(body))
		if n != 13 {
			t.Fatalf("%d records, want a header and 12 targets", n)
		}
		if len(bad) > 0 {
			t.Fatalf("%d runnable cells, e.g. %s", len(bad), bad[0])
		}
	})
	t.Run("NightCSV", func(t *testing.T) {
		q := url.Values{"site": {fmt.Sprint(siteID)}, "list": {fmt.Sprint(listID)}, "date": {"2026-03-14"}, "fill": {"1"}}
		resp, body := h.get(c, "/night.csv?"+q.Encode())
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("status %d: %.300s", resp.StatusCode, body)
		}
		n, bad := hostileCSVCells(t, []byte(body))
		if n < 2 {
			t.Fatalf("the night has no blocks: nothing was checked\n%s", body)
		}
		if len(bad) > 0 {
			t.Fatalf("%d runnable cells, e.g. %s", len(bad), bad[0])
		}
		t.Logf("%d blocks checked", n-1)
	})
}

// TestHostileImportForm: an upload over the form limit, a 10 MB cell and
// 10,000-deep JSON are refused with a short answer, and nothing is written.
func TestHostileImportForm(t *testing.T) {
	h := newHarness(t)
	ctx := context.Background()
	l, err := h.store.CreateList(ctx, h.actor("owner"), h.teamID, store.ListInput{Name: "Empty"})
	if err != nil {
		t.Fatal(err)
	}
	c := h.client("editor")
	header := "name,ra,dec,t0,t0_standard,t0_convention,period_days\n"
	tests := []struct {
		name, content, format string
		maxBody               int // the answer must stay below this many bytes beyond the echoed content
	}{
		{"OverLimit", header + strings.Repeat("#", maxImportForm+1), "", 64 << 10},
		{"TenMBCell", header + "PCX A," + strings.Repeat("9", 10<<20) + ",1,2460000.5,BJD_TDB,custom,0.1\n", "csv", 64 << 10},
		{"DeepJSON", `{"format":"phasecast-targets/1","targets":[{"name":` + strings.Repeat("[", 10000) + strings.Repeat("]", 10000) + `}]}`, "json", 64 << 10},
		{"NaNPeriod", header + "PCX A,10,1,2460000.5,BJD_TDB,custom,NaN\n", "csv", 64 << 10},
	}
	for _, tc := range tests {
		for _, path := range []string{"/import/preview", "/import"} {
			t.Run(tc.name+path, func(t *testing.T) {
				resp, body := h.postBody(c, fmt.Sprintf("/lists/%d%s", l.ID, path), url.Values{"content": {tc.content}, "format": {tc.format}})
				if resp.StatusCode == http.StatusOK || resp.StatusCode == http.StatusSeeOther || resp.StatusCode >= 500 {
					t.Fatalf("status %d, want a 4xx refusal", resp.StatusCode)
				}
				if extra := len(body) - len(tc.content); extra > tc.maxBody && len(body) > tc.maxBody {
					t.Fatalf("answer is %d bytes for a %d-byte upload", len(body), len(tc.content))
				}
				ts, err := h.store.ListTargets(ctx, h.actor("owner"), l.ID)
				if err != nil || len(ts) != 0 {
					t.Fatalf("after a refused import the list holds %d targets (%v)", len(ts), err)
				}
				t.Logf("status %d, %d bytes", resp.StatusCode, len(body))
			})
		}
	}
}

// hostileAPITarget is a valid JSON API target (docs/api.md).
const hostileAPITarget = `{"name":"PCX API","ra_deg":150.25,"dec_deg":-12.5,"priority":2,` +
	`"ephemeris":{"t0":"2460500.1234567","t0_standard":"BJD_TDB","t0_convention":"inferior_conjunction","period_days":0.0923},` +
	`"goals":[{"phase":0.25,"phase_halfwidth":0.05,"exposure_s":60,"overhead_s":5}]}`

// hostileAPIRaw sends body as it is to the JSON API with token and returns
// the status and the answer.
func hostileAPIRaw(tb testing.TB, h *harness, token, method, path string, body []byte) (int, []byte) {
	tb.Helper()
	req, err := http.NewRequest(method, h.ts.URL+path, bytes.NewReader(body))
	if err != nil {
		tb.Fatal(err)
	}
	req.Header.Set("Authorization", "Bearer "+token)
	req.Header.Set("Content-Type", "application/json")
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		tb.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		tb.Fatal(err)
	}
	return resp.StatusCode, b
}

// hostileAPISetup gives the harness team an empty list and an editor's API
// token.
func hostileAPISetup(tb testing.TB, h *harness) (listID int64, token string) {
	tb.Helper()
	ctx := context.Background()
	l, err := h.store.CreateList(ctx, h.actor("owner"), h.teamID, store.ListInput{Name: "API hostile"})
	if err != nil {
		tb.Fatal(err)
	}
	_, tok, err := h.store.CreateAPIToken(ctx, h.actor("editor"), "hostile", time.Hour)
	if err != nil {
		tb.Fatal(err)
	}
	return l.ID, tok
}

// checkAPIAnswer fails unless a JSON API answer is a success (2xx) whose
// target is finite and in range, or a 4xx JSON error with a code and a
// short message; a 5xx fails.
func checkAPIAnswer(tb testing.TB, status int, body []byte) (created bool) {
	tb.Helper()
	switch {
	case status >= 500:
		tb.Fatalf("status %d: %.500s", status, body)
	case status >= 400:
		var e apiErrorBody
		if err := json.Unmarshal(body, &e); err != nil || e.Error.Code == "" || e.Error.Message == "" {
			tb.Fatalf("status %d: the answer is not a JSON error (%v): %.300s", status, err, body)
		}
		if len(body) > 8<<10 {
			tb.Fatalf("status %d: the error answer is %d bytes (it echoes the input?): %.300s", status, len(body), body)
		}
		return false
	}
	var t targetJSON
	if err := json.Unmarshal(body, &t); err != nil {
		tb.Fatalf("status %d: not a target: %v", status, err)
	}
	e := t.Ephemeris
	for _, x := range []float64{t.RADeg, t.DecDeg, t.PMRAmasyr, t.PMDecmasyr, t.Mag, t.AcquireS, e.PeriodDays, e.T0ErrDays, e.PeriodErrDays, e.Ecc, e.OmegaDeg} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			tb.Fatalf("created target holds %v", x)
		}
	}
	if t.RADeg < 0 || t.RADeg >= 360 || t.DecDeg < -90 || t.DecDeg > 90 || !(e.PeriodDays > 0) || t.Priority < 1 || t.Priority > 5 || !utf8.ValidString(t.Name) {
		tb.Fatalf("created target out of range: %+v", t)
	}
	for _, g := range t.Goals {
		if g.PhaseHalfWidth <= 0 || g.PhaseHalfWidth >= 0.5 || !(g.ExposureS > 0) || (g.Phase != nil && (*g.Phase < 0 || *g.Phase >= 1)) {
			tb.Fatalf("created goal out of range: %+v", g)
		}
	}
	return true
}

// FuzzHostileAPITarget: any body POSTed to /api/v1/lists/{id}/targets gets
// a 201 with a target in range, or a 4xx JSON error with a short message
// and nothing written; never a 5xx.
func FuzzHostileAPITarget(f *testing.F) {
	f.Add([]byte(hostileAPITarget))
	for _, r := range [][2]string{
		{`"period_days":0.0923`, `"period_days":1e400`}, {`"period_days":0.0923`, `"period_days":"NaN"`},
		{`"period_days":0.0923`, `"period_days":4.9e-324`}, {`"ra_deg":150.25`, `"ra_deg":-0`},
		{`"ra_deg":150.25`, `"ra_deg":360`}, {`"priority":2`, `"priority":99999999999999999999`},
		{`"PCX API"`, "\"PCX \xff\xfe\""}, {`"PCX API"`, `"=cmd|' /C calc'!A0"`}, {`"PCX API"`, `"\u0000"`},
		{`"phase":0.25`, `"phase":0.25,"event":"eclipse"`}, {`"phase":0.25`, `"phase":1`},
		{`"t0":"2460500.1234567"`, `"t0":2460500.1234567`}, {`"t0":"2460500.1234567"`, `"t0":"1e400"`},
		{`"goals":[`, `"evil":1,"goals":[`}, {`}]}`, `}]}{}`},
	} {
		f.Add([]byte(strings.Replace(hostileAPITarget, r[0], r[1], 1)))
	}
	f.Add([]byte(`[]`))
	f.Add([]byte(`null`))
	f.Add([]byte(``))
	f.Add([]byte(strings.Repeat("[", 10001)))
	h := newHarness(f)
	// The harness logs to the test in -v mode; a fuzz target may not log
	// through f, so the server's log is discarded here.
	h.srv.log = slog.New(slog.NewTextHandler(io.Discard, nil))
	listID, token := hostileAPISetup(f, h)
	path := fmt.Sprintf("/api/v1/lists/%d/targets", listID)
	owner := h.actor("owner")
	f.Fuzz(func(t *testing.T, body []byte) {
		before, err := h.store.ListTargets(context.Background(), owner, listID)
		if err != nil {
			t.Fatal(err)
		}
		status, answer := hostileAPIRaw(t, h, token, http.MethodPost, path, body)
		created := checkAPIAnswer(t, status, answer)
		after, err := h.store.ListTargets(context.Background(), owner, listID)
		if err != nil {
			t.Fatal(err)
		}
		if want := len(before) + map[bool]int{true: 1}[created]; len(after) != want {
			t.Fatalf("status %d: the list went from %d to %d targets", status, len(before), len(after))
		}
	})
}

// TestHostileAPIBodies: oversize, deep, non-finite, non-UTF-8 and trailing
// bodies to the JSON API's create and update are refused with a 4xx JSON
// error whose message stays short, and nothing is written.
func TestHostileAPIBodies(t *testing.T) {
	h := newHarness(t)
	listID, token := hostileAPISetup(t, h)
	status, answer := hostileAPIRaw(t, h, token, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), []byte(hostileAPITarget))
	if status != http.StatusCreated {
		t.Fatalf("the valid target was refused: %d %s", status, answer)
	}
	var made targetJSON
	if err := json.Unmarshal(answer, &made); err != nil {
		t.Fatal(err)
	}
	deepArr := func(n int) string { return strings.Repeat("[", n) + strings.Repeat("]", n) }
	deepObj := func(n int) string { return strings.Repeat(`{"a":`, n) + "1" + strings.Repeat("}", n) }
	with := func(old, new string) string { return strings.Replace(hostileAPITarget, old, new, 1) }
	tests := []struct{ name, body string }{
		{"DeepArray10000", with(`"PCX API"`, deepArr(10000))},
		{"DeepObject10000", with(`"PCX API"`, deepObj(10000))},
		{"DeepArray100000", deepArr(100000)},
		{"OverFourMiB", with(`"PCX API"`, `"`+strings.Repeat("n", 5<<20)+`"`)},
		{"HugeT0Text", with(`"2460500.1234567"`, `"`+strings.Repeat("9", 3<<20)+`"`)},
		{"HugeNotes", with(`"priority":2`, `"priority":2,"notes":"`+strings.Repeat("n", 3<<20)+`"`)},
		{"PeriodHuge", with(`0.0923`, `1e400`)},
		{"PeriodNaN", with(`0.0923`, `"NaN"`)},
		{"PeriodInfinity", with(`0.0923`, `Infinity`)},
		{"RAHugeDigits", with(`150.25`, "1"+strings.Repeat("0", 400))},
		{"NameInvalidUTF8", with(`"PCX API"`, "\"PCX \xff\"")},
		{"NameNUL", with(`"PCX API"`, `"PCX\u0000"`)},
		{"TrailingData", hostileAPITarget + `{}`},
		{"UnknownMember", with(`"priority":2`, `"priority":2,"evil":true`)},
		{"Array", `[]`},
		{"Empty", ``},
	}
	for _, tc := range tests {
		// The update carries the version read, so that it reaches validation.
		put := strings.Replace(tc.body, `{"name":`, fmt.Sprintf(`{"version":%d,"name":`, made.Version), 1)
		for _, call := range []struct{ method, path, body string }{
			{http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), tc.body},
			{http.MethodPut, fmt.Sprintf("/api/v1/targets/%d", made.ID), put},
		} {
			t.Run(tc.name+"/"+call.method, func(t *testing.T) {
				before, err := h.store.ListTargets(context.Background(), h.actor("owner"), listID)
				if err != nil {
					t.Fatal(err)
				}
				status, answer := hostileAPIRaw(t, h, token, call.method, call.path, []byte(call.body))
				t.Logf("status %d: %.160s", status, answer)
				if checkAPIAnswer(t, status, answer) {
					// Only text that JSON itself repairs may pass: invalid
					// UTF-8 is read as U+FFFD by encoding/json.
					if tc.name != "NameInvalidUTF8" {
						t.Fatalf("status %d: accepted", status)
					}
					return
				}
				after, err := h.store.ListTargets(context.Background(), h.actor("owner"), listID)
				if err != nil || len(after) != len(before) {
					t.Fatalf("after a refused request the list went from %d to %d targets: %v", len(before), len(after), err)
				}
				for i := range after {
					if after[i].Version != before[i].Version {
						t.Fatalf("a refused request changed %q: version %d → %d", after[i].Target.Name, before[i].Version, after[i].Version)
					}
				}
			})
		}
	}
}
