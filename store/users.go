package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"net/mail"
	"strings"
	"time"
	"unicode/utf8"
)

// User is a person with an account. The password hash never leaves the
// store; HasPassword says whether one is set (accounts made by a sign-in
// link may have none).
type User struct {
	ID          int64
	Email       string
	Name        string
	HasPassword bool
	CreatedAt   time.Time
	UpdatedAt   time.Time
	Version     int64
}

// NewUser is what an account is made from. Password may be empty (the
// account then signs in by one-time links until a password is set).
type NewUser struct {
	Email    string
	Name     string
	Password string
}

// UserUpdate changes a user's name and email.
type UserUpdate struct {
	Email string
	Name  string
}

// Session is a signed-in browser session. Its token is returned once, when
// it is made, and stored only as a hash.
type Session struct {
	ID        int64
	UserID    int64
	CreatedAt time.Time
	ExpiresAt time.Time
}

// APIToken is a named, revocable secret for the JSON API. The token itself
// is returned once, by CreateAPIToken.
type APIToken struct {
	ID         int64
	UserID     int64
	Name       string
	CreatedAt  time.Time
	ExpiresAt  time.Time // zero: until revoked
	LastUsedAt time.Time // zero: never used
	RevokedAt  time.Time // zero: live
}

const userCols = "id, email, name, password_hash != '', created_at, updated_at, version"

func scanUser(sc interface{ Scan(...any) error }) (User, error) {
	var u User
	var created, updated string
	if err := sc.Scan(&u.ID, &u.Email, &u.Name, &u.HasPassword, &created, &updated, &u.Version); err != nil {
		return User{}, err
	}
	var err error
	if u.CreatedAt, err = parseTime(created); err != nil {
		return User{}, err
	}
	if u.UpdatedAt, err = parseTime(updated); err != nil {
		return User{}, err
	}
	return u, nil
}

func getUser(t *txn, id int64) (User, error) {
	u, err := scanUser(t.queryRow("SELECT "+userCols+" FROM users WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return User{}, errNotFound("user", id)
	}
	if err != nil {
		return User{}, fmt.Errorf("read user: %w", err)
	}
	return u, nil
}

// validateUser checks an email and a name, adding to v.
func validateUser(v *ValidationError, email, name string) {
	if a, err := mail.ParseAddress(email); err != nil || a.Address != email || len(email) > 254 {
		v.add("email", email, "an email address such as ada@example.org (at most 254 characters)")
	}
	validName(v, "name", name)
}

func validatePassword(v *ValidationError, field, pw string) {
	if len(pw) < MinPasswordLen || len(pw) > MaxPasswordLen || !utf8.ValidString(pw) {
		v.add(field, "(hidden)", fmt.Sprintf("a password of %d to %d bytes", MinPasswordLen, MaxPasswordLen))
	}
}

// CreateUser makes an account. It is a system operation (first start,
// console, tests): people joining a team use AcceptInvitationNewUser.
// An email already in use is ECONFLICT.
func (s *Store) CreateUser(ctx context.Context, nu NewUser) (User, error) {
	const op = "store.CreateUser"
	nu, hash, err := prepareUser(s.pw, nu)
	if err != nil {
		return User{}, wrap(op, err)
	}
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return User{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	u, err := createUser(t, nu, hash)
	if err != nil {
		return User{}, wrap(op, err)
	}
	return u, commit(t, op)
}

// prepareUser validates nu and hashes its password, if any, outside any
// transaction (argon2id is slow on purpose and must not hold the writer).
func prepareUser(p PasswordParams, nu NewUser) (NewUser, string, error) {
	v := &ValidationError{}
	nu.Email = strings.TrimSpace(nu.Email)
	validateUser(v, nu.Email, nu.Name)
	if nu.Password != "" {
		validatePassword(v, "password", nu.Password)
	}
	if err := v.err(); err != nil {
		return NewUser{}, "", err
	}
	if nu.Password == "" {
		return nu, "", nil
	}
	hash, err := hashPassword(p, nu.Password)
	return nu, hash, err
}

// createUser inserts a validated user with its password hash ("" = none).
func createUser(t *txn, nu NewUser, hash string) (User, error) {
	var n int
	if err := t.queryRow("SELECT count(*) FROM users WHERE email = ?", nu.Email).Scan(&n); err != nil {
		return User{}, fmt.Errorf("check email: %w", err)
	}
	if n > 0 {
		return User{}, errConflict("an account with email %s already exists", nu.Email)
	}
	now := fmtTime(t.now)
	id, err := t.insertID(`INSERT INTO users (email, name, password_hash, created_at, updated_at, version) VALUES (?, ?, ?, ?, ?, 1)`,
		nu.Email, nu.Name, hash, now, now)
	if err != nil {
		return User{}, fmt.Errorf("insert user: %w", err)
	}
	u, err := getUser(t, id)
	if err != nil {
		return User{}, err
	}
	return u, t.audit(0, "user", id, ActCreate, nil, u)
}

// Me returns the acting user.
func (s *Store) Me(ctx context.Context, a Actor) (User, error) {
	const op = "store.Me"
	if a.Kind != ActorUser {
		return User{}, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return User{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	u, err := getUser(t, a.UserID)
	if err != nil {
		return User{}, wrap(op, err)
	}
	return u, commit(t, op)
}

// GetUser returns a user the actor may see: themself or someone who shares
// a team with them.
func (s *Store) GetUser(ctx context.Context, a Actor, id int64) (User, error) {
	const op = "store.GetUser"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return User{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	if a.Kind != ActorUser {
		return User{}, wrap(op, errNotFound("user", id))
	}
	if id != a.UserID {
		var n int
		if err := t.queryRow(`SELECT count(*) FROM memberships m1 JOIN memberships m2 ON m1.team_id = m2.team_id
			WHERE m1.user_id = ? AND m2.user_id = ?`, a.UserID, id).Scan(&n); err != nil {
			return User{}, wrap(op, err)
		}
		if n == 0 {
			return User{}, wrap(op, errNotFound("user", id))
		}
	}
	u, err := getUser(t, id)
	if err != nil {
		return User{}, wrap(op, err)
	}
	return u, commit(t, op)
}

// UpdateUser changes the acting user's own name and email.
func (s *Store) UpdateUser(ctx context.Context, a Actor, version int64, in UserUpdate) (User, error) {
	const op = "store.UpdateUser"
	if a.Kind != ActorUser {
		return User{}, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return User{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := getUser(t, a.UserID)
	if err != nil {
		return User{}, wrap(op, err)
	}
	if before.Version != version {
		return User{}, wrap(op, errStale("user", before.ID, version, before.Version, before))
	}
	v := &ValidationError{}
	in.Email = strings.TrimSpace(in.Email)
	validateUser(v, in.Email, in.Name)
	if err := v.err(); err != nil {
		return User{}, wrap(op, err)
	}
	var n int
	if err := t.queryRow("SELECT count(*) FROM users WHERE email = ? AND id != ?", in.Email, a.UserID).Scan(&n); err != nil {
		return User{}, wrap(op, err)
	}
	if n > 0 {
		return User{}, wrap(op, errConflict("an account with email %s already exists", in.Email))
	}
	if _, err := t.exec("UPDATE users SET email = ?, name = ?, updated_at = ?, version = version + 1 WHERE id = ? AND version = ?",
		in.Email, in.Name, fmtTime(t.now), a.UserID, version); err != nil {
		return User{}, wrap(op, err)
	}
	after, err := getUser(t, a.UserID)
	if err != nil {
		return User{}, wrap(op, err)
	}
	if err := t.audit(0, "user", a.UserID, ActUpdate, before, after); err != nil {
		return User{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// ChangePassword sets the acting user's password. When one is set already,
// current must match it. Every other session of the user is signed out.
func (s *Store) ChangePassword(ctx context.Context, a Actor, current, next string) error {
	const op = "store.ChangePassword"
	if a.Kind != ActorUser {
		return &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	v := &ValidationError{}
	validatePassword(v, "new_password", next)
	if err := v.err(); err != nil {
		return wrap(op, err)
	}
	// Hash outside the write transaction: argon2id takes a while and must
	// not hold the writer.
	hash, err := hashPassword(s.pw, next)
	if err != nil {
		return wrap(op, err)
	}
	var stored string
	if err := s.rdb.QueryRowContext(ctx, s.d.rebind("SELECT password_hash FROM users WHERE id = ?"), a.UserID).Scan(&stored); err != nil {
		return wrap(op, err)
	}
	if stored != "" {
		ok, err := checkPassword(stored, current)
		if err != nil {
			return wrap(op, err)
		}
		if !ok {
			return &Error{Code: EFORBIDDEN, Op: op, Message: "the current password is wrong"}
		}
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := getUser(t, a.UserID)
	if err != nil {
		return wrap(op, err)
	}
	res, err := t.exec("UPDATE users SET password_hash = ?, updated_at = ?, version = version + 1 WHERE id = ? AND password_hash = ?",
		hash, fmtTime(t.now), a.UserID, stored)
	if err != nil {
		return wrap(op, err)
	}
	if n, err := res.RowsAffected(); err != nil || n != 1 {
		return wrap(op, errConflict("the password was changed meanwhile; try again"))
	}
	if _, err := t.exec("DELETE FROM sessions WHERE user_id = ? AND id != ?", a.UserID, a.SessionID); err != nil {
		return wrap(op, err)
	}
	after, err := getUser(t, a.UserID)
	if err != nil {
		return wrap(op, err)
	}
	if err := t.audit(0, "user", a.UserID, ActUpdate, before, after); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// errBadSignIn is the one answer to every failed sign-in, whatever failed.
func errBadSignIn(op string) error {
	return &Error{Code: EFORBIDDEN, Op: op, Message: "the email or password is wrong"}
}

// SignIn checks an email and password and, if they match, opens a session.
// It returns the user and the session token (to be set as a cookie). Any
// failure is the same EFORBIDDEN, so that it does not reveal which accounts
// exist.
func (s *Store) SignIn(ctx context.Context, email, password string) (User, string, error) {
	const op = "store.SignIn"
	var id int64
	var stored string
	err := s.rdb.QueryRowContext(ctx, s.d.rebind("SELECT id, password_hash FROM users WHERE email = ?"), strings.TrimSpace(email)).Scan(&id, &stored)
	if err != nil && !errors.Is(err, sql.ErrNoRows) {
		return User{}, "", wrap(op, err)
	}
	if stored == "" {
		// Unknown email or no password: spend the same time as a check, so
		// that a failed sign-in does not reveal whether the account exists.
		s.dummyOnce.Do(func() { s.dummyHash, s.dummyErr = hashPassword(s.pw, "phasecast-dummy-password") })
		if s.dummyErr != nil {
			return User{}, "", wrap(op, s.dummyErr)
		}
		if _, err := checkPassword(s.dummyHash, password); err != nil {
			return User{}, "", wrap(op, err)
		}
		return User{}, "", errBadSignIn(op)
	}
	ok, err := checkPassword(stored, password)
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	if !ok {
		return User{}, "", errBadSignIn(op)
	}
	t, err := s.beginWrite(ctx, Actor{Kind: ActorUser, UserID: id, Via: "password"})
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	u, err := getUser(t, id)
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	token, _, err := createSession(t, id, s.sessionTTL)
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	return u, token, commit(t, op)
}

func createSession(t *txn, userID int64, ttl time.Duration) (string, Session, error) {
	token, hash, err := newToken(prefixSession)
	if err != nil {
		return "", Session{}, err
	}
	exp := t.now.Add(ttl)
	id, err := t.insertID("INSERT INTO sessions (token_hash, user_id, created_at, expires_at) VALUES (?, ?, ?, ?)",
		hash, userID, fmtTime(t.now), fmtTime(exp))
	if err != nil {
		return "", Session{}, fmt.Errorf("insert session: %w", err)
	}
	// Sweep this user's expired sessions while we hold the writer.
	if _, err := t.exec("DELETE FROM sessions WHERE user_id = ? AND expires_at <= ?", userID, fmtTime(t.now)); err != nil {
		return "", Session{}, fmt.Errorf("sweep sessions: %w", err)
	}
	return token, Session{ID: id, UserID: userID, CreatedAt: t.now, ExpiresAt: exp}, nil
}

// SessionActor returns the actor of a session token: the user with their
// memberships. An unknown or expired token is EFORBIDDEN.
func (s *Store) SessionActor(ctx context.Context, token string) (Actor, error) {
	const op = "store.SessionActor"
	t, err := s.beginRead(ctx, Anonymous())
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	var sid, uid int64
	var exp string
	err = t.queryRow("SELECT id, user_id, expires_at FROM sessions WHERE token_hash = ?", hashToken(token)).Scan(&sid, &uid, &exp)
	if errors.Is(err, sql.ErrNoRows) {
		return Actor{}, &Error{Code: EFORBIDDEN, Op: op, Message: "not signed in, or the session has ended"}
	}
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	if exp <= fmtTime(t.now) {
		return Actor{}, &Error{Code: EFORBIDDEN, Op: op, Message: "not signed in, or the session has ended"}
	}
	a, err := userActor(t, uid, "session")
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	a.SessionID = sid
	return a, commit(t, op)
}

// userActor builds a user actor with a snapshot of their memberships.
func userActor(t *txn, uid int64, via string) (Actor, error) {
	u, err := getUser(t, uid)
	if err != nil {
		return Actor{}, err
	}
	ms, err := membershipsOfUser(t, uid)
	if err != nil {
		return Actor{}, err
	}
	return Actor{Kind: ActorUser, UserID: uid, Name: u.Name, Via: via, Teams: ms}, nil
}

// SignOut ends the session of token. An unknown token is not an error.
func (s *Store) SignOut(ctx context.Context, token string) error {
	const op = "store.SignOut"
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.exec("DELETE FROM sessions WHERE token_hash = ?", hashToken(token)); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// Limits on how long secrets live.
const (
	MaxSignInLinkTTL = 7 * 24 * time.Hour
	MaxInvitationTTL = 30 * 24 * time.Hour
	MaxShareLinkTTL  = 366 * 24 * time.Hour
	MaxAPITokenTTL   = 2 * 366 * 24 * time.Hour
)

// CreateSignInLink makes a one-time sign-in token for the account with the
// given email, valid for ttl (0 < ttl ≤ MaxSignInLinkTTL). It is a system
// operation: the first start prints one to the console, and an operator
// can make one for a locked-out member. The web layer puts the token in a
// URL.
func (s *Store) CreateSignInLink(ctx context.Context, email string, ttl time.Duration) (string, error) {
	const op = "store.CreateSignInLink"
	if ttl <= 0 || ttl > MaxSignInLinkTTL {
		return "", &Error{Code: EINVALID, Op: op, Message: fmt.Sprintf("ttl: %v is not accepted; accepted: more than 0 and at most %v", ttl, MaxSignInLinkTTL)}
	}
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return "", wrap(op, err)
	}
	defer t.tx.Rollback()
	var uid int64
	err = t.queryRow("SELECT id FROM users WHERE email = ?", strings.TrimSpace(email)).Scan(&uid)
	if errors.Is(err, sql.ErrNoRows) {
		return "", &Error{Code: ENOTFOUND, Op: op, Message: fmt.Sprintf("no account with email %s", email)}
	}
	if err != nil {
		return "", wrap(op, err)
	}
	token, err := createSignInLink(t, uid, ttl)
	if err != nil {
		return "", wrap(op, err)
	}
	return token, commit(t, op)
}

func createSignInLink(t *txn, uid int64, ttl time.Duration) (string, error) {
	token, hash, err := newToken(prefixSignIn)
	if err != nil {
		return "", err
	}
	if _, err := t.exec("INSERT INTO signin_links (token_hash, user_id, created_at, expires_at) VALUES (?, ?, ?, ?)",
		hash, uid, fmtTime(t.now), fmtTime(t.now.Add(ttl))); err != nil {
		return "", fmt.Errorf("insert sign-in link: %w", err)
	}
	return token, nil
}

// RedeemSignInLink uses a one-time sign-in token: it is marked used and a
// session is opened. A used, expired or unknown token is EFORBIDDEN.
func (s *Store) RedeemSignInLink(ctx context.Context, token string) (User, string, error) {
	const op = "store.RedeemSignInLink"
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	var id, uid int64
	var exp string
	var used sql.NullString
	err = t.queryRow("SELECT id, user_id, expires_at, used_at FROM signin_links WHERE token_hash = ?", hashToken(token)).
		Scan(&id, &uid, &exp, &used)
	if errors.Is(err, sql.ErrNoRows) || (err == nil && (used.Valid || exp <= fmtTime(t.now))) {
		return User{}, "", &Error{Code: EFORBIDDEN, Op: op, Message: "this sign-in link is unknown, used or expired; ask for a new one"}
	}
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	if _, err := t.exec("UPDATE signin_links SET used_at = ? WHERE id = ?", fmtTime(t.now), id); err != nil {
		return User{}, "", wrap(op, err)
	}
	u, err := getUser(t, uid)
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	sess, _, err := createSession(t, uid, s.sessionTTL)
	if err != nil {
		return User{}, "", wrap(op, err)
	}
	return u, sess, commit(t, op)
}

const apiTokenCols = "id, user_id, name, created_at, expires_at, last_used_at, revoked_at"

func scanAPIToken(sc interface{ Scan(...any) error }) (APIToken, error) {
	var k APIToken
	var created string
	var exp, used, rev sql.NullString
	if err := sc.Scan(&k.ID, &k.UserID, &k.Name, &created, &exp, &used, &rev); err != nil {
		return APIToken{}, err
	}
	var err error
	if k.CreatedAt, err = parseTime(created); err != nil {
		return APIToken{}, err
	}
	if k.ExpiresAt, err = parseNullTime(exp); err != nil {
		return APIToken{}, err
	}
	if k.LastUsedAt, err = parseNullTime(used); err != nil {
		return APIToken{}, err
	}
	if k.RevokedAt, err = parseNullTime(rev); err != nil {
		return APIToken{}, err
	}
	return k, nil
}

// CreateAPIToken makes a named API token for the acting user, valid for ttl
// (0 = until revoked; at most MaxAPITokenTTL). The token is returned once.
func (s *Store) CreateAPIToken(ctx context.Context, a Actor, name string, ttl time.Duration) (APIToken, string, error) {
	const op = "store.CreateAPIToken"
	if a.Kind != ActorUser {
		return APIToken{}, "", &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	v := &ValidationError{}
	if n := utf8.RuneCountInString(name); n < 1 || n > 100 || strings.TrimSpace(name) != name || !validText(name, false) {
		v.add("name", name, "a token name of 1 to 100 characters without leading or trailing blanks")
	}
	if ttl < 0 || ttl > MaxAPITokenTTL {
		v.add("ttl", ttl.String(), fmt.Sprintf("0 (until revoked) or up to %v", MaxAPITokenTTL))
	}
	if err := v.err(); err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	token, hash, err := newToken(prefixAPI)
	if err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	var exp any
	if ttl > 0 {
		exp = fmtTime(t.now.Add(ttl))
	}
	id, err := t.insertID("INSERT INTO api_tokens (user_id, name, token_hash, created_at, expires_at) VALUES (?, ?, ?, ?, ?)",
		a.UserID, name, hash, fmtTime(t.now), exp)
	if err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	k, err := scanAPIToken(t.queryRow("SELECT "+apiTokenCols+" FROM api_tokens WHERE id = ?", id))
	if err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	if err := t.audit(0, "api_token", id, ActCreate, nil, k); err != nil {
		return APIToken{}, "", wrap(op, err)
	}
	return k, token, commit(t, op)
}

// ListAPITokens returns the acting user's API tokens, newest first,
// including revoked ones.
func (s *Store) ListAPITokens(ctx context.Context, a Actor) ([]APIToken, error) {
	const op = "store.ListAPITokens"
	if a.Kind != ActorUser {
		return nil, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	rows, err := t.query("SELECT "+apiTokenCols+" FROM api_tokens WHERE user_id = ? ORDER BY id DESC", a.UserID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []APIToken
	for rows.Next() {
		k, err := scanAPIToken(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, k)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// RevokeAPIToken revokes one of the acting user's tokens. Revoking twice is
// not an error.
func (s *Store) RevokeAPIToken(ctx context.Context, a Actor, id int64) error {
	const op = "store.RevokeAPIToken"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := scanAPIToken(t.queryRow("SELECT "+apiTokenCols+" FROM api_tokens WHERE id = ? AND user_id = ?", id, a.UserID))
	if errors.Is(err, sql.ErrNoRows) || a.Kind != ActorUser {
		return wrap(op, errNotFound("API token", id))
	}
	if err != nil {
		return wrap(op, err)
	}
	if !before.RevokedAt.IsZero() {
		return commit(t, op)
	}
	if _, err := t.exec("UPDATE api_tokens SET revoked_at = ? WHERE id = ?", fmtTime(t.now), id); err != nil {
		return wrap(op, err)
	}
	after := before
	after.RevokedAt = t.now
	if err := t.audit(0, "api_token", id, ActUpdate, before, after); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// APITokenActor returns the actor of an API token (for
// "Authorization: Bearer"). An unknown, expired or revoked token is
// EFORBIDDEN. Use is recorded at most once a minute.
func (s *Store) APITokenActor(ctx context.Context, token string) (Actor, error) {
	const op = "store.APITokenActor"
	t, err := s.beginRead(ctx, Anonymous())
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	k, err := scanAPIToken(t.queryRow("SELECT "+apiTokenCols+" FROM api_tokens WHERE token_hash = ?", hashToken(token)))
	bad := &Error{Code: EFORBIDDEN, Op: op, Message: "the API token is unknown, expired or revoked"}
	if errors.Is(err, sql.ErrNoRows) {
		return Actor{}, bad
	}
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	if !k.RevokedAt.IsZero() || (!k.ExpiresAt.IsZero() && !t.now.Before(k.ExpiresAt)) {
		return Actor{}, bad
	}
	a, err := userActor(t, k.UserID, "api_token")
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	if err := commit(t, op); err != nil {
		return Actor{}, err
	}
	if k.LastUsedAt.IsZero() || t.now.Sub(k.LastUsedAt) > time.Minute {
		if _, err := s.wdb.ExecContext(ctx, s.d.rebind("UPDATE api_tokens SET last_used_at = ? WHERE id = ?"), fmtTime(t.now), k.ID); err != nil {
			return Actor{}, wrap(op, err)
		}
	}
	return a, nil
}
