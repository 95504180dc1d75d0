package analyze

import "testing"

// BenchmarkBandBankThirds runs a one-third-octave bank, 25 Hz to 20 kHz,
// over 10 s of 48 kHz mono noise (the figure per op is for 10 s).
func BenchmarkBandBankThirds(b *testing.B) {
	x := bankNoise(480000, 1)
	bank, err := NewBandBank(BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 25, ToHz: 20000})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(x) * 8))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		runBank(bank, x)
	}
}
