/**
 * Starts the local fake identity provider from the environment:
 *
 *   CARTOUCHE_IDP_PORT        port to listen on (default 4312)
 *   CARTOUCHE_IDP_HOST        loopback address to listen on (default 127.0.0.1)
 *   CARTOUCHE_DATA_DIR        data folder; certificates live in `<dataDir>/certs` (default .data)
 *   CARTOUCHE_PUBLIC_URL      Cartouche's public URL (default http://127.0.0.1:4310)
 *   CARTOUCHE_SAML_SP_ENTITY_ID   service provider entity id (default <publicUrl>/api/auth/saml/metadata)
 *   CARTOUCHE_SAML_ACS_URL        Assertion Consumer Service URL (default <publicUrl>/api/auth/saml/acs)
 *   CARTOUCHE_LOG_LEVEL       pino level (default info; `debug` shows saml-idp's own output)
 *
 * Run: `npx tsx idp-fake/main.ts`
 */
import { join, resolve } from 'node:path';
import { pino } from 'pino';
import { startFakeIdp } from './index.ts';

const logger = pino({
  level: process.env.CARTOUCHE_LOG_LEVEL ?? 'info',
  base: { service: 'cartouche-idp-fake' },
});

function port(value: string | undefined, fallback: number): number {
  if (value === undefined || value === '') return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`CARTOUCHE_IDP_PORT must be a port number, got "${value}"`);
  return n;
}

async function main(): Promise<void> {
  const publicUrl = (process.env.CARTOUCHE_PUBLIC_URL ?? 'http://127.0.0.1:4310').replace(/\/+$/, '');
  const dataDir = resolve(process.env.CARTOUCHE_DATA_DIR ?? '.data');
  const idp = await startFakeIdp({
    port: port(process.env.CARTOUCHE_IDP_PORT, 4312),
    host: process.env.CARTOUCHE_IDP_HOST || '127.0.0.1',
    certDir: join(dataDir, 'certs'),
    spEntityId: process.env.CARTOUCHE_SAML_SP_ENTITY_ID || `${publicUrl}/api/auth/saml/metadata`,
    spAcsUrl: process.env.CARTOUCHE_SAML_ACS_URL || `${publicUrl}/api/auth/saml/acs`,
    logger,
  });
  logger.info(`fake identity provider ready: sign-in page ${idp.url}/ · metadata ${idp.metadataUrl}`);

  let stopping = false;
  const stop = (signal: NodeJS.Signals) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'stopping fake identity provider');
    idp.close().then(
      () => process.exit(0),
      (error: unknown) => {
        logger.error({ err: error }, 'could not stop cleanly');
        process.exit(1);
      },
    );
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((error: unknown) => {
  logger.fatal({ err: error }, 'fake identity provider failed to start');
  process.exitCode = 1;
});
