// Minimal typing of the parts of jstat 1.9 that Kerfwise uses (the package ships no types).
declare module 'jstat' {
  interface StudentT {
    /** Quantile of Student's t: x with P(T ≤ x) = p for `dof` degrees of freedom. */
    inv(p: number, dof: number): number;
  }
  const jStat: { studentt: StudentT };
  export default jStat;
}
