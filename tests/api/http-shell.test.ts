import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { openTestDatabase } from '../helpers/db.ts';

let sequelize: Sequelize;
let config: AppConfig;
const clientDir = mkdtempSync(join(tmpdir(), 'cartouche-client-'));

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  writeFileSync(join(clientDir, 'index.html'), '<!doctype html><title>Cartouche test shell</title>');
});
afterAll(async () => sequelize.close());

describe('the HTTP shell', () => {
  it('answers an unknown API route with RFC 9457 problem details', async () => {
    const res = await request(createApp({ config: { ...config, clientDir }, sequelize })).get('/api/no-such-thing').expect(404);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body).toEqual({
      type: '/problems/not-found',
      title: 'Not found',
      status: 404,
      detail: 'No API route answers GET /api/no-such-thing.',
      instance: '/api/no-such-thing',
    });
  });

  it('refuses a malformed JSON body with a 400 problem, not a crash', async () => {
    const res = await request(createApp({ config: { ...config, clientDir }, sequelize }))
      .post('/api/collections')
      .set('Content-Type', 'application/json')
      .send('{"name": ')
      .expect(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 400, title: 'Malformed request body', type: '/problems/malformed-body' });
  });

  it('refuses an oversized JSON body with 413', async () => {
    const res = await request(createApp({ config: { ...config, clientDir }, sequelize }))
      .post('/api/collections')
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ caption: 'x'.repeat(1_100_000) }))
      .expect(413);
    expect(res.body).toMatchObject({ status: 413, title: 'Payload too large' });
  });

  it('serves the client for any non-API address (SPA fallback) with security headers', async () => {
    const res = await request(createApp({ config: { ...config, clientDir }, sequelize })).get('/review/queue/42').expect(200);
    expect(res.text).toContain('Cartouche test shell');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('says plainly when the client has not been built', async () => {
    const empty = mkdtempSync(join(tmpdir(), 'cartouche-empty-'));
    const res = await request(createApp({ config: { ...config, clientDir: empty }, sequelize })).get('/').expect(503);
    expect(res.body).toMatchObject({ title: 'Client not built', status: 503 });
  });
});
