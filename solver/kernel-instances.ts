// The step kernel as two module instances, one per field precision (grid.field_precision).
//
// Why: V8 specializes each function to the typed arrays it has seen. A kernel that has stepped Float64Array fields
// and is then handed Float32Array ones is recompiled to serve both, and stays slower for both for the life of the
// process (measured, the demo solve() in one process: float64 0.385 s, then after three float32 solves 0.57 s).
// A solver thread or queue worker may well run both kinds of case, so the float32 cases get a kernel of their own:
// the same module loaded a second time (a query on its address makes a distinct instance with its own functions,
// its own compiled code and its own free-space plans). Nothing is duplicated in the source.
import * as kernelFloat64 from './fdtd-kernel.js';

export type Kernel = typeof kernelFloat64;

// a variable, not a literal, so the type checker does not look for a file of that name
const FLOAT32_INSTANCE = './fdtd-kernel.js?fields=float32';
const kernelFloat32 = (await import(FLOAT32_INSTANCE)) as Kernel;

/** The kernel instance that steps fields of this precision. */
export function kernelFor(precision: 'float64' | 'float32'): Kernel {
  return precision === 'float32' ? kernelFloat32 : kernelFloat64;
}
