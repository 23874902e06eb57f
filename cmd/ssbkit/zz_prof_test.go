package main
import ("testing";"os")
func BenchmarkRxFT(b *testing.B) {
	cap := os.Getenv("CAP"); off := os.Getenv("OFF")
	for _, ft := range []string{"--fine-tune=false", "--fine-tune"} {
		b.Run(ft, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				runCmd(&testing.T{}, "rx", cap, "--rate", "2.4M", "--offset", off, "--agc", "off", "-q", ft, "-o", "/tmp/vp.wav", "--force")
			}
		})
	}
}
