package scan_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"reprise/scan"
)

// An invented scenario for the examples: three short essays on a town's
// flood defences, two of which share three sentences.
var essays = map[string]string{
	"ana.txt": "The levee along the Marren was raised in the spring. " +
		"Engineers from the county checked every gate before the rains. " +
		"The town paid for the work with a special levy on shops. " +
		"Ana thinks the levy was fair to the farmers.",
	"ben.txt": "The levee along the Marren was raised in the spring. " +
		"Engineers from the county checked every gate before the rains. " +
		"The town paid for the work with a special levy on shops. " +
		"Ben would rather the council had borrowed the money.",
	"cleo.txt": "Cleo writes about the old mill and its new museum. " +
		"Visitors can grind their own flour on the first Saturday of each month.",
}

func writeEssays(dir string) {
	for name, text := range essays {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			panic(err)
		}
	}
}

// Run compares every document under the paths with every other.
func ExampleRun() {
	dir, err := os.MkdirTemp("", "reprise-example-")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	writeEssays(dir)

	res, err := scan.Run(context.Background(), scan.Config{Paths: []string{dir}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range res.Pairs {
		fmt.Printf("%s ~ %s: %d shared sentences in %d passage\n", filepath.Base(p.A), filepath.Base(p.B), p.Shared, len(p.Passages))
	}
	// Output:
	// ana.txt ~ ben.txt: 3 shared sentences in 1 passage
}

// Compare keeps only pairs across the reference set and the new
// documents, and says where each new document's passages were found.
func ExampleCompare() {
	dir, err := os.MkdirTemp("", "reprise-example-")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	writeEssays(dir)
	ref := filepath.Join(dir, "ana.txt")

	res, err := scan.Compare(context.Background(), scan.CompareConfig{
		Config:     scan.Config{Paths: []string{filepath.Join(dir, "ben.txt"), filepath.Join(dir, "cleo.txt")}},
		References: []string{ref},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range res.Sources {
		for _, src := range s.Sources {
			fmt.Printf("%s: %d passage found in %s\n", filepath.Base(s.Document), src.Passages, filepath.Base(src.Path))
		}
	}
	// Output:
	// ben.txt: 1 passage found in ana.txt
}

// A cancelled context stops a run; its temporary files are gone when it
// returns.
func ExampleRun_cancelled() {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := scan.Run(ctx, scan.Config{Paths: []string{"."}})
	fmt.Println(err)
	// Output:
	// context canceled
}
