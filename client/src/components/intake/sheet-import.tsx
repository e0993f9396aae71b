import { useId, useRef, useState } from 'react';
import { useApplyImport, useImport, usePreviewSheet, type IntakeSettings } from '../../api/intake';
import { problemOf, problemReference } from '../../api/http';
import { formatBytes, formatCount } from '../../lib/format';
import { Button } from '../ui/button';
import { ProblemNotice } from '../ui/problem-notice';
import { ImportPreviewView } from './import-preview';
import { fieldLabels } from './words';

/**
 * Catalogue records from a spreadsheet: choose a CSV or XLSX file, read the preview (which rows match which
 * items, what would change, what is wrong), then apply it or let it go.
 */
export function SheetImport({ collectionId, settings }: { collectionId: number | null; settings: IntakeSettings | undefined }) {
  const inputRef = useRef<HTMLInputElement>(null);
  const buttonRef = useRef<HTMLButtonElement>(null);
  const hintId = useId();
  const [importId, setImportId] = useState<number | null>(null);
  const preview = usePreviewSheet();
  const apply = useApplyImport();
  const current = useImport(collectionId ?? 0, collectionId === null ? null : importId);

  function choose(list: FileList | null) {
    const file = list?.[0];
    if (!file || collectionId === null) return;
    setImportId(null);
    apply.reset();
    preview.mutate({ collectionId, file }, { onSuccess: (p) => setImportId(p.id) });
  }

  function discard() {
    setImportId(null);
    preview.reset();
    apply.reset();
    buttonRef.current?.focus();
  }

  const failure = preview.isError ? problemOf(preview.error) : apply.isError ? problemOf(apply.error) : current.isError ? problemOf(current.error) : null;
  const columns = settings?.sheet.columns;

  return (
    <div className="space-y-5">
      <div className="space-y-3">
          {current.data ? null : (
          <div className="max-w-prose space-y-2 text-sm" id={hintId}>
            <p>
              One row per item, with a header row naming the columns. Cartouche matches each row to an item by its
              identifier or by the name of the scanned file, and reads{' '}
              {columns ? columns.map((c) => fieldLabels[c.field].toLowerCase()).join(', ') : 'identifier, file name, caption, creator, date and rights'}.
            </p>
            {columns ? (
              <details className="rounded-control border border-line bg-raised px-3">
                <summary className="cursor-pointer py-3 font-bold">Other header names Cartouche understands</summary>
                <dl className="space-y-1 pb-3">
                  {columns.map((c) => (
                    <div key={c.field}>
                      <dt className="inline font-bold">{fieldLabels[c.field]}: </dt>
                      <dd className="inline">{c.aliases.join(', ')}</dd>
                    </div>
                  ))}
                </dl>
              </details>
            ) : null}
            {settings ? (
              <p className="text-muted">
                CSV or Excel workbook (.xlsx), up to {formatBytes(settings.sheet.maxBytes)} and {formatCount(settings.sheet.maxRows)} rows. Nothing
                changes until you apply the preview.
              </p>
            ) : null}
          </div>
          )}
          <Button
            ref={buttonRef}
            variant={current.data ? 'secondary' : 'primary'}
            disabled={collectionId === null || preview.isPending}
            aria-describedby={current.data ? undefined : hintId}
            onClick={() => inputRef.current?.click()}
          >
            {preview.isPending ? 'Reading the sheet…' : current.data ? 'Choose another sheet…' : 'Choose a sheet…'}
          </Button>
          <input
            ref={inputRef}
            type="file"
            hidden
            aria-label="Catalogue sheet"
            accept=".csv,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
            onChange={(event) => {
              choose(event.currentTarget.files);
              event.currentTarget.value = '';
            }}
          />
      </div>

      <div role="status" className="sr-only">
        {preview.isPending
          ? 'Reading the sheet.'
          : current.data?.status === 'applied' && current.data.result
            ? `Applied: ${current.data.result.applied} items updated, ${current.data.result.refused} rows left alone.`
            : current.data
              ? `Preview ready: ${current.data.summary.changes} rows would change an item, ${current.data.summary.problems} rows have problems.`
              : ''}
      </div>

      {failure ? (
        <ProblemNotice
          headingLevel={3}
          announce
          title={failure.title}
          detail={failure.detail}
          items={failure.errors?.map((e) => e.detail)}
          reference={problemReference(failure)}
        />
      ) : null}

      {current.data && collectionId !== null ? (
        <ImportPreviewView
          preview={current.data}
          applying={apply.isPending}
          onApply={() => apply.mutate({ collectionId, importId: current.data.id })}
          onDiscard={discard}
        />
      ) : null}
    </div>
  );
}
