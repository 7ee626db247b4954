package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"phasecast/store"
)

// demoTargetNames opens a database, signs the demo owner in with the given
// one-time token (when not empty) and returns the names on the demo list.
func demoTargetNames(t *testing.T, path, token string, listID int64) []string {
	t.Helper()
	ctx := context.Background()
	st, err := store.Open(ctx, path, testClock(t))
	if err != nil {
		t.Fatalf("open %s: %v", path, err)
	}
	defer st.Close()
	_, sess, err := st.RedeemSignInLink(ctx, token)
	if err != nil {
		t.Fatalf("redeem sign-in link: %v", err)
	}
	a, err := st.SessionActor(ctx, sess)
	if err != nil {
		t.Fatalf("session: %v", err)
	}
	ts, err := st.ListTargets(ctx, a, listID)
	if err != nil {
		t.Fatalf("list targets: %v", err)
	}
	var names []string
	for _, x := range ts {
		names = append(names, x.Target.Name)
	}
	return names
}

func TestBackupRestore(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	db := filepath.Join(dir, "live.db")
	// The store, the seed and the commands share one pinned clock, so the
	// demo's one-time links are valid whatever the date the suite runs on.
	st, err := store.Open(ctx, db, testClock(t))
	if err != nil {
		t.Fatal(err)
	}
	info, err := st.SeedDemo(ctx, testNow)
	if err != nil {
		t.Fatal(err)
	}
	// A second one-time link, for reading the restored copy (the first is
	// spent on the backup's source below).
	tok2, err := st.CreateSignInLink(ctx, info.Owner.Email, time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	if err := st.Close(); err != nil {
		t.Fatal(err)
	}

	bak := filepath.Join(dir, "copy.db")
	out, errOut, code := runCmd(t, "backup", "--db", db, "--out", bak)
	if code != 0 {
		t.Fatalf("backup: exit %d, stderr %q", code, errOut)
	}
	if !strings.Contains(out, bak) {
		t.Errorf("backup output %q does not name the file", out)
	}
	want := demoTargetNames(t, db, info.SignInToken, info.List.ID)
	if len(want) != len(info.Targets) {
		t.Fatalf("live list has %d targets, demo seeded %d", len(want), len(info.Targets))
	}

	// Restore the backup over the live file (the "server" is stopped): the
	// old file is kept aside and the list reads back the same.
	if _, errOut, code := runCmd(t, "restore", "--from", bak, "--db", db); code != 0 {
		t.Fatalf("restore: exit %d, stderr %q", code, errOut)
	}
	if _, err := os.Stat(db + ".before-restore"); err != nil {
		t.Errorf("the replaced database was not kept: %v", err)
	}
	got := demoTargetNames(t, db, tok2, info.List.ID)
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("restored targets %v, want %v", got, want)
	}
	// A second restore must refuse: it would overwrite the kept copy.
	if _, errOut, code := runCmd(t, "restore", "--from", bak, "--db", db); code == 0 || !strings.Contains(errOut, "before-restore") {
		t.Errorf("second restore: exit %d, stderr %q; want a refusal naming the kept file", code, errOut)
	}
}

func TestBackupBadInput(t *testing.T) {
	dir := t.TempDir()
	existing := filepath.Join(dir, "exists.db")
	if err := os.WriteFile(existing, []byte("x"), 0o600); err != nil {
		t.Fatal(err)
	}
	live := filepath.Join(dir, "live.db")
	st, err := store.Open(context.Background(), live, testClock(t))
	if err != nil {
		t.Fatal(err)
	}
	if err := st.Close(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		argv []string
		want string
	}{
		{"MissingOut", []string{"backup", "--db", filepath.Join(dir, "a.db")}, "missing --out"},
		{"EmptyOut", []string{"backup", "--out", " "}, "--out"},
		{"OutExists", []string{"backup", "--db", live, "--out", existing}, "exists already"},
		// A mistyped --db used to make an empty database there and back it up.
		{"MissingDB", []string{"backup", "--db", filepath.Join(dir, "nothere.db"), "--out", filepath.Join(dir, "copy.db")}, "--db"},
		{"MissingFrom", []string{"restore", "--db", filepath.Join(dir, "c.db")}, "missing --from"},
		{"FromNotADatabase", []string{"restore", "--from", existing, "--db", filepath.Join(dir, "d.db")}, "restore"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, errOut, code := runCmd(t, c.argv...)
			if code == 0 {
				t.Fatalf("exit 0, want failure")
			}
			if !strings.Contains(errOut, c.want) || strings.Count(strings.TrimSpace(errOut), "\n") != 0 {
				t.Errorf("stderr %q: want one line containing %q", errOut, c.want)
			}
		})
	}
	for _, name := range []string{"nothere.db", "copy.db", "a.db", "c.db", "d.db"} {
		if _, err := os.Stat(filepath.Join(dir, name)); !os.IsNotExist(err) {
			t.Errorf("%s exists after a refused command (%v)", name, err)
		}
	}
}
