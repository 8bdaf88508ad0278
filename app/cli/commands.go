package cli

import (
	"broadline/app/core"
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"
)

// Version is the program's version, printed by "broadline version".
const Version = "0.1.0-dev"

// command is one headless sub-command. Each lives in its own file and adds
// itself to the table with register from an init function.
type command struct {
	name    string // as typed after "broadline"
	args    string // one-line synopsis of the arguments, for help
	summary string // one line for the command list
	// run executes the command. It writes results to stdout and diagnostics to
	// stderr; a *usageError means bad input (exit status 2), any other error a
	// failure while working (exit status 1).
	run func(args []string, stdout, stderr io.Writer) error
}

var commands = map[string]*command{}

// register adds c to the table of sub-commands; a duplicate name is a
// programming mistake and panics.
func register(c *command) {
	if _, dup := commands[c.name]; dup {
		panic("broadline: sub-command registered twice: " + c.name)
	}
	commands[c.name] = c
}

// usageError reports bad input from the user: a flag, an argument or a value.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

// fileError wraps the error of reading the file given to flag (exit
// status 1: the file is at fault, not the command line).
func fileError(flag string, err error) error { return fmt.Errorf("%s: %w", flag, err) }

// usagef returns a *usageError with a formatted message.
func usagef(format string, args ...any) error {
	return &usageError{msg: fmt.Sprintf(format, args...)}
}

// Main runs the sub-command named by args[0] (args must not be empty) and
// returns the exit status, by one rule for every command: 0 success; 1 a
// file that cannot be read or is wrong (the message says which and where),
// or a failure while working; 2 bad usage (an unknown command or flag, a
// missing or bad value), with nothing on stdout.
func Main(args []string, stdout, stderr io.Writer) int { return dispatch(args, stdout, stderr) }

// dispatch is Main.
func dispatch(args []string, stdout, stderr io.Writer) int {
	name := args[0]
	switch name {
	case "help", "-h", "-help", "--help":
		printHelp(stdout)
		return 0
	case "version", "--version":
		fmt.Fprintln(stdout, "broadline", Version)
		return 0
	}
	c, ok := commands[name]
	if !ok {
		if strings.HasPrefix(name, "-") {
			fmt.Fprintf(stderr, "broadline: unknown flag %s (run 'broadline help' for the sub-commands)\n", name)
		} else {
			fmt.Fprintf(stderr, "broadline: unknown sub-command %q (run 'broadline help' for the list)\n", name)
		}
		return 2
	}
	err := c.run(args[1:], stdout, stderr)
	if err == nil {
		return 0
	}
	if errors.Is(err, flag.ErrHelp) {
		return 0
	}
	fmt.Fprintf(stderr, "broadline %s: %v\n", name, firstLine(core.UserMessage(err)))
	var ue *usageError
	if errors.As(err, &ue) {
		return 2
	}
	return 1
}

// flagSet is a sub-command's flag set: parse errors come back as one-line
// *usageError values, and -h prints the command's synopsis and flags.
type flagSet struct {
	*flag.FlagSet
	cmd    *command
	stdout io.Writer // where -h writes the usage
}

// newFlagSet returns an empty flag set for c; -h prints its usage to
// stdout (asked-for help is output, not a diagnostic).
func newFlagSet(c *command, stdout io.Writer) *flagSet {
	fs := flag.NewFlagSet(c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return &flagSet{FlagSet: fs, cmd: c, stdout: stdout}
}

// parse parses args. Flags may come before or after positional arguments;
// the positional arguments are returned in order. After "-h" it prints the
// usage and returns flag.ErrHelp, which dispatch treats as success.
func (fs *flagSet) parse(args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				fs.printUsage()
				return nil, err
			}
			return nil, &usageError{msg: err.Error()}
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if args[0] == "--" {
			return append(pos, args[1:]...), nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func (fs *flagSet) printUsage() {
	fmt.Fprintf(fs.stdout, "usage: broadline %s %s\n%s\n\nflags:\n", fs.cmd.name, fs.cmd.args, fs.cmd.summary)
	fs.SetOutput(fs.stdout)
	fs.PrintDefaults()
	fs.SetOutput(io.Discard)
}

func printHelp(w io.Writer) {
	var b bytes.Buffer
	b.WriteString("broadline: a workbench for identifying broad absorption features in spectra of\n")
	b.WriteString("fast, heavy-element-rich transients.\n\n")
	b.WriteString("usage:\n  broadline                 open the workbench on the built-in demo\n")
	b.WriteString("  broadline open SESSION    open the workbench on a saved session (and its dataset)\n")
	b.WriteString("  broadline COMMAND [ARGS]  run a computation headless\n\ncommands:\n")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		c := commands[n]
		fmt.Fprintf(&b, "  %-10s %s\n", n, c.summary)
		if c.args != "" {
			fmt.Fprintf(&b, "  %-10s   broadline %s %s\n", "", n, c.args)
		}
	}
	fmt.Fprintf(&b, "  %-10s %s\n  %-10s %s\n", "help", "this list", "version", "print the version")
	b.WriteString("\nRun 'broadline COMMAND -h' for a command's flags.\n")
	w.Write(b.Bytes())
}

func firstLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}
