/*
 * sincos.h - private: the sine and cosine of one angle together. glibc's
 * sincos() takes both for half the work of two calls; elsewhere the two
 * calls. Include it first in a source file: it asks for glibc's GNU
 * extensions before any system header is read.
 */
#ifndef KINLOOP_SINCOS_H
#define KINLOOP_SINCOS_H

#ifndef _GNU_SOURCE
#define _GNU_SOURCE
#endif
#include <math.h>

#if defined(__GLIBC__)
#define kli_sincos(a, s, c) sincos((a), (s), (c))
#else
#define kli_sincos(a, s, c) (*(s) = sin(a), *(c) = cos(a))
#endif

#endif
