/*
 * reactions.h - private: at finalize, the unknowns of the force stage (joint
 * reactions and input efforts), the rows of every moving link, their pattern.
 */
#ifndef KINLOOP_REACTIONS_H
#define KINLOOP_REACTIONS_H

#include "model.h"

/* Carves the force pattern's arrays (bounds from the model's counts). */
void kli_carve_reactions(const kl_model *m, kli_force_pattern *f,
                         kli_carver *c);
/* Lays out the force system of a finalized topology t (its redundancy
 * set): unknowns, entries and their band-reducing ordering; none when the
 * model declares redundant constraints. KL_OK or KL_ENOMEM. */
int kli_build_reactions(kl_model *m, kli_topology *t);

#endif
