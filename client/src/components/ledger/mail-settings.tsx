import { useState, type FormEvent } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useSaveLedgerMail, type LedgerMail } from '../../api/exports';
import { formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { SelectField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';

const WEEKDAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'];
const hourWords = (h: number) => `${String(h).padStart(2, '0')}:00`;

export function mailFactWords(m: LedgerMail): string {
  if (!m.enabled) return 'The weekly ledger mail is switched off for this collection.';
  const next = m.nextSendAt ? ` Next: ${formatDateTime(m.nextSendAt) ?? m.nextSendAt} (your clock).` : '';
  return `Every ${m.weekdayName} at ${hourWords(m.hour)} (${m.timeZone}), last week’s coverage ledger goes to every manager by mail.${next}`;
}

/** The weekly ledger mail of a collection: read-only words, or the form for those who may change it. */
export function MailSettings({ collectionId, mail, canChange }: { collectionId: number; mail: LedgerMail; canChange: boolean }) {
  const save = useSaveLedgerMail();
  const [enabled, setEnabled] = useState(mail.enabled);
  const [weekday, setWeekday] = useState(mail.weekday);
  const [hour, setHour] = useState(mail.hour);
  const [said, setSaid] = useState('');
  const problem = save.isError ? problemOf(save.error) : null;

  if (!canChange) return <p className="max-w-prose">{mailFactWords(mail)}</p>;

  function submit(event: FormEvent) {
    event.preventDefault();
    if (save.isPending) return;
    setSaid('');
    save.mutate({ collectionId, settings: { enabled, weekday, hour } }, { onSuccess: (saved) => setSaid(`Saved. ${mailFactWords(saved)}`) });
  }

  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Weekly ledger mail">
      <p className="max-w-prose">{mailFactWords(mail)}</p>
      <Checkbox label="Mail last week’s ledger to the managers every week" checked={enabled} onChange={(e) => setEnabled(e.currentTarget.checked)} />
      <div className="grid max-w-xl gap-4 sm:grid-cols-2">
        <SelectField label="Day" value={String(weekday)} disabled={!enabled} onChange={(e) => setWeekday(Number(e.currentTarget.value))}>
          {WEEKDAYS.map((d, i) => (
            <option key={d} value={i + 1}>
              {d}
            </option>
          ))}
        </SelectField>
        <SelectField label="Hour" hint={`In the collection’s time zone, ${mail.timeZone}.`} value={String(hour)} disabled={!enabled} onChange={(e) => setHour(Number(e.currentTarget.value))}>
          {Array.from({ length: 24 }, (_, h) => (
            <option key={h} value={h}>
              {hourWords(h)}
            </option>
          ))}
        </SelectField>
      </div>
      <Button type="submit" aria-disabled={save.isPending ? true : undefined}>
        {save.isPending ? 'Saving…' : 'Save the mail settings'}
      </Button>
      <p role="status" className="max-w-prose">
        {said}
      </p>
      {problem ? <ProblemNotice headingLevel={3} announce title={problem.title} detail={problem.detail} items={problem.errors?.map((e) => e.detail)} reference={problemReference(problem)} /> : null}
    </form>
  );
}
