/** BIPM-RI Python_lib CoxProcedureA test vector, as in SCORING.md. */
export const COX_X = [43772, 43910, 43947, 43910, 43900];
export const COX_U = [97, 100, 104.5, 160, 280];
export const coxVector = COX_X.map((value, i) => ({ value, uncertainty: COX_U[i] }));
