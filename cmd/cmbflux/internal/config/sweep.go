package config

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"gopkg.in/yaml.v3"
)

// MaxPoints bounds the number of runs in one sweep.
const MaxPoints = 100000

// Sweep is a parsed sweep file: a base build configuration and lists of
// values for some of its parameters, whose cartesian product gives the runs.
type Sweep struct {
	File string
	Base Set
	Axes []Axis // in the order of the file
	// Out is the output folder named in the file, already joined to the
	// file's folder; "" when the file names none.
	Out string
}

// Axis is one varied parameter and its values.
type Axis struct {
	Key    string
	Values []Value
}

// Point is one run of a sweep.
type Point struct {
	Index  int    // 0-based, in the order of runs.tsv
	Name   string // folder name, safe to join to the output folder
	Set    Set    // full build parameters of the run
	Varied []KV   // the varied parameters, in axis order
}

// KV is a parameter name and its value as written.
type KV struct{ Key, Raw string }

// ParseSweep parses a sweep file with the keys base (a build configuration),
// vary (a mapping of parameter names to lists of values) and optionally out.
func ParseSweep(file string, data []byte) (*Sweep, error) {
	root, err := parseYAML(file, data)
	if err != nil {
		return nil, err
	}
	ps, err := pairs(file, root)
	if err != nil {
		return nil, err
	}
	dir := filepath.Dir(file)
	sw := &Sweep{File: file, Base: Set{}}
	var varyNode *yaml.Node
	for _, p := range ps {
		k, v := p[0], p[1]
		switch k.Value {
		case "base":
			if v.Kind != yaml.MappingNode {
				return nil, nodeErr(file, v, "base", "expected a mapping of build parameters, e.g. {demo: true, qmean: 80}")
			}
			if sw.Base, err = mappingSet(file, dir, v); err != nil {
				return nil, err
			}
			if o, ok := sw.Base["out"]; ok {
				return nil, o.errorf("out", "a sweep's runs go into folders named after them; give the sweep's folder as a top-level out: or with --out")
			}
		case "vary":
			if v.Kind != yaml.MappingNode {
				return nil, nodeErr(file, v, "vary", "expected a mapping of parameter names to lists, e.g. {qstar: [0, 1, 2]}")
			}
			varyNode = v
		case "out":
			if v.Kind != yaml.ScalarNode || v.Value == "" {
				return nil, nodeErr(file, v, "out", "expected a folder name")
			}
			o := filepath.ToSlash(v.Value)
			if filepath.IsAbs(v.Value) || strings.HasPrefix(o, "/") || hasDotDot(o) {
				return nil, nodeErr(file, v, "out", "%q must be a relative path inside the sweep file's folder (no .., not absolute); give other places with --out", v.Value)
			}
			sw.Out = filepath.Join(dir, filepath.FromSlash(o))
		default:
			return nil, nodeErr(file, k, "", "unknown key %q (a sweep file has base, vary and out)", k.Value)
		}
	}
	if varyNode == nil {
		return nil, &Error{File: file, Line: root.Line, Col: root.Column, Err: errors.New("no vary: mapping; a sweep needs at least one parameter with a list of values")}
	}
	vps, err := pairs(file, varyNode)
	if err != nil {
		return nil, err
	}
	if len(vps) == 0 {
		return nil, nodeErr(file, varyNode, "vary", "empty; give at least one parameter with a list of values")
	}
	total := 1
	for _, p := range vps {
		key, err := lookupKey(file, p[0])
		if err != nil {
			return nil, err
		}
		if key.NoVary {
			return nil, nodeErr(file, p[0], key.Name, "cannot be varied in a sweep")
		}
		if _, ok := sw.Base[key.Name]; ok {
			return nil, nodeErr(file, p[0], key.Name, "set both in base and in vary; remove it from one of them")
		}
		ln := p[1]
		var elems []*yaml.Node
		switch ln.Kind {
		case yaml.SequenceNode:
			elems = ln.Content
		case yaml.ScalarNode:
			elems = []*yaml.Node{ln}
		default:
			return nil, nodeErr(file, ln, key.Name, "expected a list of values, e.g. [1, 2, 3]")
		}
		if len(elems) == 0 {
			return nil, nodeErr(file, ln, key.Name, "empty list")
		}
		ax := Axis{Key: key.Name}
		seen := map[string]int{}
		for _, e := range elems {
			v, err := scalar(file, dir, key, e)
			if err != nil {
				return nil, err
			}
			if l, ok := seen[v.Raw]; ok {
				return nil, nodeErr(file, e, key.Name, "value %q listed twice (first at line %d)", v.Raw, l)
			}
			seen[v.Raw] = e.Line
			ax.Values = append(ax.Values, v)
		}
		total *= len(ax.Values)
		if total > MaxPoints {
			return nil, nodeErr(file, ln, key.Name, "the sweep would have more than %d runs; split it into several files", MaxPoints)
		}
		sw.Axes = append(sw.Axes, ax)
	}
	return sw, nil
}

func hasDotDot(p string) bool {
	for _, part := range strings.Split(p, "/") {
		if part == ".." {
			return true
		}
	}
	return false
}

// NumPoints returns the number of runs.
func (sw *Sweep) NumPoints() int {
	n := 1
	for _, a := range sw.Axes {
		n *= len(a.Values)
	}
	return n
}

// Points returns every run of the sweep: the cartesian product of the axes,
// the last axis varying fastest.
func (sw *Sweep) Points() []Point {
	n := sw.NumPoints()
	width := max(4, len(fmt.Sprint(n-1)))
	pts := make([]Point, n)
	for i := range pts {
		set := sw.Base.Clone()
		varied := make([]KV, len(sw.Axes))
		r := i
		for a := len(sw.Axes) - 1; a >= 0; a-- {
			ax := sw.Axes[a]
			v := ax.Values[r%len(ax.Values)]
			r /= len(ax.Values)
			set[ax.Key] = v
			varied[a] = KV{ax.Key, v.Raw}
		}
		pts[i] = Point{Index: i, Set: set, Varied: varied, Name: RunName(i, width, varied)}
	}
	return pts
}

// RunName returns the folder name of run i: the zero-padded index followed by
// the varied parameters, reduced to letters, digits, '.', '+', '-' and '='.
// The result never contains a path separator and never starts with a dot.
func RunName(i, width int, varied []KV) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%0*d", width, i)
	for _, kv := range varied {
		raw := kv.Raw
		if kv.Key == "input" {
			raw = filepath.Base(filepath.FromSlash(raw))
			raw = strings.TrimSuffix(raw, filepath.Ext(raw))
		}
		b.WriteString("_" + kv.Key + "=" + sanitize(raw))
	}
	return b.String()
}

func sanitize(s string) string {
	var b strings.Builder
	lastDot := false
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '+', r == '-':
			b.WriteRune(r)
			lastDot = false
		case r == '.':
			if !lastDot {
				b.WriteRune(r)
			}
			lastDot = true
		default:
			b.WriteRune('~')
			lastDot = false
		}
		if b.Len() >= 40 {
			break
		}
	}
	return b.String()
}

// SafeName reports whether name can be joined to an output folder without
// leaving it.
func SafeName(name string) bool {
	return name != "" && name != "." && name != ".." && !strings.ContainsAny(name, `/\:`) &&
		!strings.HasPrefix(name, ".") && filepath.Base(name) == name && !filepath.IsAbs(name)
}
