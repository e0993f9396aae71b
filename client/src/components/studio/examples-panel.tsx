import { useId, useRef, useState, type DragEvent } from 'react';
import { problemOf, problemReference, type ProblemDetails } from '../../api/http';
import { useAddExamples, useRemoveExample, type Example, type ExampleMedium } from '../../api/subjects';
import { formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { ProblemNotice } from '../ui/problem-notice';
import { SketchPad } from './sketch-pad';
import { mediumWords, originWords } from './words';

const MEDIA: ExampleMedium[] = ['sketch', 'illustration', 'photo'];

interface ExamplesPanelProps {
  subjectId: number;
  label: string;
  examples: Example[];
  canWrite: boolean;
}

/** A subject's examples by medium, with an upload (drop or choose, many at once) and the sketch pad. */
export function ExamplesPanel({ subjectId, label, examples, canWrite }: ExamplesPanelProps) {
  const add = useAddExamples();
  const remove = useRemoveExample();
  const [medium, setMedium] = useState<ExampleMedium>('sketch');
  const [problem, setProblem] = useState<ProblemDetails | null>(null);
  const [announcement, setAnnouncement] = useState('');
  const [over, setOver] = useState(false);
  const inputRef = useRef<HTMLInputElement>(null);
  const mediumId = useId();
  const hintId = useId();

  async function upload(files: File[], as: ExampleMedium) {
    if (files.length === 0) return;
    setProblem(null);
    setAnnouncement(`Reading ${files.length} ${files.length === 1 ? 'image' : 'images'}…`);
    try {
      const added = await add.mutateAsync({ subjectId, files, medium: as });
      setAnnouncement(`${added.length} ${mediumWords[as].label.toLowerCase()} ${added.length === 1 ? 'example' : 'examples'} added to “${label}”. The preview is being refreshed.`);
    } catch (error) {
      setProblem(problemOf(error));
      setAnnouncement('');
      throw error;
    }
  }

  function onDrop(event: DragEvent<HTMLDivElement>) {
    event.preventDefault();
    setOver(false);
    void upload(Array.from(event.dataTransfer.files), medium).catch(() => undefined);
  }

  return (
    <div className="space-y-6">
      <p role="status" className="sr-only">
        {announcement}
      </p>
      {problem ? <ProblemNotice announce headingLevel={3} title={problem.title} detail={problem.detail} reference={problemReference(problem)} /> : null}

      {canWrite ? (
        <div className="grid gap-6 xl:grid-cols-2">
          <section aria-labelledby={`${mediumId}-up`} className="space-y-3">
            <h3 id={`${mediumId}-up`} className="text-xl font-bold">
              Upload images
            </h3>
            <fieldset className="space-y-1">
              <legend className="font-bold">The images are</legend>
              <div className="flex flex-wrap gap-x-4">
                {MEDIA.map((m) => (
                  <label key={m} className="inline-flex min-h-11 items-center gap-2">
                    <input type="radio" name={`${mediumId}-medium`} value={m} checked={medium === m} onChange={() => setMedium(m)} className="size-5 accent-accent" />
                    {mediumWords[m].label}
                  </label>
                ))}
              </div>
              <p className="text-sm text-muted">{mediumWords[medium].label}: {mediumWords[medium].hint}.</p>
            </fieldset>
            <div
              onDragOver={(e) => {
                if (!e.dataTransfer.types.includes('Files')) return;
                e.preventDefault();
                setOver(true);
              }}
              onDragLeave={(e) => {
                if (!e.currentTarget.contains(e.relatedTarget as Node | null)) setOver(false);
              }}
              onDrop={onDrop}
              className={cx('flex flex-col items-center gap-3 rounded-card border-2 px-4 py-8 text-center', over ? 'border-solid border-accent bg-accent-tint' : 'border-dashed border-line bg-sunk')}
            >
              <p className="text-lg font-bold">{over ? 'Release to add these images' : 'Drop images here'}</p>
              <p className="text-muted">or</p>
              <Button variant="primary" aria-describedby={hintId} aria-disabled={add.isPending ? true : undefined} onClick={() => inputRef.current?.click()}>
                {add.isPending ? 'Reading the images…' : 'Choose images…'}
              </Button>
              <p id={hintId} className="text-sm text-muted">
                JPEG, PNG, WebP or TIFF; up to 20 at once. Three to ten clear examples are usually enough to start.
              </p>
              <input
                ref={inputRef}
                type="file"
                multiple
                hidden
                accept="image/jpeg,image/png,image/webp,image/tiff"
                aria-label={`Example images for “${label}”`}
                onChange={(event) => {
                  const files = Array.from(event.currentTarget.files ?? []);
                  event.currentTarget.value = '';
                  void upload(files, medium).catch(() => undefined);
                }}
              />
            </div>
          </section>
          <section aria-labelledby={`${mediumId}-pad`} className="space-y-3">
            <h3 id={`${mediumId}-pad`} className="text-xl font-bold">
              Draw a sketch
            </h3>
            <SketchPad saving={add.isPending} onSave={(file) => upload([file], 'sketch')} />
          </section>
        </div>
      ) : null}

      <section aria-labelledby={`${mediumId}-list`} className="space-y-3">
        <h3 id={`${mediumId}-list`} className="text-xl font-bold">
          {examples.length === 0 ? 'No examples yet' : `${examples.length} ${examples.length === 1 ? 'example' : 'examples'}`}
        </h3>
        {examples.length === 0 ? <p className="max-w-prose">Upload or draw a few pictures of “{label}”. The preview below appears as soon as there is one.</p> : null}
        {MEDIA.filter((m) => examples.some((e) => e.medium === m)).map((m) => {
          const ofMedium = examples.filter((e) => e.medium === m);
          return (
            <div key={m} className="space-y-2">
              <h4 className="font-bold">
                {mediumWords[m].label} ({ofMedium.length})
              </h4>
              <ul className="grid grid-cols-[repeat(auto-fill,minmax(9rem,1fr))] gap-3">
                {ofMedium.map((e) => (
                  <li key={e.id} className="space-y-1 rounded-card border-2 border-rule bg-raised p-2">
                    <img src={e.imageUrl} alt={`Example ${e.id} of “${label}”, ${mediumWords[e.medium].label.toLowerCase()}`} className="aspect-square w-full rounded-control bg-paper object-contain" loading="lazy" />
                    <p className="text-sm">
                      <span className="font-bold">{mediumWords[e.medium].label}</span>, {originWords[e.origin]}
                      {e.itemId !== null ? ` (item ${e.itemId})` : ''}
                    </p>
                    <p className="text-sm text-muted">{formatDateTime(e.createdAt)}</p>
                    {canWrite ? (
                      <Button
                        className="w-full"
                        onClick={() => {
                          remove.mutate({ exampleId: e.id, subjectId }, { onSuccess: () => setAnnouncement(`Example ${e.id} removed. The preview is being refreshed.`), onError: (err) => setProblem(problemOf(err)) });
                        }}
                      >
                        Remove<span className="sr-only"> example {e.id} ({mediumWords[e.medium].label.toLowerCase()})</span>
                      </Button>
                    ) : null}
                  </li>
                ))}
              </ul>
            </div>
          );
        })}
      </section>
    </div>
  );
}
