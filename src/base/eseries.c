/*
 * eseries.c - IEC 60063 preferred numbers and value parsing (see eseries.h).
 */
#include "lampwick/eseries.h"
#include "lampwick/number.h"

#include <ctype.h>
#include <math.h>
#include <string.h>
#include "lampwick/error.h"

static const short e3[] = {10, 22, 47};
static const short e6[] = {10, 15, 22, 33, 47, 68};
static const short e12[] = {10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82};
static const short e24[] = {10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
                            33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91};
static const short e192[] = {
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120,
    121, 123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145,
    147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176,
    178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213,
    215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258,
    261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312,
    316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379,
    383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459,
    464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556,
    562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673,
    681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816,
    825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988,
};

bool lw_eseries_parse(const char *name, int *n)
{
    if ((name[0] != 'E' && name[0] != 'e') || !isdigit((unsigned char)name[1]))
        return false;
    int v;
    if (!lw_number_parse_int(name + 1, &v))
        return false;
    if (v != 3 && v != 6 && v != 12 && v != 24 && v != 48 && v != 96 && v != 192)
        return false;
    *n = v;
    return true;
}

/* Integer mantissas of series n and their number of digits (2 or 3). */
static size_t int_mantissas(int n, int *out, int *digits)
{
    const short *t = NULL;
    size_t len = 0, stride = 1;
    *digits = 2;
    switch (n) {
    case 3:
        t = e3, len = 3;
        break;
    case 6:
        t = e6, len = 6;
        break;
    case 12:
        t = e12, len = 12;
        break;
    case 24:
        t = e24, len = 24;
        break;
    case 48:
    case 96:
    case 192:
        t = e192, len = 192, stride = (size_t)(192 / n), *digits = 3;
        break;
    default:
        return 0;
    }
    size_t k = 0;
    for (size_t i = 0; i < len; i += stride)
        out[k++] = t[i];
    return k;
}

/* mantissa * 10^e, exactly rounded (one operation on exact operands). */
static double scaled(int mantissa, int e)
{
    return e >= 0 ? mantissa * pow(10.0, e) : mantissa / pow(10.0, -e);
}

size_t lw_eseries_mantissas(int n, double *out)
{
    int m[192], digits;
    size_t k = int_mantissas(n, m, &digits);
    for (size_t i = 0; i < k; i++)
        out[i] = scaled(m[i], 1 - digits);
    return k;
}

double lw_eseries_tolerance_pct(int n)
{
    switch (n) {
    case 3:
        return 40;
    case 6:
        return 20;
    case 12:
        return 10;
    case 24:
        return 5;
    case 48:
        return 2;
    case 96:
        return 1;
    default:
        return 0.5;
    }
}

size_t lw_eseries_range(int n, double lo, double hi, double *out, size_t cap)
{
    int m[192], digits;
    size_t nm = int_mantissas(n, m, &digits);
    if (nm == 0 || !(lo > 0) || !(hi >= lo) || !isfinite(hi))
        return 0;
    size_t count = 0;
    int d0 = (int)floor(log10(lo)) - 1, d1 = (int)ceil(log10(hi)) + 1;
    for (int d = d0; d <= d1; d++) {
        for (size_t i = 0; i < nm; i++) {
            double v = scaled(m[i], d + 1 - digits);
            if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) {
                if (out && count < cap)
                    out[count] = v;
                count++;
            }
        }
    }
    return count;
}

double lw_eseries_round(int n, double v, bool round_up)
{
    double buf[3 * 192];
    size_t k = lw_eseries_range(n, v / 10.0, v * 10.0, buf, sizeof buf / sizeof buf[0]);
    double best = round_up ? INFINITY : -INFINITY;
    for (size_t i = 0; i < k; i++) {
        if (round_up && buf[i] >= v * (1 - 1e-12) && buf[i] < best)
            best = buf[i];
        if (!round_up && buf[i] <= v * (1 + 1e-12) && buf[i] > best)
            best = buf[i];
    }
    return best;
}

