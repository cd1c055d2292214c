package main

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
)

// object is a JSON object written with its keys in the order given.
// encoding/json sorts map keys, but the contract promises template order for
// nodes and parts, and a fixed key order reads better everywhere else too.
type object []member

// member is one key and value of an object.
type member struct {
	Key   string
	Value any
}

// MarshalJSON writes the members in order. Values go through encoding/json,
// which writes float64 in the shortest form that reads back exactly.
func (o object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, m := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		if err := encodeTo(&b, m.Key); err != nil {
			return nil, err
		}
		b.WriteByte(':')
		if f, ok := m.Value.(float64); ok && (math.IsNaN(f) || math.IsInf(f, 0)) {
			// JSON has no NaN or infinity: a figure the design does not
			// define is null, as the table shows it undefined, and the
			// report's warnings say which (the same exit code and story in
			// every format).
			b.WriteString("null")
			continue
		}
		if err := encodeTo(&b, m.Value); err != nil {
			return nil, err
		}
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// writeJSON writes v indented, with a final newline, and without the HTML
// escaping encoding/json does by default (names like "a<b" stay readable).
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

// encodeTo appends v's JSON to b without HTML escaping and without the
// newline json.Encoder adds. json.Marshal would escape "<" as \u003c, and
// the outer encoder cannot undo that.
func encodeTo(b *bytes.Buffer, v any) error {
	enc := json.NewEncoder(b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return err
	}
	b.Truncate(b.Len() - 1)
	return nil
}
