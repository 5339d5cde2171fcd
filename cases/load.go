package cases

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"github.com/BurntSushi/toml"

	"cureslab/cases/internal/num"
	"cureslab/cases/limits"
	"cureslab/cases/tomltext"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
)

// topKeys are the sections and keys a case file may have at its top level.
var topKeys = []string{"title", "initial", "time", "layer", "mesh", "materials", "schedules",
	"top", "bottom", "volumetric", "output", "criteria", "sweep", "uncertainty"}

// Load reads, validates and resolves the case file at path (see Parse);
// relative paths inside it are taken from its directory.
func Load(path string) (*Case, error) { return LoadContext(context.Background(), path) }

// LoadContext is Load that stops when ctx is cancelled (the error then
// wraps ctx.Err()). The case file, and every file it names, must be a
// regular file (not a FIFO or a device) of at most limits.MaxFileSize
// bytes, checked before it is opened; it is read in chunks with ctx
// checked between them (limits.ReadFile).
func LoadContext(ctx context.Context, path string) (*Case, error) {
	data, err := limits.ReadFile(ctx, path, limits.MaxFileSize)
	if err != nil {
		return nil, ErrorList{{File: path, Err: &detail{Kind: ErrFile, Cause: err, Msg: fmt.Sprintf("cannot read the case file: %v", err)}}}
	}
	return parse(ctx, path, data, filepath.Dir(path))
}

// Parse reads, validates and resolves a case file (README, Case file reference) given as
// data; name is the file name used in messages and dir the directory that
// relative paths in the case (schedule files) refer to.
//
// Every value is converted to SI and checked before anything is built: an
// unknown key, a quantity without its unit or of the wrong dimension, a
// value out of physical range, a reference to an unknown material or
// schedule, a required section that is missing. All problems are collected
// and returned together as an ErrorList of *Error, each with the file, line,
// column and key path; no partial Case is returned. [sweep] is validated
// (sweep.New reads it) but does not change the case; so is [uncertainty]
// (uncertaintySection; uncertain.Propagate and tune.Tune read it).
// [volumetric] becomes Problem.Volumetric (see validate_volumetric.go) and
// [materials.X.dielectric] physics.Dielectric.
//
// Defaults: time.end is the end of the longest program the case uses (a
// schedule that drives a face or the volumetric control, or flux points) and
// is required when there is none; output_every is end/100; abort_temperature is 400 C; the title is
// the file name without its extension. Cost: linear in the size of the
// file, plus the schedule files it reads and the mesh it builds.
func Parse(name string, data []byte, dir string) (*Case, error) {
	return parse(context.Background(), name, data, dir)
}

func parse(ctx context.Context, name string, data []byte, dir string) (*Case, error) {
	scan, err := preScan(name, data)
	if err != nil {
		return nil, err
	}
	text := string(data)
	var doc map[string]any
	if _, err := toml.Decode(text, &doc); err != nil {
		return nil, ErrorList{syntaxError(name, text, err, scan)}
	}
	return parseTree(ctx, name, text, doc, dir)
}

// parseTree is Parse of the document doc decoded from text, which a sweep
// run has changed in place of some values; positions still come from text.
// doc is only read.
func parseTree(ctx context.Context, name, text string, doc map[string]any, dir string) (*Case, error) {
	l := &loader{file: name, dir: dir, loc: tomltext.Locate(text), ctx: ctx}
	l.checkTexts("", doc)
	c := l.build(doc)
	if err := l.errs.sortFor(name).Err(); err != nil {
		return nil, err
	}
	return c, nil
}

// build reads the whole document; the Case is nil when there are errors.
func (l *loader) build(doc map[string]any) *Case {
	root := l.open("", doc, topKeys, nil)
	c := &Case{File: l.file, Dir: l.dir, Title: strings.TrimSuffix(filepath.Base(l.file), filepath.Ext(l.file))}
	if s, ok := l.str(root, "title"); ok {
		c.Title = s
	}
	defs, replaced := l.materials(root)
	scheds := l.schedules(root)
	layers, layersOK := l.layers(root, defs)
	opt := l.meshOptions(root)
	T0, cure0, initOK := l.initial(root)
	top := l.face(root, "top", scheds)
	bottom := l.face(root, "bottom", scheds)

	vol, volOK := l.volumetric(root, scheds, layers, layersOK)

	p := &solver.Problem{InitialTemperature: T0, InitialCure: cure0}
	if !initOK {
		T0 = 0
	}
	c.OutputEvery = l.timing(root, p, programEnd(top, bottom, vol, volOK), T0)
	if vol != nil {
		l.checkControlSamples(vol.vol.Control, p.End)
	}

	total := 0.0
	for _, d := range layers {
		total += d.geom.Thickness
	}
	if !layersOK {
		total = 0 // unknown: do not judge probe depths against it
	}
	var probePaths []string
	p.Probes, probePaths = l.probes(root, total)
	if vol != nil && vol.vol.Control != nil && SensorProbe(p.Probes, vol.vol.Control.Sensor) < 0 {
		p.Probes = append(p.Probes, vol.vol.Control.Sensor) // probes.csv records the controlled temperature
	}
	c.Probes = p.Probes
	c.Criteria = l.criteria(root)
	l.sweepSection(root)
	l.uncertaintySection(root)
	if !math.IsNaN(c.Criteria.MinCure) {
		p.MinCure = c.Criteria.MinCure
	}
	p.FlowViscosity = c.Criteria.FlowViscosity
	if layersOK {
		l.checkFlowCriteria(root, layers)
	}
	if layersOK && initOK {
		l.checkStart(layers, defs, cure0)
	}
	if !layersOK || !l.checkCells(layers, opt) || len(l.errs) > 0 {
		return nil
	}

	if p.Mesh = l.buildMesh(layers, opt); p.Mesh == nil {
		return nil
	}
	if !l.placeProbes(p, probePaths, vol) {
		return nil
	}
	p.Top, p.Bottom = top.face, bottom.face
	c.TopAir, c.BottomAir = top.driver, bottom.driver
	c.Materials = make(map[string]*physics.Material)
	for _, d := range layers {
		p.Materials = append(p.Materials, d.mat)
		c.Materials[d.info.Material] = d.mat
		c.Layers = append(c.Layers, d.info)
	}
	c.Schedules = make(map[string]physics.Schedule)
	for name, s := range scheds {
		c.Schedules[name] = *s
	}
	c.Replaced = replaced
	if vol != nil {
		p.Volumetric, c.Volumetric = vol.vol, vol.info
	}
	c.Problem = p
	return c
}

// programEnd returns the end of the programs the faces and the volumetric
// heating follow, s: 0 if none has one, −1 if unknown because a face or
// [volumetric] has errors of its own (nil, or volOK false).
func programEnd(top, bottom *faceDef, vol *volDef, volOK bool) float64 {
	end := 0.0
	for _, f := range []*faceDef{top, bottom} {
		if f == nil {
			return -1
		}
		end = max(end, f.end)
	}
	if !volOK {
		return -1
	}
	if vol != nil {
		end = max(end, vol.end)
	}
	return end
}

// buildMesh builds the mesh of the checked layers with opt; nil, with the
// error added, if mesh.Build refuses them.
func (l *loader) buildMesh(layers []layerDef, opt mesh.Options) *mesh.Mesh {
	geom := make([]mesh.Layer, len(layers))
	for i, d := range layers {
		geom[i] = d.geom
	}
	m, err := mesh.Build(geom, opt)
	if err != nil { // not reached: every layer was checked before
		key := "layer"
		var le *mesh.LayerError
		if errors.As(err, &le) {
			key = fmt.Sprintf("layer.%d", le.Index)
		}
		l.add(l.loc.Table(key), key, ErrRange, err, err.Error())
		return nil
	}
	return m
}

// placeProbes puts the probe depths of p and the control sensor of vol on
// the mesh: a depth typed as a layer face ("0.4 mm") may differ by rounding
// from the face the mesh built by adding thicknesses, so it goes on the
// face and reads the upper layer's side (README, Case file reference). The
// first len(paths) probes are the case's own, written at paths; it returns
// false if two of them now fall in the same column of probes.csv.
func (l *loader) placeProbes(p *solver.Problem, paths []string, vol *volDef) bool {
	for i, z := range p.Probes {
		p.Probes[i] = snapToLayerFace(p.Mesh, z)
	}
	l.checkProbeColumns(p.Probes[:len(paths)], paths, num.FormatDepth)
	if len(l.errs) > 0 {
		return false
	}
	if vol != nil && vol.vol.Control != nil {
		vol.vol.Control.Sensor = snapToLayerFace(p.Mesh, vol.vol.Control.Sensor)
	}
	return true
}

// checkStart reports an autocatalytic resin of the case that can never start
// to react: A1 = 0 and m > 0 with an initial cure of 0.
func (l *loader) checkStart(layers []layerDef, defs map[string]*physics.Material, cure0 float64) {
	if cure0 > 0 {
		return
	}
	seen := make(map[string]bool)
	for _, d := range layers {
		name := d.info.Material
		if d.info.Builtin || d.mat == nil || d.mat.Cure == nil || seen[name] {
			continue
		}
		seen[name] = true
		if a, ok := d.mat.Cure.Model.(physics.Autocatalytic); ok && a.A1 == 0 && a.M > 0 {
			key := "materials." + name + ".cure.A1"
			l.atValue(key, ErrRange, "with A1 = 0 and m > 0 the resin never starts to react from an initial cure of 0").Hint =
				"give A1 > 0, or a small [initial] cure such as 0.01"
		}
	}
}

// preScan scans case text before the TOML library parses it
// (tomltext.Check) and refuses text that nests deeper than
// limits.MaxNesting: the library's cost grows faster than the depth.
func preScan(name string, data []byte) (tomltext.Scan, error) {
	scan := tomltext.Check(data, limits.MaxNesting)
	if scan.Depth > limits.MaxNesting {
		return scan, ErrorList{{File: name, Line: scan.Deepest.Line, Col: scan.Deepest.Col,
			Err:  &detail{Kind: ErrSyntax, Msg: fmt.Sprintf("tables, arrays and dotted keys nest deeper than %d levels here; a case file needs about 6", limits.MaxNesting)},
			Hint: caret(string(data), scan.Deepest.Line, scan.Deepest.Col, 1)}}
	}
	return scan, nil
}

// unclosedWhat explains each construct tomltext reports left open.
var unclosedWhat = map[string]string{
	"array of tables header": "this [[table]] header is not closed on its line: end it with ]]",
	"table header":           "this [table] header is not closed on its line: end it with ]",
	"string":                 "this string is not closed on its line: end it with the quote it opens with",
	"multi-line string":      "this multi-line string is never closed: end it with three quotes",
	"array":                  "this array is never closed: end it with ]",
	"inline table":           "this inline table is never closed: end it with } on the same line",
}

// syntaxError turns an error of the TOML parser into an *Error with the
// parser's position and the offending line with a caret under it. When
// the scan found a construct left open at or before the parser's position
// (a header without its bracket, a string without its quote), the error
// points at the line and column where that construct opens, with the
// parser's message after it: the parser only notices the problem later
// (in a file with CR LF line ends, it reports a string cut by its line end
// on the line before, hence the one line of slack).
func syntaxError(name, text string, err error, scan tomltext.Scan) *Error {
	var pe toml.ParseError
	if !errors.As(err, &pe) {
		return &Error{File: name, Err: &detail{Kind: ErrSyntax, Cause: err, Msg: err.Error()}}
	}
	if msg, ok := unclosedWhat[scan.Unclosed]; ok && (pe.Position.Line < 1 || scan.Open.Line <= pe.Position.Line+1) {
		return &Error{File: name, Line: scan.Open.Line, Col: scan.Open.Col, Key: tomltext.Locate(text).LastKeyBefore(scan.Open.Line, scan.Open.Col),
			Err:  &detail{Kind: ErrSyntax, Cause: err, Msg: msg},
			Hint: caret(text, scan.Open.Line, scan.Open.Col, 1)}
	}
	if pe.Position.Line < 1 {
		// The TOML library reports some lexer errors (a newline inside a
		// string on the first line) at line 0: place them from the byte
		// offset instead.
		off := min(max(pe.Position.Start, 0), len(text))
		pe.Position.Line = 1 + strings.Count(text[:off], "\n")
		pe.Position.Col = 1 + off - (strings.LastIndexByte(text[:off], '\n') + 1)
	}
	e := &Error{File: name, Line: pe.Position.Line, Col: pe.Position.Col, Key: tomltext.Locate(text).LastKeyBefore(pe.Position.Line, pe.Position.Col),
		Err: &detail{Kind: ErrSyntax, Cause: err, Msg: pe.Message}}
	if e.Key == "" {
		e.Key = pe.LastKey
	}
	e.Hint = caret(text, pe.Position.Line, pe.Position.Col, pe.Position.Len)
	return e
}

// caret returns the line of text at line (1-based) and a caret under the
// columns col..col+n-1 (bytes; tabs are kept so the caret lines up).
func caret(text string, line, col, n int) string {
	lines := strings.Split(text, "\n")
	if line < 1 || line > len(lines) {
		return ""
	}
	src := strings.TrimRight(lines[line-1], "\r")
	if col < 1 {
		col = 1
	}
	pad := []byte(src[:min(col-1, len(src))])
	for i, b := range pad {
		if b != '\t' {
			pad[i] = ' '
		}
	}
	return fmt.Sprintf("%s\n%s%s", src, pad, strings.Repeat("^", max(1, n)))
}

// snapToLayerFace returns the depth of the layer face of m within rounding
// (1e-9 of the thinner neighbouring cell) of z, or z itself.
func snapToLayerFace(m *mesh.Mesh, z float64) float64 {
	for j := 1; j < len(m.Layers); j++ {
		f := m.First[j]
		if math.Abs(z-m.Faces[f]) <= 1e-9*min(m.Widths[f-1], m.Widths[f]) {
			return m.Faces[f]
		}
	}
	return z
}
