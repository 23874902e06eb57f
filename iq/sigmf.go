package iq

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"time"
)

// SigMFVersion is the SigMF specification version written and validated
// against (SigMF Specification v1.0.0: global core:datatype and
// core:version required; the captures and annotations arrays required;
// core:sample_start required in each of their objects).
const SigMFVersion = "1.0.0"

// maxSigMFMeta caps the metadata file read (annotations can be many, but a
// metadata file of more than this is not one).
const maxSigMFMeta = 64 << 20

// sigmfMeta is the JSON shape of a .sigmf-meta file as ssbkit reads it;
// pointers tell a missing key from a zero value.
type sigmfMeta struct {
	Global *struct {
		Datatype    *string  `json:"core:datatype"`
		SampleRate  *float64 `json:"core:sample_rate"`
		Version     *string  `json:"core:version"`
		Description string   `json:"core:description"`
		NumChannels *int     `json:"core:num_channels"`
		Dataset     *string  `json:"core:dataset"`
		MetaOnly    bool     `json:"core:metadata_only"`
	} `json:"global"`
	Captures []struct {
		SampleStart *int64   `json:"core:sample_start"`
		Frequency   *float64 `json:"core:frequency"`
		Datetime    string   `json:"core:datetime"`
		HeaderBytes int64    `json:"core:header_bytes"`
	} `json:"captures"`
	Annotations []struct {
		SampleStart   *int64   `json:"core:sample_start"`
		SampleCount   *int64   `json:"core:sample_count"`
		FreqLowerEdge *float64 `json:"core:freq_lower_edge"`
		FreqUpperEdge *float64 `json:"core:freq_upper_edge"`
		Label         string   `json:"core:label"`
		Comment       string   `json:"core:comment"`
	} `json:"annotations"`
}

// maxFrequency bounds a centre frequency read from metadata (1 THz; no
// radio capture comes near it).
const maxFrequency = 1e12

// ReadSigMFMeta parses SigMF metadata from r; name is used in errors. It
// requires the global object with a supported core:datatype; a missing
// core:sample_rate leaves Rate 0. The centre frequency and date come from
// the first capture segment. Segments out of order, duplicate keys, a
// negative centre frequency and non-conforming datasets
// (core:header_bytes, core:metadata_only) are refused. Invalid JSON is reported with its line and column.
func ReadSigMFMeta(r io.Reader, name string) (Meta, error) {
	m, _, err := readSigMFMeta(r, name)
	return m, err
}

// sigmfExtra is what the reader of a recording checks against its data
// file once it knows its length.
type sigmfExtra struct {
	dataset  *string // core:dataset
	captures []int64 // core:sample_start of each capture segment
	annEnds  []int64 // core:sample_start + core:sample_count of each annotation
}

// checkDataset refuses a core:dataset other than the recording's own
// data file: one outside the metadata's folder, or a non-conforming
// dataset (SigMF v1.0.0), which ssbkit does not read.
func (x sigmfExtra) checkDataset(metaPath, dataPath string) error {
	if x.dataset == nil {
		return nil
	}
	d := *x.dataset
	switch {
	case d == filepath.Base(dataPath):
		return nil
	case d == "" || strings.ContainsAny(d, `/\`) || d == "." || d == "..":
		return formatErr(metaPath, -1, "core:dataset %s points outside the metadata's folder; refused", quote(d))
	}
	return &UnsupportedError{File: metaPath, What: "core:dataset " + quote(d) + " (a non-conforming dataset; ssbkit reads " + filepath.Base(dataPath) + ")"}
}

// checkLength refuses capture segments and annotations that begin or end
// beyond the samples of the data file: a cut data file, or a wrong one.
func (x sigmfExtra) checkLength(metaPath, dataPath string, samples int64) error {
	for i, s := range x.captures {
		if s >= samples && !(i == 0 && s == 0) {
			return formatErr(metaPath, -1, "captures[%d] begins at sample %d but %s holds %s (cut file?)", i, s, filepath.Base(dataPath), plural(samples, "sample"))
		}
	}
	for i, e := range x.annEnds {
		if e > samples {
			return formatErr(metaPath, -1, "annotations[%d] runs to sample %d but %s holds %s (cut file?)", i, e, filepath.Base(dataPath), plural(samples, "sample"))
		}
	}
	return nil
}

func readSigMFMeta(r io.Reader, name string) (Meta, sigmfExtra, error) {
	m := Meta{Container: ContainerSigMF, Samples: -1}
	var x sigmfExtra
	data, err := io.ReadAll(io.LimitReader(r, maxSigMFMeta+1))
	if err != nil {
		return m, x, fmt.Errorf("%s: %w", name, err)
	}
	if len(data) > maxSigMFMeta {
		return m, x, formatErr(name, -1, "metadata larger than %d bytes", maxSigMFMeta)
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return m, x, formatErr(name, -1, "empty metadata file")
	}
	var sm sigmfMeta
	if err := json.Unmarshal(data, &sm); err != nil {
		return m, x, jsonError(name, data, err)
	}
	if err := duplicateKey(name, data); err != nil {
		return m, x, err
	}
	if sm.Global == nil {
		return m, x, formatErr(name, -1, "no \"global\" object")
	}
	g := sm.Global
	if g.Datatype == nil {
		return m, x, formatErr(name, -1, "no global \"core:datatype\"")
	}
	dt := Datatype(*g.Datatype)
	if !dt.Valid() {
		return m, x, &UnsupportedError{File: name, What: "SigMF core:datatype " + quote(*g.Datatype) + " (known: cu8, ci8, ci16_le, cf32_le, rf32_le, ri16_le)"}
	}
	if g.NumChannels != nil && *g.NumChannels != 1 {
		return m, x, &UnsupportedError{File: name, What: fmt.Sprintf("SigMF core:num_channels %d (want 1)", *g.NumChannels)}
	}
	if g.MetaOnly {
		return m, x, formatErr(name, -1, "core:metadata_only is true: the recording has no samples")
	}
	x.dataset = g.Dataset
	m.Datatype = dt
	m.Real = dt.IsReal()
	if g.SampleRate != nil {
		if !(*g.SampleRate > 0) || *g.SampleRate > 1e12 {
			return m, x, formatErr(name, -1, "core:sample_rate %g is not a positive rate", *g.SampleRate)
		}
		m.Rate = *g.SampleRate
	}
	m.Description = g.Description
	for i, c := range sm.Captures {
		switch {
		case c.SampleStart == nil:
			return m, x, formatErr(name, -1, "captures[%d] has no \"core:sample_start\"", i)
		case *c.SampleStart < 0:
			return m, x, formatErr(name, -1, "captures[%d] core:sample_start %d is negative", i, *c.SampleStart)
		case i > 0 && *c.SampleStart <= *sm.Captures[i-1].SampleStart:
			// SigMF v1.0.0: captures sorted by core:sample_start.
			return m, x, formatErr(name, -1, "captures[%d] core:sample_start %d does not come after captures[%d]'s %d", i, *c.SampleStart, i-1, *sm.Captures[i-1].SampleStart)
		case c.HeaderBytes != 0:
			return m, x, &UnsupportedError{File: name, What: fmt.Sprintf("captures[%d] core:header_bytes %d (a non-conforming dataset)", i, c.HeaderBytes)}
		case c.Frequency != nil && !(*c.Frequency >= 0 && *c.Frequency < maxFrequency):
			return m, x, formatErr(name, -1, "captures[%d] core:frequency %g Hz is not a centre frequency (want 0 to 1 THz)", i, *c.Frequency)
		}
		x.captures = append(x.captures, *c.SampleStart)
	}
	if len(sm.Captures) > 0 {
		c := sm.Captures[0]
		if c.Frequency != nil {
			m.Center, m.HasCenter = *c.Frequency, true
		}
		prev, known := m.Center, m.HasCenter
		for _, c := range sm.Captures[1:] {
			if c.Frequency != nil && (!known || *c.Frequency != prev) {
				m.Retunes = append(m.Retunes, Retune{SampleStart: *c.SampleStart, Center: *c.Frequency})
				prev, known = *c.Frequency, true
			}
		}
		if c.Datetime != "" {
			t, err := time.Parse(time.RFC3339Nano, c.Datetime)
			if err != nil {
				return m, x, formatErr(name, -1, "captures[0] core:datetime %q is not ISO 8601 (want e.g. 2024-05-01T12:00:00Z)", c.Datetime)
			}
			m.Datetime = t
		}
	}
	for i, a := range sm.Annotations {
		if a.SampleStart == nil {
			return m, x, formatErr(name, -1, "annotations[%d] has no \"core:sample_start\"", i)
		}
		if *a.SampleStart < 0 || a.SampleCount != nil && *a.SampleCount < 0 {
			return m, x, formatErr(name, -1, "annotations[%d] has a negative sample start or count", i)
		}
		an := Annotation{SampleStart: *a.SampleStart, Label: a.Label, Comment: a.Comment}
		if a.SampleCount != nil {
			an.SampleCount = *a.SampleCount
		}
		if a.FreqLowerEdge != nil {
			an.FreqLowerEdge = *a.FreqLowerEdge
		}
		if a.FreqUpperEdge != nil {
			an.FreqUpperEdge = *a.FreqUpperEdge
		}
		if an.FreqLowerEdge > an.FreqUpperEdge {
			return m, x, formatErr(name, -1, "annotations[%d] core:freq_lower_edge %g is above core:freq_upper_edge %g", i, an.FreqLowerEdge, an.FreqUpperEdge)
		}
		end := an.SampleStart + an.SampleCount
		if end < an.SampleStart { // overflow
			end = math.MaxInt64
		}
		x.annEnds = append(x.annEnds, end)
		m.Annotations = append(m.Annotations, an)
	}
	return m, x, nil
}

// duplicateKey reports an object of the JSON document data (already
// known valid) that holds a key twice. encoding/json would keep the last
// value (and matches keys regardless of case), so a file saying two
// things about one field is refused rather than read as one of them.
func duplicateKey(name string, data []byte) error {
	d := json.NewDecoder(bytes.NewReader(data))
	// One entry per open object or array: the keys seen (nil for an
	// array) and whether the next string token is a key.
	type level struct {
		keys  map[string]bool
		isKey bool
	}
	var stack []level
	for {
		tok, err := d.Token()
		if err != nil {
			return nil // the end (the document was checked valid)
		}
		top := len(stack) - 1
		switch v := tok.(type) {
		case json.Delim:
			switch v {
			case '{':
				stack = append(stack, level{keys: map[string]bool{}, isKey: true})
				continue
			case '[':
				stack = append(stack, level{})
				continue
			default:
				stack = stack[:top]
			}
		case string:
			if top >= 0 && stack[top].keys != nil && stack[top].isKey {
				k := strings.ToLower(v)
				if stack[top].keys[k] {
					line, col := lineCol(data, d.InputOffset())
					return formatErr(name, -1, "key %s appears twice in one object (line %d, column %d)", quote(v), line, col)
				}
				stack[top].keys[k] = true
				stack[top].isKey = false
				continue
			}
		}
		// A value ended: the next string in an object is a key.
		if top = len(stack) - 1; top >= 0 && stack[top].keys != nil {
			stack[top].isKey = true
		}
	}
}

// jsonError turns a decoding error into a FormatError that says where.
func jsonError(name string, data []byte, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		line, col := lineCol(data, se.Offset-1) // Offset counts the bad byte
		return formatErr(name, -1, "invalid JSON at line %d, column %d: %v", line, col, se)
	case errors.As(err, &te):
		line, col := lineCol(data, te.Offset-1)
		return formatErr(name, -1, "line %d, column %d: %q should be %v, not a JSON %s", line, col, te.Field, te.Type, te.Value)
	}
	return formatErr(name, -1, "invalid JSON: %v", err)
}

func lineCol(data []byte, off int64) (line, col int) {
	off = min(max(off, 0), int64(len(data)))
	before := data[:off]
	line = 1 + bytes.Count(before, []byte("\n"))
	col = int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}

// WriteSigMFMeta writes SigMF v1.0.0 metadata for m: the global object
// (core:datatype, core:sample_rate, core:version, core:description,
// core:recorder), one capture segment at sample 0 with core:frequency and
// core:datetime when known, and m's annotations sorted by start as the
// specification asks. It returns an error if m.Datatype is not supported.
func WriteSigMFMeta(w io.Writer, m Meta) error {
	if !m.Datatype.Valid() {
		return &UnsupportedError{What: "SigMF datatype " + quote(string(m.Datatype))}
	}
	type kv struct {
		k string
		v any
	}
	global := []kv{
		{"core:datatype", string(m.Datatype)},
	}
	if m.Rate > 0 {
		global = append(global, kv{"core:sample_rate", m.Rate})
	}
	global = append(global, kv{"core:version", SigMFVersion})
	if m.Description != "" {
		global = append(global, kv{"core:description", m.Description})
	}
	global = append(global, kv{"core:recorder", "ssbkit"})
	capture := []kv{{"core:sample_start", 0}}
	if m.HasCenter {
		capture = append(capture, kv{"core:frequency", m.Center})
	}
	if !m.Datetime.IsZero() {
		capture = append(capture, kv{"core:datetime", m.Datetime.UTC().Format("2006-01-02T15:04:05.000Z")})
	}
	anns := append([]Annotation(nil), m.Annotations...)
	sort.SliceStable(anns, func(i, j int) bool { return anns[i].SampleStart < anns[j].SampleStart })

	var b strings.Builder
	obj := func(indent string, fields []kv) {
		b.WriteString("{")
		for i, f := range fields {
			if i > 0 {
				b.WriteString(",")
			}
			v, _ := json.Marshal(f.v)
			fmt.Fprintf(&b, "\n%s  %q: %s", indent, f.k, v)
		}
		fmt.Fprintf(&b, "\n%s}", indent)
	}
	b.WriteString("{\n  \"global\": ")
	obj("  ", global)
	b.WriteString(",\n  \"captures\": [\n    ")
	obj("    ", capture)
	b.WriteString("\n  ],\n  \"annotations\": [")
	for i, a := range anns {
		if i > 0 {
			b.WriteString(",")
		}
		f := []kv{{"core:sample_start", a.SampleStart}}
		if a.SampleCount > 0 {
			f = append(f, kv{"core:sample_count", a.SampleCount})
		}
		if a.FreqLowerEdge != 0 || a.FreqUpperEdge != 0 {
			f = append(f, kv{"core:freq_lower_edge", a.FreqLowerEdge}, kv{"core:freq_upper_edge", a.FreqUpperEdge})
		}
		if a.Label != "" {
			f = append(f, kv{"core:label", a.Label})
		}
		if a.Comment != "" {
			f = append(f, kv{"core:comment", a.Comment})
		}
		b.WriteString("\n    ")
		obj("    ", f)
	}
	if len(anns) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("]\n}\n")
	_, err := io.WriteString(w, b.String())
	return err
}
