/*
 * fuzz_api.c - fuzz target for random sequences of API calls with random
 * numbers: the bytes are a program of builder, solver and figure calls (then
 * of reach, frame, row and loop-reading calls) with
 * ids in and out of range and numbers that may be NaN, infinite or huge.
 * Nothing may crash, leak or return a status outside the known set.
 * Each number is read into a variable before the call that takes it: the
 * order in which a call's arguments are evaluated differs between
 * compilers, and an input found with clang must replay the same with gcc.
 */
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "kinloop.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

typedef struct {
  const uint8_t *data;
  size_t size, pos;
} program;

static unsigned byte(program *p) {
  return p->pos < p->size ? p->data[p->pos++] : 0u;
}

/* An id near the valid range, sometimes outside it. */
static int id(program *p, int count) {
  return (int)(byte(p) % (unsigned)(count + 3)) - 1;
}

static double number(program *p) {
  static const double special[] = {0.0,  1.0,   -1.0,  100.0, 1e-300,
                                   1e300, NAN,   INFINITY, -INFINITY, 0.5};
  unsigned kind = byte(p);
  if (kind < 10)
    return special[kind];
  if (kind < 128) /* small lengths and angles */
    return ((double)(int)byte(p) - 128.0) * 0.73 + (double)(kind & 7);
  {
    uint64_t bits = 0;
    double v;
    int k;
    for (k = 0; k < 8; k++)
      bits = bits << 8 | byte(p);
    memcpy(&v, &bits, sizeof v);
    return v;
  }
}

/* Every status the library returns has its own text. */
static void check(int status) {
  if (status > KL_STOPPED ||
      strcmp(kl_status_str(status), kl_status_str(KL_STOPPED + 1)) == 0)
    abort();
}

/* A count or an offset, or a status when negative. */
static void check_count(int n) { check(n < 0 ? n : KL_OK); }

static void build(program *p, kl_model *m) {
  int ops = (int)(byte(p) % 24), k;
  for (k = 0; k < ops && p->pos < p->size; k++) {
    int nl = kl_model_link_count(m), nj = kl_model_joint_count(m);
    int joints[6], n, i, a, b;
    double ax = number(p), ay = number(p), bx, by, angle;
    switch (byte(p) % 11) {
    case 0:
    case 1:
      kl_add_link(m, byte(p) & 1 ? NULL : "n");
      break;
    case 2:
    case 3:
      a = id(p, nl);
      b = id(p, nl);
      bx = number(p);
      by = number(p);
      kl_add_revolute(m, a, ax, ay, b, bx, by);
      break;
    case 4:
      a = id(p, nl);
      angle = number(p);
      b = id(p, nl);
      bx = number(p);
      by = number(p);
      kl_add_prismatic(m, a, ax, ay, angle, b, bx, by);
      break;
    case 5:
      a = id(p, nl);
      bx = number(p);
      by = number(p);
      b = id(p, nl);
      angle = number(p);
      kl_add_slot_through(m, a, ax, ay, bx, by, b, angle, number(p));
      break;
    case 6:
      a = id(p, nl);
      kl_add_point(m, a, ax, ay, NULL);
      /* the same numbers as mass properties of the point's link */
      check(kl_set_link_mass(m, a, fabs(ax), ay, ax, fabs(ay)));
      break;
    case 7:
      check(kl_add_input(m, id(p, nj)));
      break;
    case 8:
      n = (int)(byte(p) % 6) + 1;
      for (i = 0; i < n; i++)
        joints[i] = id(p, nj);
      check(kl_add_loop(m, n, joints));
      if (n == 6)
        check(kl_model_set_redundancy(m, 1));
      break;
    case 9:
      check(kl_model_set_sketch_angle(m, id(p, nl), ax));
      check(kl_model_set_gravity(m, ax, ay));
      break;
    default:
      check(kl_model_set_sketch_slide(m, id(p, nj), ax));
    }
  }
}

/* The calls added after the first corpus: a program of their own after
 * the first one's, so that saved inputs keep their meaning. */
static void more_calls(program *p, kl_model *m, kl_solver *s) {
  int ni = kl_model_input_count(m), nl = kl_model_link_count(m);
  int nj = kl_model_joint_count(m), np = kl_model_point_count(m);
  int size = kl_model_row_size(m), ops = (int)(byte(p) % 16), k, i;
  double in[8], *rows = malloc((size_t)(6 * size) * sizeof *rows);
  if (rows == NULL || size < 1 || ni > 8) {
    free(rows);
    return;
  }
  for (k = 0; k < ops && p->pos < p->size; k++) {
    kl_reach_result rr;
    kl_sweep_result sw;
    kl_range r;
    kl_fourbar fb;
    kl_output sites[4];
    kl_transmission_skip skips[4];
    kl_load load;
    double xy[2], v, w;
    int a, b, c;
    for (i = 0; i < ni; i++)
      in[i] = number(p);
    switch (byte(p) % 9) {
    case 0: check(kl_solver_reset(s)); break;
    case 1:
      rr.size = sizeof rr;
      check(kl_solver_reach(s, in, &rr));
      break;
    case 2:
      a = id(p, nl);
      xy[0] = number(p);
      xy[1] = number(p);
      check(kl_link_to_global(s, a, xy, xy));
      check(kl_joint_position(s, id(p, nj), xy));
      break;
    case 3:
      a = id(p, nl);
      check(kl_link_origin_velocity(s, a, xy));
      check(kl_link_origin_accel(s, a, xy));
      break;
    case 4: check(kl_solver_row(s, rows)); break;
    case 5:
      sw.size = sizeof sw;
      a = id(p, ni);
      v = number(p);
      w = number(p);
      check(kl_solver_sweep_rows(s, a, v, w, (int)(byte(p) % 6), rows, &sw));
      break;
    case 6:
      r.size = sizeof r;
      load.kind = (int)(byte(p) % 3);
      load.id = id(p, load.kind == KL_LOAD_FORCE ? np : nl);
      load.fx = number(p);
      load.fy = number(p);
      load.torque = number(p);
      a = id(p, ni);
      b = id(p, ni);
      v = number(p);
      w = number(p);
      c = 1 + (int)(byte(p) % 4);
      check(kl_input_effort_range(s, a, v, w, c, 1, &load, b, &r));
      break;
    case 7:
      fb.size = sizeof fb;
      check(kl_model_loop_fourbar(m, id(p, kl_model_loop_count(m)), &fb));
      check_count(kl_model_transmissions(m, sites, 4));
      check_count(kl_model_transmission_skips(m, skips, 4));
      break;
    default:
      check(kl_model_start_inputs(m, in));
      a = (int)(byte(p) % 21) - 1;
      check_count(kl_model_row_offset(m, a, &b));
      if (a >= 0 && a < 18 && kl_quantity_str(a) == NULL)
        abort();
    }
  }
  free(rows);
}

static void solve(program *p, kl_model *m) {
  kl_solver *s = kl_solver_new(m), *other;
  int ni = kl_model_input_count(m), nl = kl_model_link_count(m);
  int nj = kl_model_joint_count(m), np = kl_model_point_count(m);
  int ops = (int)(byte(p) % 16), k, i;
  double in[8], out[8], rows[512];
  if (s == NULL || ni > 8)
    goto done;
  other = kl_solver_new(m);
  for (k = 0; k < ops && p->pos < p->size; k++) {
    kl_output o;
    kl_range r;
    kl_sweep_result sw;
    kl_dimension d;
    kl_load load;
    double v, w;
    int a;
    for (i = 0; i < ni; i++)
      in[i] = number(p);
    o.kind = (int)(byte(p) % 7);
    o.id = id(p, nj);
    o.line_a = id(p, nj);
    o.line_b = id(p, nj);
    switch (byte(p) % 13) {
    case 0:
      a = id(p, nl);
      check(kl_set_link_angle(s, a, number(p)));
      break;
    case 1:
      a = id(p, nj);
      check(kl_set_joint_slide(s, a, number(p)));
      break;
    case 2:
    case 3: check(kl_solve_position(s, in)); break;
    case 4: check(kl_solve_velocity(s, in)); break;
    case 5:
      /* the jerk stage right after, with the same numbers as jerks */
      check(kl_solve_acceleration(s, in));
      check(kl_solve_jerk(s, in));
      check(kl_point_jerk(s, id(p, np), out));
      check(kl_link_origin_jerk(s, id(p, nl), out));
      v = kl_link_jerk(s, id(p, nl)) + kl_joint_slide_jerk(s, id(p, nj));
      (void)v;
      break;
    case 6: check(kl_solve_coefficients(s)); break;
    case 7:
      sw.size = sizeof sw;
      a = id(p, ni);
      v = number(p);
      w = number(p);
      check(kl_solver_sweep(s, a, v, w, (int)(byte(p) % 6), NULL, NULL, &sw));
      {
        /* the forces over the same range, the first input value as speed */
        kl_cycle c;
        kl_cycle_summary sum;
        kl_cycle_default(&c);
        c.input = a;
        c.from = v;
        c.to = w;
        c.steps = 1 + sw.steps_done % 3;
        c.speed = ni > 0 ? in[0] : 1.0;
        c.speed_fluctuation = ni > 1 ? in[1] : 0.0;
        sum.size = sizeof sum;
        check(kl_cycle_table(s, &c, 0, NULL, rows, 512, NULL));
        check(kl_cycle_summarize(s, &c, 0, NULL, &sum, NULL, NULL));
      }
      break;
    case 8:
      r.size = sizeof r;
      a = id(p, ni);
      v = number(p);
      w = number(p);
      check(kl_output_range(s, a, v, w, 1 + (int)(byte(p) % 4), &o, &r));
      break;
    case 9:
      check(kl_output_value(s, &o, &v));
      check(kl_output_deriv(s, &o, id(p, ni), &w));
      break;
    case 10:
      d.kind = (int)(byte(p) % 4);
      d.id = id(p, d.kind == KL_DIMENSION_POINT ? np : nj);
      d.axis = (int)(byte(p) % 3);
      check(kl_output_sensitivity(s, &o, &d, &v));
      break;
    case 11:
      load.kind = (int)(byte(p) % 3);
      load.id = id(p, load.kind == KL_LOAD_FORCE ? np : nl);
      load.fx = number(p);
      load.fy = number(p);
      load.torque = number(p);
      check(kl_input_effort(s, 1, &load, out));
      check(kl_solve_forces(s, 1, &load, out));
      check(kl_joint_force(s, load.id, out));
      check(kl_ground_force(s, out));
      v = kl_joint_moment(s, load.id);
      (void)v;
      break;
    default:
      check(kl_solver_copy_state(other, s));
    }
  }
  more_calls(p, m, s);
  kl_solver_free(other);
done:
  kl_solver_free(s);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  program p;
  kl_model *m = kl_model_new();
  p.data = data;
  p.size = size;
  p.pos = 0;
  if (m == NULL)
    return 0;
  build(&p, m);
  if (kl_model_finalize(m) == KL_OK)
    solve(&p, m);
  kl_model_free(m);
  return 0;
}
