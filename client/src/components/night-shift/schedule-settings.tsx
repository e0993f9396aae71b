import { useId, useMemo, useRef, useState, type FormEvent } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useSaveSchedule, type Schedule } from '../../api/runs';
import { splitFieldErrors } from '../../lib/field-errors';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { SelectField, TextField } from '../ui/field';
import { Notice } from '../ui/notice';
import { ProblemNotice } from '../ui/problem-notice';
import { cronInWords, timeZoneChoices } from './words';

type FieldName = 'cron' | 'timezone' | 'enabled' | 'folder';

const serverFields: Record<string, FieldName> = {
  scheduleCron: 'cron',
  scheduleTimezone: 'timezone',
  scheduleEnabled: 'enabled',
  dropFolder: 'folder',
};

/** "every day at 02:00 (Europe/London time)", or the expression as written when it is not a common form. */
export function scheduleInWords(cron: string, timeZone: string): string {
  const words = cronInWords(cron);
  return words === null ? `as the expression “${cron.trim()}” says (${timeZone} time)` : `${words} (${timeZone} time)`;
}

const capitalised = (words: string) => words.charAt(0).toUpperCase() + words.slice(1);

/** The night-shift settings of a collection as read-only facts, for people who may not change them. */
export function ScheduleFacts({ schedule }: { schedule: Schedule }) {
  return (
    <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-[max-content_1fr]">
      <dt className="font-bold">Runs</dt>
      <dd>
        {schedule.scheduleEnabled ? capitalised(scheduleInWords(schedule.scheduleCron, schedule.scheduleTimezone)) : 'Not on a schedule: only when started by hand.'}
        {schedule.scheduleEnabled ? (
          <span className="block text-sm text-muted">
            Schedule: <code className="font-sans">{schedule.scheduleCron}</code>
          </span>
        ) : null}
      </dd>
      <dt className="font-bold">Drop folder</dt>
      <dd className="[overflow-wrap:anywhere]">{schedule.dropFolder === '' ? 'None: new scans arrive through Intake only.' : schedule.dropFolder}</dd>
    </dl>
  );
}

/** The form for archivists: when the night shift runs, in which time zone, and which folder it takes scans from. */
export function ScheduleForm({ collectionId, schedule }: { collectionId: number; schedule: Schedule }) {
  const save = useSaveSchedule();
  const [cron, setCron] = useState(schedule.scheduleCron);
  const [timeZone, setTimeZone] = useState(schedule.scheduleTimezone);
  const [enabled, setEnabled] = useState(schedule.scheduleEnabled);
  const [folder, setFolder] = useState(schedule.dropFolder);
  const [savedAt, setSavedAt] = useState<number | null>(null);
  const cronRef = useRef<HTMLInputElement>(null);
  const timeZoneRef = useRef<HTMLSelectElement>(null);
  const folderRef = useRef<HTMLInputElement>(null);
  const summaryRef = useRef<HTMLDivElement>(null);
  const wordsId = useId();
  const zones = useMemo(() => timeZoneChoices(schedule.scheduleTimezone), [schedule.scheduleTimezone]);

  const problem = save.isError ? problemOf(save.error) : null;
  const { byField, other } = splitFieldErrors(problem, serverFields);
  const words = cronInWords(cron);

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (save.isPending) return;
    setSavedAt(null);
    save.mutate(
      { collectionId, schedule: { scheduleCron: cron.trim(), scheduleTimezone: timeZone, scheduleEnabled: enabled, dropFolder: folder.trim() } },
      {
        onSuccess: (saved) => {
          setCron(saved.scheduleCron);
          setFolder(saved.dropFolder);
          setSavedAt(Date.now());
        },
        onError: (error) => {
          const { byField: fields } = splitFieldErrors(problemOf(error), serverFields);
          // the first field the server named takes the focus; otherwise the problem itself
          const target = fields.cron ? cronRef : fields.timezone ? timeZoneRef : fields.folder ? folderRef : null;
          if (target) target.current?.focus();
          else summaryRef.current?.focus();
        },
      },
    );
  }

  return (
    <form noValidate onSubmit={submit} className="space-y-5">
      <div className="grid gap-5 lg:grid-cols-2">
        <div className="space-y-1.5">
          <TextField
            ref={cronRef}
            label="Schedule"
            hint="A cron expression: minute, hour, day of the month, month, day of the week. “0 2 * * *” is every day at 02:00."
            error={byField.cron}
            describedByIds={wordsId}
            value={cron}
            onChange={(event) => setCron(event.currentTarget.value)}
            autoComplete="off"
            spellCheck={false}
            className="font-mono"
          />
          <p id={wordsId} className="text-sm">
            <span className="font-bold">In words: </span>
            {words === null ? (
              cron.trim() === '' ? (
                'no schedule given'
              ) : (
                <>
                  not a common form; the night shift follows <code>{cron.trim()}</code> as written
                </>
              )
            ) : (
              `${words}, ${timeZone} time`
            )}
          </p>
        </div>
        <SelectField
          ref={timeZoneRef}
          label="Time zone"
          hint="The schedule is read in this time zone, so a run at 02:00 stays at 02:00 when the clocks change."
          error={byField.timezone}
          value={timeZone}
          onChange={(event) => setTimeZone(event.currentTarget.value)}
        >
          {zones.map((zone) => (
            <option key={zone} value={zone}>
              {zone.replace(/_/g, ' ')}
            </option>
          ))}
        </SelectField>
      </div>
      <div className="space-y-1.5">
        <Checkbox
          label="Run on this schedule"
          checked={enabled}
          onChange={(event) => setEnabled(event.currentTarget.checked)}
          aria-invalid={byField.enabled ? true : undefined}
        />
        {byField.enabled ? <p className="font-bold">{byField.enabled}</p> : null}
        <p className="text-sm text-muted">When this is off, the night shift runs only when someone presses Run now.</p>
      </div>
      <TextField
        ref={folderRef}
        label="Drop folder"
        hint="An absolute path on the server where new scans are left for the night shift, e.g. /srv/scans/harbour-plates. Leave it empty if scans come only through Intake."
        error={byField.folder}
        value={folder}
        onChange={(event) => setFolder(event.currentTarget.value)}
        autoComplete="off"
        spellCheck={false}
      />

      {problem && (other.length > 0 || Object.keys(byField).length === 0) ? (
        <div ref={summaryRef} tabIndex={-1}>
          <ProblemNotice headingLevel={3} announce title={problem.title} detail={problem.detail} items={other} reference={problemReference(problem)} />
        </div>
      ) : null}
      <div className="flex flex-wrap items-center gap-4">
        <Button type="submit" variant="primary" aria-disabled={save.isPending ? true : undefined}>
          {save.isPending ? 'Saving…' : 'Save settings'}
        </Button>
        <div role="status" className="min-w-0">
          {savedAt !== null && !save.isPending && !save.isError ? (
            <Notice className="py-2">
              <p>Settings saved. The workers pick up a changed schedule within a few minutes.</p>
            </Notice>
          ) : null}
        </div>
      </div>
    </form>
  );
}
