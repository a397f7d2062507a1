/*
 * svg.c - what the drawing and the plots share: the document frame, text
 * made safe for XML, and the tool's colour palette.
 */
#include "cli.h"

void svg_begin(FILE *f, double width, double height, const char *background) {
  fprintf(f,
          "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
          "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" "
          "height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" font-family=\"%s\">\n"
          "<rect width=\"100%%\" height=\"100%%\" fill=\"%s\"/>\n",
          width, height, width, height, SVG_FONT, background);
}

void svg_end(FILE *f) { fputs("</svg>\n", f); }

/* Length of the UTF-8 sequence starting at s, or 0 if it is not one. */
static int utf8_length(const unsigned char *s) {
  int n, i;
  if (s[0] < 0x80)
    return 1;
  n = (s[0] & 0xe0) == 0xc0 ? 2 : (s[0] & 0xf0) == 0xe0 ? 3
      : (s[0] & 0xf8) == 0xf0                           ? 4
                                                        : 0;
  if (n == 2 && s[0] < 0xc2)
    return 0; /* overlong */
  for (i = 1; i < n; i++)
    if ((s[i] & 0xc0) != 0x80)
      return 0;
  return n;
}

/* Model names are bytes; XML wants well-formed UTF-8 without markup. */
void svg_escaped(FILE *f, const char *text) {
  const unsigned char *s = (const unsigned char *)text;
  while (*s != '\0') {
    int n = utf8_length(s);
    if (n == 0) {
      fputc('?', f);
      s++;
      continue;
    }
    if (n > 1) {
      fwrite(s, 1, (size_t)n, f);
      s += n;
      continue;
    }
    switch (*s) {
    case '&':
      fputs("&amp;", f);
      break;
    case '<':
      fputs("&lt;", f);
      break;
    case '>':
      fputs("&gt;", f);
      break;
    case '"':
      fputs("&quot;", f);
      break;
    case '\'':
      fputs("&apos;", f);
      break;
    default:
      fputc(*s < 0x20 ? '?' : *s, f);
      break;
    }
    s++;
  }
}

const char *svg_colour(int k) {
  static const char *const palette[] = {"#1f7a74", "#b4532a", "#3b5aa6",
                                        "#b08a18", "#8c3d78", "#5f7d2e",
                                        "#6b4b3a", "#2f8fbf"};
  return palette[k % (int)(sizeof palette / sizeof palette[0])];
}
