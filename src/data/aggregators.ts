/**
 * Aggregators: how several values become one, for rows sharing a time stamp (`--duplicates`)
 * and for periods folded into a coarser frequency (`--aggregate`). One signature for all:
 * `(values, from, to)` reduces `values[from..to)`, skipping missing values (NaN); a range with
 * no value gives NaN (still missing). `last` is the last value present in file order.
 */

export type Aggregator = (values: ArrayLike<number>, from: number, to: number) => number;

export type AggregatorName = 'sum' | 'mean' | 'last' | 'min' | 'max';

export const AGGREGATOR_NAMES: readonly AggregatorName[] = ['sum', 'mean', 'last', 'min', 'max'];

/** Sum and count of the non-missing (non-NaN) values in [from, to). */
function finiteSum(values: ArrayLike<number>, from: number, to: number): { s: number; n: number } {
  let s = 0;
  let n = 0;
  for (let i = from; i < to; i++) {
    const v = values[i];
    if (v === v) {
      s += v;
      n++;
    }
  }
  return { s, n };
}

export const aggregators: Record<AggregatorName, Aggregator> = {
  sum(values, from, to) {
    const { s, n } = finiteSum(values, from, to);
    return n > 0 ? s : NaN;
  },
  mean(values, from, to) {
    const { s, n } = finiteSum(values, from, to);
    return n > 0 ? s / n : NaN;
  },
  last(values, from, to) {
    for (let i = to - 1; i >= from; i--) if (values[i] === values[i]) return values[i];
    return NaN;
  },
  min(values, from, to) {
    let m = Infinity;
    for (let i = from; i < to; i++) if (values[i] < m) m = values[i];
    return m === Infinity ? NaN : m;
  },
  max(values, from, to) {
    let m = -Infinity;
    for (let i = from; i < to; i++) if (values[i] > m) m = values[i];
    return m === -Infinity ? NaN : m;
  },
};
