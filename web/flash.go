package web

// flashes are the one-line confirmations a redirect may ask for with
// ?m=KEY. Only these fixed texts can be shown: a link cannot put its own
// words on the page.
var flashes = map[string]struct {
	text string
	bad  bool
}{
	"signed-in":         {"Signed in.", false},
	"link-signed-in":    {"Signed in with a one-time link. Set a password on your account page to sign in again later.", false},
	"profile-saved":     {"Profile saved.", false},
	"password-set":      {"Password set. Your other sessions were signed out.", false},
	"token-revoked":     {"API token revoked.", false},
	"joined":            {"You joined the team.", false},
	"team-created":      {"Team created.", false},
	"team-switched":     {"Team switched.", false},
	"role-changed":      {"Role changed.", false},
	"member-removed":    {"Member removed.", false},
	"left-team":         {"You left the team.", false},
	"invite-revoked":    {"Invitation revoked.", false},
	"target-saved":      {"Target saved.", false},
	"target-deleted":    {"Target deleted.", false},
	"list-saved":        {"List saved.", false},
	"list-deleted":      {"List deleted.", false},
	"imported":          {"Targets imported.", false},
	"site-saved":        {"Site saved.", false},
	"site-deleted":      {"Site deleted.", false},
	"share-revoked":     {"Share link revoked.", false},
	"plan-saved":        {"Plan saved.", false},
	"run-saved":         {"Run saved.", false},
	"run-deleted":       {"Run deleted.", false},
	"marked":            {"Block marked.", false},
	"replanned":         {"The rest of the run was planned again.", false},
	"optimize-canceled": {"The optimizer was stopped; the previous plan is kept.", true},
}

// flashFor returns the text of a flash key ("" for none or unknown).
func flashFor(key string) (string, bool) {
	f, ok := flashes[key]
	if !ok {
		return "", false
	}
	return f.text, f.bad
}
