#!/bin/sh
# Makes the MP3 test files with SoX (Debian sox 14.4.2) and LAME (Debian
# lame 3.100-6). Run from this directory: sh make.sh
set -e
T=$(mktemp -d)
sox -n -r 44100 -b 16 -c 1 $T/mono.wav synth 0.5 sine 1000
sox -n -r 44100 -b 16 -c 2 $T/stereo.wav synth 0.5 sine 440 sine 1000
sox -n -r 22050 -b 16 -c 1 $T/lsf.wav synth 0.5 sine 700
sox -n -r 8000 -b 16 -c 1 $T/mpeg25.wav synth 0.5 sine 700
# A 1000 Hz tone that starts at sample 8820 (0.2 s) and lasts 0.5 s.
sox -n -r 44100 -b 16 -c 1 $T/onset.wav synth 0.5 sine 1000 pad 0.2 0
lame --quiet -m m -b 64 $T/mono.wav mono.mp3
lame --quiet -m j -b 128 --tt "stereo sine" --id3v2-only $T/stereo.wav stereo-id3.mp3
lame --quiet -m m -b 32 $T/lsf.wav mpeg2-mono.mp3
lame --quiet -m m -b 64 $T/onset.wav onset.mp3
lame --quiet -m m -b 8 $T/mpeg25.wav invalid-mpeg25.mp3
# Without the Info frame (no gapless tag).
lame --quiet -m m -b 64 -t $T/mono.wav notag.mp3
soxi -s $T/onset.wav > onset.samples
# Broken copies.
head -c 2000 mono.mp3 > cut.mp3  # cut inside frame 10 of 22
printf 'ID3\003\000\000\000\000\000\020ten bytes!this is not an mp3 frame at all' > invalid-noframe.mp3
rm -r $T
