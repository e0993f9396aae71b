import ExcelJS from 'exceljs';
import { simpleParser } from 'mailparser';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportTasks } from '../../jobs/src/tasks/export-build.ts';
import { enqueueDueWeeklyLedgers } from '../../jobs/src/tasks/weekly-ledger.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { listMessages, readMessage } from '../../server/src/mail/mailbox.ts';
import { ExportFile, Job } from '../../server/src/models/index.ts';
import { WEEKLY_JOB, dueThisWeek, isDue, nextSendAt } from '../../server/src/services/exports/weekly.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { startTestSmtp } from '../helpers/mail.ts';
import { makePerson, signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let seed: LedgerSeed;
let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
let worker: NightShiftWorker;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  smtp = await startTestSmtp();
  config = { ...config, smtp: { ...config.smtp, port: smtp.port }, mailDir: smtp.mailDir };
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  worker = new NightShiftWorker({ sequelize, tasks: exportTasks({ config }) });
  seed = await seedLedger(sequelize, config);
});
afterAll(async () => {
  await smtp.close();
  await sequelize.close();
});

async function mailsTo(address: string) {
  const out = [];
  for (const m of await listMessages(smtp.mailDir)) {
    if (!m.to.includes(address)) continue;
    out.push(await simpleParser((await readMessage(smtp.mailDir, m.id))!.raw));
  }
  return out;
}

// Monday 30 November 2026: London keeps GMT in winter, so 07:00 there is 07:00 UTC
const MONDAY_0659 = new Date('2026-11-30T06:59:00Z');
const MONDAY_0705 = new Date('2026-11-30T07:05:00Z');

describe('the weekly coverage ledger mail', () => {
  it('is enqueued once per collection and ISO week, from the configured hour on (default Monday 07:00 in the collection’s zone)', async () => {
    expect(await enqueueDueWeeklyLedgers(MONDAY_0659)).toBe(0);
    expect(await enqueueDueWeeklyLedgers(MONDAY_0705)).toBe(1);
    // every worker ticks every quarter hour: the idempotency key keeps it to one job
    await enqueueDueWeeklyLedgers(new Date('2026-11-30T07:20:00Z'));
    await enqueueDueWeeklyLedgers(new Date('2026-11-30T13:00:00Z'));
    const jobs = await Job.findAll({ where: { kind: WEEKLY_JOB } });
    expect(jobs.map((j) => j.idempotencyKey)).toEqual([`weekly-ledger:${seed.collection.id}:2026-W49`]);
    // a day after the hour it is no longer due (a worker down all Monday does not mail on Wednesday)
    expect(await enqueueDueWeeklyLedgers(new Date('2026-12-01T07:05:00Z'))).toBe(0);
  });

  it('arrives at the fake SMTP server for each active manager with last week’s ledger attached, readable by exceljs; editors get none', async () => {
    const away = await makePerson('manager', { active: false });
    expect(await worker.runOnce()).toBe(true);
    const mails = await mailsTo(seed.manager.email);
    expect(mails.length).toBe(1);
    const mail = mails[0]!;
    expect(mail.subject).toBe('Coverage ledger: Harbour plates, 2026-11-23 to 2026-11-29');
    expect(mail.text).toContain('coverage 66.7%');
    expect(mail.text).toContain('not a statement of conformance');
    expect(mail.attachments.map((a) => [a.filename, a.contentType])).toEqual([
      ['ledger-harbour-plates-2026-11-23-to-2026-11-29.xlsx', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'],
    ]);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(mail.attachments[0]!.content as unknown as ArrayBuffer);
    expect(wb.worksheets.map((w) => w.name)).toEqual(['Summary', 'By subject', 'By editor', 'Items']);
    expect(wb.getWorksheet('Items')!.rowCount).toBe(7);
    expect(await mailsTo(seed.editors[0].email)).toEqual([]);
    expect(await mailsTo(away.email)).toEqual([]);
    const exp = await ExportFile.findOne({ where: { trigger: 'weekly' } });
    expect(exp).toMatchObject({ status: 'ready', periodFrom: '2026-11-23', periodTo: '2026-11-29' });
    expect(exp!.mailedAt).toBeInstanceOf(Date);
  });

  it('run again (a retry after the mail went out) mails nobody twice', async () => {
    const job = (await Job.findOne({ where: { kind: WEEKLY_JOB } }))!;
    await job.update({ status: 'pending', runAfter: new Date(Date.now() - 1000), lockedBy: null });
    expect(await worker.runOnce()).toBe(true);
    await job.reload();
    expect(job.result).toMatchObject({ alreadyMailed: expect.any(String) });
    expect((await mailsTo(seed.manager.email)).length).toBe(1);
  });

  it('reads weekday and hour in the collection’s own zone: Monday 07:00 in Auckland is Sunday 18:00 UTC in December (NZDT, UTC+13)', () => {
    const s = { enabled: true, weekday: 1, hour: 7, timeZone: 'Pacific/Auckland' };
    expect(dueThisWeek(new Date('2026-11-30T00:00:00Z'), s).toISOString()).toBe('2026-11-29T18:00:00.000Z');
    expect(isDue(new Date('2026-11-29T18:01:00Z'), s)).toBe(true);
    expect(isDue(new Date('2026-11-29T17:59:00Z'), s)).toBe(false);
    expect(nextSendAt(new Date('2026-11-29T18:01:00Z'), s)!.toISOString()).toBe('2026-12-06T18:00:00.000Z');
    expect(nextSendAt(new Date('2026-11-29T18:01:00Z'), { ...s, enabled: false })).toBeNull();
  });

  it('is configured per collection by managers: on/off, weekday, hour — validated, and honoured by the schedule', async () => {
    const manager = await signIn(app, 'manager');
    const editor = await signIn(app, 'editor');
    const path = `/api/collections/${seed.collection.id}/ledger-mail`;
    const shown = await editor.agent.get(path).expect(200);
    expect(shown.body.ledgerMail).toMatchObject({ enabled: true, weekday: 1, hour: 7, timeZone: 'Europe/London', weekdayName: 'Monday' });
    await editor.agent.put(path).set('x-csrf-token', editor.csrf).send({ enabled: false, weekday: 1, hour: 7 }).expect(403);
    const bad = await manager.agent.put(path).set('x-csrf-token', manager.csrf).send({ enabled: true, weekday: 8, hour: 24 }).expect(400);
    expect(bad.body.errors.map((e: { path: string }) => e.path)).toEqual(['weekday', 'hour']);
    const saved = await manager.agent.put(path).set('x-csrf-token', manager.csrf).send({ enabled: true, weekday: 5, hour: 16 }).expect(200);
    expect(saved.body.ledgerMail).toMatchObject({ weekday: 5, weekdayName: 'Friday', hour: 16 });
    // the week of 30 November already had its mail (on Monday): moving the day sends no second one that week
    expect(await enqueueDueWeeklyLedgers(new Date('2026-12-04T16:10:00Z'))).toBe(0);
    // next week: not on Monday any more, but on Friday 11 December at 16:00 London
    expect(await enqueueDueWeeklyLedgers(new Date('2026-12-07T07:05:00Z'))).toBe(0);
    expect(await enqueueDueWeeklyLedgers(new Date('2026-12-11T16:10:00Z'))).toBe(1);
    await manager.agent.put(path).set('x-csrf-token', manager.csrf).send({ enabled: false, weekday: 5, hour: 16 }).expect(200);
    expect(await enqueueDueWeeklyLedgers(new Date('2026-12-18T16:10:00Z'))).toBe(0);
  });
});
