/* irrecon.h: the one public header for programs that embed irrecon, the
 * library behind the `irrecon` program. It checks a measured infrared
 * spectrum against a proposed structure: read the spectrum (spectrum.h),
 * pick its peaks (peaks.h), parse the structure (structure.h), perceive its
 * groups (perceive.h), predict the expected bands from the group-frequency
 * tables (tables.h, predict.h), reconcile the two and reach a verdict
 * (reconcile.h), and report it (report.h). A request (request.h) describes
 * one check as data; a manifest (batch.h) describes many.
 *
 * Conventions of every header: public names start with irr_; objects are
 * opaque with create/free pairs and irr_*_free(NULL) does nothing; a result
 * returned through a `T **out` first parameter belongs to the caller, a
 * pointer returned directly is borrowed; functions return an int status (0
 * success, negative failure, common.h) and fill a caller-owned irr_error
 * with the message, file and line. The library never prints and never
 * exits. Open Babel, which parses SMILES, keeps global state: use processes,
 * not threads, to check samples in parallel.
 *
 * Build with: cc prog.c $(pkg-config --cflags --libs irrecon)
 * Licence: GPL-2.0-or-later. A verdict is evidence, never proof of identity
 * or purity. */
#ifndef IRRECON_H
#define IRRECON_H

#include "irrecon/common.h"
#include "irrecon/sha256.h"
#include "irrecon/spectrum.h"
#include "irrecon/spectrum_write.h"
#include "irrecon/peaks.h"
#include "irrecon/axischeck.h"
#include "irrecon/structure.h"
#include "irrecon/keys.h"
#include "irrecon/perceive.h"
#include "irrecon/structcache.h"
#include "irrecon/tables.h"
#include "irrecon/predict.h"
#include "irrecon/reconcile.h"
#include "irrecon/solvents.h"
#include "irrecon/report.h"
#include "irrecon/synth.h"
#include "irrecon/request.h"
#include "irrecon/batch.h"

#endif
