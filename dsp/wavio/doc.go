// Package wavio reads and writes WAVE audio files as streams of float64
// samples, and writes output files atomically.
//
// # Scope
//
// Reader decodes the sample data of a RIFF/WAVE stream block by block
// through a fixed buffer, so memory use does not grow with the file: integer
// PCM of 8, 16, 24 and 32 bits, IEEE float of 32 and 64 bits (format tag 3),
// and WAVE_FORMAT_EXTENSIBLE (tag 0xFFFE) whose sub-format GUID is PCM or
// IEEE float; 1 to 8 channels; 8 kHz to 384 kHz. Unknown chunks (LIST, fact,
// JUNK, cue, ...) are skipped wherever they sit, including odd-sized chunks
// followed by their pad byte, and odd-sized chunks whose writer forgot the
// pad byte (tolerated and listed by Reader.Warnings). PCM codes are scaled to [-1, 1) by
// 2^-(bits-1); 8-bit data is unsigned with a 128 offset.
//
// Writer encodes interleaved float64 samples as 16, 24 or 32-bit PCM
// (rounded to nearest, ties away from zero, clamped and counted, no
// dither) or 32 or 64-bit IEEE float (non-finite values refused). See
// Writer for the header rules: EXTENSIBLE for more than two channels or PCM
// deeper than 16 bits, plain tags otherwise.
//
// NewStreamWriter writes to a destination that cannot seek (a FIFO, a
// pipe, a device written in place): the header announces the frame count
// up front and Close checks it.
//
// Float input is bounded: a sample beyond DefaultFloatLimit (+24 dBFS) or
// the level set with Reader.SetFloatLimit stops Read at its frame, like a
// NaN or an infinity, so an absurd sample never reaches a circuit model;
// overs within the bound pass and are counted (Reader.Overs).
//
// Output, CreateTemp, WriteFile and WriteFileAtomic write one file through
// the outputs package (checked before the work, a hidden temporary file
// renamed into place on Commit, removed on Abort or a signal; a device or
// FIFO written in place). A command with several outputs uses an
// outputs.Set directly. SameFile is outputs.SameFile.
//
// Faults in the input are reported as *FormatError (structure and header)
// or *SampleError (non-finite, over the bound, or beyond the output
// format's range), each wrapping one sentinel such as ErrTruncated,
// ErrNonFinite or ErrOverLimit for errors.Is, with a one-line message
// naming the byte offset or frame and channel. Nothing in this package
// panics on file content.
//
// # References
//
//   - IBM Corporation and Microsoft Corporation, "Multimedia Programming
//     Interface and Data Specifications 1.0", August 1991: RIFF chunk
//     layout and even-length padding, the WAVE form, the "fmt ", "data" and
//     "fact" chunks, PCM sample layout (8-bit unsigned, wider signed
//     little-endian).
//   - Microsoft Corporation, "Multiple Channel Audio Data and WAVE Files"
//     (WAVEFORMATEXTENSIBLE), 2001: the 40-byte fmt chunk, valid bits,
//     channel mask, the KSDATAFORMAT_SUBTYPE_PCM and
//     KSDATAFORMAT_SUBTYPE_IEEE_FLOAT sub-format GUIDs, and when the
//     extensible form should be used.
//   - IEEE 754-2008, binary32 and binary64 interchange formats, for float
//     samples.
//   - P. Kabal, "Audio File Format Specifications: WAVE", McGill University
//     (from memory): summary of the above, including the fact chunk for
//     non-PCM data.
//
// # Non-goals
//
// No compressed or companded encodings (ADPCM, A-law, mu-law, MPEG), no
// 12-bit or other non-byte-sized PCM, no RIFX (big-endian) or RF64/BW64
// files over 4 GiB, no metadata preservation (LIST/INFO, bext, cue and other
// chunks are skipped on reading and not written), no sample-rate
// conversion, no dither.
package wavio
