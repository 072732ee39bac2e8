package resample_test

import (
	"errors"
	"fmt"
	"testing"

	"github.com/kalends/kalends/resample"
)

func TestJackknife(t *testing.T) {
	const n = 7
	p, err := resample.Jackknife{}.Plan(n, 99)
	if err != nil {
		t.Fatal(err)
	}
	if p.Len() != n {
		t.Fatalf("Len() = %d, want %d", p.Len(), n)
	}
	var s *resample.Split
	for r := range n {
		s = p.Split(r, s)
		if len(s.Out) != 1 || s.Out[0] != r {
			t.Errorf("replicate %d: Out = %v, want [%d]", r, s.Out, r)
		}
		total := 0
		for i, c := range s.Counts {
			want := int32(1)
			if i == r {
				want = 0
			}
			if c != want {
				t.Errorf("replicate %d row %d: count %d, want %d", r, i, c, want)
			}
			total += int(c)
		}
		if total != n-1 {
			t.Errorf("replicate %d: %d rows in bag, want %d", r, total, n-1)
		}
	}
	if _, err := (resample.Jackknife{}).Plan(1, 0); !errors.Is(err, resample.ErrTooFewRows) {
		t.Errorf("one row: got %v, want ErrTooFewRows", err)
	}
	if _, err := (resample.Jackknife{}).Plan(0, 0); !errors.Is(err, resample.ErrNoRows) {
		t.Errorf("no rows: got %v, want ErrNoRows", err)
	}
}

func ExampleJackknife() {
	p, err := resample.Jackknife{}.Plan(4, 0)
	if err != nil {
		panic(err)
	}
	for r, s := range resample.All(p) {
		fmt.Println(r, s.Counts, s.Out)
	}
	// Output:
	// 0 [0 1 1 1] [0]
	// 1 [1 0 1 1] [1]
	// 2 [1 1 0 1] [2]
	// 3 [1 1 1 0] [3]
}
