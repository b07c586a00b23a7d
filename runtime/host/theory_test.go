package host

import (
	"context"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// BPSK over AWGN run as a script through every stage agrees with the closed form
// Pb = Q(√(2Eb/N0)) (Proakis and Salehi, Digital Communications, 5th ed., eq. 4.3-13) inside the
// interval the run reports, here at 99.9 % confidence so six points rarely miss by chance.
// The closed form is computed here with math.Erfc, independently of blocks/theory.
func TestBPSKScriptAgreesWithClosedForm(t *testing.T) {
	p := scriptIn(t, "bpsk.go")
	if err := Run(context.Background(), p, quiet(2)); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(strings.TrimSuffix(p, ".go"), "table.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	num := func(r []string, name string) float64 {
		v, err := strconv.ParseFloat(r[col[name]], 64)
		if err != nil {
			t.Fatalf("column %s: %v", name, err)
		}
		return v
	}
	if len(rows) != 7 {
		t.Fatalf("%d rows, want a header and 6 points", len(rows))
	}
	for _, r := range rows[1:] {
		db := num(r, "ebn0_db")
		want := 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10)))
		lo, hi := num(r, "ber_low"), num(r, "ber_high")
		if !(lo <= want && want <= hi) {
			t.Errorf("Eb/N0 %g dB: closed form %.4g outside the reported interval [%.4g, %.4g] (%s errors in %s bits)",
				db, want, lo, hi, r[col["ber_errors"]], r[col["ber_trials"]])
		}
		if math.Abs(num(r, "theory_bpsk")-want) > 1e-5*want { // the table keeps six significant digits
			t.Errorf("Eb/N0 %g dB: theory column %s, closed form %.6g", db, r[col["theory_bpsk"]], want)
		}
	}
}
