package cli

import (
	"fmt"
	"io"
	"os"

	"broadline/app/core"
)

func init() {
	c := &command{
		name:    "example",
		args:    "DIR",
		summary: "write the invented demo as a dataset directory (dataset.json, lines/, spectra/): a template for your own",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runExample(c, args, stdout, stderr) }
	register(c)
}

func runExample(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give one directory to write the example dataset into")
	}
	if err := os.MkdirAll(pos[0], 0o755); err != nil {
		return err
	}
	path, err := core.WriteExample(pos[0])
	if err != nil {
		return err
	}
	fmt.Fprintln(stdout, path)
	fmt.Fprintln(stderr, "example: wrote the invented demo (not an observation) as a dataset; open it with Session ▸ Open dataset…, or edit dataset.json to point at your own spectra and line lists")
	return nil
}
