/* method_table.c - the registry of methods, in display order. Adding a method
 * is one file, one extern line and one table line here. */
#include <stdio.h>
#include <math.h>
#include <string.h>
#include "method.h"
#include "formulation.h"

extern const pb_method_type pb_method_rk4;
extern const pb_method_type pb_method_leapfrog;
extern const pb_method_type pb_method_yoshida4;
extern const pb_method_type pb_method_yoshida6;
extern const pb_method_type pb_method_yoshida8;
extern const pb_method_type pb_method_leapfrog_tt;
extern const pb_method_type pb_method_yoshida4_tt;
extern const pb_method_type pb_method_yoshida6_tt;
extern const pb_method_type pb_method_yoshida8_tt;
extern const pb_method_type pb_method_rkf45;
extern const pb_method_type pb_method_dop853;
extern const pb_method_type pb_method_bulirsch_stoer;
extern const pb_method_type pb_method_gsl_rk4;
extern const pb_method_type pb_method_gsl_rkf45;
extern const pb_method_type pb_method_gsl_rkck;
extern const pb_method_type pb_method_gsl_rk8pd;
extern const pb_method_type pb_method_gsl_msadams;
extern const pb_method_type pb_method_gauss_jackson8;
extern const pb_method_type pb_method_gauss_jackson8_s;
extern const pb_method_type pb_method_gauss_legendre;
extern const pb_method_type pb_method_gauss_legendre12;
extern const pb_method_type pb_method_rkn12;
extern const pb_method_type pb_method_radau15;
extern const pb_method_type pb_method_kepler_split2;
extern const pb_method_type pb_method_kepler_split4;
extern const pb_method_type pb_method_kepler_split8;
extern const pb_method_type pb_method_kepler_split4c;
extern const pb_method_type pb_method_kepler_split8c;

const pb_method_type *const pb_method_table[] = {
    &pb_method_rk4,
    &pb_method_leapfrog,
    &pb_method_yoshida4,
    &pb_method_yoshida6,
    &pb_method_yoshida8,
    &pb_method_leapfrog_tt,
    &pb_method_yoshida4_tt,
    &pb_method_yoshida6_tt,
    &pb_method_yoshida8_tt,
    &pb_method_rkf45,
    &pb_method_dop853,
    &pb_method_bulirsch_stoer,
    &pb_method_gsl_rk4,
    &pb_method_gsl_rkf45,
    &pb_method_gsl_rkck,
    &pb_method_gsl_rk8pd,
    &pb_method_gsl_msadams,
    &pb_method_gauss_jackson8,
    &pb_method_gauss_jackson8_s,
    &pb_method_gauss_legendre,
    &pb_method_gauss_legendre12,
    &pb_method_rkn12,
    &pb_method_radau15,
    &pb_method_kepler_split2,
    &pb_method_kepler_split4,
    &pb_method_kepler_split8,
    &pb_method_kepler_split4c,
    &pb_method_kepler_split8c,
    NULL
};

/* Plug-in methods, after the table: registered once at start-up (before
 * any sweep worker is forked), never removed. */
static const pb_method_type *method_extra[PB_METHOD_EXTRA_MAX];
static const pb_method_origin *method_extra_origin[PB_METHOD_EXTRA_MAX];
static int method_nextra;

const pb_method_type *pb_method_find(const char *name)
{
    if (!name)
        return NULL;
    for (const pb_method_type *const *m = pb_method_table; *m; m++)
        if (strcmp((*m)->name, name) == 0)
            return *m;
    for (int i = 0; i < method_nextra; i++)
        if (strcmp(method_extra[i]->name, name) == 0)
            return method_extra[i];
    return NULL;
}

const pb_method_type *pb_method_at(int i)
{
    int nb = (int)(sizeof pb_method_table / sizeof pb_method_table[0]) - 1;
    if (i < 0)
        return NULL;
    if (i < nb)
        return pb_method_table[i];
    return i - nb < method_nextra ? method_extra[i - nb] : NULL;
}

const pb_method_origin *pb_method_origin_of(const pb_method_type *m)
{
    for (int i = 0; m && i < method_nextra; i++)
        if (method_extra[i] == m)
            return method_extra_origin[i];
    return NULL;
}

int pb_method_register(const pb_method_type *m, const pb_method_origin *origin, char *err,
                       size_t errlen)
{
    if (pb_method_check(m, err, errlen))
        return -1;
    const pb_method_type *old = pb_method_find(m->name);
    if (old) {
        const pb_method_origin *o = pb_method_origin_of(old);
        snprintf(err, errlen, "method %s: the name is taken by %s", m->name,
                 o ? o->path : "a built-in method");
        return -1;
    }
    if (method_nextra == PB_METHOD_EXTRA_MAX) {
        snprintf(err, errlen, "method %s: more than %d plug-in methods", m->name,
                 PB_METHOD_EXTRA_MAX);
        return -1;
    }
    method_extra[method_nextra] = m;
    method_extra_origin[method_nextra++] = origin;
    return 0;
}

int pb_method_check(const pb_method_type *m, char *err, size_t errlen)
{
    const char *name = m && m->abi == PB_METHOD_ABI && m->size == sizeof *m && m->name ? m->name
                                                                                         : "?";
    const char *why = NULL;
    char buf[160];
    if (!m) {
        why = "no method record";
    } else if (m->abi != PB_METHOD_ABI) {
        /* the other fields may sit elsewhere: read nothing more of it */
        snprintf(buf, sizeof buf, "method record built for interface version %u, this "
                 "propbench has version %u: rebuild it against these headers", m->abi,
                 PB_METHOD_ABI);
        why = buf;
    } else if (m->size != sizeof *m) {
        snprintf(buf, sizeof buf, "method record is %u bytes, this propbench's is %zu: "
                 "rebuild it against these headers", m->size, sizeof *m);
        why = buf;
    } else if (!m->name || !m->name[0]) {
        why = "method record has no name";
    } else if (m->order < 1 || m->order > 30) {
        snprintf(buf, sizeof buf, "order %d outside 1..30", m->order);
        why = buf;
    } else if (!(m->flags & PB_KIND_FIXED) == !(m->flags & PB_KIND_ADAPTIVE)) {
        why = "flags must hold exactly one of PB_KIND_FIXED and PB_KIND_ADAPTIVE";
    } else if (!m->alloc || !m->start || !m->advance || !m->get_state || !m->get_stats ||
               !m->free || !m->dense) {
        why = "a function of the record (alloc, start, advance, get_state, get_stats, "
              "free, dense) is NULL";
    } else if (m->dense_order < 1 || m->dense_order > m->order) {
        snprintf(buf, sizeof buf, "dense order %d outside 1..%d (its order)", m->dense_order,
                 m->order);
        why = buf;
    }
    if (!why)
        return 0;
    if (strcmp(name, "?"))
        snprintf(err, errlen, "method %s: %s", name, why);
    else
        snprintf(err, errlen, "%s", why);
    return -1;
}

/* A regularised formulation (a problem's, or one a method steps in) is set
 * up from the Kepler period of the start (its time scale, and the steps per
 * period of a fixed-step method): it needs a bound orbit there (negative
 * two-body energy). */
static int method_unbound(const pb_method_type *m, const pb_problem *p)
{
    if (!pb_formulation_wraps(m) && p->formulation == PB_FORMULATION_CARTESIAN)
        return 0;
    double mu = pb_problem_kepler_mu(p), r2 = 0, v2 = 0;
    if (!(mu > 0))
        return 0;  /* no central body at all: refused for that, elsewhere */
    for (int i = 0; i < p->dim; i++)
        r2 += p->r0[i] * p->r0[i], v2 += p->v0[i] * p->v0[i];
    return !(r2 > 0 && 0.5 * v2 - mu / sqrt(r2) < 0);
}

int pb_method_fits(const pb_method_type *m, const pb_problem *p)
{
    if ((m->flags & PB_KIND_KEPLER) && pb_problem_kepler_mu(p) <= 0)
        return 0;
    if (method_unbound(m, p))
        return 0;
    return !((m->flags & PB_FORM_SECOND) && p->velocity_dependent);
}

int pb_method_exact_on(const pb_method_type *m, const pb_problem *p)
{
    unsigned both = PB_KIND_KEPLER | PB_KIND_KEPLER_EXACT;
    return (m->flags & both) == both && p->force == PB_FORCE_TWO_BODY && pb_method_fits(m, p);
}

int pb_method_fit_error(const pb_method_type *m, const pb_problem *p, char *err, size_t errlen)
{
    int no_mu = (m->flags & PB_KIND_KEPLER) && pb_problem_kepler_mu(p) <= 0;
    int vel = (m->flags & PB_FORM_SECOND) && p->velocity_dependent;
    if (!no_mu && method_unbound(m, p)) {
        snprintf(err, errlen, "method '%s' %s, which is set up from the Kepler period of the "
                 "start and needs a bound orbit, but problem '%s' starts on an unbound one", m->name,
                 pb_formulation_wraps(m) ? "steps in a regularised time" : "in the problem's "
                 "regularised formulation", p->name);
        return -1;
    }
    if (!no_mu && !vel)
        return 0;
    snprintf(err, errlen, "method '%s' %s%s%s, but problem '%s' %s%s%s", m->name,
             no_mu ? "is built around the Kepler flow of a central body" : "",
             no_mu && vel ? " and " : "", vel ? "needs a velocity-independent force" : "",
             p->name, no_mu ? "has no central -mu r/|r|^3 term" : "", no_mu && vel ? " and " : "",
             vel ? "depends on velocity" : "");
    return -1;
}
