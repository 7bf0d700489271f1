; Skewsmith export of effect "storm", label storm
; canvas: 256 x 224 pixels; pivot: (128, 112) in pixel-edge coordinates
; angle track: list of 9 angles (deg): 0, 6, 12, 6, 0, -6, -12, -6, 0
; fixed point: signed 16-bit, 8 fraction bits (Q8.8)
; rounding: nearest-away; half turn: flip; edges: wrap; column group: 16
; element type: uint16 (auto); coefficients: int16
; sign: scroll (negated: +1 moves a row left, a column up)
; register width: 10 bits (values wrapped modulo 1024, unsigned)
; split into low/high bytes: yes (h, v, alpha, beta)
; half tables: h and v (both antisymmetric)
; dedupe identical frames: yes, 5 of 9 frames stored
; frames: 9; stored: 5
; regenerate with:
;   skewsmith export storm.effect.json --out DIR --label storm --outputs c,6502,68k,arm,z80,bin,json,runtime --sign scroll --register-bits 10 --element auto --split --half --dedupe
; effect document (storm.effect.json):
; {"format":"skewsmith.effect/1","canvas":{"width":256,"height":224},
; "pivot":{"x":128,"y":112},"angles":{"list":[0,6,12,6,0,-6,-12,-6,0]},
; "fixedPoint":{"bits":16,"fraction":8},"rounding":"nearest-away",
; "halfTurn":"flip","edges":"wrap","columnGroup":16}
;
; dialect: ca65 (cc65 suite), 6502 and 65816; little-endian (.word and .dword
; store the low byte first); negative values are written in two's complement.
; assemble: ca65 storm.6502.s (add --cpu 65816 for the 65816), link with
; ld65 and .import the labels; the tables go to segment "RODATA", no alignment.
;
; tables, in this order:
;   storm_h_lo[5][112]: uint8, 560 bytes
;       low bytes of uint16 row scroll values (negated shifts) in whole
;       pixels, wrapped modulo 2^10, [stored frame (storm_frame[i])][row],
;       rows 0 to 111 only; +1 moves a row left
;   storm_h_hi[5][112]: uint8, 560 bytes
;       high bytes of uint16 row scroll values (negated shifts) in whole
;       pixels, wrapped modulo 2^10, [stored frame (storm_frame[i])][row],
;       rows 0 to 111 only; +1 moves a row left
;   storm_v_lo[5][128]: uint8, 640 bytes
;       low bytes of uint16 column scroll values (negated shifts) in whole
;       pixels, wrapped modulo 2^10, [stored frame (storm_frame[i])][column],
;       columns 0 to 127 only; +1 moves a column up
;   storm_v_hi[5][128]: uint8, 640 bytes
;       high bytes of uint16 column scroll values (negated shifts) in whole
;       pixels, wrapped modulo 2^10, [stored frame (storm_frame[i])][column],
;       columns 0 to 127 only; +1 moves a column up
;   storm_flip[5]: uint8, 5 bytes
;       half-turn flip per stored frame (storm_frame[i]): 1 = mirror both axes
;       first, 0 = none
;   storm_alpha_lo[5]: uint8, 5 bytes
;       low bytes of int16 k-alpha per stored frame (storm_frame[i]):
;       -tan(residual/2) scaled by 2^8, signed 16-bit
;   storm_alpha_hi[5]: uint8, 5 bytes
;       high bytes of int16 k-alpha per stored frame (storm_frame[i]):
;       -tan(residual/2) scaled by 2^8, signed 16-bit
;   storm_beta_lo[5]: uint8, 5 bytes
;       low bytes of int16 k-beta per stored frame (storm_frame[i]):
;       sin(residual) scaled by 2^8, signed 16-bit
;   storm_beta_hi[5]: uint8, 5 bytes
;       high bytes of int16 k-beta per stored frame (storm_frame[i]):
;       sin(residual) scaled by 2^8, signed 16-bit
;   storm_frame[9]: uint8, 9 bytes
;       stored frame of every frame i: index the other tables with it

        .export storm_FRAMES
        .export storm_WIDTH
        .export storm_HEIGHT
        .export storm_FRACTION
        .export storm_STORED_FRAMES
        .export storm_H_ENTRIES
        .export storm_V_ENTRIES
        .export storm_h_lo
        .export storm_h_hi
        .export storm_v_lo
        .export storm_v_hi
        .export storm_flip
        .export storm_alpha_lo
        .export storm_alpha_hi
        .export storm_beta_lo
        .export storm_beta_hi
        .export storm_frame

; frames in the angle track
storm_FRAMES = 9
; canvas width in pixels: entries of a whole v table
storm_WIDTH = 256
; canvas height in pixels: entries of a whole h table
storm_HEIGHT = 224
; fraction bits of alpha and beta (16-bit signed)
storm_FRACTION = 8
; frames stored after identical frames were shared
storm_STORED_FRAMES = 5
; rows stored per frame; row r >= 112 is -h[HEIGHT-1-r] mod 2^10
storm_H_ENTRIES = 112
; columns stored per frame; column c >= 128 is -v[WIDTH-1-c] mod 2^10
storm_V_ENTRIES = 128

        .segment "RODATA"

; storm_h_lo: uint8 [5][112], 560 bytes
storm_h_lo:
; frames 0, 4, 8: 0 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frames 1, 3: 6 deg
        .byte   $FA, $FA, $FA, $FA, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB
        .byte   $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC
        .byte   $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FD, $FD, $FD, $FD, $FD
        .byte   $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FE
        .byte   $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE
        .byte   $FE, $FE, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF
        .byte   $FF, $FF, $FF, $FF, $FF, $FF, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frame 2: 12 deg
        .byte   $F4, $F4, $F4, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F6, $F6, $F6, $F6
        .byte   $F6, $F6, $F6, $F6, $F6, $F6, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F8
        .byte   $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F9, $F9, $F9, $F9, $F9, $F9, $F9
        .byte   $F9, $F9, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FB, $FB, $FB, $FB
        .byte   $FB, $FB, $FB, $FB, $FB, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FD
        .byte   $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE
        .byte   $FE, $FE, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $00, $00, $00, $00, $00
; frames 5, 7: -6 deg
        .byte   $06, $06, $06, $06, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05
        .byte   $05, $05, $05, $05, $05, $05, $05, $04, $04, $04, $04, $04, $04, $04, $04, $04
        .byte   $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $02
        .byte   $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02
        .byte   $02, $02, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01
        .byte   $01, $01, $01, $01, $01, $01, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frame 6: -12 deg
        .byte   $0C, $0C, $0C, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0A, $0A, $0A, $0A
        .byte   $0A, $0A, $0A, $0A, $0A, $0A, $09, $09, $09, $09, $09, $09, $09, $09, $09, $08
        .byte   $08, $08, $08, $08, $08, $08, $08, $08, $08, $07, $07, $07, $07, $07, $07, $07
        .byte   $07, $07, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $05, $05, $05, $05
        .byte   $05, $05, $05, $05, $05, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $02, $02, $02, $02, $02, $02, $02, $02
        .byte   $02, $02, $01, $01, $01, $01, $01, $01, $01, $01, $01, $00, $00, $00, $00, $00

; storm_h_hi: uint8 [5][112], 560 bytes
storm_h_hi:
; frames 0, 4, 8: 0 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frames 1, 3: 6 deg
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frame 2: 12 deg
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $00, $00, $00, $00, $00
; frames 5, 7: -6 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frame 6: -12 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00

; storm_v_lo: uint8 [5][128], 640 bytes
storm_v_lo:
; frames 0, 4, 8: 0 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frames 1, 3: 6 deg
        .byte   $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D, $0D
        .byte   $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B, $0B
        .byte   $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09, $09
        .byte   $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08
        .byte   $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06, $06
        .byte   $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04, $04
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01, $01
; frame 2: 12 deg
        .byte   $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19, $19
        .byte   $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16, $16
        .byte   $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12, $12
        .byte   $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F, $0F
        .byte   $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C, $0C
        .byte   $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08, $08
        .byte   $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05, $05
        .byte   $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02, $02
; frames 5, 7: -6 deg
        .byte   $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3, $F3
        .byte   $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5, $F5
        .byte   $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7, $F7
        .byte   $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8
        .byte   $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA, $FA
        .byte   $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC, $FC
        .byte   $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD, $FD
        .byte   $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF, $FF
; frame 6: -12 deg
        .byte   $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7, $E7
        .byte   $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA, $EA
        .byte   $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE, $EE
        .byte   $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1, $F1
        .byte   $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4, $F4
        .byte   $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8, $F8
        .byte   $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB, $FB
        .byte   $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE, $FE

; storm_v_hi: uint8 [5][128], 640 bytes
storm_v_hi:
; frames 0, 4, 8: 0 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frames 1, 3: 6 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frame 2: 12 deg
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
        .byte   $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00, $00
; frames 5, 7: -6 deg
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
; frame 6: -12 deg
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03
        .byte   $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03, $03

; storm_flip: uint8 [5], 5 bytes
storm_flip:
        .byte   $00, $00, $00, $00, $00

; storm_alpha_lo: uint8 [5], 5 bytes
storm_alpha_lo:
        .byte   $00, $F3, $E5, $0D, $1B

; storm_alpha_hi: uint8 [5], 5 bytes
storm_alpha_hi:
        .byte   $00, $FF, $FF, $00, $00

; storm_beta_lo: uint8 [5], 5 bytes
storm_beta_lo:
        .byte   $00, $1B, $35, $E5, $CB

; storm_beta_hi: uint8 [5], 5 bytes
storm_beta_hi:
        .byte   $00, $00, $00, $FF, $FF

; storm_frame: uint8 [9], 9 bytes
storm_frame:
        .byte   $00, $01, $02, $01, $00, $03, $04, $03, $00
