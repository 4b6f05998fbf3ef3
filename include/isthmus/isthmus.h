/* isthmus/isthmus.h - the whole public interface of libisthmus and its version. */
#ifndef ISTHMUS_ISTHMUS_H
#define ISTHMUS_ISTHMUS_H

#include <isthmus/error.h>
#include <isthmus/filekind.h>
#include <isthmus/cancel.h>
#include <isthmus/output.h>
#include <isthmus/matrix.h>
#include <isthmus/vocab.h>
#include <isthmus/store.h>
#include <isthmus/linalg.h>
#include <isthmus/norm.h>
#include <isthmus/retrieve.h>
#include <isthmus/pairs.h>
#include <isthmus/align.h>
#include <isthmus/metrics.h>
#include <isthmus/bootstrap.h>
#include <isthmus/result.h>
#include <isthmus/gate.h>
#include <isthmus/propose.h>
#include <isthmus/text.h>
#include <isthmus/corpus.h>
#include <isthmus/diag.h>
#include <isthmus/report.h>
#include <isthmus/sgns.h>
#include <isthmus/ppmi.h>
#include <isthmus/combine.h>
#include <isthmus/cluster.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Library version, "MAJOR.MINOR.PATCH". */
IST_API const char *ist_version(void);

#ifdef __cplusplus
}
#endif
#endif
