/* cancel.c - the process-wide stop flag. */
#include <isthmus/cancel.h>

#include <signal.h>

static volatile sig_atomic_t cancel_flag;

void
ist_cancel_request(void)
{
    cancel_flag = 1;
}

void
ist_cancel_reset(void)
{
    cancel_flag = 0;
}

int
ist_cancel_requested(void)
{
    return cancel_flag != 0;
}
