package store_test

// Hostile input for the target-file importer (issue "Proof under load,
// faults and hostile input"): a fuzz target over ImportTargets on a real
// SQLite file, whose seed corpus is committed under
// testdata/fuzz/FuzzHostileImport/ so that `go test ./store/` replays it,
// and table tests for oversize files, many rows, deep JSON, non-finite and
// huge numbers, invalid UTF-8 and formula-like cells. Run the fuzzer longer
// with
//
//	go test -run='^$' -fuzz='^FuzzHostileImport$' -fuzztime=60s ./store/

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/store/testdb"
)

// hostileDB is a store with one team, its owner and a counter for fresh lists.
type hostileDB struct {
	s     *store.Store
	owner store.Actor
	team  store.Team
	lists int
}

// newHostileDB opens a fresh database file under tb.TempDir() with an owner
// and a team.
func newHostileDB(tb testing.TB) *hostileDB {
	tb.Helper()
	ctx := context.Background()
	s, err := store.Open(ctx, testdb.Target(tb, "hostile.db"),
		func() time.Time { return t0 },
		store.WithPasswordParams(store.PasswordParams{Time: 1, MemoryKiB: 1024, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		tb.Fatalf("Open: %v", err)
	}
	tb.Cleanup(func() {
		if err := s.Close(); err != nil {
			tb.Errorf("Close: %v", err)
		}
	})
	if _, err := s.CreateUser(ctx, store.NewUser{Email: "pi@example.org", Name: "Pat Invented"}); err != nil {
		tb.Fatalf("CreateUser: %v", err)
	}
	link, err := s.CreateSignInLink(ctx, "pi@example.org", time.Hour)
	if err != nil {
		tb.Fatalf("CreateSignInLink: %v", err)
	}
	_, sess, err := s.RedeemSignInLink(ctx, link)
	if err != nil {
		tb.Fatalf("RedeemSignInLink: %v", err)
	}
	owner, err := s.SessionActor(ctx, sess)
	if err != nil {
		tb.Fatalf("SessionActor: %v", err)
	}
	team, err := s.CreateTeam(ctx, owner, "Hostile Lab")
	if err != nil {
		tb.Fatalf("CreateTeam: %v", err)
	}
	return &hostileDB{s: s, owner: owner, team: team}
}

// newList makes an empty list, optionally holding the targets of seed (a
// valid team CSV file).
func (h *hostileDB) newList(tb testing.TB, seed string) int64 {
	tb.Helper()
	h.lists++
	l, err := h.s.CreateList(context.Background(), h.owner, h.team.ID, store.ListInput{Name: fmt.Sprintf("List %d", h.lists)})
	if err != nil {
		tb.Fatalf("CreateList: %v", err)
	}
	if seed != "" {
		if _, err := h.s.ImportTargets(context.Background(), h.owner, l.ID, strings.NewReader(seed), store.FormatCSV); err != nil {
			tb.Fatalf("seed import: %v", err)
		}
	}
	return l.ID
}

func (h *hostileDB) targets(tb testing.TB, listID int64) []store.StoredTarget {
	tb.Helper()
	ts, err := h.s.ListTargets(context.Background(), h.owner, listID)
	if err != nil {
		tb.Fatalf("ListTargets: %v", err)
	}
	return ts
}

// hostileTeamHeader and hostileTeamRow make a valid team CSV.
const hostileTeamHeader = "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,priority,tags,notes"

func hostileTeamRow(name string, ra float64) string {
	return fmt.Sprintf("%s,%g,-12.5,2460123.4567891234,BJD_TDB,inferior_conjunction,0.1352,0.25;0.75,0.05,120,2,cv;eclipsing,invented", name, ra)
}

// hostileSeedList is what every fuzzed import is applied to: two targets,
// so that an import can update as well as add, and a failed one must leave
// exactly these.
var hostileSeedList = hostileTeamHeader + "\n" + hostileTeamRow("PCX Seed A", 10) + "\n" + hostileTeamRow("PCX Seed B", 20) + "\n"

const hostileJSON = `{"format":"phasecast-targets/1","targets":[
 {"name":"PCX J1","ra":"09:53:00","dec":-6.125,"ephemeris":{"t0":"60123.1","t0_form":"MJD","t0_standard":"HJD_UTC",
  "t0_convention":"inferior_conjunction","period_days":0.25},"goals":[{"center":0.5,"phase_halfwidth":0.1,"exposure_s":60}],"tags":["a"]}]}`

// hostileValues are cell values a hostile or careless user may type.
var hostileValues = []string{
	"NaN", "+Inf", "-Inf", "1e400", "-1e400", "4.9e-324", "0x1p-2", "1_0", "9223372036854775808", "-0",
	"\x00", "\xff\xfe", "\xc3", "=cmd|' /C calc'!A0", "+1", "-1", "@SUM(A1:A2)", "\t=1", "\r=1",
	strings.Repeat("9", 400),
}

// sameTarget reports whether two stored targets hold the same values (not
// ids, versions or times), reading nil and empty slices alike.
func sameTarget(a, b store.StoredTarget) bool {
	norm := func(st store.StoredTarget) planner.Target {
		t := st.Target
		if len(t.Tags) == 0 {
			t.Tags = nil
		}
		if len(t.Goals) == 0 {
			t.Goals = nil
		}
		return t
	}
	ea, eb := a.Ephemeris.T0, b.Ephemeris.T0
	return reflect.DeepEqual(norm(a), norm(b)) && ea.Text == eb.Text && ea.Form == eb.Form && ea.Standard == eb.Standard
}

func sameTargets(a, b []store.StoredTarget) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !sameTarget(a[i], b[i]) {
			return false
		}
	}
	return true
}

// checkStored fails unless every stored target lies in FORMAT.md's ranges,
// with every number finite and the ephemeris valid.
func checkStored(tb testing.TB, ts []store.StoredTarget) {
	tb.Helper()
	for _, st := range ts {
		t := st.Target
		e := t.Ephem
		nums := []float64{t.RADeg, t.DecDeg, t.PMRAmasyr, t.PMDecmasyr, t.Mag, t.AcquireS, e.T0.Day, e.T0.Frac,
			e.T0ErrDays, e.PeriodDays, e.PeriodErr, e.CovT0P, e.Pdot, e.PdotErr, e.CovT0Pdot, e.CovPPdot, e.PhaseOffset, e.Ecc, e.OmegaDeg}
		for _, g := range t.Goals {
			nums = append(nums, g.Center, g.HalfWidth, g.ExposureS, g.OverheadS, g.EclipseDurDays)
		}
		for i, x := range nums {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				tb.Fatalf("%q: value %d is %v", t.Name, i, x)
			}
		}
		switch {
		case t.Name == "" || strings.TrimSpace(t.Name) != t.Name:
			tb.Fatalf("name %q empty or padded", t.Name)
		case t.RADeg < 0 || t.RADeg >= 360 || t.DecDeg < -90 || t.DecDeg > 90:
			tb.Fatalf("%q: RA %v Dec %v out of range", t.Name, t.RADeg, t.DecDeg)
		case math.Abs(t.PMRAmasyr) > planner.MaxPMmasyr || math.Abs(t.PMDecmasyr) > planner.MaxPMmasyr:
			tb.Fatalf("%q: proper motion out of range", t.Name)
		case t.Mag < planner.MinMag || t.Mag > planner.MaxMag:
			tb.Fatalf("%q: mag %v out of range", t.Name, t.Mag)
		case t.Priority < 1 || t.Priority > 5:
			tb.Fatalf("%q: priority %d", t.Name, t.Priority)
		case t.AcquireS < 0 || t.AcquireS > planner.MaxAcquireS:
			tb.Fatalf("%q: acquire_s %v", t.Name, t.AcquireS)
		case len(t.Goals) > planner.MaxGoals || len(t.Tags) > store.MaxTags:
			tb.Fatalf("%q: %d goals, %d tags", t.Name, len(t.Goals), len(t.Tags))
		}
		if err := e.Validate(); err != nil {
			tb.Fatalf("%q: stored ephemeris is invalid: %v", t.Name, err)
		}
		for _, g := range t.Goals {
			if g.Center < 0 || g.Center >= 1 || g.HalfWidth <= 0 || g.HalfWidth >= 0.5 || g.ExposureS <= 0 ||
				g.ExposureS > planner.MaxExposureS || g.OverheadS < 0 || g.OverheadS > planner.MaxExposureS {
				tb.Fatalf("%q: goal %+v out of range", t.Name, g)
			}
		}
	}
}

// checkText fails unless every stored text is valid UTF-8: JSON (the
// export, the API) cannot carry anything else, so a name that is not would
// come back changed.
func checkText(tb testing.TB, ts []store.StoredTarget) {
	tb.Helper()
	for _, st := range ts {
		t := st.Target
		texts := append([]string{t.Name, t.Notes, st.Ephemeris.T0.Text}, t.Tags...)
		for _, g := range t.Goals {
			texts = append(texts, g.Event)
		}
		for _, s := range texts {
			if !utf8.ValidString(s) {
				tb.Fatalf("stored text %q of %q is not valid UTF-8", s, t.Name)
			}
		}
	}
}

// checkImportError fails unless err is an EINVALID whose message says
// nothing was imported and whose cells (if any) each name a line.
func checkImportError(tb testing.TB, err error) {
	tb.Helper()
	if code := store.ErrorCode(err); code != store.EINVALID {
		tb.Fatalf("error code %s, want EINVALID: %v", code, err)
	}
	var te *planner.TableError
	if !errors.As(err, &te) {
		if strings.Contains(err.Error(), "constraint failed") {
			tb.Fatalf("a row passed validation and failed at the database: %v", err)
		}
		if msg := store.ErrorMessage(err); msg == "" {
			tb.Fatalf("EINVALID without a message: %v", err)
		}
		return
	}
	if !strings.Contains(store.ErrorMessage(err), "line ") {
		tb.Fatalf("message %q names no line", store.ErrorMessage(err))
	}
	for _, c := range te.Cells {
		if c.Line < 1 || c.Reason == "" {
			tb.Fatalf("cell %+v has no line or no reason", c)
		}
	}
}

// roundTrip exports listID in format f, imports the file into a fresh list
// and fails unless the targets come back the same.
func (h *hostileDB) roundTrip(tb testing.TB, listID int64, f store.FileFormat) {
	tb.Helper()
	ctx := context.Background()
	var buf bytes.Buffer
	if err := h.s.ExportTargets(ctx, h.owner, listID, &buf, f); err != nil {
		tb.Fatalf("ExportTargets %s: %v", f, err)
	}
	fresh := h.newList(tb, "")
	if _, err := h.s.ImportTargets(ctx, h.owner, fresh, bytes.NewReader(buf.Bytes()), f); err != nil {
		tb.Fatalf("re-import of the %s export: %v\n%s", f, err, buf.String())
	}
	want, got := h.targets(tb, listID), h.targets(tb, fresh)
	if !sameTargets(want, got) {
		for i := range min(len(want), len(got)) {
			if !sameTarget(want[i], got[i]) {
				tb.Fatalf("%s round trip changed a target:\n was %+v %+v\n now %+v %+v", f, want[i].Target, want[i].Ephemeris.T0, got[i].Target, got[i].Ephemeris.T0)
			}
		}
		tb.Fatalf("%s round trip: %d targets became %d", f, len(want), len(got))
	}
}

// FuzzHostileImport: any file imported into a list (two targets at first)
// either fails with EINVALID (each cell naming a line) and leaves the list
// exactly as it was, or succeeds with every stored value finite and in
// range; a successful list exports (CSV and JSON) and imports back to the
// same targets. The database is a real SQLite file.
func FuzzHostileImport(f *testing.F) {
	f.Add(hostileTeamHeader + "\n" + hostileTeamRow("PCX New", 30) + "\n")
	f.Add(hostileTeamHeader + "\n" + hostileTeamRow("PCX Seed A", 10) + "\n") // unchanged
	f.Add(strings.Replace(hostileTeamHeader+"\n"+hostileTeamRow("PCX Seed A", 10)+"\n", "0.1352", "0.1353", 1))
	f.Add(hostileTeamHeader + "\n" + hostileTeamRow("PCX Near", 10.0001) + "\n") // duplicate position
	f.Add(hostileJSON)
	f.Add(strings.Join(planner.PlanCSVHeader, ",") + "\nPCX P,8.1,37.7,2460123.45678,0.1352,0.25;0.75,0.05,120,8,1\n")
	f.Add(hostileTeamHeader + "\n" + `"PCX ""q"", x",40,+1,2460000.5,JD_UTC,custom,1,quadratures±0.1[exposure_s=30],0.05,60,5,,"multi` + "\nline\"\n")
	// Each hostile value in one column (TestHostileImportCells tries every
	// column): few seeds, so that a short run spends its time fuzzing.
	for i, v := range hostileValues {
		k := []int{0, 1, 3, 6, 7, 11, 12}[i%7]
		fields := strings.Split(hostileTeamRow("PCX H", 50), ",")
		fields[k] = `"` + strings.ReplaceAll(v, `"`, `""`) + `"`
		f.Add(hostileTeamHeader + "\n" + strings.Join(fields, ",") + "\n")
		if i%4 == 0 {
			f.Add(strings.Replace(hostileJSON, `0.25`, v, 1))
		}
	}
	h := newHostileDB(f)
	// One list for the whole run (a fresh one per input would spend the
	// run's time on writes): it starts with two targets and grows with each
	// accepted file, and every property holds whatever it holds.
	listID := h.newList(f, hostileSeedList)
	f.Fuzz(func(t *testing.T, in string) {
		ctx := context.Background()
		before := h.targets(t, listID)
		_, err := h.s.ImportTargets(ctx, h.owner, listID, strings.NewReader(in), store.FormatAuto)
		after := h.targets(t, listID)
		if err != nil {
			checkImportError(t, err)
			if !sameTargets(before, after) {
				t.Fatalf("a failed import changed the list: %d targets became %d (%v)", len(before), len(after), err)
			}
			return
		}
		checkStored(t, after)
		checkText(t, after)
		h.roundTrip(t, listID, store.FormatCSV)
		h.roundTrip(t, listID, store.FormatJSON)
	})
}

// TestHostileImportCells puts each hostile value into each column of a
// valid team CSV: the import is refused naming line 2 and the column, or it
// succeeds with values in range; a refused import leaves the list as it was.
func TestHostileImportCells(t *testing.T) {
	h := newHostileDB(t)
	columns := strings.Split(hostileTeamHeader, ",")
	for k, column := range columns {
		for _, v := range hostileValues {
			t.Run(fmt.Sprintf("%s=%q", column, v), func(t *testing.T) {
				listID := h.newList(t, hostileSeedList)
				fields := strings.Split(hostileTeamRow("PCX H", 50), ",")
				fields[k] = `"` + strings.ReplaceAll(v, `"`, `""`) + `"`
				in := hostileTeamHeader + "\n" + strings.Join(fields, ",") + "\n"
				_, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(in), store.FormatCSV)
				if err == nil {
					checkStored(t, h.targets(t, listID))
					checkText(t, h.targets(t, listID))
					return
				}
				checkImportError(t, err)
				if n := len(h.targets(t, listID)); n != 2 {
					t.Fatalf("refused import left %d targets, want the 2 seeded", n)
				}
				var te *planner.TableError
				if !errors.As(err, &te) {
					t.Fatalf("no TableError: %v", err)
				}
				for _, c := range te.Cells {
					if c.Line == 2 && c.Column == column && c.Col == k+1 {
						return
					}
				}
				t.Fatalf("no cell names line 2, column %d (%s): %v", k+1, column, te)
			})
		}
	}
}

// TestHostileImportJSON: malformed, deeply nested, oversize-number and
// non-UTF-8 JSON is refused with a line, or read in range; never a panic.
func TestHostileImportJSON(t *testing.T) {
	h := newHostileDB(t)
	deep := func(n int) string { return strings.Repeat("[", n) + strings.Repeat("]", n) }
	deepObj := func(n int) string { return strings.Repeat(`{"a":`, n) + "1" + strings.Repeat("}", n) }
	tests := []struct {
		name string
		in   string
	}{
		{"DeepArray10000", `{"format":"phasecast-targets/1","targets":[{"name":` + deep(10000) + `}]}`},
		{"DeepObject10000", `{"format":"phasecast-targets/1","targets":[{"notes":` + deepObj(10000) + `}]}`},
		{"DeepTopLevel100000", `{"format":"phasecast-targets/1","x":` + deep(100000) + `,"targets":[]}`},
		{"PeriodHuge", strings.Replace(hostileJSON, `"period_days":0.25`, `"period_days":1e400`, 1)},
		{"PeriodNaNString", strings.Replace(hostileJSON, `"period_days":0.25`, `"period_days":"NaN"`, 1)},
		{"PeriodTiny", strings.Replace(hostileJSON, `"period_days":0.25`, `"period_days":4.9e-324`, 1)},
		{"PriorityHuge", strings.Replace(hostileJSON, `"tags"`, `"priority":99999999999999999999,"tags"`, 1)},
		{"CenterNegZero", strings.Replace(hostileJSON, `"center":0.5`, `"center":-0`, 1)},
		{"RAHugeNumber", strings.Replace(hostileJSON, `"09:53:00"`, "1"+strings.Repeat("0", 400), 1)},
		{"NameInvalidUTF8", strings.Replace(hostileJSON, `"PCX J1"`, "\"PCX \xff\xfe\"", 1)},
		{"NameFormula", strings.Replace(hostileJSON, `"PCX J1"`, `"=cmd|' /C calc'!A0"`, 1)},
		{"UnknownMember", strings.Replace(hostileJSON, `"tags"`, `"evil":1,"tags"`, 1)},
		{"Truncated", hostileJSON[:len(hostileJSON)/2]},
		{"TrailingGarbage", hostileJSON + `{"format":"phasecast-targets/1","targets":[]}`},
		{"TargetsNotArray", `{"format":"phasecast-targets/1","targets":{"name":"x"}}`},
		{"TargetNull", `{"format":"phasecast-targets/1","targets":[null]}`},
		{"Empty", `{}`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			listID := h.newList(t, hostileSeedList)
			res, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(tc.in), store.FormatJSON)
			after := h.targets(t, listID)
			if err != nil {
				checkImportError(t, err)
				if len(after) != 2 {
					t.Fatalf("refused import left %d targets", len(after))
				}
				t.Logf("refused: %.300s", store.ErrorMessage(err))
				return
			}
			checkStored(t, after)
			t.Logf("accepted: %d added, %d updated", res.Added, res.Updated)
		})
	}
}

// TestHostileImportTrailingJSON: a JSON file holding a second document after
// the first is not half-read: it is refused, or every target of it is read.
func TestHostileImportTrailingJSON(t *testing.T) {
	h := newHostileDB(t)
	listID := h.newList(t, "")
	second := strings.Replace(hostileJSON, `"PCX J1"`, `"PCX J2"`, 1)
	second = strings.Replace(second, `"09:53:00"`, `"10:53:00"`, 1)
	_, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(hostileJSON+"\n"+second), store.FormatJSON)
	if n := len(h.targets(t, listID)); err == nil && n != 2 {
		t.Fatalf("two concatenated documents imported %d target(s) without an error", n)
	}
}

// TestHostileImportOversize: a file over MaxImportBytes is refused with a
// message naming the limit; a 10 MB line or cell is refused naming its line,
// and the message stays short.
func TestHostileImportOversize(t *testing.T) {
	h := newHostileDB(t)
	ctx := context.Background()
	t.Run("OverLimit", func(t *testing.T) {
		listID := h.newList(t, "")
		r := repeatBytes('#', store.MaxImportBytes+1)
		_, err := h.s.ImportTargets(ctx, h.owner, listID, r, store.FormatAuto)
		wantLimit := fmt.Sprintf("%d MiB", store.MaxImportBytes>>20)
		if store.ErrorCode(err) != store.EINVALID || !strings.Contains(store.ErrorMessage(err), wantLimit) {
			t.Fatalf("err = %v, want EINVALID naming %s", err, wantLimit)
		}
	})
	big := strings.Repeat("9", 10<<20)
	for _, tc := range []struct{ name, in string }{
		{"HugeRACell", hostileTeamHeader + "\n" + strings.Replace(hostileTeamRow("PCX H", 50), "50", big, 1) + "\n"},
		{"HugeName", hostileTeamHeader + "\n" + hostileTeamRow(strings.Repeat("N", 10<<20), 50) + "\n"},
		{"HugeNotes", hostileTeamHeader + "\n" + strings.Replace(hostileTeamRow("PCX H", 50), "invented", strings.Repeat("n", 10<<20), 1) + "\n"},
		{"HugeUnknownColumn", strings.Repeat("x", 10<<20) + "\n"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			listID := h.newList(t, "")
			_, err := h.s.ImportTargets(ctx, h.owner, listID, strings.NewReader(tc.in), store.FormatCSV)
			if err == nil {
				t.Fatalf("a 10 MB cell was accepted")
			}
			checkImportError(t, err)
			if n := len(h.targets(t, listID)); n != 0 {
				t.Fatalf("refused import wrote %d targets", n)
			}
			t.Logf("message %d bytes, error %d bytes", len(store.ErrorMessage(err)), len(err.Error()))
			if len(store.ErrorMessage(err)) > 4096 {
				t.Fatalf("the user-facing message is %d bytes: it echoes the 10 MB value", len(store.ErrorMessage(err)))
			}
		})
	}
}

// TestHostileImportManyRows: a list holds at most MaxTargets; a file with
// more rows is refused whole, naming the limit and a line. By default the
// file has MaxTargets+1 rows; PHASECAST_HOSTILE_LONG=1 uses 1e6 rows (about
// 45 MB, under MaxImportBytes).
func TestHostileImportManyRows(t *testing.T) {
	n := store.MaxTargets + 1
	if os.Getenv("PHASECAST_HOSTILE_LONG") != "" {
		n = 1000000
	}
	h := newHostileDB(t)
	listID := h.newList(t, "")
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days\n")
	for i := range n {
		// Rows 0.002° apart in Dec (7.2″ > DuplicateRadiusArcsec) so that only the count is wrong.
		fmt.Fprintf(&b, "T%07d,%g,%g,2460000.5,BJD_TDB,custom,0.1\n", i, float64(i%360), -89+0.002*float64(i/360))
	}
	start := time.Now()
	_, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(b.String()), store.FormatCSV)
	t.Logf("%d rows (%d MB): refused after %v", n, b.Len()>>20, time.Since(start).Round(time.Millisecond))
	checkImportError(t, err)
	if msg := err.Error(); !strings.Contains(msg, strconv.Itoa(store.MaxTargets)) {
		t.Fatalf("error %q does not name the limit %d", msg, store.MaxTargets)
	}
	if got := len(h.targets(t, listID)); got != 0 {
		t.Fatalf("refused import wrote %d targets", got)
	}
}

// TestHostileExportNeutralisesFormulas: names, tags and notes that a
// spreadsheet would run as formulas (starting with = + - @, tab or CR) are
// exported so that the cell is text, not a formula; plain numbers (a
// negative declination) stay numbers. OWASP "CSV Injection" (common
// practice): prefix such cells with a single quote.
func TestHostileExportNeutralisesFormulas(t *testing.T) {
	h := newHostileDB(t)
	listID := h.newList(t, "")
	payloads := []string{"=cmd|' /C calc'!A0", "+1+cmd|' /C calc'!A0", "-1+1", "@SUM(A1:A2)", "\t=1", "\r=1", "'=quoted", "'plain"}
	var in strings.Builder
	in.WriteString(hostileTeamHeader + "\n")
	for i, p := range payloads {
		fields := strings.Split(hostileTeamRow("PCX F"+strconv.Itoa(i), float64(10*i+5)), ",")
		q := `"` + strings.ReplaceAll(p, `"`, `""`) + `"`
		fields[0] = `"` + strings.ReplaceAll(p+strconv.Itoa(i), `"`, `""`) + `"` // name
		fields[12] = q                                                           // notes
		in.WriteString(strings.Join(fields, ",") + "\n")
	}
	if _, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(in.String()), store.FormatCSV); err != nil {
		t.Fatalf("import: %v", err)
	}
	var out bytes.Buffer
	if err := h.s.ExportTargets(context.Background(), h.owner, listID, &out, store.FormatCSV); err != nil {
		t.Fatalf("export: %v", err)
	}
	if bad := formulaCells(t, out.Bytes()); len(bad) > 0 {
		t.Fatalf("%d exported cells would run as spreadsheet formulas, e.g. %s", len(bad), bad[0])
	}
	// The quoting is undone on import: names and notes come back as typed,
	// including those that began with a quote.
	h.roundTrip(t, listID, store.FormatCSV)
}

// TestHostileExportQuotedNames: names and notes that begin with a single
// quote (typed so, imported from JSON) survive a CSV export and import: the
// exporter's quoting must not be confused with the user's.
func TestHostileExportQuotedNames(t *testing.T) {
	h := newHostileDB(t)
	listID := h.newList(t, "")
	doc := strings.Replace(hostileJSON, `"PCX J1"`, `"'=already quoted"`, 1)
	doc = strings.Replace(doc, `"tags":["a"]`, `"tags":["a"],"notes":"'+plain note"`, 1)
	if _, err := h.s.ImportTargets(context.Background(), h.owner, listID, strings.NewReader(doc), store.FormatJSON); err != nil {
		t.Fatalf("import: %v", err)
	}
	got := h.targets(t, listID)
	if len(got) != 1 || got[0].Target.Name != "'=already quoted" || got[0].Target.Notes != "'+plain note" {
		t.Fatalf("JSON import stored %+v", got)
	}
	var buf bytes.Buffer
	if err := h.s.ExportTargets(context.Background(), h.owner, listID, &buf, store.FormatCSV); err != nil {
		t.Fatalf("export: %v", err)
	}
	back := h.newList(t, "")
	if _, err := h.s.ImportTargets(context.Background(), h.owner, back, &buf, store.FormatCSV); err != nil {
		t.Fatalf("re-import: %v", err)
	}
	again := h.targets(t, back)
	if len(again) != 1 {
		t.Fatalf("re-import gave %d targets, want 1", len(again))
	}
	if !sameTarget(got[0], again[0]) {
		t.Fatalf("CSV round trip: name %q notes %q came back as %q %q", got[0].Target.Name, got[0].Target.Notes, again[0].Target.Name, again[0].Target.Notes)
	}
}

// formulaCells returns the cells of a CSV file that a spreadsheet would read
// as a formula: text starting with = + - @, tab or CR that is not a plain
// decimal number.
func formulaCells(tb testing.TB, b []byte) []string {
	tb.Helper()
	r := csv.NewReader(bytes.NewReader(b))
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	if err != nil {
		tb.Fatalf("exported CSV does not read back: %v", err)
	}
	var bad []string
	for i, rec := range recs {
		for j, cell := range rec {
			if cell == "" || !strings.ContainsRune("=+-@\t\r", rune(cell[0])) {
				continue
			}
			if _, err := strconv.ParseFloat(cell, 64); err == nil && !strings.ContainsAny(cell, "xXpPnN_") {
				continue
			}
			bad = append(bad, fmt.Sprintf("record %d, field %d: %q", i+1, j+1, cell))
		}
	}
	return bad
}

// repeatBytes returns a reader of n bytes c, without holding them.
func repeatBytes(c byte, n int) *repeatReader { return &repeatReader{c: c, n: n} }

type repeatReader struct {
	c byte
	n int
}

func (r *repeatReader) Read(p []byte) (int, error) {
	if r.n == 0 {
		return 0, io.EOF
	}
	k := min(len(p), r.n)
	for i := range k {
		p[i] = r.c
	}
	r.n -= k
	return k, nil
}
