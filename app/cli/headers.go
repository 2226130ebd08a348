package cli

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"
)

// headerField is one field of a SEG-Y binary or trace header: its first
// byte (1-based, as the standards print them), its type and its meaning.
type headerField struct {
	byte int
	kind string // int16, int32, uint8, uint64, float64
	name string
}

func (f headerField) size() int {
	switch f.kind {
	case "uint8":
		return 1
	case "int16":
		return 2
	case "int32":
		return 4
	}
	return 8
}

// binaryHeaderFields is the binary file header, file bytes 3201-3600: SEG-Y
// revision 1 (2002) table 2 for bytes 3201-3260 and 3501-3506, revision 2.0
// (2017) table 2 for the rest (written from the standards' tables; the
// positions are checked against python3-segyio's segyio.BinField in
// headers_test.go).
var binaryHeaderFields = []headerField{
	{3201, "int32", "job identification number"},
	{3205, "int32", "line number"},
	{3209, "int32", "reel number"},
	{3213, "int16", "data traces per ensemble"},
	{3215, "int16", "auxiliary traces per ensemble"},
	{3217, "int16", "sample interval (microseconds)"},
	{3219, "int16", "sample interval of the original field recording (microseconds)"},
	{3221, "int16", "samples per data trace"},
	{3223, "int16", "samples per data trace of the original field recording"},
	{3225, "int16", "data sample format code"},
	{3227, "int16", "ensemble fold"},
	{3229, "int16", "trace sorting code"},
	{3231, "int16", "vertical sum code"},
	{3233, "int16", "sweep frequency at start (Hz)"},
	{3235, "int16", "sweep frequency at end (Hz)"},
	{3237, "int16", "sweep length (ms)"},
	{3239, "int16", "sweep type code"},
	{3241, "int16", "trace number of sweep channel"},
	{3243, "int16", "sweep trace taper length at start (ms)"},
	{3245, "int16", "sweep trace taper length at end (ms)"},
	{3247, "int16", "taper type"},
	{3249, "int16", "correlated data traces"},
	{3251, "int16", "binary gain recovered"},
	{3253, "int16", "amplitude recovery method"},
	{3255, "int16", "measurement system (1 metres, 2 feet)"},
	{3257, "int16", "impulse signal polarity"},
	{3259, "int16", "vibratory polarity code"},
	{3261, "int32", "extended data traces per ensemble (rev 2)"},
	{3265, "int32", "extended auxiliary traces per ensemble (rev 2)"},
	{3269, "int32", "extended samples per data trace (rev 2)"},
	{3273, "float64", "extended sample interval (rev 2)"},
	{3281, "float64", "extended sample interval of the original field recording (rev 2)"},
	{3289, "int32", "extended samples per trace of the original field recording (rev 2)"},
	{3293, "int32", "extended ensemble fold (rev 2)"},
	{3297, "int32", "byte order constant 16909060 (rev 2)"},
	{3501, "uint8", "SEG-Y format revision, major"},
	{3502, "uint8", "SEG-Y format revision, minor"},
	{3503, "int16", "fixed length trace flag"},
	{3505, "int16", "number of extended textual file headers"},
	{3507, "int32", "maximum additional trace headers (rev 2)"},
	{3511, "int16", "time basis code (rev 2)"},
	{3513, "uint64", "number of traces in the file (rev 2)"},
	{3521, "uint64", "byte offset of the first trace (rev 2)"},
	{3529, "int32", "number of trailer stanzas (rev 2)"},
}

// traceHeaderFields is the 240-byte trace header, SEG-Y revision 1 (2002)
// table 3, kept by revision 2.0 (written from the standard's table; the
// positions are checked against python3-segyio's segyio.TraceField in
// headers_test.go).
var traceHeaderFields = []headerField{
	{1, "int32", "trace sequence number within line"},
	{5, "int32", "trace sequence number within file"},
	{9, "int32", "original field record number"},
	{13, "int32", "trace number within the field record"},
	{17, "int32", "energy source point number"},
	{21, "int32", "ensemble (CDP) number"},
	{25, "int32", "trace number within the ensemble"},
	{29, "int16", "trace identification code"},
	{31, "int16", "vertically summed traces"},
	{33, "int16", "horizontally stacked traces"},
	{35, "int16", "data use"},
	{37, "int32", "source-receiver offset"},
	{41, "int32", "receiver group elevation"},
	{45, "int32", "surface elevation at source"},
	{49, "int32", "source depth below surface"},
	{53, "int32", "datum elevation at receiver group"},
	{57, "int32", "datum elevation at source"},
	{61, "int32", "water depth at source"},
	{65, "int32", "water depth at group"},
	{69, "int16", "scalar for elevations and depths"},
	{71, "int16", "scalar for coordinates"},
	{73, "int32", "source X"},
	{77, "int32", "source Y"},
	{81, "int32", "group X"},
	{85, "int32", "group Y"},
	{89, "int16", "coordinate units"},
	{91, "int16", "weathering velocity"},
	{93, "int16", "subweathering velocity"},
	{95, "int16", "uphole time at source (ms)"},
	{97, "int16", "uphole time at group (ms)"},
	{99, "int16", "source static correction (ms)"},
	{101, "int16", "group static correction (ms)"},
	{103, "int16", "total static applied (ms)"},
	{105, "int16", "lag time A (ms)"},
	{107, "int16", "lag time B (ms)"},
	{109, "int16", "delay recording time (ms)"},
	{111, "int16", "mute time start (ms)"},
	{113, "int16", "mute time end (ms)"},
	{115, "int16", "samples in this trace"},
	{117, "int16", "sample interval of this trace (microseconds)"},
	{119, "int16", "gain type of field instruments"},
	{121, "int16", "instrument gain constant (dB)"},
	{123, "int16", "instrument early or initial gain (dB)"},
	{125, "int16", "correlated"},
	{127, "int16", "sweep frequency at start (Hz)"},
	{129, "int16", "sweep frequency at end (Hz)"},
	{131, "int16", "sweep length (ms)"},
	{133, "int16", "sweep type"},
	{135, "int16", "sweep trace taper length at start (ms)"},
	{137, "int16", "sweep trace taper length at end (ms)"},
	{139, "int16", "taper type"},
	{141, "int16", "alias filter frequency (Hz)"},
	{143, "int16", "alias filter slope (dB/octave)"},
	{145, "int16", "notch filter frequency (Hz)"},
	{147, "int16", "notch filter slope (dB/octave)"},
	{149, "int16", "low-cut frequency (Hz)"},
	{151, "int16", "high-cut frequency (Hz)"},
	{153, "int16", "low-cut slope (dB/octave)"},
	{155, "int16", "high-cut slope (dB/octave)"},
	{157, "int16", "year data recorded"},
	{159, "int16", "day of year"},
	{161, "int16", "hour of day"},
	{163, "int16", "minute of hour"},
	{165, "int16", "second of minute"},
	{167, "int16", "time basis code"},
	{169, "int16", "trace weighting factor"},
	{171, "int16", "geophone group number of roll switch position one"},
	{173, "int16", "geophone group number of trace number one"},
	{175, "int16", "geophone group number of last trace"},
	{177, "int16", "gap size"},
	{179, "int16", "over travel"},
	{181, "int32", "CDP X"},
	{185, "int32", "CDP Y"},
	{189, "int32", "inline number"},
	{193, "int32", "crossline number"},
	{197, "int32", "shotpoint number"},
	{201, "int16", "scalar for the shotpoint number"},
	{203, "int16", "trace value measurement unit"},
	{205, "int32", "transduction constant mantissa"},
	{209, "int16", "transduction constant exponent"},
	{211, "int16", "transduction units"},
	{213, "int16", "device or trace identifier"},
	{215, "int16", "scalar for times"},
	{217, "int16", "source type or orientation"},
	{219, "int32", "source energy direction mantissa"},
	{223, "int16", "source energy direction exponent"},
	{225, "int32", "source measurement mantissa"},
	{229, "int16", "source measurement exponent"},
	{231, "int16", "source measurement unit"},
}

// Headers runs `quadtrace headers FILE [--trace N]`: the binary header and
// one trace header field by field, with byte positions, so that a user can
// find where an odd file keeps its inline, crossline or coordinates.
func Headers(args []string, stdout, stderr io.Writer) int {
	c := newCommand("headers", "FILE [--trace N] [options]", `Prints the binary file header and one trace header of the SEG-Y file FILE
field by field: byte positions (SEG-Y revision 1 and 2.0 tables), type,
meaning and value as stored, read in the file's byte order. Binary header
positions count from the start of the file, trace header positions from the
start of the trace header.`, stdout, stderr)
	trace := c.fs.Int("trace", 0, "index of the trace whose header is printed (0 is the first)")
	c.segyFlags()
	f, code, done := c.openOne(args)
	if done {
		return code
	}
	defer f.Close()
	file := f.Path()
	if n := f.Info().Traces; *trace < 0 || *trace >= n {
		if n == 0 {
			return c.fail(file, fmt.Errorf("--trace %d: the file has no traces", *trace))
		}
		return c.fail(file, fmt.Errorf("--trace %d: the traces are 0 to %d", *trace, n-1))
	}
	bin, err := f.RawBinaryHeader()
	if err != nil {
		return c.fail(file, err)
	}
	th, err := f.RawTraceHeader(*trace)
	if err != nil {
		return c.fail(file, err)
	}
	order := f.ByteOrder()
	fmt.Fprintf(stdout, "%s: %s-endian\n\nbinary file header (file bytes 3201-3600):\n", file, f.Info().ByteOrder)
	writeFields(stdout, binaryHeaderFields, bin, 3201, order)
	fmt.Fprintf(stdout, "\ntrace header of trace %d (bytes 1-240 of the header):\n", *trace)
	writeFields(stdout, traceHeaderFields, th, 1, order)
	return exitOK
}

// writeFields prints each field of block, whose first byte is number base.
func writeFields(w io.Writer, fields []headerField, block []byte, base int, order binary.ByteOrder) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	for _, f := range fields {
		fmt.Fprintf(tw, "  %d-%d\t%s\t%s\t  %s\n", f.byte, f.byte+f.size()-1, f.kind, f.value(block, base, order), f.name)
	}
	tw.Flush()
}

// value reads the field from block, whose first byte is number base, and
// prints it.
func (f headerField) value(block []byte, base int, order binary.ByteOrder) string {
	b := block[f.byte-base : f.byte-base+f.size()]
	switch f.kind {
	case "uint8":
		return strconv.Itoa(int(b[0]))
	case "int16":
		return strconv.Itoa(int(int16(order.Uint16(b))))
	case "int32":
		return strconv.Itoa(int(int32(order.Uint32(b))))
	case "uint64":
		return strconv.FormatUint(order.Uint64(b), 10)
	}
	return strconv.FormatFloat(math.Float64frombits(order.Uint64(b)), 'g', -1, 64)
}
