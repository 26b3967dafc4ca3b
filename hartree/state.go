package hartree

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"lamina/scf"
)

// WithField returns a solver for the same device, interaction and grid under another field
// (D and n): the k-grid, the reference state and the exchange kernels are shared, so a map over
// (n, D) builds them once, and states of either solver seed the other. The solvers share scratch
// space: do not use them concurrently.
func (s *HFSolver) WithField(f Field) (*HFSolver, error) {
	if err := f.validate(); err != nil {
		return nil, err
	}
	g := *s.g
	g.mf.Field = f
	even := make([]float64, g.n)
	for l := range even {
		even[l] = f.N / float64(g.n)
	}
	g.uExt = LayerPotentials(nil, even, f.Below(), g.mf.Device.Params.D, g.mf.Device.EpsZ)
	return &HFSolver{g: &g, opt: s.opt}, nil
}

// stateMagic starts a state file; the format is ours: the magic, a version, the grid signature
// (layers, orbitals, points across, in-disk nodes, k-cutoff and γ0), the stacking letters, the
// state's Tag, then the layer potentials and the self-energies as little-endian numbers.
const stateMagic = "lamina-hfstate"

const stateVersion = 1

// WriteTo writes st in the library's binary state format. It implements io.WriterTo.
func (st *HFState) WriteTo(w io.Writer) (int64, error) {
	if st == nil || st.grid == nil {
		return 0, errors.New("hartree: no state to write")
	}
	g := st.grid
	cw := &countWriter{w: bufio.NewWriter(w)}
	seq := g.mf.Device.Stack.String()
	hdr := []any{[]byte(stateMagic), uint32(stateVersion), uint32(g.n), uint32(g.dim), uint32(g.L), uint32(len(g.nodes)),
		g.kmax, g.mf.Device.Params.Gamma0, uint32(len(seq)), []byte(seq), st.Tag, uint32(len(st.U)), st.U, uint64(len(st.Sigma))}
	for _, v := range hdr {
		if err := binary.Write(cw, binary.LittleEndian, v); err != nil {
			return cw.n, err
		}
	}
	buf := make([]float64, 0, 2*4096)
	for i := 0; i < len(st.Sigma); i += 4096 {
		buf = buf[:0]
		for _, c := range st.Sigma[i:min(i+4096, len(st.Sigma))] {
			buf = append(buf, real(c), imag(c))
		}
		if err := binary.Write(cw, binary.LittleEndian, buf); err != nil {
			return cw.n, err
		}
	}
	return cw.n, cw.w.Flush()
}

type countWriter struct {
	w *bufio.Writer
	n int64
}

func (c *countWriter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

// ReadState reads a state written by [HFState.WriteTo] for use as a seed of s (continuation or
// restart). The state must come from the same stack, parameters and k-grid.
func (s *HFSolver) ReadState(r io.Reader) (*HFState, error) {
	g := s.g
	br := bufio.NewReader(r)
	magic := make([]byte, len(stateMagic))
	if _, err := io.ReadFull(br, magic); err != nil || string(magic) != stateMagic {
		return nil, errors.New("hartree: not a state file")
	}
	var ver, n, dim, l, m uint32
	var kmax, g0 float64
	for _, v := range []any{&ver, &n, &dim, &l, &m, &kmax, &g0} {
		if err := binary.Read(br, binary.LittleEndian, v); err != nil {
			return nil, fmt.Errorf("hartree: reading state header: %w", err)
		}
	}
	if ver != stateVersion {
		return nil, fmt.Errorf("hartree: state file version %d, want %d", ver, stateVersion)
	}
	var ls uint32
	if err := binary.Read(br, binary.LittleEndian, &ls); err != nil || ls > 1024 {
		return nil, errors.New("hartree: corrupt state header")
	}
	seq := make([]byte, ls)
	if _, err := io.ReadFull(br, seq); err != nil {
		return nil, fmt.Errorf("hartree: reading state header: %w", err)
	}
	var tag int64
	if err := binary.Read(br, binary.LittleEndian, &tag); err != nil {
		return nil, fmt.Errorf("hartree: reading state header: %w", err)
	}
	if int(n) != g.n || int(dim) != g.dim || int(l) != g.L || int(m) != len(g.nodes) || kmax != g.kmax ||
		g0 != g.mf.Device.Params.Gamma0 || string(seq) != g.mf.Device.Stack.String() {
		return nil, fmt.Errorf("hartree: state of %s on a %d-point grid does not fit this problem (%s, %d points)", seq, l, g.mf.Device.Stack, g.L)
	}
	var nu uint32
	if err := binary.Read(br, binary.LittleEndian, &nu); err != nil || int(nu) != g.n {
		return nil, errors.New("hartree: corrupt state (potentials)")
	}
	st := &HFState{U: make([]float64, g.n), grid: g, Tag: tag}
	if err := binary.Read(br, binary.LittleEndian, st.U); err != nil {
		return nil, fmt.Errorf("hartree: reading state: %w", err)
	}
	var ns uint64
	if err := binary.Read(br, binary.LittleEndian, &ns); err != nil || ns != uint64(Flavors*len(g.nodes)*g.dim*g.dim) {
		return nil, errors.New("hartree: corrupt state (self-energy size)")
	}
	raw := make([]float64, 2*ns)
	if err := binary.Read(br, binary.LittleEndian, raw); err != nil {
		return nil, fmt.Errorf("hartree: reading state: %w", err)
	}
	st.Sigma = make([]complex128, ns)
	for i := range st.Sigma {
		st.Sigma[i] = complex(raw[2*i], raw[2*i+1])
	}
	for _, v := range raw {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, errors.New("hartree: state holds non-finite values")
		}
	}
	return st, nil
}

// SaveState writes st to path atomically (a temporary file renamed into place), so that an
// interrupted write never leaves a truncated checkpoint.
func SaveState(path string, st *HFState) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), filepath.Base(path)+".tmp*")
	if err != nil {
		return fmt.Errorf("hartree: checkpoint: %w", err)
	}
	if _, err := st.WriteTo(tmp); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return fmt.Errorf("hartree: checkpoint: %w", err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("hartree: checkpoint: %w", err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("hartree: checkpoint: %w", err)
	}
	return nil
}

// LoadState reads a state saved with [SaveState] for solver s.
func (s *HFSolver) LoadState(path string) (*HFState, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("hartree: %w", err)
	}
	defer f.Close()
	return s.ReadState(f)
}

// CheckpointRecorder returns an scf.Recorder that saves the current iterate of a Solve of s to
// path every `every` iterations (atomically), so that a long run can be restarted from the file
// with Seed{From: state} after [HFSolver.LoadState]. Chain it with another recorder by calling
// both from an scf.RecorderFunc.
func (s *HFSolver) CheckpointRecorder(path string, every int) scf.Recorder {
	if every < 1 {
		every = 10
	}
	return scf.RecorderFunc(func(it scf.Iteration) error {
		if it.Iter%every != 0 || len(it.X) != s.g.packLen() {
			return nil
		}
		u, sigma := s.g.unpack(it.X)
		return SaveState(path, &HFState{U: u, Sigma: sigma, grid: s.g})
	})
}

// WithOptions returns a solver sharing s's grid with other iteration options (for example a
// recorder that checkpoints, see [HFSolver.CheckpointRecorder]). Do not use both concurrently.
func (s *HFSolver) WithOptions(o HFOptions) *HFSolver {
	return &HFSolver{g: s.g, opt: o}
}
