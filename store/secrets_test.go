package store_test

import (
	"bytes"
	"context"
	"os"
	"testing"
	"time"

	"phasecast/store"
)

// TestSecretsStoredOnlyAsHashes makes one secret of every kind, then looks
// for each in the database file and its write-ahead log: none may appear.
func TestSecretsStoredOnlyAsHashes(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	var secrets []string
	if _, err := s.CreateUser(ctx, store.NewUser{Email: "pw@example.org", Name: "Pat", Password: "a password nobody guesses"}); err != nil {
		t.Fatal(err)
	}
	secrets = append(secrets, "a password nobody guesses")
	_, sess, err := s.SignIn(ctx, "pw@example.org", "a password nobody guesses")
	if err != nil {
		t.Fatal(err)
	}
	link, err := s.CreateSignInLink(ctx, "pw@example.org", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	_, api, err := s.CreateAPIToken(ctx, w.editor, "k", 0)
	if err != nil {
		t.Fatal(err)
	}
	_, share, err := s.CreateShareLink(ctx, w.editor, store.ShareInput{ListID: w.list.ID, TTL: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	_, inv, err := s.CreateInvitation(ctx, w.owner, w.team.ID, store.RoleViewer, time.Hour, "")
	if err != nil {
		t.Fatal(err)
	}
	secrets = append(secrets, sess, link, api, share, inv)
	for _, tok := range secrets[1:] {
		if len(tok) < 4+22 { // at least 128 bits in base64
			t.Errorf("token %q is too short", tok)
		}
	}
	var files [][]byte
	if store.IsPostgresURL(s.Path()) {
		files = append(files, pgDump(t, s.Path()))
	}
	for _, p := range []string{s.Path(), s.Path() + "-wal"} {
		if store.IsPostgresURL(p) {
			break
		}
		b, err := os.ReadFile(p)
		if err != nil && !os.IsNotExist(err) {
			t.Fatal(err)
		}
		files = append(files, b)
	}
	for _, sec := range secrets {
		for i, b := range files {
			if bytes.Contains(b, []byte(sec)) || bytes.Contains(b, []byte(sec[4:])) {
				t.Errorf("secret %.8s… found in file %d", sec, i)
			}
		}
	}
}

// pgDump returns every row of every table of a PostgreSQL database as text
// (the row's text form: byte columns in hex), to look for secrets in.
func pgDump(tb testing.TB, url string) []byte {
	tb.Helper()
	db := rawDB(tb, url)
	rows, err := db.Query("SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'")
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
	if len(tables) < 10 {
		tb.Fatalf("only %d tables found: %v", len(tables), tables)
	}
	var out []byte
	for _, tbl := range tables {
		rs, err := db.Query("SELECT r::text FROM " + tbl + " r")
		if err != nil {
			tb.Fatal(err)
		}
		for rs.Next() {
			var line string
			if err := rs.Scan(&line); err != nil {
				tb.Fatal(err)
			}
			out = append(append(out, line...), '\n')
		}
		rs.Close()
	}
	return out
}
