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

// tapColumns names a tap's column group. The BER tap keeps the plain names the trade reads
// first; the frame tap says frames; every other tap is prefixed with its name.
func tapColumns(tap string) []string {
	switch tap {
	case link.TapBER:
		return []string{"bits", "errors", "ber", "ci_low", "ci_high"}
	case link.TapFER:
		return []string{"frames", "frame_errors", "fer", "fer_low", "fer_high"}
	case link.TapPre:
		return []string{"pre_bits", "pre_errors", "pre_ber", "pre_low", "pre_high"}
	default:
		return []string{tap + "_trials", tap + "_errors", tap, tap + "_low", tap + "_high"}
	}
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
		for i, t := range p.Taps {
			if t.Absent {
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
