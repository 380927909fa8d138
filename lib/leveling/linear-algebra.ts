/** Dense row-major matrix of plain numbers (small sizes only: a handful of unknowns). */
export type Matrix = number[][];

const DEPENDENT_PIVOT = 1e-10;

/** Aᵀ W A and Aᵀ W b for weighted least squares; `weights` default to 1. */
export function normalEquations(rows: Matrix, values: number[], weights?: number[]): { n: Matrix; rhs: number[] } {
  const size = rows[0]?.length ?? 0;
  const n = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  const rhs = new Array<number>(size).fill(0);
  rows.forEach((row, r) => {
    const w = weights?.[r] ?? 1;
    const value = values[r]!;
    for (let i = 0; i < size; i++) {
      const wi = w * row[i]!;
      if (wi === 0) continue;
      rhs[i]! += wi * value;
      for (let j = 0; j < size; j++) n[i]![j]! += wi * row[j]!;
    }
  });
  return { n, rhs };
}

/**
 * Solves the symmetric positive semi-definite system N x = b by elimination in column order.
 * A column whose pivot falls below 1e-10 of its own diagonal depends on earlier ones: its unknown is 0.
 */
export function solveSemiDefinite(n: Matrix, b: number[]): number[] {
  const size = b.length;
  const a = n.map((row) => [...row]);
  const rhs = [...b];
  const active = new Array<boolean>(size).fill(false);
  for (let k = 0; k < size; k++) {
    const pivot = a[k]![k]!;
    const diagonal = n[k]![k]!;
    if (!(diagonal > 0) || !(pivot > DEPENDENT_PIVOT * diagonal)) continue;
    active[k] = true;
    for (let i = k + 1; i < size; i++) {
      const factor = a[i]![k]! / pivot;
      if (factor === 0) continue;
      for (let j = k; j < size; j++) a[i]![j]! -= factor * a[k]![j]!;
      rhs[i]! -= factor * rhs[k]!;
    }
  }
  const x = new Array<number>(size).fill(0);
  for (let k = size - 1; k >= 0; k--) {
    if (!active[k]) continue;
    let sum = rhs[k]!;
    for (let j = k + 1; j < size; j++) sum -= a[k]![j]! * x[j]!;
    x[k] = sum / a[k]![k]!;
  }
  return x;
}

/** Least-squares coefficients of `rows` · x ≈ `values`; dependent columns (in order) get 0. */
export function leastSquares(rows: Matrix, values: number[], weights?: number[]): number[] {
  const { n, rhs } = normalEquations(rows, values, weights);
  return solveSemiDefinite(n, rhs);
}

/** Inverse of a symmetric positive definite matrix, column by column. */
export function invertSymmetric(n: Matrix): Matrix {
  const size = n.length;
  const columns = Array.from({ length: size }, (_, j) =>
    solveSemiDefinite(n, Array.from({ length: size }, (_, i) => (i === j ? 1 : 0))),
  );
  return Array.from({ length: size }, (_, i) => columns.map((column) => column[i]!));
}

/** Matrix times vector. */
export function multiply(a: Matrix, x: number[]): number[] {
  return a.map((row) => row.reduce((sum, value, j) => sum + value * x[j]!, 0));
}
