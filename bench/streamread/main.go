// Command streamread reads a table once through pcqc's streaming reader
// (intake.Stream: the same parser and validation as pcqc run --stream) and
// does nothing with the rows: the "plain read" that bench/stream.sh
// compares the streamed audit with. It is a benchmark tool only.
//
//	go run ./bench/streamread big.csv
package main

import (
	"fmt"
	"os"

	"pcqc/analysis/intake"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: streamread FILE")
		os.Exit(2)
	}
	s, err := intake.OpenStream(os.Args[1], intake.ReadOptions{})
	if err == nil {
		err = s.Pass(func(intake.StreamRow) error { return nil })
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(2)
	}
	fmt.Printf("%d rows × %d variables\n", s.Info.RowsRead, len(s.Info.Variables))
}
