// Package static holds the web interface's stylesheet and its small
// progressive-enhancement script, embedded into the binary.
//
// Every page works without the script: it only remembers the night-vision
// choice without a round trip, reloads the Tonight fragment, and polls the
// progress of long computations.
package static

import (
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"io/fs"
)

// FS holds the files served under /static/.
//
//go:embed app.css app.js
var FS embed.FS

var versions = func() map[string]string {
	v := map[string]string{}
	entries, err := fs.ReadDir(FS, ".")
	if err != nil {
		return v
	}
	for _, e := range entries {
		b, err := FS.ReadFile(e.Name())
		if err != nil {
			continue
		}
		sum := sha256.Sum256(b)
		v[e.Name()] = hex.EncodeToString(sum[:4])
	}
	return v
}()

// Path returns the URL path of an embedded file with a content hash as a
// query string, so that browsers may cache it for long and still pick up a
// new version after an upgrade: "/static/app.css?v=1a2b3c4d".
func Path(name string) string {
	if h, ok := versions[name]; ok {
		return "/static/" + name + "?v=" + h
	}
	return "/static/" + name
}
