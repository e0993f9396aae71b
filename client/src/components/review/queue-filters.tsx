import type { QueueFilters } from '../../api/review';
import { useSubjectSearch } from '../../api/review';
import { Checkbox } from '../ui/checkbox';
import { SelectField } from '../ui/field';

export const BANDS: Record<string, { label: string; min?: number; max?: number }> = {
  any: { label: 'Any probability' },
  uncertain: { label: 'Uncertain (40–70 %)', min: 0.4, max: 0.7 },
  likely: { label: 'Likely (70 % and over)', min: 0.7, max: 1 },
  unlikely: { label: 'Unlikely (under 40 %)', min: 0, max: 0.4 },
};

export function bandOf(f: Pick<QueueFilters, 'minProbability' | 'maxProbability'>): string {
  return Object.entries(BANDS).find(([, b]) => b.min === f.minProbability && b.max === f.maxProbability)?.[0] ?? 'any';
}

/** The queue's filters and order; every change starts the queue from its first item. */
export function QueueFiltersForm({ filters, onChange }: { filters: QueueFilters; onChange(next: QueueFilters): void }) {
  const subjects = useSubjectSearch(filters.collectionId, '', '');
  const set = (patch: Partial<QueueFilters>) => onChange({ ...filters, ...patch, offset: 0 });
  return (
    <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
      <SelectField label="Items" value={filters.state} onChange={(e) => set({ state: e.currentTarget.value as QueueFilters['state'] })}>
        <option value="open">Not approved yet</option>
        <option value="suggested">With suggestions</option>
        <option value="new">Without suggestions</option>
        <option value="approved">Approved</option>
      </SelectField>
      <SelectField label="Subject" value={filters.subjectId ?? ''} onChange={(e) => set({ subjectId: e.currentTarget.value ? Number(e.currentTarget.value) : undefined })}>
        <option value="">Any subject</option>
        {(subjects.data ?? []).map((s) => (
          <option key={s.id} value={s.id}>
            {s.prefLabel}
            {s.kind === 'form' ? ' (form)' : ''}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Probability"
        value={bandOf(filters)}
        onChange={(e) => {
          const b = BANDS[e.currentTarget.value]!;
          set({ minProbability: b.min, maxProbability: b.max });
        }}
      >
        {Object.entries(BANDS).map(([k, b]) => (
          <option key={k} value={k}>
            {b.label}
          </option>
        ))}
      </SelectField>
      <SelectField label="Order" value={filters.sort} onChange={(e) => set({ sort: e.currentTarget.value as QueueFilters['sort'] })}>
        <option value="uncertainty">Most uncertain first</option>
        <option value="identifier">By identifier</option>
      </SelectField>
      <Checkbox className="self-end" label="Not reviewed at all" checked={filters.notReviewed ?? false} onChange={(e) => set({ notReviewed: e.currentTarget.checked || undefined })} />
    </div>
  );
}
