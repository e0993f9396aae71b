import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { Controller, useForm, type FieldPath } from 'react-hook-form';
import { subjectCreateSchema, type SubjectCreate, type SubjectCreateInput } from '../../../../common/schemas/subject.ts';
import { problemOf, problemReference, type ProblemDetails } from '../../api/http';
import type { SubjectListEntry, SubjectRecord } from '../../api/subjects';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { SelectField, TextAreaField, TextField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { AltLabelsEditor } from './alt-labels-editor';
import { kindWords, statusWords } from './words';
import { broaderChoices } from './tree';

interface SubjectFormProps {
  /** the subject being edited; none for a new one */
  subject?: SubjectRecord;
  /** the collection's subjects, to choose the broader one from */
  subjects: readonly SubjectListEntry[];
  submitLabel: string;
  /** saves; a rejected promise's problem is shown on the fields it names, or above the form */
  save(values: SubjectCreate): Promise<unknown>;
  /** after a refusal because the copy is stale */
  onReload?: () => void;
  /** the fields a new subject needs at first; the rest are on its page */
  brief?: boolean;
}

export function emptySubject(): SubjectCreateInput {
  return { prefLabel: '', altLabels: [], kind: 'subject', broaderId: null, notation: '', scopeNote: '', altTextPhrase: '', status: 'draft', feedsAltText: true, conceptUri: '' };
}

const FIELD_NAMES = new Set(Object.keys(emptySubject()));

export function subjectValues(s: SubjectRecord): SubjectCreateInput {
  return {
    prefLabel: s.prefLabel,
    altLabels: s.altLabels,
    kind: s.kind,
    broaderId: s.broaderId,
    notation: s.notation ?? '',
    scopeNote: s.scopeNote ?? '',
    altTextPhrase: s.altTextPhrase ?? '',
    status: s.status,
    feedsAltText: s.feedsAltText,
    conceptUri: s.conceptUri,
  };
}

/**
 * The subject record, validated as it is typed with the same zod schema the server applies; the server's
 * own refusals (a label in use, a loop, a stale copy) come back onto the same fields.
 */
export function SubjectForm({ subject, subjects, submitLabel, save, onReload, brief = false }: SubjectFormProps) {
  const form = useForm<SubjectCreateInput, unknown, SubjectCreate>({
    resolver: zodResolver(subjectCreateSchema),
    defaultValues: subject ? subjectValues(subject) : emptySubject(),
    mode: 'onTouched',
  });
  const { register, handleSubmit, formState, control, setError } = form;
  const errors = formState.errors;
  const summaryRef = useRef<HTMLDivElement>(null);
  const [problem, setProblem] = useState<ProblemDetails | null>(null);
  const [pending, setPending] = useState(false);
  // a refusal that names no field takes the focus, so it is read at once
  useEffect(() => {
    if (problem) summaryRef.current?.focus();
  }, [problem]);
  const stale = problem?.status === 409 && problem.type.endsWith('/stale-version');

  async function submit(values: SubjectCreate) {
    if (pending) return;
    setPending(true);
    setProblem(null);
    try {
      await save(values);
    } catch (error) {
      const p = problemOf(error);
      const onFields = (p.errors ?? []).filter((e) => e.path !== undefined && (FIELD_NAMES.has(e.path) || e.path.startsWith('altLabels.')));
      if (onFields.length > 0) {
        onFields.forEach((e, i) => setError(e.path as FieldPath<SubjectCreateInput>, { type: 'server', message: e.detail }, { shouldFocus: i === 0 }));
      } else {
        setProblem(p);
      }
    } finally {
      setPending(false);
    }
  }

  const choices = broaderChoices(subjects, subject?.id ?? null);
  const altErrors = Array.isArray(errors.altLabels) ? (errors.altLabels as Array<{ message?: string } | undefined>).map((e) => e?.message) : [];

  return (
    <form noValidate onSubmit={handleSubmit(submit)} className="space-y-5">
      {problem ? (
        <div ref={summaryRef} tabIndex={-1}>
          <ProblemNotice announce headingLevel={3} title={problem.title} detail={problem.detail} reference={problemReference(problem)} />
          {stale && onReload ? (
            <Button className="mt-3" onClick={onReload}>
              Load the saved version
            </Button>
          ) : null}
        </div>
      ) : null}
      <div className="grid gap-5 lg:grid-cols-2">
        <TextField label="Preferred label" hint="The name editors see and exports cite, e.g. “lighthouse”." error={errors.prefLabel?.message} autoComplete="off" {...register('prefLabel')} />
        <SelectField label="Kind" error={errors.kind?.message} {...register('kind')}>
          <option value="subject">{kindWords.subject}</option>
          <option value="form">{kindWords.form}</option>
        </SelectField>
        <SelectField
          label="Broader subject"
          hint="The subject this one is narrower than; none puts it at the top of the tree."
          error={errors.broaderId?.message}
          {...register('broaderId', { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v)) })}
        >
          <option value="">None (top of the tree)</option>
          {choices.map((c) => (
            <option key={c.id} value={c.id}>
              {'\u2003'.repeat(c.depth)}
              {c.prefLabel}
            </option>
          ))}
        </SelectField>
        <SelectField label="Status" error={errors.status?.message} {...register('status')}>
          {(['draft', 'active', 'retired'] as const).map((s) => (
            <option key={s} value={s}>
              {statusWords[s].label}: {statusWords[s].hint}
            </option>
          ))}
        </SelectField>
      </div>
      {brief ? null : (
        <>
          <Controller
            control={control}
            name="altLabels"
            render={({ field }) => <AltLabelsEditor value={field.value ?? []} onChange={field.onChange} onBlur={field.onBlur} errors={altErrors} listError={(errors.altLabels as { message?: string } | undefined)?.message} />}
          />
          <div className="grid gap-5 lg:grid-cols-2">
            <TextField label="Notation" hint="A classification code, if the collection uses one (optional)." error={errors.notation?.message} autoComplete="off" {...register('notation')} />
            <TextField
              label="Alt-text phrase"
              hint="How the subject is put in an alt-text draft, e.g. “a lighthouse on a rocky point” (optional)."
              error={errors.altTextPhrase?.message}
              autoComplete="off"
              {...register('altTextPhrase')}
            />
          </div>
          <TextAreaField label="Scope note" hint="What belongs under this subject and what does not, for editors and for whoever takes the vocabulary over." error={errors.scopeNote?.message} {...register('scopeNote')} />
          <TextField
            label="Concept URI"
            hint="The address exports cite for this subject. Keep the one from an imported vocabulary; leave it for Cartouche to mint otherwise."
            error={errors.conceptUri?.message}
            autoComplete="off"
            spellCheck={false}
            {...register('conceptUri')}
          />
          <Checkbox label="Its alt-text phrase may go into alt-text drafts" {...register('feedsAltText')} />
        </>
      )}
      <Button type="submit" variant="primary" aria-disabled={pending ? true : undefined}>
        {pending ? 'Saving…' : submitLabel}
      </Button>
    </form>
  );
}
