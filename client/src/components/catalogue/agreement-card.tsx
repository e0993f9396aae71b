import { useId, useState, type FormEvent } from 'react';
import { problemOf } from '../../api/http';
import { useAgreement, useSaveReviewSettings } from '../../api/review';
import { formatCount, formatShare } from '../../lib/format';
import { kappaWords } from '../review/words';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { TextField } from '../ui/field';

const kappa = (k: number | null) => (k === null ? '—' : k.toFixed(2));

/** How well editors agree on the items reviewed twice (Cohen's kappa), per subject and per pair of editors. */
export function AgreementCard({ collectionId, canConfigure }: { collectionId: number; canConfigure: boolean }) {
  const agreement = useAgreement(collectionId);
  const save = useSaveReviewSettings();
  const headingId = useId();
  const [percent, setPercent] = useState<string | null>(null);
  const share = agreement.data?.doubleReviewShare ?? 0.1;
  const shown = percent ?? String(Math.round(share * 1000) / 10);
  const invalid = !/^\d{1,3}(\.\d)?$/.test(shown) || Number(shown) > 100;

  function submit(e: FormEvent) {
    e.preventDefault();
    if (invalid) return;
    save.mutate({ collectionId, doubleReviewShare: Number(shown) / 100 }, { onSuccess: () => setPercent(null) });
  }

  return (
    <Card as="section" aria-labelledby={headingId} className="space-y-4">
      <div className="space-y-1">
        <h2 id={headingId} className="text-2xl font-bold">
          Agreement between editors
        </h2>
        <p className="max-w-prose text-muted">
          {formatShare(share)} of this collection’s items are reviewed a second time, blind, by another editor. Cohen’s kappa says how far two editors agree beyond
          chance: 1 is full agreement, 0 no better than chance.
        </p>
      </div>
      {canConfigure ? (
        <form onSubmit={submit} className="flex flex-wrap items-end gap-3">
          <TextField
            label="Share reviewed twice (%)"
            inputMode="decimal"
            fieldClassName="w-56"
            value={shown}
            error={invalid ? 'A percentage from 0 to 100.' : save.isError ? problemOf(save.error).detail : undefined}
            onChange={(e) => setPercent(e.currentTarget.value)}
          />
          <Button type="submit" aria-disabled={save.isPending ? true : undefined}>
            Save the share
          </Button>
        </form>
      ) : null}
      {agreement.isError ? <p>{problemOf(agreement.error).detail}</p> : null}
      {agreement.data ? (
        agreement.data.perSubject.length === 0 ? (
          <p>No item has had its second review yet.</p>
        ) : (
          <div className="grid gap-6 lg:grid-cols-2">
            <table className="w-full border-collapse text-left">
              <caption className="pb-2 text-left font-bold">Per subject</caption>
              <thead>
                <tr className="border-b-2 border-ink">
                  <th scope="col" className="py-1.5 pr-3">Subject</th>
                  <th scope="col" className="py-1.5 pr-3">Items</th>
                  <th scope="col" className="py-1.5">Kappa</th>
                </tr>
              </thead>
              <tbody>
                {agreement.data.perSubject.map((s) => (
                  <tr key={s.subjectId} className="border-b border-rule">
                    <th scope="row" className="py-1.5 pr-3 font-normal">{s.label}</th>
                    <td className="py-1.5 pr-3 tabular-nums">{formatCount(s.items)}</td>
                    <td className="py-1.5 tabular-nums">
                      {kappa(s.kappa)} <span className="text-sm text-muted">({kappaWords(s.kappa)})</span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <table className="w-full border-collapse text-left">
              <caption className="pb-2 text-left font-bold">Per pair of editors</caption>
              <thead>
                <tr className="border-b-2 border-ink">
                  <th scope="col" className="py-1.5 pr-3">Editors</th>
                  <th scope="col" className="py-1.5 pr-3">Items</th>
                  <th scope="col" className="py-1.5">Kappa</th>
                </tr>
              </thead>
              <tbody>
                {agreement.data.perPair.map((p) => (
                  <tr key={`${p.editorA.id}-${p.editorB.id}`} className="border-b border-rule">
                    <th scope="row" className="py-1.5 pr-3 font-normal">
                      {p.editorA.name} and {p.editorB.name}
                    </th>
                    <td className="py-1.5 pr-3 tabular-nums">{formatCount(p.items)}</td>
                    <td className="py-1.5 tabular-nums">
                      {kappa(p.kappa)} <span className="text-sm text-muted">({kappaWords(p.kappa)})</span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )
      ) : null}
      <p className="text-sm text-muted">Kappa words follow the bands of Landis and Koch (1977), the usual reading.</p>
    </Card>
  );
}
