package loadtest

import (
	"bytes"
	"fmt"
	"net/url"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// formValues returns what a browser would submit from the form of page
// whose action is action, without pressing any button: text and hidden
// inputs, checked boxes and radios, each select's chosen option (the first
// when none is marked selected) and textareas.
func formValues(page []byte, action string) (url.Values, error) {
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		return nil, err
	}
	form := find(doc, func(n *html.Node) bool {
		return n.Type == html.ElementNode && n.Data == "form" && attr(n, "action") == action
	})
	if form == nil {
		return nil, fmt.Errorf("no form with action %q on the page", action)
	}
	v := url.Values{}
	walk(form, func(n *html.Node) {
		if n.Type != html.ElementNode {
			return
		}
		name := attr(n, "name")
		if name == "" || hasAttr(n, "disabled") {
			return
		}
		switch n.Data {
		case "input":
			switch strings.ToLower(attr(n, "type")) {
			case "submit", "button", "reset", "image", "file":
			case "checkbox", "radio":
				if hasAttr(n, "checked") {
					val := attr(n, "value")
					if !hasAttr(n, "value") {
						val = "on"
					}
					v.Add(name, val)
				}
			default:
				v.Add(name, attr(n, "value"))
			}
		case "textarea":
			v.Add(name, strings.TrimPrefix(text(n), "\n"))
		case "select":
			var first, chosen *html.Node
			walk(n, func(o *html.Node) {
				if o.Type == html.ElementNode && o.Data == "option" {
					if first == nil {
						first = o
					}
					if chosen == nil && hasAttr(o, "selected") {
						chosen = o
					}
				}
			})
			if chosen == nil {
				chosen = first
			}
			if chosen != nil {
				val := attr(chosen, "value")
				if !hasAttr(chosen, "value") {
					val = text(chosen)
				}
				v.Add(name, val)
			}
		}
	})
	return v, nil
}

func find(n *html.Node, ok func(*html.Node) bool) *html.Node {
	if ok(n) {
		return n
	}
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		if f := find(c, ok); f != nil {
			return f
		}
	}
	return nil
}

func walk(n *html.Node, f func(*html.Node)) {
	f(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		walk(c, f)
	}
}

func attr(n *html.Node, key string) string {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val
		}
	}
	return ""
}

func hasAttr(n *html.Node, key string) bool {
	for _, a := range n.Attr {
		if a.Key == key {
			return true
		}
	}
	return false
}

func text(n *html.Node) string {
	var b strings.Builder
	walk(n, func(c *html.Node) {
		if c.Type == html.TextNode {
			b.WriteString(c.Data)
		}
	})
	return b.String()
}

func TestFormValues(t *testing.T) {
	page := []byte(`<html><body>
<form method="post" action="/other"><input name="x" value="no"></form>
<form method="post" action="/targets/7">
<input type="hidden" name="version" value="3">
<input type="text" name="name" value="A &amp; B">
<input type="checkbox" name="fill" value="1" checked>
<input type="checkbox" name="skip" value="1">
<input type="submit" name="go" value="Save">
<select name="std"><option value="JD_UTC">JD UTC</option><option value="BJD_TDB" selected>BJD TDB</option></select>
<select name="form"><option value="JD">JD</option><option value="MJD">MJD</option></select>
<textarea name="notes">
line one
line two</textarea>
<input name="off" value="z" disabled>
</form></body></html>`)
	tests := []struct {
		name, action string
		want         url.Values
		wantErr      bool
	}{
		{name: "TargetForm", action: "/targets/7", want: url.Values{
			"version": {"3"}, "name": {"A & B"}, "fill": {"1"}, "std": {"BJD_TDB"}, "form": {"JD"}, "notes": {"line one\nline two"},
		}},
		{name: "OtherForm", action: "/other", want: url.Values{"x": {"no"}}},
		{name: "ErrNoSuchForm", action: "/nowhere", wantErr: true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := formValues(page, tc.action)
			if (err != nil) != tc.wantErr {
				t.Fatalf("formValues(%q) error = %v, want error %v", tc.action, err, tc.wantErr)
			}
			if tc.wantErr {
				return
			}
			if got.Encode() != tc.want.Encode() {
				t.Errorf("formValues(%q) = %v, want %v", tc.action, got, tc.want)
			}
		})
	}
}

func TestLocationID(t *testing.T) {
	tests := []struct {
		name, loc, prefix string
		want              int64
		wantErr           bool
	}{
		{name: "Target", loc: "/targets/12?m=target-saved", prefix: "/targets/", want: 12},
		{name: "List", loc: "/targets?list=3&m=list-saved", prefix: "list=", want: 3},
		{name: "ErrNoPrefix", loc: "/login", prefix: "/targets/", wantErr: true},
		{name: "ErrNoDigits", loc: "/targets/new", prefix: "/targets/", wantErr: true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := locationID(tc.loc, tc.prefix)
			if (err != nil) != tc.wantErr || got != tc.want {
				t.Errorf("locationID(%q, %q) = %d, %v; want %d, error %v", tc.loc, tc.prefix, got, err, tc.want, tc.wantErr)
			}
		})
	}
}
