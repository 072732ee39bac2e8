// Command tourgen writes the invented example data of the Beam pipeline
// (package internal/tour) to standard output:
//
//	go run ./cmd/tourgen > testdata/tour.csv
package main

import (
	"log"
	"os"

	"github.com/kalends/kalends/examples/beam/internal/tour"
)

func main() {
	if err := tour.Write(os.Stdout); err != nil {
		log.Fatal(err)
	}
}
