package gui

import (
	"testing"

	"broadline/app/core"
)

// exampleDataset writes the demo as a dataset directory in a fresh
// temporary directory and returns the dataset file's path.
func exampleDataset(t *testing.T) string {
	t.Helper()
	path, err := core.WriteExample(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	return path
}
