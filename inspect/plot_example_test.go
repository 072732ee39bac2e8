package inspect_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/kalends/kalends/inspect"
	"gonum.org/v1/plot/vg"
)

func ExampleHistograms() {
	visitors := []float64{412, 388, 455, 501, 397, 430, 610, 420, 385, 468, 445, 402}
	vals, jack := bootMean(visitors, 999, 7)
	st := inspect.Statistic{Name: "mean visitors", Estimate: 442.75, Values: vals, Jackknife: jack}
	s, err := inspect.Summarize(st, inspect.Config{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fig, err := inspect.Histograms([]inspect.Statistic{st}, []inspect.Summary{s},
		inspect.PlotMark(inspect.BCa), inspect.PlotUnit("visitors"), inspect.PlotSize(12*vg.Centimeter, 9*vg.Centimeter))
	if err != nil {
		fmt.Println(err)
		return
	}
	dir, err := os.MkdirTemp("", "kalends-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	for _, name := range []string{"replicates.svg", "replicates.png"} {
		if err := fig.Save(filepath.Join(dir, name)); err != nil {
			fmt.Println(err)
			return
		}
		fmt.Println("wrote", name)
	}
	// Output:
	// wrote replicates.svg
	// wrote replicates.png
}
