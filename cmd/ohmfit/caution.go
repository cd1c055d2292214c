package main

import (
	"io"

	"github.com/ohmfit/ohmfit/constraints/ratings"
)

// writeCautions prints the watch's cautions to w (stderr: they must not mix
// with a machine-readable result).
func writeCautions(out io.Writer, w *ratings.Watch) {
	for _, c := range w.Cautions() {
		cautionLine(out, c)
	}
}
