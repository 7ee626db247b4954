package store

import (
	"crypto/rand"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/base64"
	"fmt"
	"strconv"
	"strings"

	"golang.org/x/crypto/argon2"
)

// Token prefixes name what a secret is for, so that a leaked token can be
// recognised (common practice). The random part follows the prefix.
const (
	prefixSession    = "pcs_"
	prefixSignIn     = "pcn_"
	prefixAPI        = "pca_"
	prefixShare      = "pcl_"
	prefixInvitation = "pci_"
)

// tokenBytes is the random part of every token: 32 bytes = 256 bits from
// crypto/rand (the issue asks for at least 128).
const tokenBytes = 32

// newToken returns a fresh secret token with the given prefix and the
// SHA-256 of the whole token, which is all the database keeps. A fast hash
// is enough here (unlike passwords): the token has 256 bits of entropy, so
// the hash cannot be reversed by guessing.
func newToken(prefix string) (token string, hash []byte, err error) {
	b := make([]byte, tokenBytes)
	if _, err := rand.Read(b); err != nil {
		return "", nil, fmt.Errorf("random token: %w", err)
	}
	token = prefix + base64.RawURLEncoding.EncodeToString(b)
	return token, hashToken(token), nil
}

// hashToken returns the SHA-256 of a presented token, for lookup.
func hashToken(token string) []byte {
	h := sha256.Sum256([]byte(token))
	return h[:]
}

// PasswordParams are argon2id parameters (RFC 9106).
type PasswordParams struct {
	Time      uint32 // passes over memory, t
	MemoryKiB uint32 // memory, m, in KiB
	Threads   uint8  // lanes, p
	SaltLen   uint32 // bytes
	KeyLen    uint32 // bytes of the tag
}

// DefaultPasswordParams are RFC 9106 §4's "second recommended option" for
// argon2id, the one for machines with little memory: t = 3 passes, p = 4
// lanes, m = 64 MiB, a 128-bit salt and a 256-bit tag. One hash takes about
// 0.5 s on the project's shared 2-core machine (BenchmarkPasswordHash) and
// 64 MiB while it runs: a sign-in is a rare event for a team server, and
// each guess costs an attacker the same; the web layer rate-limits sign-in
// attempts on top. (The first recommended option, 2 GiB, is too much for
// such a server.) Hashing happens outside any database transaction.
var DefaultPasswordParams = PasswordParams{Time: 3, MemoryKiB: 64 * 1024, Threads: 4, SaltLen: 16, KeyLen: 32}

// Password length limits, in bytes of UTF-8 (common practice: long
// passphrases welcome, a floor against trivial ones, a ceiling against
// denial of service).
const (
	MinPasswordLen = 10
	MaxPasswordLen = 1024
)

// hashPassword returns the PHC string of an argon2id hash of pw:
// "$argon2id$v=19$m=65536,t=3,p=4$<salt>$<tag>" (base64 without padding).
func hashPassword(p PasswordParams, pw string) (string, error) {
	salt := make([]byte, p.SaltLen)
	if _, err := rand.Read(salt); err != nil {
		return "", fmt.Errorf("random salt: %w", err)
	}
	key := argon2.IDKey([]byte(pw), salt, p.Time, p.MemoryKiB, p.Threads, p.KeyLen)
	return fmt.Sprintf("$argon2id$v=%d$m=%d,t=%d,p=%d$%s$%s", argon2.Version, p.MemoryKiB, p.Time, p.Threads,
		base64.RawStdEncoding.EncodeToString(salt), base64.RawStdEncoding.EncodeToString(key)), nil
}

// checkPassword reports whether pw matches the PHC string encoded, using
// the parameters stored in it and a constant-time comparison of the tags.
func checkPassword(encoded, pw string) (bool, error) {
	parts := strings.Split(encoded, "$")
	if len(parts) != 6 || parts[1] != "argon2id" || parts[2] != "v="+strconv.Itoa(argon2.Version) {
		return false, fmt.Errorf("stored password hash has an unknown format")
	}
	var m, t uint32
	var p uint8
	if _, err := fmt.Sscanf(parts[3], "m=%d,t=%d,p=%d", &m, &t, &p); err != nil {
		return false, fmt.Errorf("stored password hash parameters: %w", err)
	}
	salt, err := base64.RawStdEncoding.DecodeString(parts[4])
	if err != nil {
		return false, fmt.Errorf("stored password salt: %w", err)
	}
	want, err := base64.RawStdEncoding.DecodeString(parts[5])
	if err != nil || len(want) == 0 {
		return false, fmt.Errorf("stored password tag: %v", err)
	}
	got := argon2.IDKey([]byte(pw), salt, t, m, p, uint32(len(want)))
	return subtle.ConstantTimeCompare(got, want) == 1, nil
}
