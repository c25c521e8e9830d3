/*
 * The apnoea model's time loop, compiled: the same arithmetic as
 * airway.oxygenation.loop_python, operation for operation, so that every
 * figure is the same to the last bit (tests/test_oxygenation.py compares the two
 * over thousands of random women). Optional: when it is not built, airway runs
 * the Python loop and gives the same plans, only slower.
 *
 * One call runs several scenarios, a step of each in turn: each step waits on the
 * one before it (a chain of divisions), so the processor works on the other
 * scenarios' steps meanwhile. Each scenario's arithmetic is the one loop's.
 *
 * Every constant comes from Python as an argument; none is written here.
 * Build with floating-point contraction off (no fused multiply-add), as
 * pyproject.toml asks, or results could differ from Python's in the last bit.
 */
#define PY_SSIZE_T_CLEAN
#include <Python.h>
#include <math.h>

/* round(100 * sao2, 1) exactly as Python computes it: the double nearest to the
 * one-decimal number nearest to y = 100 * sao2 (ties to even, on y's exact binary
 * value). Fast path: z = 10 * y is within half a unit in its last place (under
 * 1e-9 below 1e6) of the exact product, so where z's fraction is further than 1e-6
 * from one half the rounding direction is certain, and whole / 10.0, one correctly
 * rounded division, is the double nearest that decimal. Near a tie, and for
 * anything out of range, Python's own conversion decides (the same correctly
 * rounded digits that round() uses). Returns -1 with an exception set on failure. */
static int percent_tenths(double sao2, double *out) {
    double y = 100.0 * sao2;
    if (y >= 0.0 && y < 1e6) {
        double z = y * 10.0;
        double whole = floor(z);
        double frac = z - whole; /* exact: whole is z's integer part */
        if (fabs(frac - 0.5) > 1e-6) {
            *out = (frac < 0.5 ? whole : whole + 1.0) / 10.0;
            return 0;
        }
    }
    char *text = PyOS_double_to_string(y, 'f', 1, 0, NULL);
    if (text == NULL) {
        return -1;
    }
    double value = PyOS_string_to_double(text, NULL, NULL);
    PyMem_Free(text);
    if (value == -1.0 && PyErr_Occurred()) {
        return -1;
    }
    *out = value;
    return 0;
}

/* round_percent(sao2) -> round(100 * sao2, 1); for the tests. */
static PyObject *round_percent(PyObject *self, PyObject *arg) {
    (void)self;
    double sao2 = PyFloat_AsDouble(arg);
    if (sao2 == -1.0 && PyErr_Occurred()) {
        return NULL;
    }
    double out;
    if (percent_tenths(sao2, &out) < 0) {
        return NULL;
    }
    return PyFloat_FromDouble(out);
}

static PyObject *time_or_none(int reached, double t) {
    if (!reached) {
        Py_RETURN_NONE;
    }
    return PyFloat_FromDouble(t);
}

/* One scenario under way. */
typedef struct {
    double v_o2, v_n2, pool, hb_cap, flow, kept, shunt, bv, p50, o2_in, n2_in;
    double paco2_start, dry, use_long, use_short;
    double t, next_point, t95, t90, t80;
    int has95, has90, has80, done;
    PyObject *points; /* list of (seconds, SaO2 %) */
} Scenario;

typedef struct {
    double sev_p50, solubility, rise, step_s, step_long_s, long_above, horizon_s, curve_every;
} Constants;

/* One step of one scenario: airway.oxygenation.loop_python's loop body, line for
 * line. Returns -1 with an exception set on failure. */
static inline int step(Scenario *r, const Constants *k) {
    if (!(r->t <= k->horizon_s)) {
        r->done = 1;
        return 0;
    }
    double t = r->t;
    double late = t / 60.0 - 1.0;
    double paco2 = late > 0.0 ? r->paco2_start + k->rise * late : r->paco2_start;
    double total = r->v_o2 + r->v_n2;
    double pao2 = total > 0 ? (r->dry - paco2) * r->v_o2 / total : 0.0;
    if (!(pao2 > 0.0)) {
        pao2 = 0.0;
    }
    double sp = pao2 * k->sev_p50 / r->p50;
    double sc = sp > 0 ? 1.0 / (23400.0 / (sp * sp * sp + 150.0 * sp) + 1.0) : 0.0;
    double cc = r->hb_cap * sc + k->solubility * pao2;
    double cv = r->pool / r->bv;
    double venous = cv / r->hb_cap;
    double sao2 = r->kept * sc + r->shunt * (venous < 1.0 ? venous : 1.0);
    if (t >= r->next_point) {
        double percent;
        if (percent_tenths(sao2, &percent) < 0) {
            return -1;
        }
        PyObject *point = Py_BuildValue("(ld)", (long)t, percent);
        if (point == NULL || PyList_Append(r->points, point) < 0) {
            Py_XDECREF(point);
            return -1;
        }
        Py_DECREF(point);
        r->next_point += k->curve_every;
    }
    if (sao2 < 0.95) {
        if (!r->has95) {
            r->has95 = 1;
            r->t95 = t;
        }
        if (sao2 < 0.90) {
            if (!r->has90) {
                r->has90 = 1;
                r->t90 = t;
            }
            if (sao2 < 0.80) {
                r->has80 = 1;
                r->t80 = t;
                r->done = 1;
                return 0;
            }
        }
    }
    double dt, used;
    if (sao2 > k->long_above) {
        dt = k->step_long_s;
        used = r->use_long;
    } else {
        dt = k->step_s;
        used = r->use_short;
    }
    double uptake = r->flow * (cc - cv);
    uptake = (uptake > 0.0 ? uptake : 0.0) * dt;
    if (!(uptake < r->v_o2)) {
        uptake = r->v_o2;
    }
    r->v_o2 += r->o2_in * uptake;
    r->v_n2 += r->n2_in * uptake;
    double pool = r->pool + uptake - used;
    r->pool = pool > 0.0 ? pool : 0.0;
    r->t = t + dt;
    return 0;
}

/* (t95, t90, t80, ((seconds, SaO2 %), ...)) of a finished scenario; NULL on failure. */
static PyObject *result(Scenario *r) {
    PyObject *curve_points = PyList_AsTuple(r->points);
    if (curve_points == NULL) {
        return NULL;
    }
    PyObject *a = time_or_none(r->has95, r->t95);
    PyObject *b = time_or_none(r->has90, r->t90);
    PyObject *c = time_or_none(r->has80, r->t80);
    if (a == NULL || b == NULL || c == NULL) {
        Py_XDECREF(a);
        Py_XDECREF(b);
        Py_XDECREF(c);
        Py_DECREF(curve_points);
        return NULL;
    }
    return Py_BuildValue("(NNNN)", a, b, c, curve_points);
}

#define MAX_SCENARIOS 8

/* run(states, constants, horizon_s, curves, curve_every) ->
 *     ((t95, t90, t80, ((seconds, SaO2 % to one decimal), ...)), ...), one a state
 * states: up to 8 tuples of v_o2, v_n2, pool, hb_cap, flow, kept, shunt, bv, p50,
 *         o2_in, n2_in, paco2_start, dry, use_long, use_short
 * constants: severinghaus_p50, solubility, paco2_rise, step_s, step_long_s,
 *            step_long_above
 * curves: one flag a state, whether to record its curve
 */
static PyObject *run(PyObject *self, PyObject *args) {
    PyObject *states, *curves;
    Constants k;
    (void)self;
    if (!PyArg_ParseTuple(args, "O!(dddddd)dO!d", &PyTuple_Type, &states, &k.sev_p50,
                          &k.solubility, &k.rise, &k.step_s, &k.step_long_s, &k.long_above,
                          &k.horizon_s, &PyTuple_Type, &curves, &k.curve_every)) {
        return NULL;
    }
    Py_ssize_t n = PyTuple_GET_SIZE(states);
    if (n > MAX_SCENARIOS || PyTuple_GET_SIZE(curves) != n) {
        PyErr_SetString(PyExc_TypeError, "run: up to 8 states, and one curve flag a state");
        return NULL;
    }
    Scenario runs[MAX_SCENARIOS];
    Py_ssize_t i, made = 0;
    PyObject *out = NULL;
    for (i = 0; i < n; i++) {
        Scenario *r = &runs[i];
        PyObject *state = PyTuple_GET_ITEM(states, i);
        if (!PyTuple_Check(state)) {
            PyErr_SetString(PyExc_TypeError, "run: each state is a tuple of 15");
            goto done;
        }
        if (!PyArg_ParseTuple(state, "ddddddddddddddd;a state of 15",
                              &r->v_o2, &r->v_n2, &r->pool, &r->hb_cap, &r->flow, &r->kept,
                              &r->shunt, &r->bv, &r->p50, &r->o2_in, &r->n2_in,
                              &r->paco2_start, &r->dry, &r->use_long, &r->use_short)) {
            goto done;
        }
        int curve = PyObject_IsTrue(PyTuple_GET_ITEM(curves, i));
        if (curve < 0) {
            goto done;
        }
        r->t = 0.0;
        r->next_point = curve ? 0.0 : INFINITY;
        r->t95 = r->t90 = r->t80 = 0.0;
        r->has95 = r->has90 = r->has80 = r->done = 0;
        r->points = PyList_New(0);
        if (r->points == NULL) {
            goto done;
        }
        made++;
    }
    for (int busy = 1; busy;) {
        busy = 0;
        for (i = 0; i < n; i++) {
            if (!runs[i].done) {
                if (step(&runs[i], &k) < 0) {
                    goto done;
                }
                busy |= !runs[i].done;
            }
        }
    }
    out = PyTuple_New(n);
    if (out == NULL) {
        goto done;
    }
    for (i = 0; i < n; i++) {
        PyObject *one = result(&runs[i]);
        if (one == NULL) {
            Py_CLEAR(out);
            goto done;
        }
        PyTuple_SET_ITEM(out, i, one);
    }
done:
    for (i = 0; i < made; i++) {
        Py_DECREF(runs[i].points);
    }
    return out;
}

static PyMethodDef methods[] = {
    {"run", run, METH_VARARGS, "The apnoea model's time loop (see airway.oxygenation)."},
    {"round_percent", round_percent, METH_O, "round(100 * sao2, 1), as the loop rounds."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    PyModuleDef_HEAD_INIT, "_apnoea", "Compiled time loop of the apnoea model.", -1, methods,
    NULL, NULL, NULL, NULL,
};

PyMODINIT_FUNC PyInit__apnoea(void) { return PyModule_Create(&module); }
