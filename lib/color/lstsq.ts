/**
 * Small dense least squares for colour fits: minimise ‖A·x − b‖² for each column b of B, through the
 * normal equations AᵀA x = Aᵀb solved by Cholesky. The condition number of A (√ of the eigenvalue
 * ratio of AᵀA, Jacobi eigenvalues) is reported so callers can refuse ill-conditioned designs.
 */

/** Eigenvalues of a symmetric matrix by cyclic Jacobi rotations (Golub & Van Loan, §8.5). */
export function symmetricEigenvalues(m: readonly number[][]): number[] {
  const n = m.length;
  const a = m.map((row) => row.slice());
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p][q] * a[p][q];
    if (off < 1e-30) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        if (Math.abs(a[p][q]) < 1e-300) continue;
        const theta = (a[q][q] - a[p][p]) / (2 * a[p][q]);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k][p];
          const akq = a[k][q];
          a[k][p] = c * akp - s * akq;
          a[k][q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p][k];
          const aqk = a[q][k];
          a[p][k] = c * apk - s * aqk;
          a[q][k] = s * apk + c * aqk;
        }
      }
    }
  }
  return a.map((row, i) => row[i]);
}

export type LeastSquaresResult = {
  /** One solution vector per column of B: x[j] has one coefficient per column of A. */
  solutions: number[][];
  /** Condition number of A (2-norm); Infinity if A is rank-deficient. */
  condition: number;
};

export function leastSquares(a: readonly number[][], b: readonly number[][]): LeastSquaresResult {
  const rows = a.length;
  const k = a[0].length;
  const ata: number[][] = Array.from({ length: k }, () => new Array(k).fill(0));
  for (const row of a) for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) ata[i][j] += row[i] * row[j];
  const eig = symmetricEigenvalues(ata);
  const maxEig = Math.max(...eig);
  const minEig = Math.min(...eig);
  const condition = minEig <= maxEig * 1e-15 || minEig <= 0 ? Infinity : Math.sqrt(maxEig / minEig);
  const targets = b[0].length;
  if (!Number.isFinite(condition)) return { solutions: [], condition };
  // Cholesky AᵀA = L Lᵀ.
  const l: number[][] = Array.from({ length: k }, () => new Array(k).fill(0));
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = ata[i][j];
      for (let p = 0; p < j; p++) s -= l[i][p] * l[j][p];
      if (i === j) {
        if (s <= 0) return { solutions: [], condition: Infinity };
        l[i][i] = Math.sqrt(s);
      } else l[i][j] = s / l[j][j];
    }
  }
  const solutions: number[][] = [];
  for (let t = 0; t < targets; t++) {
    const atb = new Array(k).fill(0);
    for (let r = 0; r < rows; r++) for (let i = 0; i < k; i++) atb[i] += a[r][i] * b[r][t];
    const z = new Array(k).fill(0);
    for (let i = 0; i < k; i++) {
      let s = atb[i];
      for (let p = 0; p < i; p++) s -= l[i][p] * z[p];
      z[i] = s / l[i][i];
    }
    const x = new Array(k).fill(0);
    for (let i = k - 1; i >= 0; i--) {
      let s = z[i];
      for (let p = i + 1; p < k; p++) s -= l[p][i] * x[p];
      x[i] = s / l[i][i];
    }
    solutions.push(x);
  }
  return { solutions, condition };
}
