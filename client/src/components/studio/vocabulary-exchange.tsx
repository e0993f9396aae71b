import { useId, useRef, useState } from 'react';
import { problemOf, type ProblemDetails } from '../../api/http';
import { useImportVocabulary, vocabularyDownloadUrl, type ExchangeFormat, type ImportReport } from '../../api/vocabulary';
import { Button } from '../ui/button';
import { Notice } from '../ui/notice';

/** Downloads of the vocabulary (SKOS Turtle, CSV) and an import that checks SKOS integrity and lands whole or not at all. */
export function VocabularyExchange({ collectionId, collectionName, canWrite }: { collectionId: number; collectionName: string; canWrite: boolean }) {
  const run = useImportVocabulary();
  const [file, setFile] = useState<File | null>(null);
  const [report, setReport] = useState<ImportReport | null>(null);
  const [problem, setProblem] = useState<ProblemDetails | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);
  const resultRef = useRef<HTMLDivElement>(null);
  const fileId = useId();
  const fileHint = useId();

  const format: ExchangeFormat | null = file ? (/\.csv$/i.test(file.name) ? 'csv' : /\.(ttl|turtle)$/i.test(file.name) ? 'turtle' : null) : null;

  async function go(dryRun: boolean) {
    if (!file || !format || run.isPending) return;
    setReport(null);
    setProblem(null);
    try {
      setReport(await run.mutateAsync({ collectionId, file, format, dryRun }));
    } catch (error) {
      setProblem(problemOf(error));
    }
    requestAnimationFrame(() => resultRef.current?.focus());
  }

  return (
    <div className="space-y-5">
      <div className="space-y-2">
        <h3 className="text-xl font-bold">Download</h3>
        <p className="max-w-prose">Every subject with its concept URI, labels, notes and place in the tree.</p>
        <ul className="flex flex-wrap gap-x-6 gap-y-2">
          <li>
            <a href={vocabularyDownloadUrl(collectionId, 'turtle')} download>
              SKOS in Turtle (.ttl)<span className="sr-only"> for {collectionName}</span>
            </a>
          </li>
          <li>
            <a href={vocabularyDownloadUrl(collectionId, 'csv')} download>
              CSV sheet (.csv)<span className="sr-only"> for {collectionName}</span>
            </a>
          </li>
        </ul>
      </div>
      {canWrite ? (
        <div className="space-y-3">
          <h3 className="text-xl font-bold">Import</h3>
          <p className="max-w-prose">
            A SKOS file (Turtle) or a CSV sheet with the columns of the download. A concept with the URI of an existing subject updates it; the others become new subjects. The file is checked against the W3C
            SKOS Reference (one preferred label per language, no label both preferred and alternative, broader and narrower in agreement) and Cartouche’s own rules (one broader subject, no loops); if
            anything fails, nothing is imported.
          </p>
          <div className="space-y-1.5">
            <label htmlFor={fileId} className="block font-bold">
              Vocabulary file
            </label>
            <p id={fileHint} className="text-sm text-muted">
              .ttl or .csv, UTF-8, up to 5 MB.
            </p>
            <input
              ref={inputRef}
              id={fileId}
              type="file"
              accept=".ttl,.csv,text/turtle,text/csv"
              aria-describedby={fileHint}
              className="block min-h-11 w-full max-w-md rounded-control border-2 border-line bg-raised px-3 py-2"
              onChange={(e) => {
                setFile(e.currentTarget.files?.[0] ?? null);
                setReport(null);
                setProblem(null);
              }}
            />
            {file && !format ? <p className="font-bold">Give the file a .ttl or .csv name so Cartouche knows how to read it.</p> : null}
          </div>
          <div className="flex flex-wrap gap-3">
            <Button onClick={() => void go(true)} disabled={!file || !format}>
              Check the file
            </Button>
            <Button variant="primary" onClick={() => void go(false)} disabled={!file || !format} aria-disabled={run.isPending ? true : undefined}>
              {run.isPending ? 'Working…' : 'Import'}
            </Button>
          </div>
          <div ref={resultRef} tabIndex={-1} role="status" className="space-y-3">
            {report ? (
              <Notice title={report.dryRun ? 'The file passes every check (nothing imported yet)' : 'Imported'}>
                <p>
                  {report.concepts} concepts: {report.created} {report.dryRun ? 'would be' : ''} new, {report.updated} {report.dryRun ? 'would be' : ''} updated; {report.untouched} subjects not in the file
                  are left as they are.
                </p>
                {report.warnings.length ? (
                  <>
                    <p className="font-bold">Not kept:</p>
                    <ul className="list-disc pl-5">
                      {report.warnings.map((w) => (
                        <li key={w} className="[overflow-wrap:anywhere]">
                          {w}
                        </li>
                      ))}
                    </ul>
                  </>
                ) : null}
              </Notice>
            ) : null}
            {problem ? (
              <div className="rounded-card border-2 border-ink bg-raised px-4 py-3">
                <p className="font-bold">{problem.title}</p>
                <p>{problem.detail}</p>
                {problem.errors?.length ? (
                  <ul className="mt-2 list-disc space-y-1 pl-5">
                    {problem.errors.map((e, i) => (
                      <li key={i} className="[overflow-wrap:anywhere]">
                        <code>{e.path}</code>: {e.detail}
                      </li>
                    ))}
                  </ul>
                ) : null}
              </div>
            ) : null}
          </div>
        </div>
      ) : null}
    </div>
  );
}
