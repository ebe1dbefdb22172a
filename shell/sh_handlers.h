/* sh_handlers.h - command groups: each shell/sh_cmd_*.c file exports one
 * table of commands, terminated by an entry with a NULL name; sh_cmd.c
 * joins them in the order listed in its group list. */
#ifndef SH_HANDLERS_H
#define SH_HANDLERS_H

#include "sh_cmd.h"

extern const sh_command sh_cmds_data[];     /* load, series, transform */
extern const sh_command sh_cmds_prefit[];   /* stationarity */
extern const sh_command sh_cmds_model[];    /* fit, check, models, use */
extern const sh_command sh_cmds_forecast[]; /* forecast, holdout */
extern const sh_command sh_cmds_sim[];      /* simulate */
extern const sh_command sh_cmds_audit[];    /* record, note, replay */
extern const sh_command sh_cmds_output[];   /* plot, save, report */
extern const sh_command sh_cmds_misc[];     /* set, help, quit */
extern const sh_command sh_cmds_advise[];   /* advise, step, refine, scan */

#endif
