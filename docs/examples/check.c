/*
 * A small host program built against the pulled C tables (label fx): prints the canvas, the frame count and
 * every frame's row and column shifts, one frame per line, so a build can see the tables it linked.
 */
#include <stdio.h>

#include "fx.h"

int main(void) {
    int f, i;
    printf("frames %d width %d height %d\n", fx_FRAMES, fx_WIDTH, fx_HEIGHT);
    for (f = 0; f < fx_FRAMES; f++) {
        printf("frame %d flip %d h", f, (int)fx_flip[f]);
        for (i = 0; i < fx_HEIGHT; i++) printf(" %d", (int)fx_h[f][i]);
        printf(" v");
        for (i = 0; i < fx_WIDTH; i++) printf(" %d", (int)fx_v[f][i]);
        printf("\n");
    }
    return 0;
}
