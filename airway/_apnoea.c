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

static PyObject *time_or_none(int reached, double t) {
    if (!reached) {
        Py_RETURN_NONE;
    }
    return PyFloat_FromDouble(t);
}

/* run(state, constants, horizon_s, curve, curve_every) ->
 *     (t95, t90, t80, [(seconds, sao2), ...])
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
        double sc = sp > 0 ? 1.0 / (23400.0 / (pow(sp, 3.0) + 150.0 * sp) + 1.0) : 0.0;
        double cc = hb_cap * sc + solubility * pao2;
        double cv = pool / bv;
        double venous = cv / hb_cap;
        double sao2 = kept * sc + shunt * (venous < 1.0 ? venous : 1.0);
        if (t >= next_point) {
            PyObject *point = Py_BuildValue("(ld)", (long)t, sao2);
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
    PyObject *a = time_or_none(has95, t95);
    PyObject *b = time_or_none(has90, t90);
    PyObject *c = time_or_none(has80, t80);
    if (a == NULL || b == NULL || c == NULL) {
        Py_XDECREF(a);
        Py_XDECREF(b);
        Py_XDECREF(c);
        Py_DECREF(points);
        return NULL;
    }
    return Py_BuildValue("(NNNN)", a, b, c, points);
}

static PyMethodDef methods[] = {
    {"run", run, METH_VARARGS, "The apnoea model's time loop (see airway.oxygenation)."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    PyModuleDef_HEAD_INIT, "_apnoea", "Compiled time loop of the apnoea model.", -1, methods,
};

PyMODINIT_FUNC PyInit__apnoea(void) { return PyModule_Create(&module); }
