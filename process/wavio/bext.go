package wavio

import (
	"bytes"
	"fmt"
)

// bextHistoryOffset is where CodingHistory starts in a bext chunk body:
// Description 256, Originator 32, OriginatorReference 32, OriginationDate
// 10, OriginationTime 8, TimeReference 8, Version 2, UMID 64, five loudness
// fields of 2 bytes and 180 reserved bytes (EBU Tech 3285 v2, section 2.3).
const bextHistoryOffset = 602

// AppendCodingHistory returns a copy of the bext chunk body with line
// appended to its CodingHistory, after dropping the NUL padding some
// writers leave at its end. A line without a final CR LF gets one (EBU
// R 98 ends each line with CR LF).
func AppendCodingHistory(bext []byte, line string) ([]byte, error) {
	if len(bext) < bextHistoryOffset {
		return nil, FormatError(fmt.Sprintf("bext chunk: %d bytes, need %d", len(bext), bextHistoryOffset))
	}
	hist := bytes.TrimRight(bext[bextHistoryOffset:], "\x00")
	out := make([]byte, 0, bextHistoryOffset+len(hist)+len(line)+2)
	out = append(out, bext[:bextHistoryOffset]...)
	out = append(out, hist...)
	out = append(out, line...)
	if !bytes.HasSuffix(out, []byte("\r\n")) {
		out = append(out, '\r', '\n')
	}
	return out, nil
}

// CodingHistoryLine formats a CodingHistory line in the form of EBU R 98:
// A= coding algorithm, F= sampling frequency, W= word length, M= mode,
// T= free text, comma separated and ended by CR LF. For example:
//
//	A=PCM,F=48000,W=24,M=stereo,T=wavsieve filter\r\n
//
// The mode is "mono" or "stereo" for one or two channels (R 98); R 98 has
// no code for more channels, so "multichannel" is used (from memory of
// R 98's list; not checked against the text). Float output is written
// A=PCM with its word length, as R 98 has no float code (common practice).
func CodingHistoryLine(f Format, text string) string {
	mode := "multichannel"
	switch f.Channels {
	case 1:
		mode = "mono"
	case 2:
		mode = "stereo"
	}
	bits := f.ValidBits
	if bits == 0 {
		bits = f.Bits
	}
	return fmt.Sprintf("A=PCM,F=%d,W=%d,M=%s,T=%s\r\n", f.SampleRate, bits, mode, text)
}
