/*
 * realquad._kernels._ckernels: the compiled word-size kernels. This file holds
 * the method table and the module; the kernels are in the other *_kernels.c
 * files, their shared helpers and an overview in kernels.h.
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* module                                                              */
/* ------------------------------------------------------------------ */

static PyMethodDef methods[] = {
    {"principal_half_cycle", (PyCFunction)(void (*)(void))k_principal_half_cycle, METH_FASTCALL,
     "Walk the continued fraction of omega to the symmetry point of the principal cycle."},
    {"principal_period", (PyCFunction)(void (*)(void))k_principal_period, METH_FASTCALL,
     "Period length, parity and q_mid of the principal cycle."},
    {"principal_regulator", (PyCFunction)(void (*)(void))k_principal_regulator, METH_FASTCALL,
     "The half-cycle walk with the regulator accumulated in long double, with an error bound."},
    {"convergent_leaves", (PyCFunction)(void (*)(void))k_convergent_leaves, METH_FASTCALL,
     "Exact products of [[a, 1], [1, 0]] over blocks of chunk partial quotients."},
    {"kronecker_symbols", (PyCFunction)(void (*)(void))k_kronecker_symbols, METH_FASTCALL,
     "The Kronecker symbols (a/n) for a sequence of moduli n."},
    {"form_rho_b", (PyCFunction)(void (*)(void))k_form_rho_b, METH_FASTCALL,
     "The normalised middle coefficient of the rho step."},
    {"form_is_reduced", (PyCFunction)(void (*)(void))k_form_is_reduced, METH_FASTCALL,
     "Whether (a, b, *) is reduced: |sqrt D - 2|a|| < b < sqrt D."},
    {"form_reduce", (PyCFunction)(void (*)(void))k_form_reduce, METH_FASTCALL,
     "Apply rho until the form is reduced."},
    {"form_cycle", (PyCFunction)(void (*)(void))k_form_cycle, METH_FASTCALL,
     "The rho cycle of a reduced form, or None beyond max_steps."},
    {"extended_gcd", (PyCFunction)(void (*)(void))k_extended_gcd, METH_FASTCALL,
     "(g, u, v) with u x + v y = g = gcd(x, y) >= 0."},
    {"form_compose", (PyCFunction)(void (*)(void))k_form_compose, METH_FASTCALL,
     "Dirichlet composition of two forms of discriminant D (not reduced)."},
    {"prime_form_b", (PyCFunction)(void (*)(void))k_prime_form_b, METH_FASTCALL,
     "The b (0 <= b <= p) of a primitive form (p, b, c) of discriminant D, or -1."},
    {"form_class_candidates", (PyCFunction)(void (*)(void))k_form_class_candidates, METH_FASTCALL,
     "Generators of the narrow class group: J, then forms of prime-power norm q with 4q^2 < D."},
    {"form_class_table", (PyCFunction)(void (*)(void))k_form_class_table, METH_FASTCALL,
     "All narrow classes of D reached from the principal cycle by the candidates, or None."},
    {"form_class_numbers", (PyCFunction)(void (*)(void))k_form_class_numbers, METH_FASTCALL,
     "(h+, 1 if (-1, b0, c0) is principal else 0) from the cycles of reduced forms, or None."},
    {"form_class_relations", (PyCFunction)(void (*)(void))k_form_class_relations, METH_FASTCALL,
     "(h+, j, generators, relations) of the class table, without its index and vectors, or None."},
    {"survey_numbers", (PyCFunction)(void (*)(void))k_survey_numbers, METH_FASTCALL,
     "(D, t, no_three, h+, j, principal_regulator) for each radicand d, or None beyond max_forms."},
    {"infrastructure_baby_steps", (PyCFunction)(void (*)(void))k_infrastructure_baby_steps, METH_FASTCALL,
     "Up to count baby steps (rho) on reduced principal ideals, with binary64 distances."},
    {"infrastructure_giant_step", (PyCFunction)(void (*)(void))k_infrastructure_giant_step, METH_FASTCALL,
     "reduce([a, b][a2, b2]) on reduced principal ideals, with the distance change."},
    {"form_compose_reduce", (PyCFunction)(void (*)(void))k_form_compose_reduce, METH_FASTCALL,
     "Dirichlet composition of two forms of discriminant D, reduced."},
    /* positive definite forms and the class groups of D < 0 */
    {"definite_reduce", (PyCFunction)(void (*)(void))k_definite_reduce, METH_FASTCALL,
     "The reduced form properly equivalent to a positive definite form."},
    {"definite_compose_reduce", (PyCFunction)(void (*)(void))k_definite_compose_reduce, METH_FASTCALL,
     "Dirichlet composition of two positive definite forms of discriminant D, reduced."},
    {"definite_class_candidates", (PyCFunction)(void (*)(void))k_definite_class_candidates, METH_FASTCALL,
     "Reduced prime forms (and prime-power forms for p | f) of norm <= sqrt(|D|/3): generators of Cl(D)."},
    {"definite_class_table", (PyCFunction)(void (*)(void))k_definite_class_table, METH_FASTCALL,
     "Every class of D < 0 (one reduced form each) reached from 1 by the candidates, or None."},
    {"definite_class_relations", (PyCFunction)(void (*)(void))k_definite_class_relations, METH_FASTCALL,
     "(h, generators, relations) of the class table of D < 0, or None."},
    {"definite_class_number", (PyCFunction)(void (*)(void))k_definite_class_number, METH_FASTCALL,
     "The class number of a fundamental D < 0 by counting its reduced forms."},
    {"definite_structures", (PyCFunction)(void (*)(void))k_definite_structures, METH_FASTCALL,
     "The invariants of the class groups of many D < 0 whose class numbers are known (0: counted)."},
    /* infrastructure: the baby-step table and the giant-step search */
    {"infrastructure_table_new", (PyCFunction)(void (*)(void))k_infrastructure_table_new, METH_FASTCALL,
     "An empty baby-step table (open addressing) for D < 2^106."},
    {"infrastructure_table_size", (PyCFunction)(void (*)(void))k_infrastructure_table_size, METH_FASTCALL,
     "(ideals stored, bytes allocated) of a baby-step table."},
    {"infrastructure_table_get", (PyCFunction)(void (*)(void))k_infrastructure_table_get, METH_FASTCALL,
     "The stored distance of a reduced ideal, or None."},
    {"infrastructure_table_extend", (PyCFunction)(void (*)(void))k_infrastructure_table_extend, METH_FASTCALL,
     "Baby steps stored in the table, with double-double distances."},
    {"infrastructure_giant_search", (PyCFunction)(void (*)(void))k_infrastructure_giant_search, METH_FASTCALL,
     "Giant steps until one meets the table, passes a distance, or a budget is spent."},
    /* the relation search: sieving a family of polynomials */
    {"sieve_family", (PyCFunction)(void (*)(void))k_sieve_family, METH_FASTCALL,
     "Candidates (k, x, hits) of a family of sieve polynomials: x whose sum of logarithms reaches threshold."},
    /* the linear algebra of index calculus: structured Gaussian elimination */
    {"eliminate_rows", (PyCFunction)(void (*)(void))k_eliminate_rows, METH_FASTCALL,
     "Structured Gaussian elimination of sparse integer rows with pivots +-1 (the twin's, step for step)."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    PyModuleDef_HEAD_INIT, "_ckernels", "realquad's compiled word-size kernels (each C file has its pure-Python twin, the .py file of the same name).", -1,
    methods,
};

PyMODINIT_FUNC
PyInit__ckernels(void)
{
    PyObject *m = PyModule_Create(&module);
    if (m == NULL)
        return NULL;
    if (PyModule_AddObject(m, "MAX_CFRAC_DISCRIMINANT", PyLong_FromLongLong(MAX_CFRAC)) < 0 ||
        PyModule_AddObject(m, "MAX_WORD_DISCRIMINANT", PyLong_FromLongLong(MAX_WORD)) < 0 ||
        PyModule_AddIntConstant(m, "LONG_DOUBLE_MANTISSA_BITS", LDBL_MANT_DIG) < 0) {
        Py_DECREF(m);
        return NULL;
    }
    return m;
}
