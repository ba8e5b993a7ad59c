package fit

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
)

// Results is the document `fickfit fit --format json` writes.
type Results struct {
	Fits []*Result `json:"fits"`
}

// ReadResults reads fit results back from the JSON that `fickfit fit
// --format json` wrote, so that later stages (Arrhenius, back-calculation)
// can start from saved fits. The results carry no model: curves and refits
// need the profiles.
func ReadResults(r io.Reader, name string) ([]*Result, error) {
	var doc Results
	dec := json.NewDecoder(r)
	if err := dec.Decode(&doc); err != nil {
		return nil, fmt.Errorf("%w: %s: not a fickfit results file (%v); it must be the JSON of fitted profiles that fickfit writes", ErrBadInput, name, err)
	}
	if len(doc.Fits) == 0 {
		return nil, fmt.Errorf("%w: %s: the results file holds no fits", ErrBadInput, name)
	}
	for i, f := range doc.Fits {
		if f == nil || f.ID == "" || f.Param("D") == nil {
			return nil, fmt.Errorf("%w: %s: fit %d has no id or no D; the file is not from 'fickfit fit'", ErrBadInput, name, i+1)
		}
		if f.Source == "" {
			f.Source = name
		}
	}
	return doc.Fits, nil
}

// ReadResultsFile opens path read-only and reads fit results from it.
func ReadResultsFile(path string) ([]*Result, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrBadInput, err)
	}
	defer f.Close()
	return ReadResults(f, path)
}
