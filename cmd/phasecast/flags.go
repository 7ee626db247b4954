package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"regexp"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
	"unicode"
	"unicode/utf8"

	"phasecast/ephem"
)

// flags is one command's flag set. Every value flag is read as text and
// parsed only after the whole command line has been read, so that each
// message can name the flag, the value typed and what is accepted. The
// standard flag package does the splitting (-x v, --x v, --x=v).
type flags struct {
	cmd      string
	synopsis string
	fs       *flag.FlagSet
	order    []*textValue
	bools    []boolFlag
}

// textValue is a flag's raw text and whether it was given.
type textValue struct {
	name  string // without dashes
	meta  string // placeholder in the help, e.g. DEG
	usage string
	def   string // shown in the help; "" for none
	value string
	set   bool
}

type boolFlag struct {
	name, usage string
}

func (v *textValue) String() string {
	if v == nil {
		return ""
	}
	return v.value
}

func (v *textValue) Set(s string) error {
	v.value, v.set = s, true
	return nil
}

// flagName is the flag as the user types it, with two dashes.
func (v *textValue) flagName() string { return "--" + v.name }

func newFlags(cmd, synopsis string) *flags {
	fs := flag.NewFlagSet(cmd, flag.ContinueOnError)
	fs.SetOutput(io.Discard) // errors are reported by run, on one line
	fs.Usage = func() {}
	return &flags{cmd: cmd, synopsis: synopsis, fs: fs}
}

// text registers a value flag.
func (f *flags) text(name, meta, def, usage string) *textValue {
	v := &textValue{name: name, meta: meta, usage: usage, def: def}
	f.fs.Var(v, name, usage)
	f.order = append(f.order, v)
	return v
}

// boolean registers a switch.
func (f *flags) boolean(name, usage string) *bool {
	f.bools = append(f.bools, boolFlag{name, usage})
	return f.fs.Bool(name, false, usage)
}

// parse reads args. help is true when -h was asked for and the help has
// been printed to stdout.
func (f *flags) parse(args []string, stdout io.Writer) (help bool, err error) {
	err = f.fs.Parse(args)
	if errors.Is(err, flag.ErrHelp) {
		return true, f.printHelp(stdout)
	}
	if err != nil {
		return false, usageErrorf("%s: %s; run 'phasecast %s -h' for its flags", f.cmd, dashDash(err.Error()), f.cmd)
	}
	if f.fs.NArg() > 0 {
		return false, usageErrorf("%s: unexpected argument %q; every input is a flag (run 'phasecast %s -h')", f.cmd, f.fs.Arg(0), f.cmd)
	}
	return false, nil
}

var singleDashFlag = regexp.MustCompile(`(^|[\s:])-([A-Za-z][\w-]*)`)

// dashDash rewrites the flag package's "-lat" as "--lat".
func dashDash(msg string) string {
	msg = strings.Replace(msg, "flag provided but not defined", "unknown flag", 1)
	return singleDashFlag.ReplaceAllString(msg, "$1--$2")
}

func (f *flags) printHelp(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Usage: phasecast %s [flags]\n\n%s\n\nFlags:\n", f.cmd, f.synopsis)
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, v := range f.order {
		usage := v.usage
		if v.def != "" {
			usage += " (default " + v.def + ")"
		}
		fmt.Fprintf(tw, "  --%s %s\t%s\n", v.name, v.meta, usage)
	}
	for _, bf := range f.bools {
		fmt.Fprintf(tw, "  --%s\t%s\n", bf.name, bf.usage)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// fieldError is the one-line message for a bad flag value:
// "--lat 95: out of range; accepted: −90..90 degrees, north positive".
func fieldError(v *textValue, problem, accepted string) error {
	return usageErrorf("%s %s: %s; accepted: %s", v.flagName(), shown(v.value), problem, accepted)
}

// missing is the message for a required flag that was not given.
func missing(v *textValue) error {
	return usageErrorf("missing %s %s: %s", v.flagName(), v.meta, strings.TrimSuffix(v.usage, "; required"))
}

// shown returns a value as it should appear in a message: bare when it is
// short plain printable UTF-8 text without blanks, quoted otherwise, and cut
// to 80 characters (a value read from a file may be megabytes long, or not
// UTF-8 at all).
func shown(s string) string {
	cut, n := s, 0
	for i := range s {
		if n == 80 {
			cut = s[:i] + "…"
			break
		}
		n++
	}
	if cut != s || s == "" || !utf8.ValidString(s) ||
		strings.IndexFunc(s, func(r rune) bool { return unicode.IsSpace(r) || !unicode.IsPrint(r) }) >= 0 {
		return strconv.Quote(cut)
	}
	return s
}

// fromInputError turns an *ephem.InputError about one of the given flags
// (matched by its Field, e.g. "lat" for --lat) into a flag message showing
// the text the user typed. Other errors are returned as they are.
func fromInputError(err error, problem string, byField map[string]*textValue) error {
	var ie *ephem.InputError
	if !errors.As(err, &ie) {
		return err
	}
	if v, ok := byField[ie.Field]; ok {
		return fieldError(v, problem, ie.Accepted)
	}
	return usageErrorf("%s %s: %s; accepted: %s", ie.Field, ie.Value, problem, ie.Accepted)
}

// decimalNumber is the accepted spelling of a plain number: optional sign
// (ASCII or U+2212 minus), digits with an optional fraction, an optional
// exponent. No NaN, no infinity, no hexadecimal, no digit separators.
var decimalNumber = regexp.MustCompile(`^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$`)

// parseNumber reads a plain decimal number.
func parseNumber(s string) (float64, bool) {
	s = strings.TrimSpace(s)
	if strings.HasPrefix(s, "−") {
		s = "-" + strings.TrimPrefix(s, "−")
	}
	if !decimalNumber.MatchString(s) {
		return 0, false
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil { // only ErrRange is possible here: overflow
		return 0, false
	}
	return x, true
}

// number parses v as a number in lo..hi (inclusive), or returns def when v
// was not given and required is false.
func number(v *textValue, required bool, def, lo, hi float64, accepted string) (float64, error) {
	if !v.set {
		if required {
			return 0, missing(v)
		}
		return def, nil
	}
	x, ok := parseNumber(v.value)
	if !ok {
		return 0, fieldError(v, "not a number", accepted)
	}
	if x < lo || x > hi {
		return 0, fieldError(v, "out of range", accepted)
	}
	return x, nil
}

// addSiteNameFlag is --site-name, the site's name the documents of plan,
// run and windows carry (the web writes its site's name there).
func addSiteNameFlag(f *flags) *textValue {
	return f.text("site-name", "NAME", "none", "the site's name, written into the JSON, CSV and iCalendar documents")
}

// siteFlags are --lat, --lon and --elev.
type siteFlags struct{ lat, lon, elev *textValue }

func addSiteFlags(f *flags) siteFlags {
	return siteFlags{
		lat:  f.text("lat", "DEG", "", "site latitude, degrees, north positive (−90..90); required"),
		lon:  f.text("lon", "DEG", "", "site longitude, degrees, EAST positive (−180..180; west is negative); required"),
		elev: f.text("elev", "M", "0", "site elevation above sea level, metres (−500..9000)"),
	}
}

// site parses and validates the site flags.
func (s siteFlags) site() (ephem.Site, error) {
	for _, v := range []*textValue{s.lat, s.lon} {
		if !v.set {
			return ephem.Site{}, missing(v)
		}
	}
	var vals [3]float64
	accepted := [3]string{"−90..90 degrees, north positive", "−180..180 degrees, east positive", "−500..9000 metres"}
	for i, v := range []*textValue{s.lat, s.lon, s.elev} {
		if !v.set {
			continue
		}
		x, ok := parseNumber(v.value)
		if !ok {
			return ephem.Site{}, fieldError(v, "not a number", accepted[i])
		}
		vals[i] = x
	}
	site, err := ephem.NewSite(vals[0], vals[1], vals[2])
	if err != nil {
		return ephem.Site{}, fromInputError(err, "out of range", map[string]*textValue{"lat": s.lat, "lon": s.lon, "elev": s.elev})
	}
	return site, nil
}

// targetFlags are --ra and --dec (ICRS, J2000) with optional proper motion.
type targetFlags struct{ ra, dec, pmra, pmdec *textValue }

func addTargetFlags(f *flags) targetFlags {
	return targetFlags{
		ra:    f.text("ra", "RA", "", "target right ascension, ICRS: decimal degrees (148.25) or hours 09:53:00.0; required"),
		dec:   f.text("dec", "DEC", "", "target declination, ICRS: decimal degrees (-6.125) or -06:07:30; required"),
		pmra:  f.text("pmra", "MAS/YR", "0", "proper motion in RA × cos(Dec), milliarcseconds per year"),
		pmdec: f.text("pmdec", "MAS/YR", "0", "proper motion in Dec, milliarcseconds per year"),
	}
}

// star parses the target flags.
func (t targetFlags) star() (ephem.Star, error) {
	if !t.ra.set {
		return ephem.Star{}, missing(t.ra)
	}
	if !t.dec.set {
		return ephem.Star{}, missing(t.dec)
	}
	ra, err := ephem.ParseRA(t.ra.value)
	if err != nil {
		return ephem.Star{}, fromInputError(err, "not a right ascension", map[string]*textValue{"ra": t.ra})
	}
	dec, err := ephem.ParseDec(t.dec.value)
	if err != nil {
		return ephem.Star{}, fromInputError(err, "not a declination", map[string]*textValue{"dec": t.dec})
	}
	const pmAccepted = "a proper motion in milliarcseconds per year, −100000..100000"
	pmra, err := number(t.pmra, false, 0, -1e5, 1e5, pmAccepted)
	if err != nil {
		return ephem.Star{}, err
	}
	pmdec, err := number(t.pmdec, false, 0, -1e5, 1e5, pmAccepted)
	if err != nil {
		return ephem.Star{}, err
	}
	return ephem.Star{RADeg: ra, DecDeg: dec, PMRAmasyr: pmra, PMDecmasyr: pmdec}, nil
}

// sightingFlags are the site, the target and the instant (--at) of a command
// about one target seen from a site at one moment (bjd, phase, sky).
type sightingFlags struct {
	site   siteFlags
	target targetFlags
	at     *textValue
}

// addSightingFlags adds the site flags, the target flags and --at (help
// text atUsage), in that order.
func addSightingFlags(f *flags, atUsage string) sightingFlags {
	return sightingFlags{site: addSiteFlags(f), target: addTargetFlags(f), at: f.text("at", "TIME", "now", atUsage)}
}

// read parses and validates the site, the target and the instant (now()
// when --at is not given), in that order.
func (s sightingFlags) read(now func() time.Time) (ephem.Site, ephem.Star, time.Time, error) {
	site, err := s.site.site()
	if err != nil {
		return ephem.Site{}, ephem.Star{}, time.Time{}, err
	}
	star, err := s.target.star()
	if err != nil {
		return ephem.Site{}, ephem.Star{}, time.Time{}, err
	}
	t, err := instant(s.at, now)
	if err != nil {
		return ephem.Site{}, ephem.Star{}, time.Time{}, err
	}
	return site, star, t, nil
}

// instant parses a time flag; when it was not given the result is now.
func instant(v *textValue, now func() time.Time) (time.Time, error) {
	if !v.set {
		return now().UTC(), nil
	}
	t, err := ephem.ParseTime(v.value)
	if err != nil {
		return time.Time{}, fromInputError(err, "not a time", map[string]*textValue{"time": v})
	}
	return t, nil
}
