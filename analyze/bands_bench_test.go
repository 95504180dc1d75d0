package analyze

import "testing"

// BenchmarkBandBankThirds runs a one-third-octave bank, 25 Hz to 20 kHz,
// over 10 s of 48 kHz mono noise (the figure per op is for 10 s).
func BenchmarkBandBankThirds(b *testing.B) {
	benchBank(b, BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 25, ToHz: 20000})
}

// BenchmarkOneThirdBandFullRate runs the 1 kHz third alone at the file's
// rate over the same 10 s: the cost the whole multirate bank is compared
// with ("a small multiple of one band's").
func BenchmarkOneThirdBandFullRate(b *testing.B) {
	benchBank(b, BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 1000, ToHz: 1000, FullRate: true})
}

// BenchmarkBandBankThirdsFullRate is BenchmarkBandBankThirds with every
// band at the file's rate (no decimation).
func BenchmarkBandBankThirdsFullRate(b *testing.B) {
	benchBank(b, BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 25, ToHz: 20000, FullRate: true})
}

// benchBank runs the bank o over 10 s of 48 kHz mono noise per op.
func benchBank(b *testing.B, o BankOptions) {
	x := bankNoise(480000, 1)
	bank, err := NewBandBank(o)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(x) * 8))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		runBank(bank, x)
	}
}
