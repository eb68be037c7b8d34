// Training rows the forest doubts: where the trees that never saw a row disagree with its label. These are
// the rows worth a second look (a wrong label, a unit slip, an unusual case). One definition, used by the
// fit report, the command line and the editor alike.
//
// Classification: a negative out-of-bag margin (Breiman 2001): more out-of-bag trees vote for some other
// class than for the label.
// Regression: a large out-of-bag residual for the forest's own error: the residual divided by a robust scale
// of all out-of-bag residuals (1.4826 × their median absolute deviation, which estimates the standard
// deviation for normal errors; common practice). Beyond 3.5 such a modified z-score is the usual cut for
// outliers (Iglewicz & Hoaglin 1993, "How to Detect and Handle Outliers"; cited from memory).

/** How far out a regression residual must be, in robust standard deviations. */
export const RESIDUAL_CUT = 3.5;

export interface Doubt {
  /** Index into the arrays given (a training row's index). */
  readonly index: number;
  /** Classification: the margin (negative). Regression: the modified z-score of the residual (label − out-of-bag value). */
  readonly score: number;
}

/** Rows with a negative margin, most doubtful first (lowest margin; then by index). */
export function doubtfulByMargin(margin: ArrayLike<number>): Doubt[] {
  const out: Doubt[] = [];
  for (let i = 0; i < margin.length; i++) if (margin[i] < 0) out.push({ index: i, score: margin[i] });
  return out.sort((a, b) => a.score - b.score || a.index - b.index);
}

/**
 * Rows whose out-of-bag residual is beyond RESIDUAL_CUT robust standard deviations, largest first.
 * Rows without a label or an out-of-bag value take no part. The scale is 0 (and nothing is flagged) when
 * half the residuals or more are exactly 0.
 */
export function doubtfulByResidual(truth: ArrayLike<number>, oobValue: ArrayLike<number>): { rows: Doubt[]; scale: number } {
  const residual: number[] = [];
  const index: number[] = [];
  for (let i = 0; i < truth.length; i++) {
    const d = truth[i] - oobValue[i];
    if (Number.isFinite(d)) {
      residual.push(d);
      index.push(i);
    }
  }
  const centre = medianOf(residual);
  const scale = 1.4826 * medianOf(residual.map((d) => Math.abs(d - centre)));
  if (!(scale > 0)) return { rows: [], scale: 0 };
  const rows: Doubt[] = [];
  residual.forEach((d, j) => {
    const z = (d - centre) / scale;
    if (Math.abs(z) > RESIDUAL_CUT) rows.push({ index: index[j], score: z });
  });
  return { rows: rows.sort((a, b) => Math.abs(b.score) - Math.abs(a.score) || a.index - b.index), scale };
}

function medianOf(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  const s = [...values].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}
