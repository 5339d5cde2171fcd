// Command genfastmath writes physics/fastmath_tables.go, the tables of the
// table-driven e^x and ln x of package physics, computed in 256-bit
// arithmetic by package fastmathgen. It is run by `go generate ./physics`:
//
//	genfastmath -o fastmath_tables.go
//
// The file is written to a temporary name and renamed, so a failed run
// leaves the previous file.
package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"

	"cureslab/physics/internal/fastmathgen"
)

func main() {
	out := flag.String("o", "fastmath_tables.go", "output `file`")
	flag.Parse()
	if err := run(*out); err != nil {
		fmt.Fprintln(os.Stderr, "genfastmath:", err)
		os.Exit(1)
	}
}

func run(out string) error {
	src, err := fastmathgen.Source()
	if err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(out), ".genfastmath-*")
	if err != nil {
		return err
	}
	if _, err := f.Write(src); err != nil {
		f.Close()
		os.Remove(f.Name())
		return err
	}
	if err := f.Close(); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Chmod(f.Name(), 0o644); err != nil {
		os.Remove(f.Name())
		return err
	}
	return os.Rename(f.Name(), out)
}
