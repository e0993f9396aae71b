import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { useForm, type FieldPath } from 'react-hook-form';
import { ALT_TEXT_LENGTH_RANGE, collectionCreateSchema, type CollectionCreate, type CollectionCreateInput } from '../../../../common/schemas/collection.ts';
import { problemOf, problemReference, type ProblemDetails } from '../../api/http';
import { Button } from '../ui/button';
import { TextAreaField, TextField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';

const FIELDS = new Set(['name', 'slug', 'description', 'medium', 'altTextLanguage', 'altTextMaxLength', 'houseStyle']);

export function emptyCollection(): CollectionCreateInput {
  return { name: '', slug: '', description: '', medium: '', altTextLanguage: 'en', altTextMaxLength: 125, houseStyle: '' };
}

/** A short name from a name: "Quay photographs, 1890–1930" → "quay-photographs-1890-1930". */
export function slugFrom(name: string): string {
  return name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80);
}

interface CollectionFormProps {
  initial: CollectionCreateInput;
  submitLabel: string;
  save(values: CollectionCreate): Promise<unknown>;
  /** the short name follows the name until someone edits it (new collections) */
  suggestSlug?: boolean;
  onStale?: () => void;
  /** further fields of the same form (the feeding subjects) */
  children?: React.ReactNode;
}

/** The collection's own settings, validated as typed with the schema the server applies. */
export function CollectionForm({ initial, submitLabel, save, suggestSlug = false, onStale, children }: CollectionFormProps) {
  const { register, handleSubmit, formState, setError, setValue, getFieldState } = useForm<CollectionCreateInput, unknown, CollectionCreate>({
    resolver: zodResolver(collectionCreateSchema),
    defaultValues: initial,
    mode: 'onTouched',
  });
  const errors = formState.errors;
  const [problem, setProblem] = useState<ProblemDetails | null>(null);
  const [pending, setPending] = useState(false);
  // a refusal that names no field takes the focus, so it is read at once
  useEffect(() => {
    if (problem) summaryRef.current?.focus();
  }, [problem]);
  const summaryRef = useRef<HTMLDivElement>(null);

  async function submit(values: CollectionCreate) {
    if (pending) return;
    setPending(true);
    setProblem(null);
    try {
      await save(values);
    } catch (error) {
      const p = problemOf(error);
      const onFields = (p.errors ?? []).filter((e) => e.path !== undefined && FIELDS.has(e.path));
      if (onFields.length) onFields.forEach((e, i) => setError(e.path as FieldPath<CollectionCreateInput>, { type: 'server', message: e.detail }, { shouldFocus: i === 0 }));
      else {
        setProblem(p);
      }
    } finally {
      setPending(false);
    }
  }

  const name = register('name');
  return (
    <form noValidate onSubmit={handleSubmit(submit)} className="space-y-5">
      {problem ? (
        <div ref={summaryRef} tabIndex={-1} className="space-y-3">
          <ProblemNotice announce headingLevel={3} title={problem.title} detail={problem.detail} reference={problemReference(problem)} />
          {problem.status === 409 && onStale ? <Button onClick={onStale}>Load the saved settings</Button> : null}
        </div>
      ) : null}
      <div className="grid gap-5 lg:grid-cols-2">
        <TextField
          label="Name"
          hint="As staff and visitors know it, e.g. “Harbour plates”."
          error={errors.name?.message}
          autoComplete="off"
          {...name}
          onChange={(event) => {
            void name.onChange(event);
            if (suggestSlug && !getFieldState('slug').isDirty) setValue('slug', slugFrom(event.currentTarget.value), { shouldValidate: false });
          }}
        />
        <TextField label="Short name" hint="Used in addresses and concept URIs: lower-case letters, digits and hyphens." error={errors.slug?.message} autoComplete="off" spellCheck={false} {...register('slug')} />
        <TextField label="Medium" hint="What the images are: engraving, photograph, lantern slide, map…" error={errors.medium?.message} autoComplete="off" {...register('medium')} />
      </div>
      <TextAreaField label="Description" hint="What the collection holds and where it comes from (optional)." error={errors.description?.message} {...register('description')} />
      <fieldset className="space-y-4 rounded-card border-2 border-rule p-4">
        <legend className="px-1 text-xl font-bold">Alt-text guidance</legend>
        <p className="max-w-prose text-sm text-muted">
          What editors are asked for when they write alt text. WCAG 2.2 (SC 1.1.1) asks for a text alternative that serves the same purpose as the image; it sets no length. What the law requires differs by
          country, so follow local law as well: Cartouche claims no compliance for you.
        </p>
        <div className="grid gap-5 lg:grid-cols-2">
          <TextField
            label="Language of the alt text"
            hint="A language tag: “en”, “cy”, “fr-CA” (BCP 47). Screen readers choose their voice by it."
            error={errors.altTextLanguage?.message}
            autoComplete="off"
            spellCheck={false}
            {...register('altTextLanguage')}
          />
          <TextField
            label="Suggested longest alt text (characters)"
            hint={`Editors are warned beyond this, not stopped; ${ALT_TEXT_LENGTH_RANGE.min} to ${ALT_TEXT_LENGTH_RANGE.max}. About 125 is a common choice; longer descriptions go in the long description.`}
            error={errors.altTextMaxLength?.message}
            inputMode="numeric"
            {...register('altTextMaxLength', { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? Number.NaN : Number(v)) })}
          />
        </div>
        <TextAreaField
          label="House style notes"
          hint="Shown to editors beside the alt-text field: how to name places and vessels, what to leave out, how to handle offensive historical captions."
          error={errors.houseStyle?.message}
          {...register('houseStyle')}
        />
      </fieldset>
      {children}
      <Button type="submit" variant="primary" aria-disabled={pending ? true : undefined}>
        {pending ? 'Saving…' : submitLabel}
      </Button>
    </form>
  );
}
