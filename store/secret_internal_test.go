package store

import (
	"strings"
	"testing"
)

// TestPasswordHashDefaults checks the stated argon2id parameters (RFC 9106
// §4, second recommended option: t=3, p=4, m=64 MiB, 128-bit salt, 256-bit
// tag) and that a hash verifies only its own password.
func TestPasswordHashDefaults(t *testing.T) {
	h, err := hashPassword(DefaultPasswordParams, "correct horse battery staple")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(h, "$argon2id$v=19$m=65536,t=3,p=4$") {
		t.Errorf("hash %q does not carry the default parameters", h)
	}
	parts := strings.Split(h, "$")
	if len(parts[4]) != 22 || len(parts[5]) != 43 { // 16 and 32 bytes, base64 without padding
		t.Errorf("salt %d chars, tag %d chars; want 22 and 43", len(parts[4]), len(parts[5]))
	}
	for _, tc := range []struct {
		pw   string
		want bool
	}{{"correct horse battery staple", true}, {"correct horse battery stapl", false}, {"", false}} {
		ok, err := checkPassword(h, tc.pw)
		if err != nil || ok != tc.want {
			t.Errorf("checkPassword(%q) = %v, %v; want %v", tc.pw, ok, err, tc.want)
		}
	}
	if _, err := checkPassword("$argon2i$v=19$m=1,t=1,p=1$x$y", "x"); err == nil {
		t.Error("a non-argon2id hash was accepted")
	}
}

func TestTokens(t *testing.T) {
	seen := map[string]bool{}
	for range 100 {
		tok, hash, err := newToken(prefixShare)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(tok, "pcl_") || len(tok) != 4+43 || len(hash) != 32 || seen[tok] {
			t.Fatalf("token %q (hash %d bytes)", tok, len(hash))
		}
		if string(hashToken(tok)) != string(hash) {
			t.Fatal("hashToken disagrees with newToken")
		}
		seen[tok] = true
	}
}

// BenchmarkPasswordHash is one argon2id hash with DefaultPasswordParams
// (what a sign-in costs).
func BenchmarkPasswordHash(b *testing.B) {
	for b.Loop() {
		if _, err := hashPassword(DefaultPasswordParams, "correct horse battery staple"); err != nil {
			b.Fatal(err)
		}
	}
}
