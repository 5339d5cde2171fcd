package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/results"
)

// Exit statuses, as the README and printUsage state them.
const (
	exitOK       = 0 // ran, every criterion met (or none given)
	exitCriteria = 1 // ran, a criterion failed
	exitUsage    = 2 // bad input or usage; nothing written
	exitFailure  = 3 // runaway or numerical failure; outputs kept
	// exitInterrupted: stopped by Ctrl-C or SIGTERM (128 + SIGINT, as
	// shells report it); what was computed is kept and says so.
	exitInterrupted = 130
)

// exitCode maps the status of a run (summary.json) to the exit status. It
// is the only place that does.
func exitCode(status string) int {
	switch status {
	case results.StatusOK:
		return exitOK
	case results.StatusCriteriaFailed:
		return exitCriteria
	case results.StatusInterrupted:
		return exitInterrupted
	}
	return exitFailure // runaway, failed, or anything unforeseen
}

// Command is one subcommand of cureslab.
type Command struct {
	Name    string
	Args    string // synopsis after the name, e.g. "CASE.toml [-o DIR]"
	Short   string // one line for the command list
	Long    string // paragraph(s) for 'cureslab help NAME'
	Example string // one or more example command lines
	// Setup defines the command's flags on fs and returns the function that
	// runs the command on the positional arguments left after parsing.
	Setup func(fs *pflag.FlagSet) func(e *env, args []string) int
}

// commands is the command table, in the order of 'cureslab help'. It is
// assembled once from commandOrder: each command, implemented in its own
// file, registers itself with register (from that file's init).
var commands []*Command

// commandOrder is the order of 'cureslab help'.
var commandOrder = []string{"run", "check", "demo", "compare", "sweep", "merge", "fit", "ttt", "tune", "calibrate",
	"report", "example", "materials", "help"}

// registered holds the commands registered by their files' init functions.
var registered = map[string]*Command{}

// register adds an implemented command. Call it from an init function.
func register(c *Command) { registered[c.Name] = c }

func init() {
	for _, c := range []*Command{runCmd, checkCmd, demoCmd, exampleCmd, materialsCmd, helpCmd} {
		register(c)
	}
}

// buildCommands assembles the command table; main calls it once.
func buildCommands() {
	if commands != nil {
		return
	}
	for _, name := range commandOrder {
		c, ok := registered[name]
		if !ok {
			panic("cureslab: command " + name + " is listed in commandOrder but not registered")
		}
		commands = append(commands, c)
	}
}

func lookup(name string) *Command {
	for _, c := range commands {
		if c.Name == name {
			return c
		}
	}
	return nil
}

func commandNames() []string {
	var out []string
	for _, c := range commands {
		out = append(out, c.Name)
	}
	return out
}

// didYouMean returns `; did you mean "x"?` for the nearest of valid, or "".
func didYouMean(got string, valid []string) string {
	if s := cases.Suggest(got, valid); s != "" {
		return fmt.Sprintf("; did you mean %q?", s)
	}
	return ""
}

// flagSet returns a fresh flag set for c that reports errors to us (pflag
// prints nothing itself with ContinueOnError) and has -h/--help.
func (c *Command) flagSet(stderr io.Writer) (*pflag.FlagSet, *bool) {
	fs := pflag.NewFlagSet("cureslab "+c.Name, pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {}
	fs.SortFlags = false
	help := new(bool)
	fs.BoolFuncP("help", "h", "show this help", func(string) error { *help = true; return nil })
	return fs, help
}

// run parses args with c's flags and runs c.
func (c *Command) run(e *env, args []string) int {
	// Ctrl-C or SIGTERM cancels the work in progress (a run keeps its
	// outputs up to that moment) and stops what would follow.
	ctx, stop := signal.NotifyContext(e.ctx, os.Interrupt, syscall.SIGTERM)
	defer stop()
	e.ctx = ctx
	fs, help := c.flagSet(e.stderr)
	runner := c.Setup(fs)
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			c.printHelp(e.stdout)
			return exitOK
		}
		e.cmd = c
		return e.usageError("%v", err)
	}
	if *help {
		c.printHelp(e.stdout)
		return exitOK
	}
	e.cmd = c
	if f := fs.Lookup("out"); f != nil && f.Changed && f.Value.String() == "" {
		return e.usageError("-o: the output name is empty; give a directory or file name (or leave -o out for the default)")
	}
	return runner(e, fs.Args())
}

// loadError prints the error of loading a case file and returns its exit
// status: exitInterrupted when Ctrl-C or SIGTERM stopped the reading,
// exitUsage otherwise.
func (e *env) loadError(err error) int {
	if e.interrupted(err) {
		fmt.Fprintf(e.stderr, "cureslab %s: interrupted while reading the case file; nothing was written\n", e.cmd.Name)
		return exitInterrupted
	}
	fmt.Fprintln(e.stderr, err)
	return exitUsage
}

// interrupted reports whether err is the command's context having been
// cancelled by Ctrl-C or SIGTERM.
func (e *env) interrupted(err error) bool {
	return err != nil && e.ctx.Err() != nil && errors.Is(err, e.ctx.Err())
}

// usageError prints a usage error of the running command with the hint and
// returns exitUsage.
func (e *env) usageError(format string, a ...any) int {
	name := "help"
	if e.cmd != nil {
		name = e.cmd.Name
	}
	fmt.Fprintf(e.stderr, "cureslab %s: %s\nRun 'cureslab help %s' for usage.\n", name, fmt.Sprintf(format, a...), name)
	return exitUsage
}

// printHelp writes the help of c: synopsis, description, flags, example.
func (c *Command) printHelp(w io.Writer) {
	fmt.Fprintf(w, "Usage: cureslab %s %s\n\n", c.Name, c.Args)
	fmt.Fprintf(w, "%s\n", strings.TrimSpace(c.Long))
	fs, _ := c.flagSet(io.Discard)
	c.Setup(fs)
	fmt.Fprintf(w, "\nFlags:\n%s", fs.FlagUsages())
	fmt.Fprintf(w, "\nExample:\n")
	for _, line := range strings.Split(strings.TrimSpace(c.Example), "\n") {
		fmt.Fprintf(w, "  %s\n", line)
	}
}

// printUsage writes the overview of every command.
func printUsage(w io.Writer) {
	fmt.Fprint(w, `cureslab simulates heat and cure through the thickness of a curing thermoset
part (bond lines, potting, coatings, laminates) in ovens, on platens, under
lamps or by volumetric (microwave or dielectric) heating under closed-loop
control.

Usage: cureslab COMMAND [ARGS]

Commands:
`)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, c := range commands {
		fmt.Fprintf(tw, "  %s\t%s\n", c.Name, c.Short)
	}
	tw.Flush()
	fmt.Fprint(w, `
Run 'cureslab help COMMAND' for the flags and an example of one command.
Start with 'cureslab demo', or 'cureslab example NAME > my.toml' for a case
file to edit.

Exit status: 0 ran and every criterion met, 1 a criterion failed, 2 bad input
or usage (nothing written), 3 runaway or numerical failure (outputs kept).
`)
}

var helpCmd = &Command{
	Name:    "help",
	Args:    "[COMMAND]",
	Short:   "show the commands, or the flags and an example of one",
	Long:    "Show the list of commands, or the usage, flags and an example of one command.",
	Example: "cureslab help run",
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		return func(e *env, args []string) int {
			switch len(args) {
			case 0:
				printUsage(e.stdout)
				return exitOK
			case 1:
				c := lookup(args[0])
				if c == nil {
					fmt.Fprintf(e.stderr, "cureslab help: unknown command %q%s\nRun 'cureslab help' for the commands.\n",
						args[0], didYouMean(args[0], commandNames()))
					return exitUsage
				}
				c.printHelp(e.stdout)
				return exitOK
			}
			return e.usageError("expects at most one command name, got %d arguments", len(args))
		}
	},
}
