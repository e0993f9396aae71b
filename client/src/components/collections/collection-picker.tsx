import { useSearchParams } from 'react-router';
import type { CollectionSummary } from '../../api/collections';
import { formatCount } from '../../lib/format';
import { SelectField } from '../ui/field';

interface CollectionPickerProps {
  collections: readonly CollectionSummary[];
  value: number | null;
  onChange(id: number): void;
  label?: string;
  hint?: string;
}

/** A select of the collections, each with its item count, for screens that work on one collection at a time. */
export function CollectionPicker({ collections, value, onChange, label = 'Collection', hint }: CollectionPickerProps) {
  return (
    <div className="max-w-md">
      <SelectField
        label={label}
        hint={hint}
        value={value === null ? '' : String(value)}
        onChange={(event) => onChange(Number(event.currentTarget.value))}
      >
        {collections.map((c) => (
          <option key={c.id} value={c.id}>
            {c.name} ({formatCount(c.itemCount)} {c.itemCount === 1 ? 'item' : 'items'})
          </option>
        ))}
      </SelectField>
    </div>
  );
}

/**
 * The collection a screen works on, kept in `?collection=` so a link or a reload keeps it; the first
 * collection when the address names none (or one that does not exist).
 */
export function useCollectionParam(collections: readonly CollectionSummary[]): {
  chosen: CollectionSummary | null;
  choose(id: number): void;
} {
  const [params, setParams] = useSearchParams();
  const wanted = Number(params.get('collection'));
  const chosen = collections.find((c) => c.id === wanted) ?? collections[0] ?? null;
  return { chosen, choose: (id) => setParams({ collection: String(id) }, { replace: true }) };
}
