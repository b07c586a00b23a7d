package output

import (
	"fmt"

	"tally/plots"
	"tally/runtime/result"
)

// plotFiles are ber.svg and ber.png (none when no point counted anything). The SVG holds no
// time or random identifier, so like table.csv it is the same on a rerun with the same seed.
func plotFiles(r *result.Run) ([]File, error) {
	fig, err := plots.BER(r)
	if err != nil || fig == nil {
		return nil, err
	}
	svg, err := fig.SVG()
	if err != nil {
		return nil, fmt.Errorf("output: ber.svg: %w", err)
	}
	png, err := fig.PNG()
	if err != nil {
		return nil, fmt.Errorf("output: ber.png: %w", err)
	}
	files := []File{{"ber.svg", svg}, {"ber.png", png}}
	if sc := r.Scatter; sc != nil {
		fig := plots.Constellation("received samples at "+sc.Label, sc.Received, sc.Ideal)
		svg, err := fig.SVG()
		if err != nil {
			return nil, fmt.Errorf("output: scatter.svg: %w", err)
		}
		png, err := fig.PNG()
		if err != nil {
			return nil, fmt.Errorf("output: scatter.png: %w", err)
		}
		files = append(files, File{"scatter.svg", svg}, File{"scatter.png", png})
	}
	return files, nil
}
