package web

import (
	"strconv"
	"time"

	"phasecast/store"
)

// inviteState names where an invitation stands at now.
func inviteState(i store.Invitation, now time.Time) string {
	switch {
	case !i.AcceptedAt.IsZero():
		return "accepted"
	case !i.RevokedAt.IsZero():
		return "revoked"
	case now.After(i.ExpiresAt):
		return "expired"
	}
	return "open"
}

func i64s(n int64) string { return strconv.FormatInt(n, 10) }
