package hartree

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"lamina/lattice"
)

// Scan output files. The first lines identify the format and record the full input settings (as
// one line of JSON), so that a file documents itself and a resumed or merged scan can check that
// it continues the same calculation:
//
//	CSV:   # lamina phase map v1
//	       # settings {...}
//	       index,i_n,j_D,n_1e12_cm2,D_V_per_nm,state,...      (header with units)
//	       one line per point
//	JSONL: {"format":"lamina phase map v1","settings":{...}}
//	       one JSON object per point
//
// Every point is written with one write call and flushed, so an interrupted scan loses at most
// the point it was working on; a partly written last line (a crash in the middle of a write) is
// cut off when the file is resumed.

const scanFormat = "lamina phase map v1"

// ScanColumns are the columns of a CSV scan file (and the keys of a JSONL one).
var ScanColumns = []string{"index", "i_n", "j_D", "n_1e12_cm2", "D_V_per_nm", "state", "pattern", "degenerate_states", "seed",
	"energy_meV_per_nm2", "gap_meV", "sigma_xy_e2_h", "converged", "states", "failed_seeds", "iterations"}

// ScanOutput writes scan records to a file.
type ScanOutput struct {
	f      *os.File
	format string
	// Done holds the indices of the points already in the file when it was opened.
	Done map[int]bool
	// Last is the highest index already in the file (−1 if none).
	Last int
}

// OpenScanOutput creates path for a scan with the given settings (any JSON-encodable value;
// format "csv" or "jsonl"), or, with resume set and the file present, checks that it holds the
// same format and settings, cuts off a partial last line, and opens it for appending.
func OpenScanOutput(path, format string, settings any, resume bool) (*ScanOutput, error) {
	if format != "csv" && format != "jsonl" {
		return nil, fmt.Errorf("hartree: scan format %q is not csv or jsonl", format)
	}
	sj, err := json.Marshal(settings)
	if err != nil {
		return nil, fmt.Errorf("hartree: scan settings: %w", err)
	}
	out := &ScanOutput{format: format, Done: map[int]bool{}, Last: -1}
	if resume {
		if data, err := os.ReadFile(path); err == nil {
			gotFormat, gotSettings, recs, keep, err := parseScanFile(data)
			if err != nil {
				return nil, fmt.Errorf("hartree: resuming %s: %w", path, err)
			}
			if gotFormat != format {
				return nil, fmt.Errorf("hartree: resuming %s: the file is %s, not %s", path, gotFormat, format)
			}
			if !bytes.Equal(canonical(gotSettings), canonical(sj)) {
				return nil, fmt.Errorf("hartree: resuming %s: the file was written with other settings:\n  file: %s\n  now:  %s", path, gotSettings, sj)
			}
			for _, r := range recs {
				if out.Done[r.index] {
					return nil, fmt.Errorf("hartree: resuming %s: point %d appears twice", path, r.index)
				}
				out.Done[r.index] = true
				out.Last = max(out.Last, r.index)
			}
			if out.f, err = os.OpenFile(path, os.O_RDWR, 0o644); err != nil {
				return nil, fmt.Errorf("hartree: %w", err)
			}
			if err := out.f.Truncate(int64(keep)); err != nil {
				out.f.Close()
				return nil, fmt.Errorf("hartree: %w", err)
			}
			if _, err := out.f.Seek(int64(keep), io.SeekStart); err != nil {
				out.f.Close()
				return nil, fmt.Errorf("hartree: %w", err)
			}
			return out, nil
		} else if !errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("hartree: %w", err)
		}
	}
	if out.f, err = os.Create(path); err != nil {
		return nil, fmt.Errorf("hartree: %w", err)
	}
	var hdr string
	if format == "csv" {
		hdr = "# " + scanFormat + "\n# settings " + string(sj) + "\n" + strings.Join(ScanColumns, ",") + "\n"
	} else {
		b, _ := json.Marshal(map[string]json.RawMessage{"format": json.RawMessage(strconv.Quote(scanFormat)), "settings": sj})
		hdr = string(b) + "\n"
	}
	if _, err := out.f.WriteString(hdr); err != nil {
		out.f.Close()
		return nil, fmt.Errorf("hartree: %w", err)
	}
	return out, nil
}

func canonical(b []byte) []byte {
	var v any
	if json.Unmarshal(b, &v) != nil {
		return b
	}
	c, _ := json.Marshal(v)
	return c
}

// scanRow is a parsed record: its index and its text.
type scanRow struct {
	index int
	line  string
}

// parseScanFile reads a scan file; keep is the length of its complete lines.
func parseScanFile(data []byte) (format string, settings []byte, rows []scanRow, keep int, err error) {
	keep = bytes.LastIndexByte(data, '\n') + 1
	lines := strings.Split(string(data[:keep]), "\n")
	if len(lines) > 0 && lines[len(lines)-1] == "" {
		lines = lines[:len(lines)-1]
	}
	if len(lines) == 0 {
		return "", nil, nil, 0, errors.New("empty file")
	}
	switch {
	case lines[0] == "# "+scanFormat:
		format = "csv"
		if len(lines) < 3 || !strings.HasPrefix(lines[1], "# settings ") || lines[2] != strings.Join(ScanColumns, ",") {
			return "", nil, nil, 0, errors.New("not a complete scan header")
		}
		settings = []byte(strings.TrimPrefix(lines[1], "# settings "))
		for i, l := range lines[3:] {
			idx, _, ok := strings.Cut(l, ",")
			n, err := strconv.Atoi(idx)
			if !ok || err != nil || n < 0 {
				return "", nil, nil, 0, fmt.Errorf("line %d is not a scan record", i+4)
			}
			rows = append(rows, scanRow{n, l})
		}
	case strings.HasPrefix(lines[0], "{"):
		format = "jsonl"
		var h struct {
			Format   string          `json:"format"`
			Settings json.RawMessage `json:"settings"`
		}
		if err := json.Unmarshal([]byte(lines[0]), &h); err != nil || h.Format != scanFormat {
			return "", nil, nil, 0, errors.New("not a scan file")
		}
		settings = h.Settings
		for i, l := range lines[1:] {
			var r struct {
				Index *int `json:"index"`
			}
			if err := json.Unmarshal([]byte(l), &r); err != nil || r.Index == nil || *r.Index < 0 {
				return "", nil, nil, 0, fmt.Errorf("line %d is not a scan record", i+2)
			}
			rows = append(rows, scanRow{*r.Index, l})
		}
	default:
		return "", nil, nil, 0, errors.New("not a scan file")
	}
	return format, settings, rows, keep, nil
}

// nan encodes NaN as JSON null.
type nan float64

func (x nan) MarshalJSON() ([]byte, error) {
	if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
		return []byte("null"), nil
	}
	return []byte(strconv.FormatFloat(float64(x), 'g', 10, 64)), nil
}

// Write appends one record and flushes it to the operating system.
func (o *ScanOutput) Write(r ScanRecord) error {
	state, pattern := "no converged state", "none"
	energy, gap, sxy := math.NaN(), math.NaN(), math.NaN()
	if g := r.Ground; g != nil {
		state, pattern = g.Class, g.Pattern
		energy, gap, sxy = 1e3*r.RelEnergy, 1e3*g.GapRefined, g.SigmaXY
	}
	vals := []any{r.Index, r.I, r.J, r.N / lattice.Per1e12cm2, r.D, state, pattern, strings.Join(r.Degenerate, ";"), r.Seed,
		nan(energy), nan(gap), nan(sxy), r.Ground != nil, r.States, r.Failed, r.Iterations}
	var line []byte
	if o.format == "jsonl" {
		m := map[string]any{}
		for i, k := range ScanColumns {
			m[k] = vals[i]
		}
		b, err := json.Marshal(m)
		if err != nil {
			return err
		}
		line = append(b, '\n')
	} else {
		fields := make([]string, len(vals))
		for i, v := range vals {
			switch x := v.(type) {
			case nan:
				fields[i] = "NaN"
				if !math.IsNaN(float64(x)) {
					fields[i] = strconv.FormatFloat(float64(x), 'g', 10, 64)
				}
			case float64:
				fields[i] = strconv.FormatFloat(x, 'g', 10, 64)
			default:
				fields[i] = fmt.Sprint(x)
			}
		}
		var buf bytes.Buffer
		cw := csv.NewWriter(&buf)
		if err := cw.Write(fields); err != nil {
			return err
		}
		cw.Flush()
		line = buf.Bytes()
	}
	if _, err := o.f.Write(line); err != nil {
		return err
	}
	o.Done[r.Index] = true
	o.Last = max(o.Last, r.Index)
	return nil
}

// Close closes the file.
func (o *ScanOutput) Close() error { return o.f.Close() }

// MergeScans joins the shard files of one scan of total points into dst (sorted by index). It
// checks that all files have the same format and settings, that no point appears twice and that
// none of 0..total−1 is missing.
func MergeScans(dst io.Writer, paths []string, total int) error {
	if len(paths) == 0 {
		return errors.New("hartree: no scan files to merge")
	}
	var format string
	var settings []byte
	var header []byte
	rows := map[int]string{}
	for i, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			return fmt.Errorf("hartree: %w", err)
		}
		f, s, recs, keep, err := parseScanFile(data)
		if err != nil {
			return fmt.Errorf("hartree: merging %s: %w", p, err)
		}
		if keep != len(data) {
			return fmt.Errorf("hartree: merging %s: the last line is incomplete (resume that shard first)", p)
		}
		if i == 0 {
			format, settings = f, canonical(s)
			nh := 3
			if f == "jsonl" {
				nh = 1
			}
			header = []byte(strings.Join(strings.SplitN(string(data), "\n", nh+1)[:nh], "\n") + "\n")
		} else if f != format || !bytes.Equal(canonical(s), settings) {
			return fmt.Errorf("hartree: merging %s: other format or settings than %s", p, paths[0])
		}
		for _, r := range recs {
			if _, dup := rows[r.index]; dup {
				return fmt.Errorf("hartree: merging: point %d appears twice (second time in %s)", r.index, p)
			}
			rows[r.index] = r.line
		}
	}
	var missing []int
	for i := range total {
		if _, ok := rows[i]; !ok {
			missing = append(missing, i)
		}
	}
	if len(missing) > 0 {
		show := missing[:min(10, len(missing))]
		return fmt.Errorf("hartree: merging: %d of %d points missing (first: %v)", len(missing), total, show)
	}
	for idx := range rows {
		if idx >= total {
			return fmt.Errorf("hartree: merging: point %d lies outside the %d-point scan", idx, total)
		}
	}
	bw := bufio.NewWriter(dst)
	bw.Write(header)
	keys := make([]int, 0, len(rows))
	for k := range rows {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		bw.WriteString(rows[k])
		bw.WriteByte('\n')
	}
	return bw.Flush()
}
