// jstat ships no types. `@ts-ignore` rather than `@ts-expect-error`: another file may declare the
// module, and then an expect-error directive would itself become a type error.
// eslint-disable-next-line @typescript-eslint/ban-ts-comment -- see the reason above
// @ts-ignore
import jstat from 'jstat';

/** The one piece of jstat used here, typed locally so this file works with or without a module declaration. */
interface NormalInverse {
  normal: { inv(p: number, mean: number, sd: number): number };
}

/** Standard normal quantile Φ⁻¹(p) (dimensionless) for a probability 0 < p < 1. */
export function standardNormalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`probability must lie strictly between 0 and 1, got ${p}`);
  return (jstat as unknown as NormalInverse).normal.inv(p, 0, 1);
}
