/* bm-stencil.c: refinement stencils along the principal axes of an extremum. */
#include "bm-stencil.h"

#include <math.h>

size_t bm_stencil_size(int dims)
{
    if (dims < 1 || dims > 3)
        return 0;
    size_t d = (size_t)dims;
    return 1 + 2 * (2 * d + 2 * d * (d - 1));
}

double bm_stencil_step(double k_error, double spacing)
{
    double h = isfinite(k_error) ? 0.5 * k_error : 0.05;
    if (isfinite(spacing) && spacing > 0.0)
        h = fmin(h, spacing);
    return fmin(fmax(h, 0.01), 0.05);
}

void bm_stencil_directional(const double centre[3], double step, double (*out)[3])
{
    static const double dirs[3][3] = { { 1, 0, 0 }, { 1, 1, 0 }, { 1, 1, 1 } };
    for (int i = 0; i < 3; i++)
        out[0][i] = centre[i];
    for (int d = 0; d < 3; d++) {
        double len = sqrt(dirs[d][0] * dirs[d][0] + dirs[d][1] * dirs[d][1]
                          + dirs[d][2] * dirs[d][2]);
        for (int s = 1; s <= 2; s++)
            for (int i = 0; i < 3; i++)
                out[2 * d + s][i] = centre[i] + s * step * dirs[d][i] / len;
    }
}

void bm_stencil_points(const double centre[3], const double axes[3][3], int dims, double step,
                       double (*out)[3])
{
    size_t n = 0;
    for (int i = 0; i < 3; i++)
        out[n][i] = centre[i];
    n++;
    for (int s = 0; s < 2; s++) {
        double h = s ? 0.5 * step : step;
        for (int a = 0; a < dims; a++)
            for (int sg = -1; sg <= 1; sg += 2, n++)
                for (int i = 0; i < 3; i++)
                    out[n][i] = centre[i] + sg * h * axes[a][i];
        for (int a = 0; a < dims; a++)
            for (int b = a + 1; b < dims; b++)
                for (int sa = -1; sa <= 1; sa += 2)
                    for (int sb = -1; sb <= 1; sb += 2, n++)
                        for (int i = 0; i < 3; i++)
                            out[n][i] = centre[i]
                                      + h * (sa * axes[a][i] + sb * axes[b][i]) / sqrt(2.0);
    }
}
