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

// BenchmarkOneThirdBandFullRate runs the 1 kHz third alone at the file's
// rate over the same 10 s: the cost the whole multirate bank is compared
// with ("a small multiple of one band's").
func BenchmarkOneThirdBandFullRate(b *testing.B) {
	x := bankNoise(480000, 1)
	bank, err := NewBandBank(BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 1000, ToHz: 1000, FullRate: true})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(x) * 8))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		runBank(bank, x)
	}
}

// BenchmarkBandBankThirdsFullRate is BenchmarkBandBankThirds with every
// band at the file's rate (no decimation).
func BenchmarkBandBankThirdsFullRate(b *testing.B) {
	x := bankNoise(480000, 1)
	bank, err := NewBandBank(BankOptions{SampleRate: 48000, Channels: 1, Fraction: 3, FromHz: 25, ToHz: 20000, FullRate: true})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(x) * 8))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		runBank(bank, x)
	}
}
