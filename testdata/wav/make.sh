#!/bin/sh
# Makes the WAV test files with SoX (Debian sox 14.4.2) and the reference
# values with SoX's own decoder (`sox FILE -t dat -`). patch.py derives the
# edited and broken copies from them. Run from this directory: sh make.sh
set -e
sox --version
R="-r 8000"
sox -n $R -b 16 -c 2 pcm16-stereo.wav synth 0.05 sine 440 sine 1000
sox -n $R -b 8 -c 1 pcm8-mono.wav synth 0.02 sine 440
sox -n $R -b 24 -c 2 pcm24-ext.wav synth 0.02 sine 440 sine 1000
sox -n $R -b 32 -c 1 pcm32-ext.wav synth 0.02 sine 440
sox -n $R -b 16 -c 3 pcm16-3ch.wav synth 0.02 sine 440 sine 1000 sine 2000
sox -n $R -e floating-point -b 32 -c 1 float32.wav synth 0.02 sine 440 gain -3
sox -n $R -e floating-point -b 64 -c 2 float64.wav synth 0.02 sine 440 sine 1000
# Written to a pipe, SoX cannot go back to fix the sizes: the RIFF and data
# sizes are left at 0x7ffff000-ish placeholders, as by many streaming writers.
sox -n $R -b 16 -c 1 -t wav - synth 0.02 sine 440 2>/dev/null | cat > piped.wav
sox -n $R -e ms-adpcm -c 1 invalid-adpcm.wav synth 0.02 sine 440
/usr/bin/python3 patch.py
for f in pcm16-stereo pcm8-mono pcm24-ext pcm32-ext pcm16-3ch float32 float64 piped oddchunk; do
	sox $f.wav -t dat $f.dat 2>/dev/null
done
