//go:build !unix

package wavio

import "os"

func openNoBlock(name string) (*os.File, error) { return os.Open(name) }
