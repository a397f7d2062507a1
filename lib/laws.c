/*
 * laws.c - the published motion laws of cams and servo profiles,
 * normalised: rise s from 0 to 1 as x goes from 0 to 1, with its first
 * three derivatives. No model or solver involved.
 */
#include <math.h>
#include <stddef.h>

#include "model.h"

/* Peak accelerations of the two laws built from acceleration pieces, so
 * that s(1) = 1 (derived in docs/theory.md, section on motion laws). */
#define KLI_TRAPEZOID_PEAK (8.0 * KLI_PI / (KLI_PI + 2.0))       /* 4.888 */
#define KLI_SINE_PEAK (4.0 * KLI_PI * KLI_PI / (KLI_PI + 4.0)) /* 5.528 */

static void set(double out[4], double s, double v, double a, double j) {
  out[0] = s;
  out[1] = v;
  out[2] = a;
  out[3] = j;
}

/* Modified trapezoidal, first half (x <= 1/2): a sine quarter up to the
 * peak over [0, 1/8], the peak held over [1/8, 3/8], a sine quarter down to
 * zero over [3/8, 1/2]. */
static void trapezoid_half(double x, double out[4]) {
  const double A = KLI_TRAPEZOID_PEAK, w = 4.0 * KLI_PI;
  const double v1 = A / w, s1 = A / w * (0.125 - 1.0 / w);
  const double v2 = v1 + 0.25 * A, s2 = s1 + 0.25 * v1 + A / 32.0;
  if (x <= 0.125) {
    set(out, A / w * (x - sin(w * x) / w), A / w * (1.0 - cos(w * x)),
        A * sin(w * x), A * w * cos(w * x));
  } else if (x <= 0.375) {
    double t = x - 0.125;
    set(out, s1 + v1 * t + 0.5 * A * t * t, v1 + A * t, A, 0.0);
  } else {
    double t = x - 0.375;
    set(out, s2 + v2 * t + A / (w * w) * (1.0 - cos(w * t)),
        v2 + A / w * sin(w * t), A * cos(w * t), -A * w * sin(w * t));
  }
}

/* Modified sine, first half: a sine quarter up to the peak over [0, 1/8],
 * then a cosine of a third of the frequency, which passes zero at 1/2. */
static void sine_half(double x, double out[4]) {
  const double A = KLI_SINE_PEAK, w = 4.0 * KLI_PI, k = w / 3.0;
  const double v1 = A / w, s1 = A / w * (0.125 - 1.0 / w);
  if (x <= 0.125) {
    set(out, A / w * (x - sin(w * x) / w), A / w * (1.0 - cos(w * x)),
        A * sin(w * x), A * w * cos(w * x));
  } else {
    double t = x - 0.125;
    set(out, s1 + v1 * t + A / (k * k) * (1.0 - cos(k * t)),
        v1 + A / k * sin(k * t), A * cos(k * t), -A * k * sin(k * t));
  }
}

int kl_motion_law(int law, double x, double out[4]) {
  const double pi = KLI_PI;
  if (out == NULL)
    return KL_EINVAL;
  if (!isfinite(x))
    return KL_ENONFINITE;
  if (x < 0.0 || x > 1.0 || law < KL_LAW_HARMONIC || law > KL_LAW_MOD_SINE)
    return KL_EINVAL;
  switch (law) {
  case KL_LAW_HARMONIC:
    set(out, 0.5 * (1.0 - cos(pi * x)), 0.5 * pi * sin(pi * x),
        0.5 * pi * pi * cos(pi * x), -0.5 * pi * pi * pi * sin(pi * x));
    break;
  case KL_LAW_CYCLOIDAL:
    set(out, x - sin(2.0 * pi * x) / (2.0 * pi), 1.0 - cos(2.0 * pi * x),
        2.0 * pi * sin(2.0 * pi * x), 4.0 * pi * pi * cos(2.0 * pi * x));
    break;
  case KL_LAW_POLY345: {
    double x2 = x * x, x3 = x2 * x;
    set(out, x3 * (10.0 - 15.0 * x + 6.0 * x2),
        x2 * (30.0 - 60.0 * x + 30.0 * x2), x * (60.0 - 180.0 * x + 120.0 * x2),
        60.0 - 360.0 * x + 360.0 * x2);
    break;
  }
  case KL_LAW_POLY4567: {
    double x2 = x * x, x3 = x2 * x, x4 = x3 * x;
    set(out, x4 * (35.0 - 84.0 * x + 70.0 * x2 - 20.0 * x3),
        x3 * (140.0 - 420.0 * x + 420.0 * x2 - 140.0 * x3),
        x2 * (420.0 - 1680.0 * x + 2100.0 * x2 - 840.0 * x3),
        x * (840.0 - 5040.0 * x + 8400.0 * x2 - 4200.0 * x3));
    break;
  }
  default: {
    /* both built on their first half: the rise is symmetric about its
     * middle, s(x) = 1 - s(1 - x), so v and j are even about it and a odd */
    int second = x > 0.5;
    double half[4];
    if (law == KL_LAW_MOD_TRAPEZOID)
      trapezoid_half(second ? 1.0 - x : x, half);
    else
      sine_half(second ? 1.0 - x : x, half);
    if (second)
      set(out, 1.0 - half[0], half[1], -half[2], half[3]);
    else
      set(out, half[0], half[1], half[2], half[3]);
  }
  }
  return KL_OK;
}

const char *kl_motion_law_str(int law) {
  switch (law) {
  case KL_LAW_HARMONIC: return "simple harmonic";
  case KL_LAW_CYCLOIDAL: return "cycloidal";
  case KL_LAW_POLY345: return "3-4-5 polynomial";
  case KL_LAW_POLY4567: return "4-5-6-7 polynomial";
  case KL_LAW_MOD_TRAPEZOID: return "modified trapezoidal";
  case KL_LAW_MOD_SINE: return "modified sine";
  default: return "not a law";
  }
}
