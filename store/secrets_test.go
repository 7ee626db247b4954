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
	for _, p := range []string{s.Path(), s.Path() + "-wal"} {
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
