//go:build tools

// This file pins the project dependencies that no package imports yet.

package main
import (
 _ "github.com/go-audio/wav"
 _ "github.com/go-audio/audio"
 _ "gonum.org/v1/gonum/dsp/fourier"
 _ "github.com/spf13/pflag"
 _ "gonum.org/v1/plot"
 _ "gonum.org/v1/plot/vg/vgsvg"
 _ "gonum.org/v1/plot/vg/vgimg"
 _ "github.com/schollz/progressbar/v3"
)
func main(){}
