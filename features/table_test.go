package features_test

import (
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/features"
)

func tableWith(t *testing.T, name string, values []float64) *features.Table {
	t.Helper()
	tab := features.NewTable(len(values))
	if err := tab.Append(name, values); err != nil {
		t.Fatal(err)
	}
	return tab
}

func TestTableZeroValue(t *testing.T) {
	var tab features.Table
	if r, c := tab.Dims(); r != 0 || c != 0 || tab.Index("x") != -1 {
		t.Fatalf("zero table: got %d×%d, Index %d; want 0×0, -1", r, c, tab.Index("x"))
	}
	if err := tab.Append("a", []float64{1, 2}); err != nil {
		t.Fatal(err)
	}
	if err := tab.Append("b", []float64{1}); err == nil {
		t.Errorf("second column of another length: got nil error")
	}
	if tab.Rows() != 2 {
		t.Errorf("rows: got %d, want 2 (fixed by the first Append)", tab.Rows())
	}
}

func TestTableJoinAndErrors(t *testing.T) {
	a := features.NewTable(2)
	_ = a.Append("x", []float64{1, 2})
	b := features.NewTable(2)
	shared := []float64{3, 4}
	_ = b.Append("y", shared)
	tests := []struct {
		name string
		err  error
		want string
	}{
		{"empty name", a.Append("", []float64{0, 0}), "features: column 2: empty name"},
		{"rows differ", a.Join(tableWith(t, "z", []float64{1, 2, 3})), "features: join: 2 rows and 3 rows"},
		{"name in both", a.Join(tableWith(t, "x", []float64{0, 0})), `features: join: column "x" is in both tables`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.err == nil || !strings.Contains(tt.err.Error(), tt.want) {
				t.Errorf("got %v, want an error containing %q", tt.err, tt.want)
			}
		})
	}
	if a.Width() != 1 {
		t.Fatalf("failed joins changed the table: %v", a.Names())
	}
	if err := a.Join(b); err != nil {
		t.Fatal(err)
	}
	shared[0] = 30
	if got := a.At(0, 1); got != 30 {
		t.Errorf("joined column does not share storage: got %v, want 30", got)
	}
}

func TestTableMatrix(t *testing.T) {
	src := mat.NewDense(3, 2, []float64{1, 2, 3, 4, 5, 6})
	tab, err := features.FromMatrix(src, []string{"p", "q"})
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff([]float64{2, 4, 6}, tab.Column(1)); diff != "" {
		t.Errorf("column q (-want +got):\n%s", diff)
	}
	if !mat.Equal(tab, src) || !mat.Equal(tab.T(), src.T()) {
		t.Errorf("table does not equal its source matrix")
	}
	dst := mat.NewDense(3, 2, nil)
	if got := tab.DenseTo(dst); got != dst || !mat.Equal(dst, src) {
		t.Errorf("DenseTo into a sized dst: got %v", mat.Formatted(got))
	}
	if msg := panics(func() { tab.DenseTo(mat.NewDense(2, 2, nil)) }); msg != "features: DenseTo: dst is 2×2, table is 3×2" {
		t.Errorf("DenseTo wrong size: got panic %q", msg)
	}
	if _, err := features.FromMatrix(src, []string{"p"}); err == nil {
		t.Errorf("FromMatrix with 1 name for 2 columns: got nil error")
	}
	if _, err := features.FromMatrix(src, []string{"p", "p"}); err == nil {
		t.Errorf("FromMatrix with a repeated name: got nil error")
	}
}
