package outputs_test

import (
	"fmt"
	"io"
	"log"
	"os"
	"path/filepath"

	"renderchain/outputs"
)

// Example declares a command's input and outputs, refuses a report that
// would overwrite the input, then writes and commits a valid set.
func Example() {
	dir, err := os.MkdirTemp("", "outputs-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	dry := filepath.Join(dir, "dry.wav")
	if err := os.WriteFile(dry, []byte("dry take"), 0o644); err != nil {
		log.Fatal(err)
	}

	bad := outputs.New()
	bad.Input("in", dry)
	bad.File("out", filepath.Join(dir, "wet.wav"))
	bad.File("report", filepath.Join(dir, "sub", "..", "dry.wav"))
	err = bad.Check()
	fmt.Println(err != nil, filepath.Base(err.(*outputs.PathError).OtherPath))

	set := outputs.New()
	set.Input("in", dry)
	wet := set.File("out", filepath.Join(dir, "wet.wav"))
	rep := set.File("report", filepath.Join(dir, "report.json"))
	if err := set.Check(); err != nil {
		log.Fatal(err)
	}
	defer set.Abort() // removes the temporary files unless committed
	io.WriteString(wet, "wet render")
	io.WriteString(rep, "{}\n")
	if err := set.Commit(); err != nil {
		log.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		fmt.Println(e.Name())
	}
	// Output:
	// true dry.wav
	// dry.wav
	// report.json
	// wet.wav
}
