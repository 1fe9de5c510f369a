// Package wav reads and writes RIFF/WAVE audio as a data.Recording.
//
// The reader accepts PCM integer samples of 8 (unsigned), 16, 24 and 32 bits,
// IEEE float samples of 32 and 64 bits (format tag 3), and
// WAVE_FORMAT_EXTENSIBLE (tag 0xFFFE) with those subformats, for 1 to 256
// channels. It walks the chunk list (odd-sized chunks are followed by one pad
// byte), finds "fmt " and "data" in either order and streams the data into
// one float32 slice per channel.
//
// Integer samples are scaled to full scale [−1, 1): v/2^(bits−1), with 8-bit
// samples first made signed (v−128). Float samples keep their stored values.
// Audio gear does not record its gain, so every channel gets Unit "a.u." and
// Type "AUDIO", and Recording.Notes says "audio gain unknown, units
// arbitrary". Channels are named ch1, ch2, …; a channels.tsv beside the file
// is not read here.
//
// A data chunk that declares more bytes than the file holds is not an error:
// writers that stream to a pipe cannot go back to fix the size, so the reader
// uses the whole sample frames present and says so in Notes. It is
// format.ErrTruncated when not even one frame is present, or when the file
// ends inside the RIFF header or the fmt chunk. NaN or infinite float
// samples are errors naming the byte offset.
//
// Errors are *format.Error values with the byte offset and, where one
// applies, the header field.
//
// Importing the package registers format "wav" with magic "RIFF????WAVE".
package wav
