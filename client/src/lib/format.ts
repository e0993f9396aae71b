/**
 * Number, share and date formatting for the interface, in the reader's own locale.
 * Formatters are built once; Intl objects are comparatively costly to create.
 */

const integer = new Intl.NumberFormat(undefined, { maximumFractionDigits: 0 });
const oneDecimal = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 });

/** Whole percentages, truncated so that an unfinished collection never reads "100 %". */
const wholePercent = new Intl.NumberFormat(undefined, {
  style: 'percent',
  maximumFractionDigits: 0,
  roundingMode: 'trunc',
});

/** For small shares, so that a first approval never reads "0 %". */
const finePercent = new Intl.NumberFormat(undefined, {
  style: 'percent',
  maximumFractionDigits: 1,
  roundingMode: 'trunc',
});

const dateTime = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });
const timeOfDay = new Intl.DateTimeFormat(undefined, { timeStyle: 'short' });

export function formatCount(value: number): string {
  return integer.format(value);
}

/** A share between 0 and 1 as a percentage. */
export function formatShare(share: number): string {
  const clamped = Math.min(1, Math.max(0, share));
  if (clamped > 0 && clamped < 0.001) return `< ${finePercent.format(0.001)}`;
  if (clamped > 0 && clamped < 0.01) return finePercent.format(clamped);
  return wholePercent.format(clamped);
}

/** `part / whole` clamped to 0…1; 0 when there is no whole. */
export function share(part: number, whole: number): number {
  if (whole <= 0) return 0;
  return Math.min(1, Math.max(0, part / whole));
}

/** An ISO 8601 timestamp for people, or null when it cannot be read. */
export function formatDateTime(iso: string): string | null {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return null;
  return dateTime.format(date);
}

/** A clock time for people, e.g. "14:32". */
export function formatTime(date: Date): string {
  return timeOfDay.format(date);
}

/** A byte count for people: "812 bytes", "3.4 kB" (decimal units). */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return bytes === 1 ? '1 byte' : `${formatCount(bytes)} bytes`;
  if (bytes < 1_000_000) return `${oneDecimal.format(bytes / 1000)} kB`;
  return `${oneDecimal.format(bytes / 1_000_000)} MB`;
}
