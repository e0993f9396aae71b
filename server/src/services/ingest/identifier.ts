import { Op, type Transaction } from 'sequelize';
import { Item } from '../../models/index.ts';

/** The width of items.identifier. */
export const IDENTIFIER_MAX = 120;

/** The last path component of a name a browser or a folder gave us (browsers may send "C:\\scans\\a.tif"). */
export function baseName(fileName: string): string {
  const last = fileName.split(/[\\/]/).pop() ?? '';
  // control characters never belong in a stored name
  const cleaned = [...last.normalize('NFC')].filter((ch) => ch.charCodeAt(0) >= 0x20 && ch.charCodeAt(0) !== 0x7f).join('').trim();
  return cleaned.slice(0, 255) || 'unnamed';
}

/**
 * An identifier made from a file name: the name without its extension, upper-cased, accents dropped, and every
 * run of characters other than A–Z, 0–9, ".", "_" and "-" turned into one "-". "kestrel quay 12 (verso).tif"
 * becomes "KESTREL-QUAY-12-VERSO".
 */
export function identifierFromFileName(fileName: string): string {
  const stem = baseName(fileName).replace(/\.[A-Za-z0-9]{1,8}$/, '');
  const id = stem
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toUpperCase()
    .replace(/[^A-Z0-9._-]+/g, '-')
    .replace(/-{2,}/g, '-')
    .replace(/^[-._]+|[-._]+$/g, '')
    .slice(0, IDENTIFIER_MAX);
  return id || 'ITEM';
}

/** A catalogue's own identifier, kept as written (only trimmed, with runs of white space made one space). */
export function cleanIdentifier(identifier: string): string {
  return identifier.normalize('NFC').replace(/\s+/g, ' ').trim().slice(0, IDENTIFIER_MAX);
}

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * The wanted identifier if no item of the collection has it, else the first free one of "WANTED-2",
 * "WANTED-3", … — the same answer for the same collection contents. The database compares identifiers without
 * regard to case, and so does this. Call inside the transaction that inserts the item, with the collection locked.
 */
export async function uniqueIdentifier(collectionId: number, wanted: string, transaction?: Transaction): Promise<string> {
  const rows = await Item.findAll({
    attributes: ['identifier'],
    where: { collectionId, identifier: { [Op.like]: `${likeEscape(wanted.slice(0, IDENTIFIER_MAX - 7))}%` } },
    transaction,
  });
  const taken = new Set(rows.map((r) => r.identifier.toLowerCase()));
  if (!taken.has(wanted.toLowerCase())) return wanted;
  for (let n = 2; ; n++) {
    const suffix = `-${n}`;
    const candidate = wanted.slice(0, IDENTIFIER_MAX - suffix.length) + suffix;
    if (!taken.has(candidate.toLowerCase())) return candidate;
  }
}
