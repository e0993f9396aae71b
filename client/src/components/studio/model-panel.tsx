import { useId, useState, type FormEvent } from 'react';
import { useCollections } from '../../api/collections';
import { problemOf, problemReference } from '../../api/http';
import { useModels, useSubjects, useSynthesize, type ModelSummary, type SubjectListEntry, type SynthesisRequest } from '../../api/subjects';
import { formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { SelectField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { methodWords, percent } from './words';

type Mode = SynthesisRequest['mode'];

const count = (n: number | undefined, one: string, many: string) => `${n ?? 0} ${(n ?? 0) === 1 ? one : many}`;

/** What a model version was made from, in words. */
export function madeFromWords(m: ModelSummary, labelOf: (id: number) => string | undefined, collectionName: (id: number) => string | undefined): string[] {
  const f = m.madeFrom;
  const out = [count(f.exampleIds?.length, 'example', 'examples')];
  if (f.confirmedItemIds?.length) out.push(count(f.confirmedItemIds.length, 'confirmed item', 'confirmed items'));
  if (f.rejectedItemIds?.length) out.push(count(f.rejectedItemIds.length, 'rejected item', 'rejected items'));
  if (f.broaderSubjectId !== undefined) out.push(`the model of the broader subject “${labelOf(f.broaderSubjectId) ?? `subject ${f.broaderSubjectId}`}”${f.siblingSubjectIds?.length ? ` and ${count(f.siblingSubjectIds.length, 'sibling', 'siblings')}` : ''}`);
  if (f.sourceCollectionId !== undefined) out.push(`model ${f.sourceModelId ?? '?'} of the collection “${collectionName(f.sourceCollectionId) ?? `collection ${f.sourceCollectionId}`}”`);
  if (f.regressorId) out.push(`weight regressor ${f.regressorId}`);
  if (f.mirrored) out.push('mirror images of the examples');
  return out;
}

function QualityFacts({ m }: { m: ModelSummary }) {
  const q = m.metrics;
  if (!q) return <p>Not measured: there was nothing to hold out.</p>;
  const j = q.judgements;
  const few = j.confirmed + j.rejected < 10;
  return (
    <div className="space-y-1">
      <p>
        Average precision {q.averagePrecision === null ? 'not measurable' : percent(q.averagePrecision)}, area under the ROC curve {q.auroc === null ? 'not measurable' : percent(q.auroc)}
        {q.threshold.precision !== null ? `; at ${q.threshold.minZ} SD, precision ${percent(q.threshold.precision)} and recall ${percent(q.threshold.recall)}` : ''}.
      </p>
      <p className="text-sm text-muted">
        Measured by {q.scheme === 'leave-one-out' ? 'leaving one out at a time' : `${q.folds}-fold cross-validation`} over {count(j.examples, 'example', 'examples')}, {count(j.confirmed, 'confirmed', 'confirmed')} and{' '}
        {count(j.rejected, 'rejected item', 'rejected items')}, with {count(j.otherSubject, 'item', 'items')} of other subjects as counter-examples.
        {few ? ' With so few reviewed items this is a rough indication, not a measurement to rely on.' : ''}
      </p>
    </div>
  );
}

interface ModelPanelProps {
  subjectId: number;
  collectionId: number;
  label: string;
  broaderId: number | null;
  subjects: readonly SubjectListEntry[];
  canWrite: boolean;
  exampleCount: number;
}

/** The subject's model: how to make a new version (three ways), what the active one is, and every version so far. */
export function ModelPanel({ subjectId, collectionId, label, broaderId, subjects, canWrite, exampleCount }: ModelPanelProps) {
  const models = useModels(subjectId);
  const synthesize = useSynthesize();
  const collections = useCollections();
  const [mode, setMode] = useState<Mode>('from-examples');
  const [broader, setBroader] = useState<string>(broaderId === null ? '' : String(broaderId));
  const others = (collections.data?.collections ?? []).filter((c) => c.id !== collectionId);
  const [sourceCollection, setSourceCollection] = useState<number | null>(null);
  const sourceCollectionId = sourceCollection ?? others[0]?.id ?? null;
  const sourceSubjects = useSubjects(mode === 'carried' ? sourceCollectionId : null);
  const withModel = (sourceSubjects.data ?? []).filter((s) => s.model !== null);
  const [sourceSubject, setSourceSubject] = useState<string>('');
  const [done, setDone] = useState('');
  const name = useId();
  const labelOf = (id: number) => subjects.find((s) => s.id === id)?.prefLabel;
  const collectionName = (id: number) => collections.data?.collections.find((c) => c.id === id)?.name;
  const active = models.data?.find((m) => m.active) ?? null;
  const problem = synthesize.isError ? problemOf(synthesize.error) : null;
  const broaderChoices = subjects.filter((s) => s.id !== subjectId && s.model !== null);

  function submit(event: FormEvent) {
    event.preventDefault();
    if (synthesize.isPending) return;
    let request: SynthesisRequest;
    if (mode === 'narrower') request = broader === '' ? { mode } : { mode, broaderSubjectId: Number(broader) };
    else if (mode === 'carried') {
      const chosen = sourceSubject || String(withModel[0]?.id ?? '');
      if (!chosen) return;
      request = { mode, sourceSubjectId: Number(chosen) };
    } else request = { mode };
    setDone('');
    synthesize.mutate({ subjectId, request }, { onSuccess: (m) => setDone(`Model version ${m.version} of “${label}” is made and active: ${methodWords(m.method).label.toLowerCase()}. The preview now ranks by it.`) });
  }

  return (
    <div className="space-y-6">
      {active ? (
        <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-[max-content_1fr]">
          <dt className="font-bold">Active version</dt>
          <dd>
            Version {active.version}, made {formatDateTime(active.createdAt)}
          </dd>
          <dt className="font-bold">Method</dt>
          <dd>
            {methodWords(active.method).label}: {methodWords(active.method).explanation}
          </dd>
          <dt className="font-bold">Made from</dt>
          <dd>{madeFromWords(active, labelOf, collectionName).join(', ')}</dd>
          <dt className="font-bold">Measured quality</dt>
          <dd>
            <QualityFacts m={active} />
          </dd>
          <dt className="font-bold">Probabilities</dt>
          <dd>
            {active.calibration?.kind === 'platt'
              ? `Calibrated by Platt scaling on ${active.calibration.positives} confirmed and ${active.calibration.negatives} rejected items.`
              : 'None yet: fewer than 10 confirmed and 10 rejected items. Scores are shown against the collection’s usual score instead.'}
          </dd>
        </dl>
      ) : (
        <p className="max-w-prose">
          “{label}” has no model yet. The preview ranks by the average of its examples until one is made{canWrite ? '' : ' by an archivist'}.
        </p>
      )}

      {canWrite ? (
        <form onSubmit={submit} className="space-y-4" aria-label={`Make a model version of “${label}”`}>
          <fieldset className="space-y-2">
            <legend className="text-xl font-bold">Make a new version</legend>
            {(
              [
                ['from-examples', 'From its examples', 'The usual way: Cartouche picks the method its examples and reviewed items allow.'],
                ['narrower', 'Narrower than a broader subject', 'Refines the model of a broader subject with this subject’s few examples.'],
                ['carried', 'Carry from another collection', 'Reuses a model made for a collection of another medium.'],
              ] as const
            ).map(([value, title, hint]) => (
              <label key={value} className="flex min-h-11 items-start gap-3">
                <input type="radio" name={name} value={value} checked={mode === value} onChange={() => setMode(value)} className="mt-1 size-5 shrink-0 accent-accent" />
                <span>
                  <span className="font-bold">{title}</span>
                  <span className="block text-sm text-muted">{hint}</span>
                </span>
              </label>
            ))}
          </fieldset>
          {mode === 'narrower' ? (
            <SelectField label="Broader subject" hint="Only subjects with a model can be refined." value={broader} onChange={(e) => setBroader(e.currentTarget.value)} fieldClassName="max-w-md">
              <option value="">{broaderId === null ? 'Choose a subject' : `Its broader subject (${labelOf(broaderId) ?? broaderId})`}</option>
              {broaderChoices.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.prefLabel}
                </option>
              ))}
            </SelectField>
          ) : null}
          {mode === 'carried' ? (
            others.length === 0 ? (
              <p>There is no other collection to carry a model from.</p>
            ) : (
              <div className="grid max-w-2xl gap-4 sm:grid-cols-2">
                <SelectField label="From the collection" value={sourceCollectionId ?? ''} onChange={(e) => { setSourceCollection(Number(e.currentTarget.value)); setSourceSubject(''); }}>
                  {others.map((c) => (
                    <option key={c.id} value={c.id}>
                      {c.name} ({c.medium})
                    </option>
                  ))}
                </SelectField>
                <SelectField label="Its subject" hint={withModel.length === 0 ? 'No subject of that collection has a model yet.' : undefined} value={sourceSubject || String(withModel[0]?.id ?? '')} onChange={(e) => setSourceSubject(e.currentTarget.value)}>
                  {withModel.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.prefLabel} (version {s.model!.version})
                    </option>
                  ))}
                </SelectField>
              </div>
            )
          ) : null}
          {mode === 'from-examples' && exampleCount === 0 ? <p>Add an example first: a model from examples needs at least one.</p> : null}
          <Button type="submit" variant="primary" aria-disabled={synthesize.isPending ? true : undefined}>
            {synthesize.isPending ? 'Making the model…' : 'Make the model'}
          </Button>
          <p role="status" className={done ? 'font-bold' : 'sr-only'}>
            {done}
          </p>
          {problem ? <ProblemNotice announce headingLevel={3} title={problem.title} detail={problem.detail} reference={problemReference(problem)} /> : null}
        </form>
      ) : null}

      {models.data && models.data.length > 0 ? (
        <div className="space-y-2 overflow-x-auto">
          <table className="w-full min-w-[36rem] border-collapse text-left">
            <caption className="mb-2 text-left text-xl font-bold">Every version</caption>
            <thead>
              <tr className="border-b-2 border-line">
                <th scope="col" className="py-2 pr-4">Version</th>
                <th scope="col" className="py-2 pr-4">Made</th>
                <th scope="col" className="py-2 pr-4">Method</th>
                <th scope="col" className="py-2 pr-4">Made from</th>
                <th scope="col" className="py-2 pr-4">Average precision</th>
              </tr>
            </thead>
            <tbody>
              {models.data.map((m) => (
                <tr key={m.id} className="border-b border-rule align-top">
                  <th scope="row" className="py-2 pr-4">
                    {m.version}
                    {m.active ? ' (active)' : ''}
                  </th>
                  <td className="py-2 pr-4">{formatDateTime(m.createdAt)}</td>
                  <td className="py-2 pr-4">{methodWords(m.method).label}</td>
                  <td className="py-2 pr-4">{madeFromWords(m, labelOf, collectionName).join(', ')}</td>
                  <td className="py-2 pr-4">{m.metrics?.averagePrecision == null ? 'not measurable' : percent(m.metrics.averagePrecision)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}
