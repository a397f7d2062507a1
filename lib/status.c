/*
 * status.c - version, status texts and the message formatter every handle
 * uses for its last-failure message.
 */
#include <stdarg.h>
#include <stdio.h>

#include "model.h"

const char *kl_version(void) { return KINLOOP_VERSION; }

int kl_version_number(void) { return KINLOOP_VERSION_NUMBER; }

const char *kl_status_str(int status) {
  switch (status) {
  case KL_OK: return "ok";
  case KL_LIMIT: return "motion limit reached";
  case KL_STOPPED: return "stopped by the callback";
  case KL_ENOMEM: return "out of memory";
  case KL_EINVAL: return "invalid argument";
  case KL_ENONFINITE: return "number is NaN or infinite";
  case KL_EID: return "unknown id";
  case KL_EKIND: return "id of the wrong kind";
  case KL_ESTATE: return "call not allowed in this state";
  case KL_ESELFJOINT: return "joint joins a link to itself";
  case KL_EDUPLICATE: return "duplicate";
  case KL_EDISCONNECTED: return "link not connected to ground";
  case KL_EZEROLENGTH: return "zero length";
  case KL_ELOOP: return "loop is not a simple cycle";
  case KL_ELOOPSET: return "loops are not a full independent set";
  case KL_EOVERCONSTRAINED: return "over-constrained";
  case KL_EDOF: return "inputs do not match the degrees of freedom";
  case KL_EUNDETERMINED: return "coordinate not determined by any equation";
  case KL_EMAXITER: return "no convergence within the iteration limit";
  case KL_ENOASSEMBLY: return "no assembly: the loops cannot close";
  case KL_ESINGULAR: return "singular Jacobian";
  case KL_ESTAGE: return "stage called before the stage it needs";
  case KL_ESYNTAX: return "model file syntax error";
  case KL_EIO: return "file could not be read or written";
  case KL_ETRUNCATED: return "buffer too small: output cut short";
  case KL_ETOOLARGE: return "request exceeds a bound of the library";
  case KL_EINDETERMINATE: return "statically indeterminate: forces not determined";
  case KL_EFEWPOINTS: return "too few points for the curve";
  case KL_EREPEATED: return "a curve repeats a point";
  case KL_ERADIUS: return "radius zero or negative";
  case KL_EUNDERCUT: return "cam surface undercut by the roller";
  case KL_EPRESSURE: return "pressure angle above the bound";
  case KL_EJOIN: return "motion profile segments do not join";
  case KL_ENOMESH: return "gear pair cannot mesh at its centre distance";
  case KL_ENOCOMMON: return "coupled joints share no link";
  case KL_ESELFCOUPLING: return "joint coupled with itself";
  default: return "unknown status";
  }
}

int kli_fail(char *buf, int status, const char *fmt, ...) {
  va_list ap;
  if (buf == NULL)
    return status;
  va_start(ap, fmt);
  vsnprintf(buf, KLI_MESSAGE_SIZE, fmt, ap);
  va_end(ap);
  return status;
}
