package config

import (
	"errors"
	"fmt"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// ErrBadConfig is wrapped by every error about a malformed configuration
// file, sweep file or flag value; the command line maps it to exit status 2.
var ErrBadConfig = errors.New("bad configuration")

// Error reports a problem with a parameter, located by file, line and column
// (YAML files) or by flag name. It prints as "file:line:col: key: cause" or
// "--flag: cause".
type Error struct {
	File      string // YAML file as given, or "" for a flag
	Line, Col int    // 1-based; 0 when unknown
	Key       string // parameter name, or "" when the error is not about one key
	Err       error
}

// Error implements the error interface.
func (e *Error) Error() string {
	var b strings.Builder
	if e.File != "" {
		b.WriteString(e.File)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
			if e.Col > 0 {
				fmt.Fprintf(&b, ":%d", e.Col)
			}
		}
		b.WriteString(": ")
		if e.Key != "" {
			b.WriteString(e.Key + ": ")
		}
	} else if e.Key != "" {
		b.WriteString("--" + e.Key + ": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

// Unwrap lets errors.Is find both the cause and ErrBadConfig.
func (e *Error) Unwrap() []error { return []error{e.Err, ErrBadConfig} }

// Source says where a value was set.
type Source struct {
	File      string // YAML file, or "" for a flag
	Line, Col int
	Dir       string // folder that relative paths in the value are relative to
}

// Value is one parameter setting as written, with where it came from.
type Value struct {
	Raw string
	Src Source
}

// errorf returns an *Error located at v for key.
func (v Value) errorf(key, format string, args ...any) error {
	return &Error{File: v.Src.File, Line: v.Src.Line, Col: v.Src.Col, Key: key, Err: fmt.Errorf(format, args...)}
}

// Set maps parameter names to values.
type Set map[string]Value

// Clone returns a copy of s.
func (s Set) Clone() Set {
	d := make(Set, len(s))
	for k, v := range s {
		d[k] = v
	}
	return d
}

// Merge returns a copy of s with the values of over replacing those of s.
func (s Set) Merge(over Set) Set {
	d := s.Clone()
	for k, v := range over {
		d[k] = v
	}
	return d
}

// Keys returns the names set in s, sorted.
func (s Set) Keys() []string {
	k := make([]string, 0, len(s))
	for n := range s {
		k = append(k, n)
	}
	sort.Strings(k)
	return k
}

// SetFlag records a value given on the command line for key name, checking
// that it has the key's kind.
func (s Set) SetFlag(name, raw string) error {
	k := Lookup(name)
	if k == nil {
		return &Error{Key: name, Err: errors.New("unknown parameter")}
	}
	v := Value{Raw: raw}
	if err := check(k, v); err != nil {
		return err
	}
	s[name] = v
	return nil
}

// check validates the syntax of v for key k.
func check(k *Key, v Value) error {
	switch k.Kind {
	case Float:
		f, err := strconv.ParseFloat(v.Raw, 64)
		if err != nil || f != f || f > 1e300 || f < -1e300 {
			return v.errorf(k.Name, "%q is not a finite number", v.Raw)
		}
	case Int:
		if _, err := strconv.Atoi(v.Raw); err != nil {
			return v.errorf(k.Name, "%q is not an integer", v.Raw)
		}
	case Bool:
		if _, err := parseBool(v.Raw); err != nil {
			return v.errorf(k.Name, "%q is not true or false", v.Raw)
		}
	}
	return nil
}

func parseBool(s string) (bool, error) {
	switch strings.ToLower(s) {
	case "true", "yes", "on", "1":
		return true, nil
	case "false", "no", "off", "0":
		return false, nil
	}
	return false, errors.New("not a boolean")
}

var yamlLine = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// parseYAML decodes data into a document node, turning syntax errors into
// *Error with the line number.
func parseYAML(file string, data []byte) (*yaml.Node, error) {
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		msg := err.Error()
		if m := yamlLine.FindStringSubmatch(msg); m != nil {
			line, _ := strconv.Atoi(m[1])
			return nil, &Error{File: file, Line: line, Err: fmt.Errorf("YAML syntax: %s", m[2])}
		}
		return nil, &Error{File: file, Err: fmt.Errorf("YAML syntax: %s", strings.TrimPrefix(msg, "yaml: "))}
	}
	if doc.Kind == 0 || len(doc.Content) == 0 {
		return nil, &Error{File: file, Err: errors.New("the file is empty; expected a mapping of parameter names to values")}
	}
	root := doc.Content[0]
	if root.Kind != yaml.MappingNode {
		return nil, &Error{File: file, Line: root.Line, Col: root.Column, Err: errors.New("expected a mapping of names to values (name: value)")}
	}
	return root, nil
}

// nodeErr returns an *Error located at n.
func nodeErr(file string, n *yaml.Node, key, format string, args ...any) error {
	return &Error{File: file, Line: n.Line, Col: n.Column, Key: key, Err: fmt.Errorf(format, args...)}
}

// pairs returns the key and value nodes of a mapping, refusing duplicate and
// non-scalar keys.
func pairs(file string, m *yaml.Node) ([][2]*yaml.Node, error) {
	seen := map[string]*yaml.Node{}
	var out [][2]*yaml.Node
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], m.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			return nil, nodeErr(file, k, "", "keys must be plain names")
		}
		if p, ok := seen[k.Value]; ok {
			return nil, nodeErr(file, k, k.Value, "set twice (first at line %d)", p.Line)
		}
		seen[k.Value] = k
		out = append(out, [2]*yaml.Node{k, v})
	}
	return out, nil
}

// scalar turns a YAML value node into a Value for key k.
func scalar(file, dir string, k *Key, n *yaml.Node) (Value, error) {
	src := Source{File: file, Line: n.Line, Col: n.Column, Dir: dir}
	switch n.Kind {
	case yaml.ScalarNode:
		if n.Tag == "!!null" {
			return Value{}, nodeErr(file, n, k.Name, "no value given")
		}
		v := Value{Raw: n.Value, Src: src}
		return v, check(k, v)
	case yaml.SequenceNode:
		if k.Kind != List {
			return Value{}, nodeErr(file, n, k.Name, "expected a single value, not a list")
		}
		parts := make([]string, 0, len(n.Content))
		for _, e := range n.Content {
			if e.Kind != yaml.ScalarNode {
				return Value{}, nodeErr(file, e, k.Name, "list elements must be plain values")
			}
			parts = append(parts, e.Value)
		}
		return Value{Raw: strings.Join(parts, ","), Src: src}, nil
	}
	return Value{}, nodeErr(file, n, k.Name, "expected a value, not a mapping")
}

// lookupKey returns the key for a YAML key node or an error suggesting the
// nearest known name.
func lookupKey(file string, kn *yaml.Node) (*Key, error) {
	k := Lookup(kn.Value)
	if k != nil {
		return k, nil
	}
	if s := Suggest(kn.Value); s != "" {
		return nil, nodeErr(file, kn, "", "unknown parameter %q (did you mean %q?)", kn.Value, s)
	}
	return nil, nodeErr(file, kn, "", "unknown parameter %q (see cmbflux build --help for the names)", kn.Value)
}

// mappingSet reads a mapping of build parameters.
func mappingSet(file, dir string, m *yaml.Node) (Set, error) {
	ps, err := pairs(file, m)
	if err != nil {
		return nil, err
	}
	s := Set{}
	for _, p := range ps {
		k, err := lookupKey(file, p[0])
		if err != nil {
			return nil, err
		}
		v, err := scalar(file, dir, k, p[1])
		if err != nil {
			return nil, err
		}
		s[k.Name] = v
	}
	return s, nil
}

// ParseBuild parses a build configuration: a YAML mapping whose keys are the
// long flag names of cmbflux build. file names the file in errors; relative
// paths in it are taken relative to the file's folder.
func ParseBuild(file string, data []byte) (Set, error) {
	root, err := parseYAML(file, data)
	if err != nil {
		return nil, err
	}
	return mappingSet(file, filepath.Dir(file), root)
}
