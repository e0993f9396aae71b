import { describe, expect, it } from 'vitest';
import { cohenKappa } from '../../server/src/ml/metrics.ts';

// Agreement on the review desk uses cohenKappa from the ML library (server/src/services/agreement.ts); these are
// the published worked examples it must reproduce.
describe("Cohen's kappa against published worked examples", () => {
  it('scikit-learn user guide (cohen_kappa_score): [2,0,2,2,0,1] vs [0,0,2,2,0,2] → 3/7 ≈ 0.4286', () => {
    expect(cohenKappa([2, 0, 2, 2, 0, 1], [0, 0, 2, 2, 0, 2])).toBeCloseTo(3 / 7, 10);
  });

  it('scikit-learn cohen_kappa_score docstring: negative/positive/neutral labels → 0.6875', () => {
    const a = ['negative', 'positive', 'negative', 'neutral', 'positive'];
    const b = ['negative', 'positive', 'negative', 'neutral', 'negative'];
    expect(cohenKappa(a, b)).toBeCloseTo(0.6875, 10);
  });

  it('Wikipedia "Cohen\'s kappa" worked example (from memory): 50 proposals, yes/yes 20, yes/no 5, no/yes 10, no/no 15 → 0.4', () => {
    const a = [...Array(20).fill(1), ...Array(5).fill(1), ...Array(10).fill(0), ...Array(15).fill(0)];
    const b = [...Array(20).fill(1), ...Array(5).fill(0), ...Array(10).fill(1), ...Array(15).fill(0)];
    expect(cohenKappa(a, b)).toBeCloseTo(0.4, 10);
  });
});
