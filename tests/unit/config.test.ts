import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/src/config.ts';

describe('configuration from the environment', () => {
  it('uses the project defaults: API on 4310, MariaDB on 127.0.0.1:4311', () => {
    const c = loadConfig({ CARTOUCHE_DATA_DIR: '/nonexistent/cartouche-data' });
    expect(c.apiPort).toBe(4310);
    expect(c.db.host).toBe('127.0.0.1');
    expect(c.db.port).toBe(4311);
    expect(c.db.name).toBe('cartouche');
    expect(c.storageDir).toBe('/nonexistent/cartouche-data/storage');
    expect(c.publicUrl).toBe('http://127.0.0.1:4310');
  });

  it('picks the test database under NODE_ENV=test', () => {
    expect(loadConfig({ NODE_ENV: 'test', CARTOUCHE_DATA_DIR: '/nonexistent' }).db.name).toBe('cartouche_test');
  });

  it('refuses a port that is not a positive integer, naming the variable', () => {
    expect(() => loadConfig({ CARTOUCHE_API_PORT: 'eighty', CARTOUCHE_DATA_DIR: '/nonexistent' })).toThrow(/CARTOUCHE_API_PORT must be a positive integer/);
    expect(() => loadConfig({ CARTOUCHE_DB_PORT: '-1', CARTOUCHE_DATA_DIR: '/nonexistent' })).toThrow(/CARTOUCHE_DB_PORT/);
  });
});
