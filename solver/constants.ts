// Physical constants, SI. One place, so every formula uses the same values.
export const C0 = 299_792_458; // m/s (exact, SI)
export const MU0 = 4e-7 * Math.PI; // H/m (pre-2019 SI value; within 1e-9 of CODATA 2018)
export const EPS0 = 1 / (MU0 * C0 * C0); // F/m
export const ETA0 = MU0 * C0; // Ω, free-space wave impedance
