/* hn_status.h - status codes shared by every module of libhone.
 *
 * Library functions in fit/ and diagnose/ never print: they return one of
 * these codes and fill result structs.  0 is success. */
#ifndef HN_STATUS_H
#define HN_STATUS_H

typedef enum {
    HN_OK = 0,
    HN_EINVAL,     /* bad argument or malformed text */
    HN_ENOMEM,     /* allocation failed */
    HN_ESHORT,     /* too few observations for what was asked */
    HN_ENOCONV,    /* optimiser stopped without meeting its tolerance */
    HN_ESINGULAR,  /* singular matrix (Hessian, design matrix) */
    HN_EDOMAIN,    /* value outside its domain (log of a non-positive number, ...) */
    HN_EINTR,      /* interrupted by the user (Ctrl-C flag) */
    HN_EIO,        /* file could not be read or written */
    HN_EPARSE,     /* input text could not be parsed */
    HN_ECONST,     /* data are constant: nothing to estimate */
    HN_ENUMERIC,   /* a non-finite value arose in a computation */
    HN_ELIMIT      /* input exceeds a stated size limit */
} hn_status;

/* A short English phrase for a status code (static storage). */
const char *hn_strerror(int status);

#endif
