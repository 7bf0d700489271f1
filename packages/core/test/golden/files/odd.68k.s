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
* dialect: Motorola-style 68000 data for GNU as (m68k); big-endian;
* 16-bit tables start at an even address, 32-bit tables at a multiple of 4.
* assemble: m68k-linux-gnu-as odd.68k.s -o odd.68k.o (or any m68k GNU as);
* the tables go to section .rodata in this order, the same bytes as the .be.bin file.
*
* tables, in this order:
*   odd_h[5][9]: uint16, 90 bytes
*       row shifts in whole pixels, wrapped modulo 2^9, [frame][row]; +1 moves
*       a row right
*   odd_v[5][15]: uint16, 150 bytes
*       column shifts in whole pixels, wrapped modulo 2^9, [frame][column]; +1
*       moves a column down
*   odd_flip[5]: uint8, 5 bytes
*       half-turn flip per frame: 1 = mirror both axes first, 0 = none
*   odd_alpha[5]: int16, 10 bytes
*       k-alpha per frame: -tan(residual/2) scaled by 2^8, signed 16-bit
*   odd_beta[5]: int16, 10 bytes
*       k-beta per frame: sin(residual) scaled by 2^8, signed 16-bit

        .globl  odd_FRAMES
        .globl  odd_WIDTH
        .globl  odd_HEIGHT
        .globl  odd_FRACTION
        .globl  odd_h
        .globl  odd_v
        .globl  odd_flip
        .globl  odd_alpha
        .globl  odd_beta

* frames in the angle track
        .equ    odd_FRAMES, 5
* canvas width in pixels: entries of a whole v table
        .equ    odd_WIDTH, 15
* canvas height in pixels: entries of a whole h table
        .equ    odd_HEIGHT, 9
* fraction bits of alpha and beta (16-bit signed)
        .equ    odd_FRACTION, 8

        .section .rodata

* odd_h: uint16 [5][9], 90 bytes
        .even
        .type   odd_h, @object
        .size   odd_h, 90
odd_h:
* frame 0: -40 deg
        dc.w    511, 511, 511, 0, 0, 0, 1, 1, 1
* frame 1: -28.2843 deg
        dc.w    511, 511, 511, 0, 0, 0, 1, 1, 1
* frame 2: 0 deg
        dc.w    0, 0, 0, 0, 0, 0, 0, 0, 0
* frame 3: 28.2843 deg
        dc.w    1, 1, 1, 0, 0, 0, 511, 511, 511
* frame 4: 40 deg
        dc.w    1, 1, 1, 0, 0, 0, 511, 511, 511

* odd_v: uint16 [5][15], 150 bytes
        .even
        .type   odd_v, @object
        .size   odd_v, 150
odd_v:
* frame 0: -40 deg
        dc.w    4, 4, 4, 4, 1, 1, 1, 1, 510, 510, 510, 510
        dc.w    508, 508, 508
* frame 1: -28.2843 deg
        dc.w    3, 3, 3, 3, 1, 1, 1, 1, 511, 511, 511, 511
        dc.w    509, 509, 509
* frame 2: 0 deg
        dc.w    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0
        dc.w    0, 0, 0
* frame 3: 28.2843 deg
        dc.w    509, 509, 509, 509, 511, 511, 511, 511, 1, 1, 1, 1
        dc.w    3, 3, 3
* frame 4: 40 deg
        dc.w    508, 508, 508, 508, 511, 511, 511, 511, 2, 2, 2, 2
        dc.w    4, 4, 4

* odd_flip: uint8 [5], 5 bytes
        .type   odd_flip, @object
        .size   odd_flip, 5
odd_flip:
        dc.b    0, 0, 0, 0, 0

* odd_alpha: int16 [5], 10 bytes
        .even
        .type   odd_alpha, @object
        .size   odd_alpha, 10
odd_alpha:
        dc.w    93, 65, 0, -65, -93

* odd_beta: int16 [5], 10 bytes
        .even
        .type   odd_beta, @object
        .size   odd_beta, 10
odd_beta:
        dc.w    -165, -121, 0, 121, 165
