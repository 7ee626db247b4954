// Package page holds the HTML pages of the web interface as templ
// components, each with its typed view model. Components only display what
// the handlers computed; they hold no astronomy and no database access.
package page

// Chrome is what every full page shows around its content: title,
// navigation, who is signed in, and the theme.
type Chrome struct {
	Title     string // page title, without the product name
	Nav       string // key of the active navigation entry ("night", "targets", …)
	User      string // display name of the signed-in user; "" when signed out
	Team      string // name of the current team
	NightMode bool   // dim red-on-black theme
	Flash     string // a one-line confirmation shown at the top
	FlashErr  bool   // Flash reports a failure
	// Refresh, when > 0, reloads the page after that many seconds (a
	// progress page without JavaScript).
	Refresh int
}

// NavItem is one entry of the main navigation.
type NavItem struct {
	Key   string
	Label string
	Href  string
}

// MainNav lists the navigation entries in display order.
var MainNav = []NavItem{
	{"tonight", "Tonight", "/tonight"},
	{"night", "Night", "/night"},
	{"runs", "Runs", "/runs"},
	{"windows", "Queue windows", "/windows"},
	{"propose", "Proposal", "/propose"},
	{"targets", "Targets", "/targets"},
	{"sites", "Sites", "/sites"},
	{"team", "Team", "/team"},
}

// FullTitle is the document title.
func (c Chrome) FullTitle() string {
	if c.Title == "" {
		return "phasecast"
	}
	return c.Title + " · phasecast"
}
