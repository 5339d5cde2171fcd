package textout

import (
	"fmt"
	"io"
	"os"
)

func ExampleWriteFileAtomic() {
	dir, err := os.MkdirTemp("", "cureslab-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	err = WriteFileAtomic(dir, "note.txt", func(w io.Writer) error {
		_, err := fmt.Fprintln(w, "written whole or not at all")
		return err
	})
	b, _ := os.ReadFile(dir + "/note.txt")
	fmt.Print(err, " ", string(b))
	// Output:
	// <nil> written whole or not at all
}
