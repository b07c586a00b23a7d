// Package output writes a run's files beside its script: table.csv, run.json and README.md
// (and the plots), each replaced atomically.
package output

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"

	"tally/blocks/link"
	"tally/runtime/result"
)

// TapQuantity is the name a tap's figures go by in table.csv: "ber", "fer", "pre_ber" for the
// pre-decoder tap, and a script's own tap by its name ("payload").
func TapQuantity(tap string) string {
	if tap == link.TapPre {
		return "pre_ber"
	}
	return tap
}

// tapColumns names a tap's column group, one pattern for every tap: for the quantity q
// (TapQuantity) the trials counted q_trials, the errors among them q_errors, the estimate q,
// and its interval q_low, q_high ("ber_trials,ber_errors,ber,ber_low,ber_high";
// "payload_trials,…,payload_high").
func tapColumns(tap string) []string {
	q := TapQuantity(tap)
	return []string{q + "_trials", q + "_errors", q, q + "_low", q + "_high"}
}

// Num formats a rate or interval bound: six significant digits, the same bytes on every run;
// an undefined or unbounded value (NaN, ±Inf: a theory curve with no value there, an open end)
// is an empty cell.
func Num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// Table is table.csv: a column per swept parameter, a column group per tap (the BER tap first,
// then stop), and a column per theory curve. It holds no times, so a rerun with the same seed
// gives the same bytes.
func Table(r *result.Run) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	var head []string
	for _, p := range r.Params {
		head = append(head, csvCell(p))
	}
	for i, t := range r.Taps {
		for _, c := range tapColumns(t) {
			head = append(head, csvCell(c))
		}
		if i == 0 {
			head = append(head, "stop")
		}
	}
	for _, c := range r.Theory {
		head = append(head, csvCell("theory_"+c))
	}
	weighted := Weighted(r)
	if weighted {
		head = append(head, estimatorColumns...)
	}
	paired := r.Paired()
	if paired {
		head = append(head, pairedColumns...)
	}
	w.Write(head)
	for _, p := range r.Points {
		row := make([]string, 0, len(head))
		for i := range r.Params {
			row = append(row, csvCell(r.Value(p, i)))
		}
		for i, t := range p.Taps { // a skipped point counted nothing: empty cells, not 0 of 0
			if t.Absent || p.Stop == skipped {
				row = append(row, "", "", "", "", "")
			} else {
				row = append(row, strconv.FormatInt(t.Trials, 10), strconv.FormatInt(t.Errors, 10), Num(t.Rate), Num(t.Low), Num(t.High))
			}
			if i == 0 {
				row = append(row, p.Stop)
			}
		}
		for _, v := range p.Theory {
			row = append(row, Num(v))
		}
		if weighted {
			row = append(row, estimatorCells(p)...)
		}
		if paired {
			row = append(row, pairedCells(p)...)
		}
		w.Write(row)
	}
	w.Flush()
	return b.Bytes()
}
