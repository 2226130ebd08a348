// Package segy reads and writes SEG-Y files (revisions 0, 1 and 2.0).
//
// References: SEG-Y revision 1 (SEG Technical Standards Committee, 2002)
// and SEG-Y revision 2.0 (2017) for every byte position and code; IBM
// System/370 Principles of Operation for the hexadecimal floating-point
// format. Tests also check against the segyio test files in
// testdata/segy-corpus and against Debian's python3-segyio 1.8.3.
//
// Reading. Open maps the file read-only (falling back to ReadAt when mmap
// is refused), parses the textual header (EBCDIC or ASCII, detected),
// extended textual headers (count at bytes 3505-3506, -1 = read until the
// ((SEG: EndText)) stanza), the binary header, and every trace header, and
// builds a geometry index. OpenFast reads a sample of trace headers instead
// when they support a regular grid (a hypothesis through the same geometry
// decision), or uses a saved index that matches the file; File.Check reads
// every header and returns the exact index, the Info Open gives.
// ReadTrace and TraceHeader read one trace; ReadTraces and TraceHeaders a
// run of consecutive ones, with a few large reads when the file is read
// through a ReaderAt. Sample formats 1, 2, 3, 5, 6, 7, 8, 9, 10, 11,
// 12, 15 and 16 decode to float32; format 4 (obsolete) is refused.
//
// Decisions where the standard leaves a choice (each also noted where it
// is implemented, and reported in Info.Warnings when it applies):
//
//   - Byte order: the rev 2.0 word at 3297-3300, else the order in which
//     bytes 3225-3226 hold a known format code; Options.ByteOrder wins.
//   - Samples per trace: binary header (rev 2: the extended count at
//     3269-3272 when set); if it is 0 or disagrees with the first trace
//     header, the value that divides the data into whole traces is used.
//   - Sample interval: the binary header's; the first trace header's only
//     when the binary one is not positive. A negative trace-header interval
//     is reported; a zero one is not (many writers leave it 0).
//   - Start time: delay (trace bytes 109-110) times the time scalar
//     (215-216) of the first trace.
//   - A file whose data is not a whole number of traces is refused with an
//     error naming the trace and byte where the file ends, unless
//     Options.IgnorePartialTrace is set (then the tail is ignored).
//   - Headers only: opens with Traces == 0, Layout "empty" and a "no traces"
//     warning.
//   - Missing and duplicate traces are counted, never fatal; the first of
//     duplicates is used. NaN and infinite samples, and traces that are all
//     zero (every sampled one), are reported; samples are returned as read.
//   - Nothing is allocated from sizes the headers claim: the trace count
//     comes from the file size.
//   - Geometry (one decision, in buildGrid, that scan, figure, export and
//     the window all see through Info): the inline/crossline numbering is
//     used as a grid when the grid has at most 4*traces+1024 cells; else,
//     when a few traces (at most max(16, traces/100)) carry numbers far
//     outside the main run of numbers and the rest fit, those traces are
//     left out of the grid and listed in Info.Outliers (trace, field, value,
//     byte) with a warning; else the layout is "unstructured" and the
//     traces are one line in file order (inline 0, crosslines 1..traces).
//     Info.Inline and Info.Crossline therefore never span more than
//     4*traces+1024 numbers; Info.HeaderInline/HeaderCrossline report the
//     numbers as found.
//   - Reads hold the file: Close waits for reads in progress and later
//     reads fail with os.ErrClosed. A mapped file that another program
//     shortens gives errors wrapping ErrChanged (memory faults are caught
//     with runtime/debug.SetPanicOnFault), never a crash.
//   - Only regular files are opened: FIFOs, devices and directories are
//     refused before any read.
//   - Trace numbers in errors are 0-based indices as in ReadTrace; byte
//     numbers are 1-based file positions as the standards print them.
//
// Writing. NewWriter (with the headers of a source file) and NewWriterSpec
// (from scratch) stream a revision 1, big-endian file in IEEE (format 5,
// default) or IBM (format 1) floats to an io.Writer; revision 2.0 when the
// source's additional trace headers are carried. segy holds no file-system
// policy: where the bytes go, temporary files and what may be overwritten
// are the caller's (quadtrace writes through app/outfile).
package segy
