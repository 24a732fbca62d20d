// Command cmd writes shingle/scripttables.go (see package gentables).
package main

import (
	"flag"
	"fmt"
	"os"

	"reprise/shingle/internal/gentables"
)

func main() {
	out := flag.String("o", "shingle/scripttables.go", "file to write")
	flag.Parse()
	dir, err := gentables.UnisegDir()
	if err != nil {
		fmt.Fprintln(os.Stderr, "gentables:", err)
		os.Exit(1)
	}
	src, err := gentables.Generate(dir)
	if err != nil {
		fmt.Fprintln(os.Stderr, "gentables:", err)
		os.Exit(1)
	}
	if err := os.WriteFile(*out, src, 0o644); err != nil {
		fmt.Fprintln(os.Stderr, "gentables:", err)
		os.Exit(1)
	}
}
