/* status.h - the status codes, as installed for users in propbench/status.h. */
#ifndef PB_PROBLEMS_STATUS_H
#define PB_PROBLEMS_STATUS_H

#include "propbench/status.h"

#endif
