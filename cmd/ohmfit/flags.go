package main

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/dustin/go-humanize"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// maxListed bounds the count flags that ask for a ranked list or an answer
// in it (--top, --rank): each listed answer is re-solved in
// every condition and kept in memory, and a list longer than this is read
// by no one (the trade-off front is the tool for surveying a space).
const maxListed = 10_000

// maxWorkers bounds --workers: each worker owns a solver and a top list,
// and more of them than cores only costs memory.
const maxWorkers = 1024

// countValue is a whole-number option with bounds, checked as the command
// line is read, so that a huge count is refused before anything is
// allocated for it.
type countValue struct {
	p        *int
	min, max int
}

// countVar binds a bounded whole-number option to p.
func countVar(f *pflag.FlagSet, p *int, name string, value, min, max int, usage string) {
	*p = value
	f.Var(&countValue{p: p, min: min, max: max}, name, usage)
}

func (c *countValue) String() string { return strconv.Itoa(*c.p) }

// Type is the word the help shows for the value when the usage names none.
func (c *countValue) Type() string { return "N" }

// Set reads the count; its error says what is accepted.
func (c *countValue) Set(s string) error {
	n, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil || n < c.min || n > c.max {
		return &flagValueError{want: c.accepts()}
	}
	*c.p = n
	return nil
}

// accepts says what the option takes.
func (c *countValue) accepts() string {
	return fmt.Sprintf("a whole number from %s to %s", count(float64(c.min)), count(float64(c.max)))
}

// durationValue is a time limit: a duration with a unit, zero for none.
type durationValue struct{ p *time.Duration }

// timeLimitUsage is the help of --time-limit, one wording for every
// command that has it: the search stops and shows its best, not proven.
const timeLimitUsage = "stop after this long (`DURATION`, e.g. 30s) and show the best found so far, marked not proven"

// timeLimitVar binds --time-limit to p.
func timeLimitVar(f *pflag.FlagSet, p *time.Duration) {
	durationVar(f, p, "time-limit", timeLimitUsage)
}

// durationVar binds a time-limit option to p.
func durationVar(f *pflag.FlagSet, p *time.Duration, name string, usage string) {
	f.Var(&durationValue{p: p}, name, usage)
}

// String is "0" for no limit, so that the help shows no default for it.
func (d *durationValue) String() string {
	if *d.p == 0 {
		return "0"
	}
	return d.p.String()
}

// Type is the word the help shows for the value.
func (d *durationValue) Type() string { return "DURATION" }

// Set reads a duration such as 30s or 1h30m.
func (d *durationValue) Set(s string) error {
	v, err := time.ParseDuration(strings.TrimSpace(s))
	if err != nil || v < 0 {
		return &flagValueError{want: d.accepts()}
	}
	*d.p = v
	return nil
}

func (d *durationValue) accepts() string {
	return "a duration with its unit, like 500ms, 30s, 2m or 1h30m (0 for no limit)"
}

// sizeValue is an amount of memory in bytes, such as 512MiB or 4GB.
type sizeValue struct{ p *int64 }

// minMemory is the least --memory accepted: below a few boxes' worth the
// search would be depth first from its root, which is allowed (the answer
// is the same) but never what anyone wants from a memory figure.
const minMemory = 1 << 20

// sizeVar binds a memory-size option to p, with its default.
func sizeVar(f *pflag.FlagSet, p *int64, name string, value int64, usage string) {
	*p = value
	f.Var(&sizeValue{p: p}, name, usage)
}

// String writes the size in binary units, as the help shows the default.
func (v *sizeValue) String() string {
	return strings.ReplaceAll(humanize.IBytes(uint64(*v.p)), " ", "")
}

// Type is the word the help shows for the value.
func (v *sizeValue) Type() string { return "SIZE" }

// Set reads a size with its unit (go-humanize's ParseBytes: 512MiB, 4GiB,
// 2GB, 800M; MiB and GiB are powers of 1024, MB and GB of 1000).
func (v *sizeValue) Set(s string) error {
	n, err := humanize.ParseBytes(strings.TrimSpace(s))
	if err != nil || n < minMemory || n > math.MaxInt64 {
		return &flagValueError{want: v.accepts()}
	}
	*v.p = int64(n)
	return nil
}

func (v *sizeValue) accepts() string {
	return "an amount of memory with its unit, like 512MiB, 4GiB or 2GB (at least 1MiB)"
}

// flagValueError is what a typed option's Set returns: what it accepts.
type flagValueError struct{ want string }

func (e *flagValueError) Error() string { return "want " + e.want }

// accepter is an option value that can say what it accepts.
type accepter interface{ accepts() string }

// acceptsOf says what a flag accepts, for the options whose values are
// pflag's own types.
func acceptsOf(f *pflag.Flag) string {
	if a, ok := f.Value.(accepter); ok {
		return a.accepts()
	}
	switch f.Value.Type() {
	case "bool":
		return "true or false (or no value, for true)"
	case "uint64":
		return fmt.Sprintf("a whole number from 0 to %d", uint64(math.MaxUint64))
	case "int":
		return "a whole number"
	case "duration":
		return (&durationValue{}).accepts()
	}
	name, _ := pflag.UnquoteUsage(f)
	if name == "" {
		return "a value"
	}
	return name
}

// flagError turns pflag's errors about the command line into our own
// words: which option, what is wrong, what it accepts. It is the one
// translation every command's flag errors pass through (cobra's
// SetFlagErrorFunc), so no library wording reaches the user.
func flagError(c *cobra.Command, err error) error {
	path := c.CommandPath()
	var (
		inv *pflag.InvalidValueError
		req *pflag.ValueRequiredError
		nx  *pflag.NotExistError
		syn *pflag.InvalidSyntaxError
	)
	switch {
	case errors.As(err, &inv):
		f := inv.GetFlag()
		return usagef(path, "--%s: cannot use %s; want %s", f.Name, quoteValue(inv.GetValue()), acceptsOf(f))
	case errors.As(err, &req):
		f := req.GetFlag()
		return usagef(path, "--%s needs a value: %s", f.Name, acceptsOf(f))
	case errors.As(err, &nx):
		if sh := nx.GetSpecifiedShortnames(); sh != "" {
			if _, perr := units.Parse("-" + sh); perr == nil {
				return negativeArg(c, "-"+sh)
			}
			return usagef(path, "unknown option -%s in -%s%s", nx.GetSpecifiedName(), sh, optionSuggestion(c, nx.GetSpecifiedName()))
		}
		return usagef(path, "unknown option --%s%s", nx.GetSpecifiedName(), optionSuggestion(c, nx.GetSpecifiedName()))
	case errors.As(err, &syn):
		return usagef(path, "%s is not an option: options are written --name or --name=value", quoteValue(syn.GetSpecifiedFlag()))
	}
	return usagef(path, "%s", err.Error())
}

// negativeArgNote is the annotation key under which a command says why a
// negative argument makes no sense for it.
const negativeArgNote = "ohmfit-negative-arg"

// negativeArg is the message for a word like -4.7k, which reads as a
// negative number rather than an option.
func negativeArg(c *cobra.Command, word string) error {
	why, ok := c.Annotations[negativeArgNote]
	if !ok {
		why = "an option's value that starts with - goes after it with =, as in --vout=-5"
	}
	return usagef(c.CommandPath(), "%s is a negative number, not an option: %s", word, why)
}

// optionSuggestion suggests the closest option name to a misspelt one.
func optionSuggestion(c *cobra.Command, name string) string {
	var names []string
	c.Flags().VisitAll(func(f *pflag.Flag) { names = append(names, f.Name) })
	s := didYouMean(name, names)
	if s == "" {
		return ""
	}
	// ` (did you mean "near"?)` -> ` (did you mean --near?)`
	open, close := strings.Index(s, `"`), strings.LastIndex(s, `"`)
	return s[:open] + "--" + s[open+1:close] + s[close+1:]
}

// quoteValue quotes what the user typed for a message, escaping anything a
// terminal would act on, and shortening what is too long to echo.
func quoteValue(s string) string {
	const most = 40
	if r := []rune(s); len(r) > most {
		s = string(r[:most]) + "…"
	}
	return strconv.Quote(s)
}
