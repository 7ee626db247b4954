package store

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// TestAuditInSameTransaction shows that an audit entry and its change live
// and die together: a change rolled back leaves no entry, a committed one
// leaves exactly one with the row after the change.
func TestAuditInSameTransaction(t *testing.T) {
	ctx := context.Background()
	s, err := Open(ctx, filepath.Join(t.TempDir(), "a.db"), func() time.Time { return time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC) }, WithPasswordParams(PasswordParams{Time: 1, MemoryKiB: 1024, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if _, err := s.CreateUser(ctx, NewUser{Email: "o@example.org", Name: "O"}); err != nil {
		t.Fatal(err)
	}
	a := Actor{Kind: ActorUser, UserID: 1, Name: "O"}
	tm, err := s.CreateTeam(ctx, a, "T")
	if err != nil {
		t.Fatal(err)
	}
	l, err := s.CreateList(ctx, a, tm.ID, ListInput{Name: "L"})
	if err != nil {
		t.Fatal(err)
	}
	in := TargetInput{
		Target: planner.Target{Name: "X", RADeg: 1, DecDeg: 2, Priority: 1,
			Ephem: ephem.Ephemeris{PeriodDays: 0.1, Convention: ephem.ConvInferiorConjunction}},
		T0: Epoch{Text: "2460000.5", Standard: ephem.StdBJDTDB},
	}
	auditRows := func() int {
		var n int
		if err := s.rdb.QueryRowContext(ctx, "SELECT count(*) FROM audit_log WHERE entity = 'target'").Scan(&n); err != nil {
			t.Fatal(err)
		}
		return n
	}

	// Rolled back: the helper wrote the target and its audit entry in the
	// transaction; neither survives.
	tx, err := s.beginWrite(ctx, a)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := createTarget(tx, l.ID, in, SourceEntered); err != nil {
		t.Fatal(err)
	}
	var inside int
	if err := tx.queryRow("SELECT count(*) FROM audit_log WHERE entity = 'target'").Scan(&inside); err != nil || inside != 1 {
		t.Fatalf("inside the transaction: %d audit rows (%v), want 1", inside, err)
	}
	if err := tx.tx.Rollback(); err != nil {
		t.Fatal(err)
	}
	if n := auditRows(); n != 0 {
		t.Errorf("after rollback: %d audit rows, want 0", n)
	}
	var targets int
	if err := s.rdb.QueryRowContext(ctx, "SELECT count(*) FROM targets").Scan(&targets); err != nil || targets != 0 {
		t.Errorf("after rollback: %d targets (%v), want 0", targets, err)
	}

	// Committed: one entry, by the actor, with the row after.
	st, err := s.CreateTarget(ctx, a, l.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	es, err := s.ListAudit(ctx, a, tm.ID, AuditQuery{Entity: EntTarget})
	if err != nil {
		t.Fatal(err)
	}
	if len(es) != 1 || es[0].EntityID != st.ID || es[0].Action != ActCreate || es[0].UserID != 1 || es[0].Before != nil {
		t.Fatalf("audit = %+v", es)
	}
	in.Target.Notes = "changed"
	if _, err := s.UpdateTarget(ctx, a, st.ID, st.Version, in); err != nil {
		t.Fatal(err)
	}
	es, err = s.ListAudit(ctx, a, tm.ID, AuditQuery{Entity: EntTarget, EntityID: st.ID})
	if err != nil {
		t.Fatal(err)
	}
	if len(es) != 2 || es[0].Action != ActUpdate || !strings.Contains(string(es[0].After), `"Notes":"changed"`) || strings.Contains(string(es[0].Before), `"Notes":"changed"`) {
		t.Errorf("update audit = %s / %s", es[0].Before, es[0].After)
	}
	// A failed update (stale version) writes no entry.
	if _, err := s.UpdateTarget(ctx, a, st.ID, st.Version, in); ErrorCode(err) != ECONFLICT {
		t.Fatalf("stale update: %v", err)
	}
	if n := auditRows(); n != 2 {
		t.Errorf("audit rows after a failed update = %d, want 2", n)
	}
}
