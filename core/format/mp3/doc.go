// Package mp3 decodes MPEG-1 and MPEG-2 Layer III audio into a
// data.Recording, with github.com/hajimehoshi/go-mp3.
//
// go-mp3 always produces 16-bit stereo. This package reads the first frame
// header itself (after an ID3v2 tag, whose size is a 28-bit syncsafe
// integer) and, when its channel mode is 3 (single channel), returns one
// channel: the decoder's left. Samples are scaled to full scale [−1, 1):
// v/32768. Audio gear does not record its gain, so channels get Unit
// "a.u." and Type "AUDIO", and Recording.Notes says "audio gain unknown,
// units arbitrary". Channels are named ch1 and ch2.
//
// # Delay and padding
//
// An MP3 decoder's output does not start with the encoded audio. LAME (and
// encoders that copy its layout) put an Info or Xing frame first, which
// go-mp3 decodes as one frame of silence; then come the encoder's delay
// (576 samples for LAME) and the decoder's own delay of 529 samples; the
// last frame is padded. When the Info frame carries a LAME tag with the
// encoder delay and padding, Decode removes all of these, so that sample 0
// is the first sample of the encoded audio and the length is the encoded
// length (checked against a tone with a known onset in the tests). Without
// such a tag only an Info frame is removed; the samples then start late by the
// encoder delay plus 529 samples (about 25 ms at 44.1 kHz for LAME), and a
// note says so.
//
// Importing the package registers format "mp3", found by an "ID3" tag or a
// Layer III frame sync at the start, or by the extension ".mp3".
package mp3
