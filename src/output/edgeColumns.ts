/** Extra per-edge columns after the contract columns, in order. */
export interface ExtraEdgeColumn {
  name: string;
  values: ArrayLike<number>;
}

/** One contrast's edge table as columns in the fixed edge order (i < j, row-major). */
export interface EdgeColumns {
  regionA: Uint32Array;
  regionB: Uint32Array;
  statistic: Float64Array;
  estimate: Float64Array;
  pUncorrected: Float64Array;
  qFdr: Float64Array;
  /** Component id, 0 when the edge is below the threshold. */
  component: Int32Array;
  /** Edge-level family-wise p (max-statistic method only). */
  pFwe?: Float64Array;
  /** t contrasts: partial correlation and standard error of the estimate (NaN for F contrasts). */
  partialR: Float64Array;
  standardError: Float64Array;
  /** F contrasts: partial η² (NaN for t contrasts). */
  partialEtaSquared: Float64Array;
  /** t contrasts: the effect-size columns (output/effectSizeColumns.ts), when written. */
  effects?: EdgeEffectColumns;
}

/** The estimate's interval, Cohen's d with its interval (NaN where it does not apply), and the two levels' means (correlation scale). */
export interface EdgeEffectColumns {
  ciLow: Float64Array;
  ciHigh: Float64Array;
  cohensD: Float64Array;
  cohensDLow: Float64Array;
  cohensDHigh: Float64Array;
  means?: { levels: [string, string]; first: Float64Array; second: Float64Array };
}
