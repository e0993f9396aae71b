import { useState, type FormEvent } from 'react';
import type { CatalogueFilters, ItemState } from '../../api/items';
import { useCatalogueFacets } from '../../api/items';
import { Button } from '../ui/button';
import { SelectField, TextField } from '../ui/field';

export type FilterValues = Omit<CatalogueFilters, 'collectionId' | 'page' | 'pageSize'>;

/** Search words and filters of the catalogue; applied when the form is sent (Enter in any field). */
export function CatalogueFiltersForm({ collectionId, initial, onApply }: { collectionId: number; initial: FilterValues; onApply(values: FilterValues): void }) {
  const facets = useCatalogueFacets(collectionId);
  const [v, setV] = useState<FilterValues>(initial);
  const set = (patch: Partial<FilterValues>) => setV((x) => ({ ...x, ...patch }));
  function submit(event: FormEvent) {
    event.preventDefault();
    onApply(v);
  }
  return (
    <form role="search" aria-label="Search the catalogue" onSubmit={submit} className="space-y-4">
      <div className="flex flex-wrap items-end gap-3">
        <TextField
          fieldClassName="min-w-72 flex-1"
          label="Search"
          hint="Identifier, caption, alt text, subjects (also their other names) and text found in the image. Every word must match; word beginnings are enough."
          type="search"
          value={v.q ?? ''}
          onChange={(e) => set({ q: e.currentTarget.value })}
        />
        <Button type="submit" variant="primary">
          Search
        </Button>
      </div>
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        <SelectField label="State" value={v.state ?? ''} onChange={(e) => set({ state: (e.currentTarget.value || undefined) as ItemState | undefined })}>
          <option value="">Any state</option>
          <option value="new">New</option>
          <option value="suggested">Suggested</option>
          <option value="approved">Approved</option>
        </SelectField>
        <SelectField label="Subject" value={v.subjectId ?? ''} onChange={(e) => set({ subjectId: e.currentTarget.value ? Number(e.currentTarget.value) : undefined })}>
          <option value="">Any subject</option>
          {(facets.data?.subjects ?? []).map((s) => (
            <option key={s.id} value={s.id}>
              {s.prefLabel}
              {s.kind === 'form' ? ' (form)' : ''}
            </option>
          ))}
        </SelectField>
        <SelectField label="Reviewer" value={v.reviewerId ?? ''} onChange={(e) => set({ reviewerId: e.currentTarget.value ? Number(e.currentTarget.value) : undefined })}>
          <option value="">Anyone</option>
          {(facets.data?.reviewers ?? []).map((r) => (
            <option key={r.id} value={r.id}>
              {r.name}
            </option>
          ))}
        </SelectField>
        <TextField label="Approved from" type="date" value={v.from ?? ''} onChange={(e) => set({ from: e.currentTarget.value || undefined })} />
        <TextField label="Approved until" type="date" value={v.to ?? ''} onChange={(e) => set({ to: e.currentTarget.value || undefined })} />
      </div>
    </form>
  );
}
