package modem

import "testing"

// FuzzParseModeAGC: the --mode and --agc parsers accept exactly the names
// their String methods print, and nothing else.
func FuzzParseModeAGC(f *testing.F) {
	for _, s := range []string{"usb", "lsb", "am", "sam", "off", "slow", "medium", "fast", "USB", " am", "", "Mode(9)"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if m, err := ParseMode(s); err == nil && m.String() != s {
			t.Fatalf("ParseMode(%q) = %v", s, m)
		}
		if a, err := ParseAGC(s); err == nil && a.String() != s {
			t.Fatalf("ParseAGC(%q) = %v", s, a)
		}
	})
}
