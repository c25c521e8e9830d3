/*
 * The apnoea model's time loop, compiled: the same arithmetic as
 * airway.oxygenation.loop_python, operation for operation, so that every
 * figure is the same to the last bit (tests/test_oxygenation.py compares the two
 * over thousands of random women). Optional: when it is not built, airway runs
 * the Python loop and gives the same plans, only slower.
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

/* run(state, constants, horizon_s, curve, curve_every) ->
 *     (t95, t90, t80, ((seconds, SaO2 % to one decimal), ...))
 * state: v_o2, v_n2, pool, hb_cap, flow, kept, shunt, bv, p50, o2_in, n2_in,
 *        paco2_start, dry, use_long, use_short
 * constants: severinghaus_p50, solubility, paco2_rise, step_s, step_long_s,
 *            step_long_above
 */
static PyObject *run(PyObject *self, PyObject *args) {
    double v_o2, v_n2, pool, hb_cap, flow, kept, shunt, bv, p50, o2_in, n2_in;
    double paco2_start, dry, use_long, use_short;
    double sev_p50, solubility, rise, step_s, step_long_s, long_above;
    double horizon_s, curve_every;
    int curve;
    (void)self;
    if (!PyArg_ParseTuple(args, "(ddddddddddddddd)(dddddd)dpd", &v_o2, &v_n2, &pool,
                          &hb_cap, &flow, &kept, &shunt, &bv, &p50, &o2_in, &n2_in,
                          &paco2_start, &dry, &use_long, &use_short, &sev_p50,
                          &solubility, &rise, &step_s, &step_long_s, &long_above,
                          &horizon_s, &curve, &curve_every)) {
        return NULL;
    }
    PyObject *points = PyList_New(0);
    if (points == NULL) {
        return NULL;
    }
    int has95 = 0, has90 = 0, has80 = 0;
    double t95 = 0.0, t90 = 0.0, t80 = 0.0;
    double t = 0.0;
    double next_point = curve ? 0.0 : INFINITY;
    while (t <= horizon_s) {
        double late = t / 60.0 - 1.0;
        double paco2 = late > 0.0 ? paco2_start + rise * late : paco2_start;
        double total = v_o2 + v_n2;
        double pao2 = total > 0 ? (dry - paco2) * v_o2 / total : 0.0;
        if (!(pao2 > 0.0)) {
            pao2 = 0.0;
        }
        double sp = pao2 * sev_p50 / p50;
        double sc = sp > 0 ? 1.0 / (23400.0 / (sp * sp * sp + 150.0 * sp) + 1.0) : 0.0;
        double cc = hb_cap * sc + solubility * pao2;
        double cv = pool / bv;
        double venous = cv / hb_cap;
        double sao2 = kept * sc + shunt * (venous < 1.0 ? venous : 1.0);
        if (t >= next_point) {
            double percent;
            if (percent_tenths(sao2, &percent) < 0) {
                Py_DECREF(points);
                return NULL;
            }
            PyObject *point = Py_BuildValue("(ld)", (long)t, percent);
            if (point == NULL || PyList_Append(points, point) < 0) {
                Py_XDECREF(point);
                Py_DECREF(points);
                return NULL;
            }
            Py_DECREF(point);
            next_point += curve_every;
        }
        if (sao2 < 0.95) {
            if (!has95) {
                has95 = 1;
                t95 = t;
            }
            if (sao2 < 0.90) {
                if (!has90) {
                    has90 = 1;
                    t90 = t;
                }
                if (sao2 < 0.80) {
                    has80 = 1;
                    t80 = t;
                    break;
                }
            }
        }
        double dt, used;
        if (sao2 > long_above) {
            dt = step_long_s;
            used = use_long;
        } else {
            dt = step_s;
            used = use_short;
        }
        double uptake = flow * (cc - cv);
        uptake = (uptake > 0.0 ? uptake : 0.0) * dt;
        if (!(uptake < v_o2)) {
            uptake = v_o2;
        }
        v_o2 += o2_in * uptake;
        v_n2 += n2_in * uptake;
        pool = pool + uptake - used;
        if (!(pool > 0.0)) {
            pool = 0.0;
        }
        t += dt;
    }
    PyObject *curve_points = PyList_AsTuple(points);
    Py_DECREF(points);
    if (curve_points == NULL) {
        return NULL;
    }
    PyObject *a = time_or_none(has95, t95);
    PyObject *b = time_or_none(has90, t90);
    PyObject *c = time_or_none(has80, t80);
    if (a == NULL || b == NULL || c == NULL) {
        Py_XDECREF(a);
        Py_XDECREF(b);
        Py_XDECREF(c);
        Py_DECREF(curve_points);
        return NULL;
    }
    return Py_BuildValue("(NNNN)", a, b, c, curve_points);
}

static PyMethodDef methods[] = {
    {"run", run, METH_VARARGS, "The apnoea model's time loop (see airway.oxygenation)."},
    {"round_percent", round_percent, METH_O, "round(100 * sao2, 1), as the loop rounds."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    PyModuleDef_HEAD_INIT, "_apnoea", "Compiled time loop of the apnoea model.", -1, methods,
};

PyMODINIT_FUNC PyInit__apnoea(void) { return PyModule_Create(&module); }
