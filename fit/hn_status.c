/* hn_status.c - text for the status codes. */
#include "hn_status.h"

const char *hn_strerror(int status)
{
    switch (status) {
    case HN_OK:        return "success";
    case HN_EINVAL:    return "invalid argument";
    case HN_ENOMEM:    return "out of memory";
    case HN_ESHORT:    return "too few observations";
    case HN_ENOCONV:   return "the optimiser did not converge";
    case HN_ESINGULAR: return "singular matrix";
    case HN_EDOMAIN:   return "value outside its domain";
    case HN_EINTR:     return "interrupted";
    case HN_EIO:       return "input/output error";
    case HN_EPARSE:    return "could not parse input";
    case HN_ECONST:    return "the data are constant";
    case HN_ENUMERIC:  return "a non-finite value arose";
    case HN_ELIMIT:    return "input exceeds the size limit";
    default:           return "unknown status";
    }
}
