//go:build unix

package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"flag"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"time"
)

// The hostile-input campaign: files and command lines that are cut,
// damaged, contradictory or absurd, generated here at test time (no
// committed binaries). Every case must end with the exit code of the
// design (1 failure, 2 usage), exactly one stderr line "ssbkit: CMD: WHY"
// that names the file (or flag) and the fault, nothing on standard
// output, no file written or changed in the case's folder (so no output,
// no temporary file, inputs untouched), no panic and no unbounded work.
// docs/hostile-inputs.md is the table of the cases and their messages;
// go test ./cmd/ssbkit -run TestHostileInputs -update-hostile rewrites it.

var updateHostile = flag.Bool("update-hostile", false, "rewrite docs/hostile-inputs.md from the hostile-input campaign")

// hostileDoc is the table of the campaign, relative to this package.
const hostileDoc = "../../docs/hostile-inputs.md"

// hostileTimeout bounds one case: a refusal takes milliseconds, so a case
// still running after it is unbounded work (a hang guard, not a speed goal).
const hostileTimeout = 60 * time.Second

// hostileCase is one hostile input.
type hostileCase struct {
	group string            // reader or flag family, for the table
	what  string            // what is wrong
	files map[string][]byte // inputs written to the case's folder
	setup func(t *testing.T) (skip string)
	stdin []byte
	args  []string // run in the case's folder
	exit  int
	names string // what the message must name: the file or the flag
	why   string // what the message must say is wrong
}

// Builders of hostile files.

// cf32Tone returns n samples of a complex tone of amplitude 0.5 at 1 kHz
// and 48 kHz, as cf32_le bytes.
func cf32Tone(n int) []byte {
	b := make([]byte, 0, 8*n)
	for i := range n {
		p := 2 * math.Pi * 1000 * float64(i) / 48000
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(float32(0.5*math.Cos(p))))
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(float32(0.5*math.Sin(p))))
	}
	return b
}

// riffChunk is one chunk of a RIFF file; size < 0 means the body's length.
type riffChunk struct {
	id   string
	size int64
	body []byte
}

// riff returns a RIFF/WAVE file of the chunks, each padded to even length.
func riff(chunks ...riffChunk) []byte {
	le := binary.LittleEndian
	b := []byte("RIFF\x00\x00\x00\x00WAVE")
	for _, c := range chunks {
		b = append(b, c.id...)
		size := c.size
		if size < 0 {
			size = int64(len(c.body))
		}
		b = le.AppendUint32(b, uint32(size))
		b = append(b, c.body...)
		if len(c.body)%2 == 1 {
			b = append(b, 0)
		}
	}
	le.PutUint32(b[4:], uint32(len(b)-8))
	return b
}

// fmtBody returns a plain fmt chunk body (16 bytes).
func fmtBody(tag, ch int, rate uint32, bits int) []byte {
	le := binary.LittleEndian
	var b []byte
	b = le.AppendUint16(b, uint16(tag))
	b = le.AppendUint16(b, uint16(ch))
	b = le.AppendUint32(b, rate)
	b = le.AppendUint32(b, rate*uint32(ch*bits/8))
	b = le.AppendUint16(b, uint16(ch*bits/8))
	b = le.AppendUint16(b, uint16(bits))
	return b
}

// fmtExtensible returns a WAVE_FORMAT_EXTENSIBLE fmt body with the
// 16-byte sub-format GUID guid.
func fmtExtensible(ch int, rate uint32, bits int, guid []byte) []byte {
	le := binary.LittleEndian
	b := fmtBody(0xFFFE, ch, rate, bits)
	b = le.AppendUint16(b, 22)
	b = le.AppendUint16(b, uint16(bits))
	b = le.AppendUint32(b, 3)
	return append(b, guid...)
}

// wavIQ is a valid two-channel 16-bit I/Q WAV of n frames at rate.
func wavIQ(rate uint32, n int) []byte {
	return riff(riffChunk{"fmt ", -1, fmtBody(1, 2, rate, 16)}, riffChunk{"data", -1, make([]byte, 4*n)})
}

// meta returns SigMF metadata with the global fields g and the captures
// and annotations arrays given as JSON text.
func meta(g, captures, annotations string) []byte {
	return []byte(`{"global":{` + g + `},"captures":[` + captures + `],"annotations":[` + annotations + `]}`)
}

const okGlobal = `"core:datatype":"cf32_le","core:sample_rate":48000,"core:version":"1.0.0"`

func hostileCases() []hostileCase {
	x := cf32Tone(4800) // 0.1 s at 48 kHz
	capture := map[string][]byte{"x.cf32": x}
	with := func(m map[string][]byte, name string, b []byte) map[string][]byte {
		out := map[string][]byte{name: b}
		for k, v := range m {
			out[k] = v
		}
		return out
	}
	sigmf := func(name string, metaJSON []byte, data []byte) map[string][]byte {
		return map[string][]byte{name + ".sigmf-meta": metaJSON, name + ".sigmf-data": data}
	}
	mono := riff(riffChunk{"fmt ", -1, fmtBody(1, 1, 48000, 16)}, riffChunk{"data", -1, make([]byte, 2*4800)})
	unknownGUID := []byte{0x01, 0, 0, 0, 0, 0, 0x10, 0, 0x80, 0, 0, 0xAA, 0, 0x38, 0x9B, 0x72}
	return []hostileCase{
		// Raw files and standard input.
		{group: "raw", what: "cu8 with a partial last sample", files: map[string][]byte{"cut.cu8": {1, 2, 3}},
			args: []string{"info", "cut.cu8", "--rate", "48k"}, exit: 1, names: "cut.cu8", why: "1 byte left over"},
		{group: "raw", what: "ci16 with a partial last sample", files: map[string][]byte{"cut.cs16": make([]byte, 4*10+3)},
			args: []string{"convert", "cut.cs16", "--rate", "48k", "out.cf32"}, exit: 1, names: "cut.cs16", why: "3 bytes left over"},
		{group: "raw", what: "cf32 with a partial last sample", files: map[string][]byte{"cut.cf32": x[:len(x)-3]},
			args: []string{"measure", "cut.cf32", "--rate", "48k"}, exit: 1, names: "cut.cf32", why: "5 bytes left over"},
		{group: "raw", what: "ci8 with a partial last sample", files: map[string][]byte{"cut.cs8": make([]byte, 4097)},
			args: []string{"spectrum", "cut.cs8", "--rate", "48k", "-o", "s.png"}, exit: 1, names: "cut.cs8", why: "1 byte left over"},
		{group: "raw", what: "rf32 (real) with a partial last sample", files: map[string][]byte{"cut.raw": make([]byte, 4*50+3)},
			args: []string{"rx", "cut.raw", "--format", "rf32", "--rate", "48k", "--offset", "1000", "-o", "a.wav"}, exit: 1, names: "cut.raw", why: "3 bytes left over"},
		{group: "raw", what: "ri16 (real) with a partial last sample", files: map[string][]byte{"cut.ci16": make([]byte, 2*50+1)},
			args: []string{"info", "cut.ci16", "--format", "ri16", "--rate", "48k"}, exit: 1, names: "cut.ci16", why: "1 byte left over"},
		{group: "raw", what: "zero-length file", files: map[string][]byte{"empty.cf32": nil},
			args: []string{"rx", "empty.cf32", "--rate", "48k", "-o", "a.wav"}, exit: 1, names: "empty.cf32", why: "empty file"},
		{group: "raw", what: "one-byte file", files: map[string][]byte{"one.ci16": {7}},
			args: []string{"info", "one.ci16", "--rate", "48k"}, exit: 1, names: "one.ci16", why: "size 1 byte is not a whole number"},
		{group: "raw", what: "a folder given as a capture",
			setup: func(t *testing.T) string { return mkdir(t, "folder.cf32") },
			args:  []string{"convert", "folder.cf32", "--rate", "48k", "out.cu8"}, exit: 1, names: "folder.cf32", why: "is a folder"},
		{group: "raw", what: "a named pipe (FIFO) given as a capture",
			setup: func(t *testing.T) string { return mkfifo(t, "pipe.cu8") },
			args:  []string{"info", "pipe.cu8", "--rate", "48k"}, exit: 1, names: "pipe.cu8", why: "is a named pipe"},
		{group: "raw", what: "/dev/zero given as a raw file",
			args: []string{"spectrum", "/dev/zero", "--format", "cu8", "--rate", "48k", "--list"}, exit: 1, names: "/dev/zero", why: "is a device"},
		{group: "raw", what: "standard input ending inside a sample", stdin: make([]byte, 4*100+2),
			args: []string{"info", "-", "--format", "ci16", "--rate", "48k"}, exit: 1, names: "standard input", why: "ends inside a sample"},
		{group: "raw", what: "empty standard input",
			args: []string{"convert", "-", "--format", "cf32", "--rate", "48k", "out.cf32"}, exit: 1, names: "standard input", why: "no samples"},
		{group: "raw", what: "standard input without --format",
			args: []string{"rx", "-", "--rate", "48k", "-o", "a.wav"}, exit: 1, names: "standard input", why: "--format"},
		{group: "raw", what: "missing file",
			args: []string{"measure", "nothere.cu8", "--rate", "48k"}, exit: 1, names: "nothere.cu8", why: "no such file"},
		{group: "raw", what: "unknown extension without --format", files: map[string][]byte{"capture.bin": make([]byte, 64)},
			args: []string{"info", "capture.bin", "--rate", "48k"}, exit: 1, names: "capture.bin", why: "unknown extension"},
		{group: "raw", what: "raw file without --rate", files: capture,
			args: []string{"convert", "x.cf32", "out.wav"}, exit: 1, names: "x.cf32", why: "give --rate"},

		// WAV.
		{group: "wav", what: "data chunk larger than the file", files: map[string][]byte{"long.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 16)}, riffChunk{"data", 1 << 30, make([]byte, 400)})},
			args: []string{"info", "long.wav"}, exit: 1, names: "long.wav", why: "runs past the end"},
		{group: "wav", what: "data chunk of size zero", files: map[string][]byte{"zero.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 16)}, riffChunk{"data", 0, nil})},
			args: []string{"measure", "zero.wav"}, exit: 1, names: "zero.wav", why: "no samples"},
		{group: "wav", what: "data chunk of an odd size (not whole frames)", files: map[string][]byte{"odd.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 16)}, riffChunk{"data", -1, make([]byte, 403)})},
			args: []string{"rx", "odd.wav", "-o", "a.wav"}, exit: 1, names: "odd.wav", why: "not a whole number of 4-byte frames"},
		{group: "wav", what: "a chunk larger than the file before fmt", files: map[string][]byte{"list.wav": riff(riffChunk{"LIST", 1 << 31, []byte("abcd")}, riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 16)})},
			args: []string{"convert", "list.wav", "out.cf32"}, exit: 1, names: "list.wav", why: "cut short"},
		{group: "wav", what: "fmt chunk with an absurd size", files: map[string][]byte{"fmtsize.wav": riff(riffChunk{"fmt ", 0xFFFFFFF0, fmtBody(1, 2, 48000, 16)})},
			args: []string{"spectrum", "fmtsize.wav", "--list"}, exit: 1, names: "fmtsize.wav", why: "fmt chunk size 4294967280"},
		{group: "wav", what: "no fmt chunk (data first)", files: map[string][]byte{"nofmt.wav": riff(riffChunk{"data", -1, make([]byte, 400)})},
			args: []string{"spectrum", "nofmt.wav", "-o", "s.png"}, exit: 1, names: "nofmt.wav", why: "data chunk before fmt chunk"},
		{group: "wav", what: "no data chunk", files: map[string][]byte{"nodata.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 16)})},
			args: []string{"rx", "nodata.wav", "-o", "a.wav"}, exit: 1, names: "nodata.wav", why: "no data chunk"},
		{group: "wav", what: "extensible header with an unknown sub-format", files: map[string][]byte{"ext.wav": riff(riffChunk{"fmt ", -1, fmtExtensible(2, 48000, 16, unknownGUID)}, riffChunk{"data", -1, make([]byte, 400)})},
			args: []string{"info", "ext.wav"}, exit: 1, names: "ext.wav", why: "unsupported WAV sub-format {00000001-0000-0010-8000-00AA00389B72}"},
		{group: "wav", what: "sample rate 0 Hz", files: map[string][]byte{"rate0.wav": wavIQ(0, 100)},
			args: []string{"convert", "rate0.wav", "out.cf32"}, exit: 1, names: "rate0.wav", why: "sample rate is 0"},
		{group: "wav", what: "sample rate 1 GHz", files: map[string][]byte{"rate1g.wav": wavIQ(1e9, 100)},
			args: []string{"measure", "rate1g.wav"}, exit: 1, names: "rate1g.wav", why: "sample rate 1000000000 Hz is out of range"},
		{group: "wav", what: "three channels", files: map[string][]byte{"three.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 3, 48000, 16)}, riffChunk{"data", -1, make([]byte, 600)})},
			args: []string{"measure", "three.wav"}, exit: 1, names: "three.wav", why: "3 channels"},
		{group: "wav", what: "8-bit PCM", files: map[string][]byte{"eight.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 2, 48000, 8)}, riffChunk{"data", -1, make([]byte, 200)})},
			args: []string{"info", "eight.wav"}, exit: 1, names: "eight.wav", why: "sample size 8 bits"},
		{group: "wav", what: "64-bit float", files: map[string][]byte{"f64.wav": riff(riffChunk{"fmt ", -1, fmtBody(3, 2, 48000, 64)}, riffChunk{"data", -1, make([]byte, 1600)})},
			args: []string{"rx", "f64.wav", "-o", "a.wav"}, exit: 1, names: "f64.wav", why: "sample size 64 bits"},
		{group: "wav", what: "not a RIFF file", files: map[string][]byte{"text.wav": []byte("this is not a wave file at all")},
			args: []string{"info", "text.wav"}, exit: 1, names: "text.wav", why: "not a WAV file"},
		{group: "wav", what: "block align contradicting channels and bits", files: map[string][]byte{"align.wav": riff(riffChunk{"fmt ", -1, append(fmtBody(1, 2, 48000, 16)[:12], 3, 0, 16, 0)}, riffChunk{"data", -1, make([]byte, 400)})},
			args: []string{"convert", "align.wav", "out.cf32"}, exit: 1, names: "align.wav", why: "block align 3"},
		{group: "wav", what: "header cut after 5 bytes", files: map[string][]byte{"short.wav": []byte("RIFF\x00")},
			args: []string{"info", "short.wav"}, exit: 1, names: "short.wav", why: "too short"},
		{group: "wav", what: "tx audio: data chunk larger than the file", files: map[string][]byte{"voice.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 1, 48000, 16)}, riffChunk{"data", 1 << 30, make([]byte, 400)})},
			args: []string{"tx", "voice.wav", "-o", "out.cf32"}, exit: 1, names: "voice.wav", why: "runs past the end"},
		{group: "wav", what: "tx audio: three channels", files: map[string][]byte{"voice3.wav": riff(riffChunk{"fmt ", -1, fmtBody(1, 3, 48000, 16)}, riffChunk{"data", -1, make([]byte, 600)})},
			args: []string{"tx", "voice3.wav", "-o", "out.cf32"}, exit: 1, names: "voice3.wav", why: "3 channels"},
		{group: "wav", what: "tx audio: a named pipe",
			setup: func(t *testing.T) string { return mkfifo(t, "voice.wav") },
			args:  []string{"tx", "voice.wav", "-o", "out.cf32"}, exit: 1, names: "voice.wav", why: "is a named pipe"},
		{group: "wav", what: "real recording tuned to a negative offset", files: map[string][]byte{"mono.wav": mono},
			args: []string{"rx", "mono.wav", "--offset", "-1000", "-o", "a.wav"}, exit: 1, names: "mono.wav", why: "offsets are positive audio frequencies"},

		// SigMF.
		{group: "sigmf", what: "data file without its metadata", files: map[string][]byte{"rec.sigmf-data": x},
			args: []string{"info", "rec.sigmf-data"}, exit: 1, names: "rec.sigmf-meta", why: "no such file"},
		{group: "sigmf", what: "metadata without its data file", files: map[string][]byte{"rec.sigmf-meta": meta(okGlobal, `{"core:sample_start":0}`, "")},
			args: []string{"spectrum", "rec.sigmf-meta", "--list"}, exit: 1, names: "rec.sigmf-data", why: "no such file"},
		{group: "sigmf", what: "missing core:datatype", files: sigmf("rec", meta(`"core:sample_rate":48000,"core:version":"1.0.0"`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: `no global "core:datatype"`},
		{group: "sigmf", what: "unknown core:datatype", files: sigmf("rec", meta(`"core:datatype":"cf64_le","core:sample_rate":48000`, "", ""), x),
			args: []string{"measure", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: `core:datatype "cf64_le"`},
		{group: "sigmf", what: "duplicate core:sample_rate", files: sigmf("rec", []byte("{\"global\":{\"core:datatype\":\"cf32_le\",\n\"core:sample_rate\":48000,\n\"core:sample_rate\":96000}}"), x),
			args: []string{"rx", "rec.sigmf-meta", "-o", "a.wav"}, exit: 1, names: "rec.sigmf-meta", why: `key "core:sample_rate" appears twice`},
		{group: "sigmf", what: "duplicate key differing only in case", files: sigmf("rec", []byte(`{"global":{"core:datatype":"cf32_le","CORE:DATATYPE":"cu8","core:sample_rate":48000}}`), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: `key "CORE:DATATYPE" appears twice`},
		{group: "sigmf", what: "captures out of order", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":100},{"core:sample_start":0}`, ""), x),
			args: []string{"convert", "rec.sigmf-meta", "out.cf32"}, exit: 1, names: "rec.sigmf-meta", why: "captures[1] core:sample_start 0 does not come after"},
		{group: "sigmf", what: "annotation edges contradicting (lower above upper)", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0}`, `{"core:sample_start":0,"core:freq_lower_edge":7.2e6,"core:freq_upper_edge":7.1e6}`), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "core:freq_lower_edge 7.2e+06 is above"},
		{group: "sigmf", what: "two channels", files: sigmf("rec", meta(okGlobal+`,"core:num_channels":2`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "core:num_channels 2"},
		{group: "sigmf", what: "huge core:sample_start", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0},{"core:sample_start":9000000000000000000}`, ""), x),
			args: []string{"spectrum", "rec.sigmf-meta", "--list"}, exit: 1, names: "rec.sigmf-meta", why: "captures[1] begins at sample 9000000000000000000 but rec.sigmf-data holds 4800 samples"},
		{group: "sigmf", what: "negative core:sample_start", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":-5}`, ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "core:sample_start -5 is negative"},
		{group: "sigmf", what: "data shorter than an annotation says", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0}`, `{"core:sample_start":4000,"core:sample_count":48000}`), x),
			args: []string{"convert", "rec.sigmf-meta", "out.wav"}, exit: 1, names: "rec.sigmf-meta", why: "annotations[0] runs to sample 52000 but rec.sigmf-data holds 4800 samples"},
		{group: "sigmf", what: "negative centre frequency", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0,"core:frequency":-7.1e6}`, ""), x),
			args: []string{"rx", "rec.sigmf-meta", "-o", "a.wav"}, exit: 1, names: "rec.sigmf-meta", why: "core:frequency -7.1e+06 Hz is not a centre frequency"},
		{group: "sigmf", what: `NaN as a string for core:sample_rate`, files: sigmf("rec", meta(`"core:datatype":"cf32_le","core:sample_rate":"NaN"`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: `"global.core:sample_rate" should be float64, not a JSON string`},
		{group: "sigmf", what: "infinite core:sample_rate (1e999)", files: sigmf("rec", meta(`"core:datatype":"cf32_le","core:sample_rate":1e999`, "", ""), x),
			args: []string{"measure", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "number 1e999"},
		{group: "sigmf", what: "a string for core:frequency", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0,"core:frequency":"7.1M"}`, ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "should be float64, not a JSON string"},
		{group: "sigmf", what: "core:sample_rate 0", files: sigmf("rec", meta(`"core:datatype":"cf32_le","core:sample_rate":0`, "", ""), x),
			args: []string{"spectrum", "rec.sigmf-meta", "-o", "s.png"}, exit: 1, names: "rec.sigmf-meta", why: "core:sample_rate 0 is not a positive rate"},
		{group: "sigmf", what: "core:sample_rate 100 GHz", files: sigmf("rec", meta(`"core:datatype":"cf32_le","core:sample_rate":1e11`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "sample rate 1e+11 Hz is out of range"},
		{group: "sigmf", what: "no core:sample_rate and no --rate", files: sigmf("rec", meta(`"core:datatype":"cf32_le"`, "", ""), x),
			args: []string{"rx", "rec.sigmf-meta", "-o", "a.wav"}, exit: 1, names: "rec.sigmf-meta", why: "no core:sample_rate"},
		{group: "sigmf", what: "metadata pointing outside its folder", files: sigmf("rec", meta(okGlobal+`,"core:dataset":"../secret.sigmf-data"`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "points outside the metadata's folder"},
		{group: "sigmf", what: "non-conforming dataset", files: sigmf("rec", meta(okGlobal+`,"core:dataset":"other.bin"`, "", ""), x),
			args: []string{"convert", "rec.sigmf-meta", "out.cf32"}, exit: 1, names: "rec.sigmf-meta", why: "non-conforming dataset"},
		{group: "sigmf", what: "header bytes in the dataset", files: sigmf("rec", meta(okGlobal, `{"core:sample_start":0,"core:header_bytes":512}`, ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "core:header_bytes 512"},
		{group: "sigmf", what: "metadata-only recording", files: sigmf("rec", meta(okGlobal+`,"core:metadata_only":true`, "", ""), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "core:metadata_only"},
		{group: "sigmf", what: "invalid JSON", files: sigmf("rec", []byte("{\"global\":{\n\"core:datatype\":\"cf32_le\",,}}"), x),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "invalid JSON at line 2"},
		{group: "sigmf", what: "empty metadata file", files: sigmf("rec", nil, x),
			args: []string{"measure", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "empty metadata file"},
		{group: "sigmf", what: "data file with a partial last sample", files: sigmf("rec", meta(okGlobal, "", ""), x[:len(x)-1]),
			args: []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-data", why: "7 bytes left over"},
		{group: "sigmf", what: "SigMF archive (tar)", files: map[string][]byte{"rec.sigmf": make([]byte, 1024)},
			args: []string{"info", "rec.sigmf"}, exit: 1, names: "rec.sigmf", why: "unsupported SigMF archive"},
		{group: "sigmf", what: "metadata that is a named pipe",
			setup: func(t *testing.T) string { return mkfifo(t, "rec.sigmf-meta") },
			args:  []string{"info", "rec.sigmf-meta"}, exit: 1, names: "rec.sigmf-meta", why: "is a named pipe"},

		// Flags: rates, frequencies beyond Nyquist, absurd lengths.
		{group: "flags", what: "--rate 0", files: capture,
			args: []string{"info", "x.cf32", "--rate", "0"}, exit: 2, names: "--rate 0", why: "want a sample rate from 1 kHz to 500 MHz"},
		{group: "flags", what: "--rate negative", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "-48k", "-o", "a.wav"}, exit: 2, names: "--rate -48k", why: "want a sample rate"},
		{group: "flags", what: "--rate NaN", files: capture,
			args: []string{"spectrum", "x.cf32", "--rate", "NaN", "--list"}, exit: 2, names: "--rate", why: "not finite"},
		{group: "flags", what: "--rate 1e300", files: capture,
			args: []string{"convert", "x.cf32", "--rate", "1e300", "out.cu8"}, exit: 2, names: "--rate 1e300", why: "want a sample rate"},
		{group: "flags", what: "--rate 1 Hz", files: capture,
			args: []string{"measure", "x.cf32", "--rate", "1"}, exit: 2, names: "--rate 1", why: "want a sample rate"},
		{group: "flags", what: "tx --rate 0",
			args: []string{"tx", "--tone", "1k", "--rate", "0", "-o", "out.cf32"}, exit: 2, names: "--rate 0", why: "want a sample rate"},
		{group: "flags", what: "sweep --rate NaN",
			args: []string{"sweep", "--rate", "NaN"}, exit: 2, names: "--rate", why: "not finite"},
		{group: "flags", what: "splitter --rate negative",
			args: []string{"splitter", "--rate", "-8000"}, exit: 2, names: "--rate -8000", why: "want a sample rate"},
		{group: "flags", what: "test tone beyond the output's Nyquist frequency",
			args: []string{"tx", "--tone", "5k", "--band", "off", "--rate", "8k", "-o", "out.cf32"}, exit: 2, names: "test tone 5000 Hz", why: "above half the output rate"},
		{group: "flags", what: "tx --offset beyond Nyquist",
			args: []string{"tx", "--tone", "1k", "--offset", "30k", "-o", "out.cf32"}, exit: 2, names: "--offset 30000", why: "beyond the output's Nyquist band"},
		{group: "flags", what: "rx --offset beyond Nyquist", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--offset", "30k", "-o", "a.wav"}, exit: 1, names: "30000", why: "capture band"},
		{group: "flags", what: "measure --offset beyond Nyquist", files: capture,
			args: []string{"measure", "x.cf32", "--rate", "48k", "--offset", "30k"}, exit: 1, names: "x.cf32", why: "carrier offset 30000 Hz is outside the capture"},
		{group: "flags", what: "tx --seconds absurd",
			args: []string{"tx", "--tone", "1k", "--seconds", "1e9", "-o", "out.cf32"}, exit: 2, names: "--seconds 1e+09", why: "at most 3600"},
		{group: "flags", what: "tx --taps absurd",
			args: []string{"tx", "--tone", "1k", "--taps", "1000000001", "-o", "out.cf32"}, exit: 2, names: "taps", why: "3 to 2047"},
		{group: "flags", what: "tx --sections absurd",
			args: []string{"tx", "--tone", "1k", "--sections", "100000", "-o", "out.cf32"}, exit: 2, names: "sections", why: "1 to 16"},
		{group: "flags", what: "sweep --taps range of a billion lengths",
			args: []string{"sweep", "--taps", "7:1000000000:2"}, exit: 2, names: "--taps", why: "too many lengths"},
		{group: "flags", what: "sweep --sections absurd",
			args: []string{"sweep", "--designs", "allpass", "--sections", "1:1000000:1"}, exit: 2, names: "--sections", why: "too many lengths"},
		{group: "flags", what: "analog --r-tol of 60 %",
			args: []string{"analog", "--r-tol", "60"}, exit: 2, names: "--r-tol", why: "tolerance"},
		{group: "flags", what: "analog --series not of IEC 60063",
			args: []string{"analog", "--series", "E7"}, exit: 2, names: "--series", why: "unknown series"},
		{group: "flags", what: "splitter --taps absurd",
			args: []string{"splitter", "--taps", "100000001"}, exit: 2, names: "taps", why: "3 to 2047"},
		{group: "flags", what: "splitter --design fft with a billion-point block",
			args: []string{"splitter", "--design", "fft", "--taps", "1073741824"}, exit: 2, names: "fft block size", why: "8 to 1048576"},
		{group: "flags", what: "spectrum picture of absurd size", files: capture,
			args: []string{"spectrum", "x.cf32", "--rate", "48k", "--width", "100000", "-o", "s.png"}, exit: 2, names: "--width 100000", why: "want 200 to 4000 points"},
		{group: "flags", what: "spectrum --rows absurd", files: capture,
			args: []string{"spectrum", "x.cf32", "--rate", "48k", "--rows", "1000000000", "-o", "s.png"}, exit: 2, names: "--rows", why: "want 1…4000"},
		{group: "flags", what: "spectrum --resolution coarser than the rate", files: capture,
			args: []string{"spectrum", "x.cf32", "--rate", "48k", "--resolution", "1G", "--list"}, exit: 2, names: "--resolution", why: "coarser"},
		{group: "flags", what: "measure --resolution finer than the capture allows", files: capture,
			args: []string{"measure", "x.cf32", "--rate", "48k", "--resolution", "1e-6"}, exit: 1, names: "x.cf32", why: "use a resolution of"},
		{group: "flags", what: "rx --bandwidth absurd", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--bandwidth", "1e12", "-o", "a.wav"}, exit: 2, names: "1e+12 Hz", why: "cannot carry"},
		{group: "flags", what: "rx --bandwidth of a hundredth of a hertz", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--mode", "am", "--bandwidth", "0.01", "-o", "a.wav"}, exit: 2, names: "--bandwidth 0.01", why: "at least 100 Hz"},
		{group: "flags", what: "rx --audio-rate absurd", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--audio-rate", "1G", "-o", "a.wav"}, exit: 2, names: "--audio-rate", why: "8k to 384k"},
		{group: "flags", what: "tx --center NaN",
			args: []string{"tx", "--tone", "1k", "--center", "NaN", "-o", "out.sigmf-meta"}, exit: 2, names: "--center", why: "not finite"},
		{group: "flags", what: "rx --freq without a centre frequency", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--freq", "7.1M", "-o", "a.wav"}, exit: 2, names: "--freq 7.1M", why: "centre frequency is unknown"},
		{group: "flags", what: "--format of an unknown type", files: capture,
			args: []string{"info", "x.cf32", "--format", "cf64", "--rate", "48k"}, exit: 2, names: "--format", why: `"cf64"`},
		{group: "flags", what: "measure --band reversed", files: capture,
			args: []string{"measure", "x.cf32", "--rate", "48k", "--band", "3000:100"}, exit: 2, names: "--band", why: "LOW must be below HIGH"},

		// Outputs.
		{group: "output", what: "output equal to the input", files: capture,
			args: []string{"convert", "x.cf32", "--rate", "48k", "x.cf32"}, exit: 2, names: "x.cf32", why: "is also an input"},
		{group: "output", what: "existing output without --force", files: with(capture, "out.cu8", []byte{1, 2}),
			args: []string{"convert", "x.cf32", "--rate", "48k", "out.cu8"}, exit: 1, names: "out.cu8", why: "exists (use --force"},
		{group: "output", what: "output onto a named pipe, even with --force", files: capture,
			setup: func(t *testing.T) string { return mkfifo(t, "pipe.cf32") },
			args:  []string{"convert", "x.cf32", "--rate", "48k", "--force", "pipe.cf32"}, exit: 1, names: "pipe.cf32", why: "not a regular file"},
		{group: "output", what: "output in a folder that is a file", files: with(capture, "notdir", []byte("x")),
			args: []string{"rx", "x.cf32", "--rate", "48k", "-o", "notdir/a.wav"}, exit: 1, names: "notdir", why: "not a directory"},
		{group: "output", what: "demo folder that is a file", files: map[string][]byte{"out": []byte("x")},
			args: []string{"demo", "-q", "-o", "out"}, exit: 1, names: "out", why: "is not a folder"},
		{group: "output", what: "rx with two channels and no {freq}", files: capture,
			args: []string{"rx", "x.cf32", "--rate", "48k", "--offset", "1k", "--offset", "5k", "-o", "a.wav"}, exit: 2, names: "-o a.wav", why: "{freq}"},
	}
}

func mkdir(t *testing.T, name string) string {
	if err := os.Mkdir(name, 0o755); err != nil {
		t.Fatal(err)
	}
	return ""
}

func mkfifo(t *testing.T, name string) string {
	if err := syscall.Mkfifo(name, 0o644); err != nil {
		return fmt.Sprintf("cannot make a named pipe here: %v", err)
	}
	return ""
}

// folderState maps every name under the current folder to its type and
// content hash (regular files) or type alone (folders, pipes).
func folderState(t *testing.T) map[string]string {
	t.Helper()
	st := map[string]string{}
	err := filepath.WalkDir(".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if p == "." {
			return nil
		}
		if !d.Type().IsRegular() {
			st[p] = d.Type().String()
			return nil
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		st[p] = fmt.Sprintf("%x", sha256.Sum256(b))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// runBounded runs the command line with stdin and reports a panic as
// such; it gives up after hostileTimeout.
func runBounded(t *testing.T, args []string, stdin []byte) (code int, stdout, stderr string) {
	t.Helper()
	type result struct {
		code   int
		o, e   string
		panicV any
	}
	done := make(chan result, 1)
	go func() {
		var o, e bytes.Buffer
		var r result
		defer func() {
			r.panicV = recover()
			r.o, r.e = o.String(), e.String()
			done <- r
		}()
		r.code = run(args, &env{stdin: bytes.NewReader(stdin), stdout: &o, stderr: &e})
	}()
	select {
	case r := <-done:
		if r.panicV != nil {
			t.Fatalf("panic: %v", r.panicV)
		}
		return r.code, r.o, r.e
	case <-time.After(hostileTimeout):
		t.Fatalf("still running after %v: unbounded work", hostileTimeout)
	}
	return
}

var oneLine = regexp.MustCompile(`^ssbkit: ([a-z]+): [^\n]+\n$`)

func TestHostileInputs(t *testing.T) {
	cases := hostileCases()
	if len(cases) < 40 {
		t.Fatalf("%d cases; the campaign asks for at least 40", len(cases))
	}
	commandsSeen := map[string]bool{}
	var rows []string
	for i, c := range cases {
		name := fmt.Sprintf("%02d_%s_%s", i+1, c.group, strings.NewReplacer(" ", "_", "/", "_").Replace(c.what))
		var msg string
		ok := t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			t.Chdir(dir)
			for n, b := range c.files {
				if err := os.WriteFile(n, b, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if c.setup != nil {
				if why := c.setup(t); why != "" {
					msg = "(skipped: " + why + ")"
					t.Skip(why)
				}
			}
			before := folderState(t)
			code, stdout, stderr := runBounded(t, c.args, c.stdin)
			msg = strings.TrimSuffix(stderr, "\n")
			if code != c.exit {
				t.Errorf("exit %d, want %d", code, c.exit)
			}
			m := oneLine.FindStringSubmatch(stderr)
			switch {
			case m == nil:
				t.Errorf("stderr %q is not one line \"ssbkit: CMD: WHY\"", stderr)
			case m[1] != c.args[0]:
				t.Errorf("stderr %q names command %q, want %q", stderr, m[1], c.args[0])
			}
			if !strings.Contains(stderr, c.names) || !strings.Contains(stderr, c.why) {
				t.Errorf("stderr %q does not name %q and say %q", stderr, c.names, c.why)
			}
			if stdout != "" {
				t.Errorf("stdout %q, want nothing", stdout)
			}
			after := folderState(t)
			for n, h := range after {
				if before[n] == "" {
					t.Errorf("%s written", n)
				} else if before[n] != h {
					t.Errorf("%s changed", n)
				}
			}
			for n := range before {
				if after[n] == "" {
					t.Errorf("%s removed", n)
				}
			}
		})
		commandsSeen[c.args[0]] = true
		_ = ok
		rows = append(rows, fmt.Sprintf("| %d | %s | %s | `%s` | %d | %s |", i+1, c.group, c.what,
			mdCode(shellLine(c)), c.exit, mdText(msg)))
	}
	for _, cmd := range commands {
		if !commandsSeen[cmd.name] {
			t.Errorf("no hostile case for command %s", cmd.name)
		}
	}
	doc := hostileTable(len(cases), rows)
	if *updateHostile {
		if err := os.WriteFile(hostileDoc, []byte(doc), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if t.Failed() {
		return
	}
	old, err := os.ReadFile(hostileDoc)
	if err != nil || string(old) != doc {
		t.Errorf("%s is not the campaign's table (run go test ./cmd/ssbkit -run TestHostileInputs -update-hostile)", hostileDoc)
	}
}

// shellLine writes the case's command line as a user would type it.
func shellLine(c hostileCase) string {
	var b strings.Builder
	b.WriteString("ssbkit")
	for _, a := range c.args {
		b.WriteByte(' ')
		if a == "" || strings.ContainsAny(a, " {}*?'\"$") {
			a = "'" + a + "'"
		}
		b.WriteString(a)
	}
	if c.stdin != nil {
		fmt.Fprintf(&b, " < (%d bytes)", len(c.stdin))
	} else if len(c.args) > 1 && c.args[1] == "-" {
		b.WriteString(" < /dev/null")
	}
	return b.String()
}

func mdCode(s string) string { return strings.ReplaceAll(s, "|", `\|`) }

func mdText(s string) string {
	return strings.NewReplacer("|", `\|`, "<", "&lt;", ">", "&gt;", "*", `\*`, "_", `\_`).Replace(s)
}

func hostileTable(n int, rows []string) string {
	return fmt.Sprintf(`# Hostile inputs: what ssbkit says

Generated by TestHostileInputs (cmd/ssbkit/hostile_test.go); regenerate
with `+"`go test ./cmd/ssbkit -run TestHostileInputs -update-hostile`"+`.
Each of the %d cases runs in a folder of its own, built at test time. The
test asserts the exit code (1 failure, 2 usage error), exactly one line on
stderr of the form `+"`ssbkit: <command>: <why>`"+` that names the file or
flag and the fault, nothing on standard output, no file written or
changed in the folder (no output, no temporary file, inputs untouched),
no panic, and an answer within a minute.

| # | group | what is wrong | command | exit | message |
|---|---|---|---|---|---|
%s
`, n, strings.Join(rows, "\n"))
}
