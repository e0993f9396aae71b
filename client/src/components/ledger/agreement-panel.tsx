import { useId } from 'react';
import type { Agreement } from '../../api/dashboard';
import { formatCount } from '../../lib/format';
import { tableClass } from './chart-kit';

/**
 * Words for Cohen's kappa, after the bands of Landis & Koch (1977), "The measurement of observer agreement
 * for categorical data", Biometrics 33(1): below 0 poor, to 0.20 slight, to 0.40 fair, to 0.60 moderate,
 * to 0.80 substantial, above almost perfect. A convention for reading, not a verdict.
 */
export function kappaWords(kappa: number | null): string {
  if (kappa === null) return 'not enough judgements';
  if (kappa < 0) return 'poor (less than chance)';
  if (kappa <= 0.2) return 'slight';
  if (kappa <= 0.4) return 'fair';
  if (kappa <= 0.6) return 'moderate';
  if (kappa <= 0.8) return 'substantial';
  return 'almost perfect';
}

const kappaNumber = new Intl.NumberFormat(undefined, { minimumFractionDigits: 2, maximumFractionDigits: 2, signDisplay: 'negative' });
/** Below this many items a kappa says little (common practice: a handful of judgements swing it wholly). */
export const FEW_ITEMS = 10;
const readAs = (kappa: number | null, items: number) => `${kappaWords(kappa)}${kappa !== null && items < FEW_ITEMS ? ', few items: read with care' : ''}`;

export const formatKappa = (k: number | null) => (k === null ? '—' : kappaNumber.format(k));

/** Agreement between editors on the items reviewed twice (blind): Cohen's kappa per pair and per subject. */
export function AgreementPanel({ agreement }: { agreement: Agreement }) {
  const pairs = useId();
  const subjects = useId();
  if (agreement.perPair.length === 0 && agreement.perSubject.length === 0) {
    return (
      <p className="max-w-prose">
        No item has been reviewed twice yet. Once a share of items is reviewed blind by a second editor (a review desk setting), their agreement appears here.
      </p>
    );
  }
  return (
    <div className="space-y-6">
      <p className="max-w-prose text-muted">
        Cohen’s kappa: 1 is full agreement, 0 what chance alone would give, below 0 less than chance. The words follow the bands of Landis and Koch (1977), a
        convention for reading the figure, not a verdict on anyone.
      </p>
      {agreement.perPair.length ? (
        <div className="overflow-x-auto">
          <table className={tableClass} aria-labelledby={pairs}>
            <caption id={pairs} className="mb-2 text-left text-lg font-bold">
              By pair of editors
            </caption>
            <thead>
              <tr>
                <th scope="col">Editors</th>
                <th scope="col">Items reviewed by both</th>
                <th scope="col">Kappa</th>
                <th scope="col">Reads as</th>
              </tr>
            </thead>
            <tbody>
              {agreement.perPair.map((p) => (
                <tr key={`${p.editorA.id}-${p.editorB.id}`}>
                  <th scope="row">
                    {p.editorA.name} and {p.editorB.name}
                  </th>
                  <td className="tabular-nums">{formatCount(p.items)}</td>
                  <td className="tabular-nums font-bold">{formatKappa(p.kappa)}</td>
                  <td>{readAs(p.kappa, p.items)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {agreement.perSubject.length ? (
        <div className="overflow-x-auto">
          <table className={tableClass} aria-labelledby={subjects}>
            <caption id={subjects} className="mb-2 text-left text-lg font-bold">
              By subject
            </caption>
            <thead>
              <tr>
                <th scope="col">Subject</th>
                <th scope="col">Items judged twice</th>
                <th scope="col">Kappa</th>
                <th scope="col">Reads as</th>
              </tr>
            </thead>
            <tbody>
              {agreement.perSubject.map((s) => (
                <tr key={s.subjectId}>
                  <th scope="row">{s.label}</th>
                  <td className="tabular-nums">{formatCount(s.items)}</td>
                  <td className="tabular-nums font-bold">{formatKappa(s.kappa)}</td>
                  <td>{readAs(s.kappa, s.items)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}
