package store_test

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"phasecast/store"
)

// dump returns every row of every table of a database file, as text, in
// primary-key order.
func dump(tb testing.TB, path string) map[string][]string {
	tb.Helper()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		tb.Fatal(err)
	}
	defer db.Close()
	rows, err := db.Query("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")
	if err != nil {
		tb.Fatal(err)
	}
	var tables []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			tb.Fatal(err)
		}
		tables = append(tables, n)
	}
	rows.Close()
	out := map[string][]string{}
	for _, tbl := range tables {
		r, err := db.Query("SELECT * FROM " + tbl + " ORDER BY 1, 2")
		if err != nil {
			tb.Fatal(err)
		}
		cols, _ := r.Columns()
		for r.Next() {
			vals := make([]any, len(cols))
			ptrs := make([]any, len(cols))
			for i := range vals {
				ptrs[i] = &vals[i]
			}
			if err := r.Scan(ptrs...); err != nil {
				tb.Fatal(err)
			}
			out[tbl] = append(out[tbl], fmt.Sprint(vals...))
		}
		if err := r.Err(); err != nil {
			tb.Fatal(err)
		}
		r.Close()
	}
	return out
}

func sameDump(tb testing.TB, got, want map[string][]string) {
	tb.Helper()
	for tbl, rows := range want {
		if !slices.Equal(got[tbl], rows) {
			tb.Errorf("table %s differs: %d rows, want %d", tbl, len(got[tbl]), len(rows))
		}
	}
	for tbl := range got {
		if _, ok := want[tbl]; !ok {
			tb.Errorf("extra table %s", tbl)
		}
	}
}

func TestBackupAndRestore(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	path := filepath.Join(dir, "live.db")
	s, err := store.Open(ctx, path, func() time.Time { return t0 }, store.WithPasswordParams(fastPasswords))
	if err != nil {
		t.Fatal(err)
	}
	info, err := s.SeedDemo(ctx, t0)
	if err != nil {
		t.Fatal(err)
	}
	owner := store.Actor{Kind: store.ActorUser, UserID: info.Owner.ID}
	want := dump(t, path)
	if len(want["targets"]) != len(info.Targets) || len(want["audit_log"]) == 0 {
		t.Fatalf("seeded dump: %d targets, %d audit rows", len(want["targets"]), len(want["audit_log"]))
	}

	out := filepath.Join(dir, "backup.db")
	if err := s.Backup(ctx, out); err != nil {
		t.Fatal(err)
	}
	sameDump(t, dump(t, out), want)

	// A second backup is taken while another goroutine keeps writing
	// targets: the writes must not fail, and the copy must be one
	// transaction's snapshot: every target in it has its ephemeris and its
	// audit entry, since the three are written in one transaction.
	other, err := s.CreateList(ctx, owner, info.Team.ID, store.ListInput{Name: "Written during the backup"})
	if err != nil {
		t.Fatal(err)
	}
	out2 := filepath.Join(dir, "backup2.db")
	var wg sync.WaitGroup
	stop := make(chan struct{})
	var writeErr error
	var written int
	wg.Add(1)
	go func() {
		defer wg.Done()
		for ; writeErr == nil; written++ {
			select {
			case <-stop:
				return
			default:
			}
			_, writeErr = s.CreateTarget(ctx, owner, other.ID, targetInput(fmt.Sprintf("W%d", written), float64(written%360), float64(written%80)))
		}
	}()
	time.Sleep(20 * time.Millisecond)
	if err := s.Backup(ctx, out2); err != nil {
		t.Fatal(err)
	}
	close(stop)
	wg.Wait()
	if writeErr != nil {
		t.Fatalf("write during backup: %v", writeErr)
	}
	var nT, nE, nA int
	db := rawDB(t, out2)
	if err := db.QueryRow("SELECT count(*) FROM targets WHERE list_id = ?", other.ID).Scan(&nT); err != nil {
		t.Fatal(err)
	}
	if err := db.QueryRow("SELECT count(*) FROM ephemerides e JOIN targets t ON t.id = e.target_id WHERE t.list_id = ?", other.ID).Scan(&nE); err != nil {
		t.Fatal(err)
	}
	if err := db.QueryRow("SELECT count(*) FROM audit_log WHERE entity = 'target' AND action = 'create' AND entity_id IN (SELECT id FROM targets WHERE list_id = ?)", other.ID).Scan(&nA); err != nil {
		t.Fatal(err)
	}
	t.Logf("backup during writes: %d of %d targets written were in the snapshot", nT, written)
	if nE != nT || nA != nT {
		t.Errorf("torn backup: %d targets, %d ephemerides, %d audit entries", nT, nE, nA)
	}
	t.Run("RefusesExisting", func(t *testing.T) {
		wantCode(t, s.Backup(ctx, out), store.ECONFLICT)
	})
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}

	// Restore (server stopped) brings back the backup's state exactly; the
	// old database is kept beside it.
	if err := store.Restore(ctx, out, path); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(path + ".before-restore"); err != nil {
		t.Errorf("old database not kept: %v", err)
	}
	sameDump(t, dump(t, path), want)
	s2, err := store.Open(ctx, path, func() time.Time { return t0 })
	if err != nil {
		t.Fatal(err)
	}
	defer s2.Close()
	if _, err := s2.GetList(ctx, owner, other.ID); store.ErrorCode(err) != store.ENOTFOUND {
		t.Errorf("the list made after the first backup is back after restoring it: %v", err)
	}
	if u, err := s2.Me(ctx, owner); err != nil || u.Email != info.Owner.Email {
		t.Errorf("restored owner = %+v, %v", u, err)
	}
	t.Run("SecondRestoreRefused", func(t *testing.T) {
		err := store.Restore(ctx, out, path)
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("NotADatabase", func(t *testing.T) {
		junk := filepath.Join(dir, "junk.db")
		if err := os.WriteFile(junk, []byte(strings.Repeat("not sqlite ", 100)), 0o600); err != nil {
			t.Fatal(err)
		}
		err := store.Restore(ctx, junk, filepath.Join(dir, "x.db"))
		wantCode(t, err, store.EINVALID)
	})
}
