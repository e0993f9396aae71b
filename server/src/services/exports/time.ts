/**
 * Calendar arithmetic in a collection's time zone, with Intl only (no zone tables in the database needed).
 * A period is a pair of calendar days, both inclusive; its instants are midnight of the first day and
 * midnight after the last day, in the zone.
 */

export interface WallClock {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
  /** ISO weekday, 1 Monday … 7 Sunday */
  weekday: number;
}

const formatters = new Map<string, Intl.DateTimeFormat>();
const WEEKDAYS: Record<string, number> = { Mon: 1, Tue: 2, Wed: 3, Thu: 4, Fri: 5, Sat: 6, Sun: 7 };

function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      weekday: 'short',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** What a clock on the wall in the zone shows at an instant. */
export function wallClock(at: Date, timeZone: string): WallClock {
  const parts = Object.fromEntries(formatter(timeZone).formatToParts(at).map((p) => [p.type, p.value]));
  return {
    year: Number(parts.year),
    month: Number(parts.month),
    day: Number(parts.day),
    hour: Number(parts.hour),
    minute: Number(parts.minute),
    second: Number(parts.second),
    weekday: WEEKDAYS[parts.weekday ?? ''] ?? 0,
  };
}

/**
 * The wall-clock time of an instant as a Date whose UTC fields carry it: what a spreadsheet cell (which has
 * no time zone) should hold so that it reads as local time.
 */
export function asLocalCell(at: Date, timeZone: string): Date {
  const w = wallClock(at, timeZone);
  return new Date(Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second, at.getUTCMilliseconds()));
}

/** The instant at which the zone's clocks show 00:00 on a calendar day (`YYYY-MM-DD`), or the first instant after it (a midnight skipped by a clock change). */
export function startOfDay(day: string, timeZone: string): Date {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  const guess = Date.UTC(y, m - 1, d);
  // two passes settle the offset even when the day itself changes offset
  let t = guess;
  for (let i = 0; i < 2; i++) {
    const w = wallClock(new Date(t), timeZone);
    const shown = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
    t += guess - shown;
  }
  return new Date(t);
}

/** A calendar day plus n days (`YYYY-MM-DD`). */
export function addDays(day: string, n: number): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  return new Date(Date.UTC(y, m - 1, d + n)).toISOString().slice(0, 10);
}

/** The calendar day the zone's clocks show at an instant. */
export function dayIn(at: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  return `${String(w.year).padStart(4, '0')}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
}

/** ISO 8601 week of a calendar day: `2026-W49`. */
export function isoWeek(day: string): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  const date = new Date(Date.UTC(y, m - 1, d));
  const weekday = date.getUTCDay() || 7;
  date.setUTCDate(date.getUTCDate() + 4 - weekday); // the week's Thursday names its year
  const yearStart = Date.UTC(date.getUTCFullYear(), 0, 1);
  const week = Math.ceil(((date.getTime() - yearStart) / 86_400_000 + 1) / 7);
  return `${date.getUTCFullYear()}-W${String(week).padStart(2, '0')}`;
}

/** The instants a period of calendar days covers in a zone: [from, to). Open ends stay null. */
export function periodInstants(period: { from: string | null; to: string | null }, timeZone: string): { from: Date | null; to: Date | null } {
  return {
    from: period.from ? startOfDay(period.from, timeZone) : null,
    to: period.to ? startOfDay(addDays(period.to, 1), timeZone) : null,
  };
}

/** The Monday-to-Sunday week before the one the instant falls in, in the zone. */
export function previousWeek(at: Date, timeZone: string): { from: string; to: string } {
  const today = dayIn(at, timeZone);
  const weekday = wallClock(at, timeZone).weekday;
  const thisMonday = addDays(today, 1 - weekday);
  return { from: addDays(thisMonday, -7), to: addDays(thisMonday, -1) };
}
