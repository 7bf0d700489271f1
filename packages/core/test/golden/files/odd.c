/*
 * Skewsmith export of effect "odd", label odd
 * canvas: 15 x 9 pixels; pivot: (7.5, 4.5) in pixel-edge coordinates
 * angle track: sweep from -40 to 40 deg, 5 frames, ease-in-out, end included
 * fixed point: signed 16-bit, 8 fraction bits (Q8.8)
 * rounding: nearest-up; half turn: flip; edges: wrap; column group: 4
 * element type: uint16 (forced); coefficients: int16
 * sign: shift (as computed: +1 moves a row right, a column down)
 * register width: 9 bits (values wrapped modulo 512, unsigned)
 * split into low/high bytes: no
 * half tables: no
 * dedupe identical frames: no
 * frames: 5; stored: 5
 * regenerate with:
 *   skewsmith export odd.effect.json --out DIR --label odd --outputs c,6502,68k,arm,z80,bin,json,runtime --sign shift --register-bits 9 --element uint16
 * effect document (odd.effect.json):
 * {"format":"skewsmith.effect/1","canvas":{"width":15,"height":9},
 * "pivot":{"x":7.5,"y":4.5},"angles":{"sweep":{"from":-40,"to":40,"frames":5,
 * "easing":"ease-in-out","includeEnd":true}},"fixedPoint":{"bits":16,
 * "fraction":8},"rounding":"nearest-up","halfTurn":"flip","edges":"wrap",
 * "columnGroup":4}
 *
 * Table definitions; declarations and constants are in odd.h.
 */
#include "odd.h"

/* row shifts in whole pixels, wrapped modulo 2^9, [frame][row]; +1 moves a row right */
const uint16_t odd_h[odd_FRAMES][odd_HEIGHT] = {
    /* frame 0: -40 deg */
    {
        511, 511, 511, 0, 0, 0, 1, 1, 1
    },
    /* frame 1: -28.2843 deg */
    {
        511, 511, 511, 0, 0, 0, 1, 1, 1
    },
    /* frame 2: 0 deg */
    {
        0, 0, 0, 0, 0, 0, 0, 0, 0
    },
    /* frame 3: 28.2843 deg */
    {
        1, 1, 1, 0, 0, 0, 511, 511, 511
    },
    /* frame 4: 40 deg */
    {
        1, 1, 1, 0, 0, 0, 511, 511, 511
    }
};

/* column shifts in whole pixels, wrapped modulo 2^9, [frame][column]; +1 moves a column down */
const uint16_t odd_v[odd_FRAMES][odd_WIDTH] = {
    /* frame 0: -40 deg */
    {
        4, 4, 4, 4, 1, 1, 1, 1, 510, 510, 510, 510,
        508, 508, 508
    },
    /* frame 1: -28.2843 deg */
    {
        3, 3, 3, 3, 1, 1, 1, 1, 511, 511, 511, 511,
        509, 509, 509
    },
    /* frame 2: 0 deg */
    {
        0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
        0, 0, 0
    },
    /* frame 3: 28.2843 deg */
    {
        509, 509, 509, 509, 511, 511, 511, 511, 1, 1, 1, 1,
        3, 3, 3
    },
    /* frame 4: 40 deg */
    {
        508, 508, 508, 508, 511, 511, 511, 511, 2, 2, 2, 2,
        4, 4, 4
    }
};

/* half-turn flip per frame: 1 = mirror both axes first, 0 = none */
const uint8_t odd_flip[odd_FRAMES] = {
    0, 0, 0, 0, 0
};

/* k-alpha per frame: -tan(residual/2) scaled by 2^8, signed 16-bit */
const int16_t odd_alpha[odd_FRAMES] = {
    93, 65, 0, -65, -93
};

/* k-beta per frame: sin(residual) scaled by 2^8, signed 16-bit */
const int16_t odd_beta[odd_FRAMES] = {
    -165, -121, 0, 121, 165
};
