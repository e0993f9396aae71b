import type { SubjectListEntry } from '../../api/subjects';
import { Checkbox } from '../ui/checkbox';

/** Which subjects' alt-text phrases may go into a collection's alt-text drafts. */
export function FeedingSubjects({ subjects, value, onChange }: { subjects: readonly SubjectListEntry[]; value: ReadonlySet<number>; onChange(next: Set<number>): void }) {
  const offered = subjects.filter((s) => s.status !== 'retired');
  return (
    <fieldset className="space-y-3 rounded-card border-2 border-rule p-4">
      <legend className="px-1 text-xl font-bold">Subjects that feed the alt-text draft</legend>
      <p className="max-w-prose text-sm text-muted">
        When an editor confirms one of these subjects, its alt-text phrase is offered in the draft. A draft is only a start: an editor reads and approves every alt text.
      </p>
      {offered.length === 0 ? (
        <p>The collection has no subject yet.</p>
      ) : (
        <>
          <div className="flex flex-wrap gap-3">
            <button type="button" className="min-h-11 underline" onClick={() => onChange(new Set(offered.map((s) => s.id)))}>
              All
            </button>
            <button type="button" className="min-h-11 underline" onClick={() => onChange(new Set())}>
              None
            </button>
          </div>
          <ul className="grid gap-x-6 sm:grid-cols-2 lg:grid-cols-3">
            {offered.map((s) => (
              <li key={s.id}>
                <Checkbox
                  label={
                    <>
                      {s.prefLabel}
                      <span className="block text-sm text-muted">{s.altTextPhrase ? `“${s.altTextPhrase}”` : 'no alt-text phrase yet'}</span>
                    </>
                  }
                  checked={value.has(s.id)}
                  onChange={(e) => {
                    const next = new Set(value);
                    if (e.currentTarget.checked) next.add(s.id);
                    else next.delete(s.id);
                    onChange(next);
                  }}
                />
              </li>
            ))}
          </ul>
        </>
      )}
    </fieldset>
  );
}
