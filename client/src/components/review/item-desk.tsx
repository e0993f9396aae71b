import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useId, useMemo, useRef, useState, type KeyboardEvent } from 'react';
import { checkAltText, hasErrors } from '../../../../common/alt-text/index.ts';
import { isApiError, problemOf, problemReference, type ProblemDetails } from '../../api/http';
import {
  itemPanelQueryOptions,
  useApproveItem,
  useDecideSubject,
  useFlagCaption,
  usePromoteToExample,
  useReadTextNow,
  useSaveDescription,
  useSetForm,
  useSubjectSearch,
  type DescriptionValues,
  type ItemPanel,
  type PanelSuggestion,
} from '../../api/review';
import { formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { SelectField, controlClass } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { CheckerFindings } from './checker-findings';
import { ConflictMerge } from './conflict-merge';
import { ScanViewer, nextZoom } from './scan-viewer';
import { ShortcutsHelp } from './shortcuts-help';
import { singleKeysEnabled, typingInto } from './shortcuts';
import { SubjectTypeahead } from './subject-typeahead';
import { SuggestionList } from './suggestion-list';
import { clearDraft, useDescriptionDraft } from './use-draft';

interface ItemDeskProps {
  panel: ItemPanel;
  /** "Item 3 of 120" */
  position: string;
  /** says something through the desk's live region */
  announce(message: string): void;
  /** the item was approved; the message says so for the live region */
  onApproved(itemId: number, message: string): void;
  onSkip(itemId: number): void;
}

/** One item on the desk: the scan, its fields, its subjects and form, the texts with the live checker, and the actions. */
export function ItemDesk({ panel, position, announce, onApproved, onSkip }: ItemDeskProps) {
  const { item } = panel;
  const queryClient = useQueryClient();
  const headingId = useId();
  const altId = useId();
  const longId = useId();
  const findingsId = useId();
  const flagId = useId();
  const headingRef = useRef<HTMLHeadingElement>(null);
  const addRef = useRef<HTMLInputElement>(null);
  const formRef = useRef<HTMLSelectElement>(null);
  const altRef = useRef<HTMLTextAreaElement>(null);
  const longRef = useRef<HTMLTextAreaElement>(null);
  const flagRef = useRef<HTMLTextAreaElement>(null);
  const promoteRef = useRef<HTMLSelectElement>(null);

  const [zoom, setZoom] = useState(1);
  const [current, setCurrent] = useState(0);
  const [help, setHelp] = useState(false);
  const [singleKeys, setSingleKeys] = useState(singleKeysEnabled);
  const [problem, setProblem] = useState<ProblemDetails | null>(null);
  const [conflict, setConflict] = useState<{ mine: DescriptionValues; theirs: ItemPanel } | null>(null);
  const [flagging, setFlagging] = useState(false);
  const [flagNote, setFlagNote] = useState(item.captionFlagNote ?? '');
  const [promoting, setPromoting] = useState(false);

  const draft = useDescriptionDraft(
    item.id,
    { altText: item.altText ?? '', longDescription: item.longDescription ?? '', decorative: item.decorative, hasStored: item.altText !== null || item.decorative },
    panel.draft,
    item.version,
  );
  const { values } = draft;

  const decide = useDecideSubject();
  const setForm = useSetForm();
  const save = useSaveDescription();
  const approve = useApproveItem();
  const flag = useFlagCaption();
  const promote = usePromoteToExample();
  const readText = useReadTextNow();
  const forms = useSubjectSearch(item.collectionId, '', 'form');
  const busy = decide.isPending || setForm.isPending || save.isPending || approve.isPending || flag.isPending;

  const findings = useMemo(
    () => checkAltText({ altText: values.altText, longDescription: values.longDescription, decorative: values.decorative, fileName: item.fileName, identifier: item.identifier, caption: item.caption, ocrText: panel.ocr?.text ?? null }),
    [values, item.fileName, item.identifier, item.caption, panel.ocr?.text],
  );
  const blocked = hasErrors(findings);
  const confirmed = [...panel.subjects, ...panel.forms].filter((s) => s.state === 'accepted' || s.state === 'added');
  const taken = new Set([...panel.subjects, ...panel.forms].map((s) => s.subject.id));

  useEffect(() => {
    headingRef.current?.focus();
  }, [item.id]);

  async function refetchAfterConflict(): Promise<ItemPanel> {
    return queryClient.fetchQuery({ ...itemPanelQueryOptions(item.id), staleTime: 0 });
  }

  function failed(error: unknown, mine?: DescriptionValues) {
    if (isApiError(error) && error.status === 409 && error.problem.type.endsWith('/problems/stale-item')) {
      void refetchAfterConflict().then((theirs) => {
        if (mine) {
          setConflict({ mine, theirs });
          announce(`${item.identifier} was changed by someone else meanwhile. Nothing was saved; compare both versions below.`);
        } else {
          setProblem({ ...error.problem, detail: `${error.problem.detail} The desk now shows the current version; make your decision again.` });
          announce(`${item.identifier} was changed meanwhile; your decision was not saved.`);
        }
      });
      return;
    }
    setProblem(problemOf(error));
    announce(problemOf(error).title);
  }

  function onDecide(s: PanelSuggestion, decision: 'accept' | 'reject' | 'undo') {
    setProblem(null);
    decide.mutate(
      { itemId: item.id, version: item.version, subjectId: s.subject.id, decision },
      {
        onSuccess: () => announce(`${s.subject.prefLabel}: ${decision === 'accept' ? 'accepted' : decision === 'reject' ? 'rejected' : 'decision undone'}.`),
        onError: (e) => failed(e),
      },
    );
  }

  function addSubject(subjectId: number, label: string) {
    setProblem(null);
    decide.mutate(
      { itemId: item.id, version: item.version, subjectId, decision: 'accept' },
      { onSuccess: () => announce(`${label} added to ${item.identifier}.`), onError: (e) => failed(e) },
    );
  }

  function chooseForm(subjectId: number | null) {
    setProblem(null);
    setForm.mutate({ itemId: item.id, version: item.version, subjectId }, { onSuccess: (p) => announce(p.acceptedForm ? `Form: ${p.acceptedForm.prefLabel}.` : 'No form.'), onError: (e) => failed(e) });
  }

  function saveTexts(mine: DescriptionValues = values, version = item.version) {
    setProblem(null);
    save.mutate(
      { itemId: item.id, version, ...mine },
      {
        onSuccess: () => {
          clearDraft(item.id);
          setConflict(null);
          announce(`Texts of ${item.identifier} saved, not approved.`);
        },
        onError: (e) => failed(e, mine),
      },
    );
  }

  function approveNow(mine: DescriptionValues = values, version = item.version) {
    setProblem(null);
    if (hasErrors(checkAltText({ ...mine, fileName: item.fileName, identifier: item.identifier, caption: item.caption, ocrText: panel.ocr?.text ?? null }))) {
      announce('Not approved: the checker found a problem that blocks approval.');
      altRef.current?.focus();
      return;
    }
    approve.mutate(
      { itemId: item.id, version, ...mine },
      {
        onSuccess: ({ warnings, rejected }) => {
          clearDraft(item.id);
          setConflict(null);
          onApproved(
            item.id,
            `Approved ${item.identifier}${warnings.length ? ` with ${warnings.length} piece${warnings.length === 1 ? '' : 's'} of advice` : ''}${rejected ? `; ${rejected} suggestion${rejected === 1 ? '' : 's'} not accepted recorded as rejected` : ''}.`,
          );
        },
        onError: (e) => failed(e, mine),
      },
    );
  }

  function saveFlag(flagged: boolean) {
    setProblem(null);
    flag.mutate(
      { itemId: item.id, version: item.version, flagged, note: flagNote },
      {
        onSuccess: () => {
          setFlagging(false);
          announce(flagged ? 'Caption flagged for harmful language.' : 'Caption flag cleared.');
          headingRef.current?.focus();
        },
        onError: (e) => failed(e),
      },
    );
  }

  function promoteTo(subjectId: number) {
    setProblem(null);
    promote.mutate(
      { itemId: item.id, subjectId },
      {
        onSuccess: (r) => {
          setPromoting(false);
          const label = confirmed.find((c) => c.subject.id === subjectId)?.subject.prefLabel ?? 'the subject';
          announce(r.created ? `${item.identifier} is now an example of ${label}; tonight’s models learn from it.` : `${item.identifier} already is an example of ${label}.`);
        },
        onError: (e) => failed(e),
      },
    );
  }

  function onKeyDown(event: KeyboardEvent<HTMLDivElement>) {
    if (event.defaultPrevented || (event.target instanceof Element && event.target.closest('dialog'))) return;
    const ctrl = event.ctrlKey || event.metaKey;
    if (ctrl && event.key === 'Enter') {
      event.preventDefault();
      approveNow();
      return;
    }
    if (ctrl && (event.key === 's' || event.key === 'S')) {
      event.preventDefault();
      saveTexts();
      return;
    }
    if (event.key === 'Escape' && typingInto(event.target)) {
      event.preventDefault();
      headingRef.current?.focus();
      return;
    }
    if (ctrl || event.altKey || !singleKeys || typingInto(event.target)) return;
    const list = panel.subjects;
    const s = list[current];
    const actions: Record<string, () => void> = {
      '?': () => setHelp(true),
      n: () => onSkip(item.id),
      j: () => setCurrent((c) => Math.min(list.length - 1, c + 1)),
      k: () => setCurrent((c) => Math.max(0, c - 1)),
      a: () => s && s.state !== 'accepted' && s.state !== 'added' && onDecide(s, 'accept'),
      r: () => s && s.state !== 'rejected' && onDecide(s, 'reject'),
      u: () => s && s.state !== 'proposed' && onDecide(s, 'undo'),
      s: () => addRef.current?.focus(),
      f: () => formRef.current?.focus(),
      t: () => altRef.current?.focus(),
      l: () => longRef.current?.focus(),
      g: () => draft.change({ altText: panel.draft, decorative: false }),
      d: () => draft.change(values.decorative ? { decorative: false } : { decorative: true, altText: '' }),
      c: () => {
        setFlagging(true);
        setTimeout(() => flagRef.current?.focus(), 0);
      },
      e: () => {
        setPromoting(true);
        setTimeout(() => promoteRef.current?.focus(), 0);
      },
      o: () => readText.mutate({ itemId: item.id }, { onSuccess: () => announce('Text in the image read.'), onError: (er) => failed(er) }),
      '+': () => setZoom((z) => nextZoom(z, 1)),
      '=': () => setZoom((z) => nextZoom(z, 1)),
      '-': () => setZoom((z) => nextZoom(z, -1)),
      '0': () => setZoom(1),
    };
    const act = actions[event.key];
    if (!act) return;
    event.preventDefault();
    act();
  }

  const formOptions = forms.data ?? [];
  const fields: Array<[string, string | null]> = [
    ['Identifier', item.identifier],
    ['Caption', item.caption],
    ['Creator', item.creator],
    ['Date', item.dateText],
    ['Rights', item.rights],
    ['File', item.fileName],
  ];

  return (
    <div onKeyDown={onKeyDown} className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <p className="text-sm text-muted">{position}</p>
          <h2 id={headingId} ref={headingRef} tabIndex={-1} className="text-2xl font-bold">
            {item.identifier}
            {item.state === 'approved' ? <span className="text-base font-normal"> — approved{item.approvedBy ? ` by ${item.approvedBy.name}` : ''}</span> : null}
          </h2>
        </div>
        <div className="flex flex-wrap gap-2">
          <Button variant="primary" onClick={() => approveNow()} aria-disabled={approve.isPending ? true : undefined} aria-keyshortcuts="Control+Enter" aria-describedby={blocked ? findingsId : undefined}>
            {approve.isPending ? 'Approving…' : 'Approve'} <kbd className="text-sm font-normal">Ctrl+Enter</kbd>
          </Button>
          <Button onClick={() => onSkip(item.id)} aria-keyshortcuts="n">
            Skip <kbd className="text-sm font-normal">N</kbd>
          </Button>
          <Button onClick={() => saveTexts()} aria-keyshortcuts="Control+S">
            Save texts <kbd className="text-sm font-normal">Ctrl+S</kbd>
          </Button>
          <Button onClick={() => setHelp(true)} aria-keyshortcuts="?" aria-haspopup="dialog">
            Keys <kbd className="text-sm font-normal">?</kbd>
          </Button>
        </div>
      </div>

      {problem ? <ProblemNotice headingLevel={3} title={problem.title} detail={problem.detail} reference={problemReference(problem)} items={problem.errors?.map((e) => e.detail)} /> : null}
      {conflict ? (
        <ConflictMerge
          mine={conflict.mine}
          theirs={conflict.theirs}
          onKeepMine={() => {
            draft.reset(conflict.mine);
            saveTexts(conflict.mine, conflict.theirs.item.version);
          }}
          onTakeTheirs={() => {
            const t = conflict.theirs.item;
            draft.reset({ altText: t.altText ?? '', longDescription: t.longDescription ?? '', decorative: t.decorative });
            setConflict(null);
            announce('Their version is in the fields now; yours was set aside.');
          }}
          onEdit={() => {
            draft.reset(conflict.mine);
            setConflict(null);
            altRef.current?.focus();
          }}
        />
      ) : null}
      {draft.restored && !conflict ? (
        <p className="rounded-control border-2 border-dashed border-line bg-raised p-3">
          Restored the text you had not saved{formatDateTime(draft.restored.savedAt) ? ` (${formatDateTime(draft.restored.savedAt)})` : ''}; it is kept in this browser until you save or approve.
          {draft.restored.baseVersion !== item.version ? ' The item has changed since: check the fields before saving.' : ''}
        </p>
      ) : null}

      <div className="grid gap-6 lg:grid-cols-[minmax(0,7fr)_minmax(0,5fr)]">
        <div className="min-w-0 space-y-5">
          <ScanViewer src={item.imageUrl} identifier={item.identifier} zoom={zoom} onZoom={setZoom} />
          <section aria-labelledby={`${headingId}-fields`} className="space-y-2">
            <h3 id={`${headingId}-fields`} className="text-xl font-bold">
              Catalogue fields
            </h3>
            <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1">
              {fields.map(([label, value]) => (
                <div key={label} className="contents">
                  <dt className="font-bold">{label}</dt>
                  <dd className="break-words">{value ?? <span className="text-muted">not recorded</span>}</dd>
                </div>
              ))}
            </dl>
            {item.captionFlagged ? (
              <p className="rounded-control border-2 border-ink p-2">
                <span className="font-bold">Caption flagged for harmful or outdated language:</span> {item.captionFlagNote}. It is kept as the historical record and
                left out of the composed draft.
              </p>
            ) : null}
            {flagging ? (
              <div className="space-y-2 rounded-control border-2 border-line p-3">
                <label htmlFor={flagId} className="block font-bold">
                  What is harmful or outdated in the caption?
                </label>
                <textarea id={flagId} ref={flagRef} className={controlClass} rows={2} value={flagNote} onChange={(e) => setFlagNote(e.currentTarget.value)} />
                <div className="flex flex-wrap gap-2">
                  <Button variant="primary" onClick={() => saveFlag(true)} disabled={flagNote.trim() === ''}>
                    Flag the caption
                  </Button>
                  {item.captionFlagged ? <Button onClick={() => saveFlag(false)}>Clear the flag</Button> : null}
                  <Button onClick={() => setFlagging(false)}>Cancel</Button>
                </div>
              </div>
            ) : (
              <Button onClick={() => setFlagging(true)} aria-keyshortcuts="c">
                {item.captionFlagged ? 'Change the caption flag' : 'Flag the caption'} <kbd className="text-sm font-normal">C</kbd>
              </Button>
            )}
          </section>
          <section aria-labelledby={`${headingId}-ocr`} className="space-y-2">
            <h3 id={`${headingId}-ocr`} className="text-xl font-bold">
              Text in the image
            </h3>
            {panel.ocr?.mostlyText ? (
              <p className="rounded-control border-2 border-ink p-2">
                <span className="font-bold">Mostly text.</span> This image is mostly text (WCAG 2.2 SC 1.4.5 Images of Text): give its words in the alt text or the
                long description.
              </p>
            ) : null}
            {panel.ocr ? (
              panel.ocr.text ? (
                <pre className="whitespace-pre-wrap rounded-control border border-line bg-sunk p-2 font-sans">{panel.ocr.text}</pre>
              ) : (
                <p className="text-muted">No confident text was found.</p>
              )
            ) : (
              <p className="text-muted">Not read yet. The night shift reads the text in new scans where the collection’s settings ask for it; you can read it now.</p>
            )}
            <Button onClick={() => readText.mutate({ itemId: item.id }, { onSuccess: () => announce('Text in the image read.'), onError: (er) => failed(er) })} aria-disabled={readText.isPending ? true : undefined} aria-keyshortcuts="o">
              {readText.isPending ? 'Reading…' : panel.ocr ? 'Read it again' : 'Read it now'} <kbd className="text-sm font-normal">O</kbd>
            </Button>
          </section>
        </div>

        <div className="min-w-0 space-y-6">
          <section aria-labelledby={`${headingId}-subjects`} className="space-y-3">
            <h3 id={`${headingId}-subjects`} className="text-xl font-bold">
              Subjects
            </h3>
            <p className="text-sm text-muted">J and K move between them; A accepts, R rejects, U undoes the current one.</p>
            <SuggestionList suggestions={panel.subjects} current={current} onCurrent={setCurrent} onDecide={onDecide} busy={busy} />
            <SubjectTypeahead
              collectionId={item.collectionId}
              label="Add a subject"
              hint="Search preferred and alternative labels (S)."
              taken={taken}
              inputRef={addRef}
              onPick={(s) => addSubject(s.id, s.prefLabel)}
            />
          </section>

          <section aria-labelledby={`${headingId}-form`} className="space-y-2">
            <h3 id={`${headingId}-form`} className="sr-only">
              Form
            </h3>
            <SelectField
              ref={formRef}
              label="Form of the item (F)"
              hint={panel.forms.some((f) => f.state === 'proposed') ? `Proposed: ${panel.forms.filter((f) => f.state === 'proposed').map((f) => `${f.subject.prefLabel} (${Math.round((f.probability ?? 0) * 100)} %)`).join(', ')}` : 'What the item is: the alt text opens with it.'}
              value={panel.acceptedForm ? String(panel.acceptedForm.id) : ''}
              onChange={(e) => chooseForm(e.currentTarget.value ? Number(e.currentTarget.value) : null)}
              disabled={setForm.isPending}
            >
              <option value="">No form chosen</option>
              {formOptions.map((f) => (
                <option key={f.id} value={f.id}>
                  {f.prefLabel}
                </option>
              ))}
            </SelectField>
          </section>

          <section aria-labelledby={`${headingId}-texts`} className="space-y-3">
            <h3 id={`${headingId}-texts`} className="text-xl font-bold">
              Alt text and long description
            </h3>
            <Checkbox
              label="Decorative: adds nothing a reader needs (the alt text is then empty by design) (D)"
              checked={values.decorative}
              onChange={(e) => draft.change(e.currentTarget.checked ? { decorative: true, altText: '' } : { decorative: false })}
            />
            <div className="space-y-1.5">
              <label htmlFor={altId} className="block font-bold">
                Alt text (T)
              </label>
              <p id={`${altId}-hint`} className="text-sm text-muted">
                {values.decorative
                  ? 'Empty by design for a decorative item.'
                  : `Composed draft: “${panel.draft || 'nothing yet — accept a form and subjects'}”. G puts it in the field. ${[...values.altText].length} characters.`}
              </p>
              <textarea
                id={altId}
                ref={altRef}
                rows={3}
                className={controlClass}
                value={values.altText}
                disabled={values.decorative}
                aria-invalid={blocked ? true : undefined}
                aria-describedby={`${altId}-hint ${findingsId}`}
                onChange={(e) => draft.change({ altText: e.currentTarget.value })}
              />
            </div>
            <div aria-live="polite">
              <CheckerFindings findings={findings} id={findingsId} />
            </div>
            <div className="space-y-1.5">
              <label htmlFor={longId} className="block font-bold">
                Long description (L)
              </label>
              <p id={`${longId}-hint`} className="text-sm text-muted">
                For what the alt text cannot hold: text in the image, a map’s detail, a chart’s figures. Do not repeat the alt text.
              </p>
              <textarea id={longId} ref={longRef} rows={4} className={controlClass} value={values.longDescription} aria-describedby={`${longId}-hint`} onChange={(e) => draft.change({ longDescription: e.currentTarget.value })} />
            </div>
          </section>

          <section aria-labelledby={`${headingId}-learn`} className="space-y-2">
            <h3 id={`${headingId}-learn`} className="text-xl font-bold">
              Teach the models
            </h3>
            <p className="text-sm text-muted">Your decisions train tomorrow’s models. A good scan can also become an example of a subject it shows.</p>
            {promoting ? (
              confirmed.length ? (
                <div className="flex flex-wrap items-end gap-2">
                  <SelectField ref={promoteRef} label="Example of" defaultValue={String(confirmed[0]!.subject.id)} fieldClassName="min-w-48" onKeyDown={(e) => e.key === 'Enter' && promoteTo(Number(e.currentTarget.value))}>
                    {confirmed.map((c) => (
                      <option key={c.subject.id} value={c.subject.id}>
                        {c.subject.prefLabel}
                      </option>
                    ))}
                  </SelectField>
                  <Button variant="primary" onClick={() => promoteTo(Number(promoteRef.current?.value))} aria-disabled={promote.isPending ? true : undefined}>
                    Make it an example
                  </Button>
                  <Button onClick={() => setPromoting(false)}>Cancel</Button>
                </div>
              ) : (
                <p>Accept or add a subject first; only a confirmed subject can take this scan as an example.</p>
              )
            ) : (
              <Button onClick={() => setPromoting(true)} aria-keyshortcuts="e">
                Make it an example… <kbd className="text-sm font-normal">E</kbd>
              </Button>
            )}
          </section>
        </div>
      </div>
      <ShortcutsHelp
        open={help}
        onClose={() => {
          setHelp(false);
          headingRef.current?.focus();
        }}
        onSingleKeys={setSingleKeys}
      />
    </div>
  );
}
