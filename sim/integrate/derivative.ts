// The shape every integrator in sim/integrate works with: y' = f(t, y), state in a Float64Array.
// f writes the derivative into `dydt` (no return value, no allocation) so hot loops stay allocation-free.

/** Right-hand side of y' = f(t, y): write f(t, y) into dydt. Must not keep references to y or dydt. */
export type Derivative = (t: number, y: Float64Array, dydt: Float64Array) => void;
