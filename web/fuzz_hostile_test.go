package web

// Hostile input at the web layer (issue "Proof under load, faults and
// hostile input"): the CSV neutraliser is fuzzed (corpus under
// testdata/fuzz/FuzzHostileSafeCell/), and the CSV exports a spreadsheet user
// opens (target list, night plan) are checked for formula-like cells with
// invented targets whose names are formulas; uploads over the limit, deep
// JSON and oversize cells are refused with a short answer and nothing
// written. Run the fuzzer longer with
//
//	go test -run='^$' -fuzz='^FuzzHostileSafeCell$' -fuzztime=60s ./web/

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// hostileFormulas are cells a spreadsheet would run (OWASP "CSV Injection").
var hostileFormulas = []string{"=cmd|' /C calc'!A0", "+1+cmd|' /C calc'!A0", "-1+1", "@SUM(A1:A2)", "=HYPERLINK(\"http://x\")", "-2-3"}

// hostileRunnable reports whether a spreadsheet would take cell for a
// formula: it starts with = + - @, a tab or a CR and is not a plain number
// or sexagesimal angle.
func hostileRunnable(cell string) bool {
	return cell != "" && strings.ContainsRune("=+-@\t\r", rune(cell[0])) && !numberLike.MatchString(cell)
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

// FuzzHostileSafeCell: safeCell leaves a cell alone or prefixes one
// apostrophe, and what it returns is never runnable; neutralizeCSV keeps the
// records and their cells' text (after the apostrophe).
func FuzzHostileSafeCell(f *testing.F) {
	for _, s := range append(hostileFormulas, "", "-12.5", "+1e5", "-12:30:00", "-12 30", "\t=1", "\r=1", "'=x", "=", "-", "+-1", "-1e", "\xff", "-٣") {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		out := safeCell(s)
		if out != s && out != "'"+s {
			t.Fatalf("safeCell(%q) = %q: neither the cell nor the cell after an apostrophe", s, out)
		}
		if hostileRunnable(out) {
			t.Fatalf("safeCell(%q) = %q is still runnable", s, out)
		}
		var in bytes.Buffer
		w := csv.NewWriter(&in)
		if err := w.Write([]string{s, "x", s}); err != nil {
			t.Fatal(err)
		}
		w.Flush()
		var got bytes.Buffer
		if err := neutralizeCSV(&got, bytes.NewReader(in.Bytes())); err != nil {
			return // s made a record the CSV reader refuses (e.g. a bare CR): nothing is exported
		}
		n, bad := hostileCSVCells(t, got.Bytes())
		if len(bad) > 0 {
			t.Fatalf("neutralizeCSV left %s", bad[0])
		}
		if n != 1 && s != "" {
			t.Fatalf("neutralizeCSV made %d records of one", n)
		}
	})
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
