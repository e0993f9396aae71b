import type { Run, RunStatus, StageName, StageState } from '../../api/runs';
import { formatCount } from '../../lib/format';

/** What each stage of a run does, in the screen's words. */
export const stageLabels: Record<StageName, string> = {
  ingest: 'Take in the drop folder',
  embed: 'Read the new scans',
  text: 'Find text in the scans',
  suggest: 'Suggest subjects',
  retrain: 'Rebuild subject models',
  digest: 'Mail the digest',
};

export const stageStateWords: Record<StageState, string> = {
  pending: 'Not started',
  running: 'Under way',
  done: 'Done',
  skipped: 'Skipped',
};

export const statusWords: Record<RunStatus, string> = {
  queued: 'Queued',
  running: 'Running',
  succeeded: 'Succeeded',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

export const triggerWords: Record<Run['trigger'], string> = {
  schedule: 'On schedule',
  manual: 'Started by hand',
};

export function plural(n: number, one: string, many: string): string {
  return `${formatCount(n)} ${n === 1 ? one : many}`;
}

/** What each count of a run means, shortest first. */
export function countWords(counts: Run['counts']): string[] {
  return [
    `${plural(counts.ingested, 'scan', 'scans')} taken in`,
    `${plural(counts.duplicates, 'duplicate', 'duplicates')} passed over`,
    `${plural(counts.rejected, 'file', 'files')} refused`,
    `${plural(counts.embedded, 'scan', 'scans')} read`,
    `${plural(counts.textRead ?? 0, 'scan', 'scans')} searched for text`,
    `${plural(counts.suggested, 'suggestion', 'suggestions')} made`,
    `${plural(counts.retrained, 'subject model', 'subject models')} rebuilt`,
  ];
}

/** A length of time for people: "under a second", "42 seconds", "3 min 20 s", "1 h 05 min". */
export function formatDuration(ms: number): string {
  if (ms < 1000) return 'under a second';
  const seconds = Math.round(ms / 1000);
  if (seconds < 60) return plural(seconds, 'second', 'seconds');
  const minutes = Math.floor(seconds / 60);
  if (minutes < 60) return `${minutes} min ${String(seconds % 60).padStart(2, '0')} s`;
  return `${Math.floor(minutes / 60)} h ${String(minutes % 60).padStart(2, '0')} min`;
}

/** Time left at the pace so far, in words: "about 40 seconds left". Always an estimate, so always "about". */
export function etaWords(seconds: number): string {
  if (seconds < 10) return 'a few seconds left';
  if (seconds < 60) return `about ${Math.round(seconds / 10) * 10} seconds left`;
  const minutes = Math.round(seconds / 60);
  if (minutes < 60) return `about ${plural(minutes, 'minute', 'minutes')} left`;
  const hours = Math.round(minutes / 6) / 10;
  return `about ${hours === 1 ? '1 hour' : `${hours} hours`} left`;
}

// ------------------------------------------------------------------ cron expressions in words

const dayNames = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

const isNumber = (field: string) => /^\d{1,2}$/.test(field);

function clock(hour: number, minute: number): string {
  return `${String(hour).padStart(2, '0')}:${String(minute).padStart(2, '0')}`;
}

function ordinal(n: number): string {
  const tens = n % 100;
  if (tens >= 11 && tens <= 13) return `${n}th`;
  return `${n}${['th', 'st', 'nd', 'rd'][n % 10] ?? 'th'}`;
}

function andList(words: string[]): string {
  if (words.length <= 1) return words.join('');
  return `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`;
}

/** The days of a weekday field, Sunday as 0 (7 is Sunday too), or null when it is not a plain list or range. */
function weekdays(field: string): number[] | null {
  const days = new Set<number>();
  for (const part of field.split(',')) {
    const range = /^(\d)-(\d)$/.exec(part);
    if (range) {
      const from = Number(range[1]);
      const to = Number(range[2]);
      if (from > to || to > 7) return null;
      for (let d = from; d <= to; d++) days.add(d % 7);
    } else if (/^\d$/.test(part) && Number(part) <= 7) {
      days.add(Number(part) % 7);
    } else {
      return null;
    }
  }
  return [...days].sort((a, b) => a - b);
}

function daysInWords(days: number[]): string {
  const key = days.join(',');
  if (key === '1,2,3,4,5') return 'on weekdays';
  if (key === '0,6') return 'at weekends';
  if (days.length === 7) return 'every day';
  // Monday first, the way a working week reads
  const ordered = [...days].sort((a, b) => ((a + 6) % 7) - ((b + 6) % 7));
  return `every ${andList(ordered.map((d) => dayNames[d]!))}`;
}

/**
 * A five-field cron expression (minute hour day-of-month month day-of-week) in plain words, for the common
 * forms: "0 2 * * *" → "every day at 02:00", "30 1 * * 1-5" → "on weekdays at 01:30", "0 3 1 * *" →
 * "on the 1st of every month at 03:00", "*\/15 * * * *" → "every 15 minutes". Anything else gives null, and
 * the screen shows the expression as written.
 */
export function cronInWords(expression: string): string | null {
  const fields = expression.trim().split(/\s+/);
  if (fields.length !== 5) return null;
  const [minute, hour, dayOfMonth, month, dayOfWeek] = fields as [string, string, string, string, string];
  if (month !== '*') return null;

  if (minute === '*' && hour === '*' && dayOfMonth === '*' && dayOfWeek === '*') return 'every minute';
  const everyMinutes = /^\*\/(\d{1,2})$/.exec(minute);
  if (everyMinutes && hour === '*' && dayOfMonth === '*' && dayOfWeek === '*') {
    const n = Number(everyMinutes[1]);
    return n >= 1 && n < 60 ? (n === 1 ? 'every minute' : `every ${n} minutes`) : null;
  }
  if (!isNumber(minute) || Number(minute) > 59) return null;
  const m = Number(minute);

  const everyHours = /^\*\/(\d{1,2})$/.exec(hour);
  if ((hour === '*' || everyHours) && dayOfMonth === '*' && dayOfWeek === '*') {
    const n = everyHours ? Number(everyHours[1]) : 1;
    if (n < 1 || n > 23) return null;
    const past = m === 0 ? 'on the hour' : `at ${plural(m, 'minute', 'minutes')} past`;
    return n === 1 ? `every hour, ${past}` : `every ${n} hours from midnight, ${past}`;
  }

  if (!isNumber(hour) || Number(hour) > 23) return null;
  const at = `at ${clock(Number(hour), m)}`;

  if (dayOfMonth === '*' && dayOfWeek === '*') return `every day ${at}`;
  if (dayOfMonth === '*') {
    const days = weekdays(dayOfWeek);
    return days === null || days.length === 0 ? null : `${daysInWords(days)} ${at}`;
  }
  if (dayOfWeek === '*' && isNumber(dayOfMonth) && Number(dayOfMonth) >= 1 && Number(dayOfMonth) <= 31) {
    return `on the ${ordinal(Number(dayOfMonth))} of every month ${at}`;
  }
  return null;
}

/** The time zones the browser knows (IANA names), with UTC and the current choice always among them. */
export function timeZoneChoices(current: string): string[] {
  const zones = new Set(Intl.supportedValuesOf('timeZone'));
  zones.add('UTC');
  if (current !== '') zones.add(current);
  return [...zones].sort((a, b) => (a === 'UTC' ? -1 : b === 'UTC' ? 1 : a.localeCompare(b)));
}
