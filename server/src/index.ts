// Starts the Cartouche API: builds the app from server/src/app.ts and listens on 127.0.0.1.
import { createApp } from './app.ts';
import { loadConfig } from './config.ts';
import { openDatabase } from './db/index.ts';
import { logger } from './logger.ts';
import { processEmbedder } from './services/features.ts';
import { ensureDevCertificates } from '../../scripts/dev-certs.ts';

const config = loadConfig();
// development and tests: the fake IdP's certificate and ours, made once under .data/certs
if (config.saml.enabled && config.saml.generateDevCertificates) await ensureDevCertificates(config.saml.certDir);
const sequelize = openDatabase(config.db);
await sequelize.authenticate();
const app = createApp({ config, sequelize });
const host = process.env.CARTOUCHE_API_HOST ?? '127.0.0.1';
const server = app.listen(config.apiPort, host, () => {
  logger.info({ url: `http://${host}:${config.apiPort}/` }, 'Cartouche API listening');
  // start the embedder now rather than at the first example upload: building the ONNX model (first start only)
  // and checking it against TF.js on the probe image happen here, and /api/health says what came of it; a
  // failure is logged (and shown in health) and the next use tries again
  processEmbedder().catch(() => undefined);
});
server.on('error', (err) => {
  logger.fatal({ err }, 'API could not listen');
  process.exit(1);
});

async function stop(signal: string): Promise<void> {
  logger.info({ signal }, 'API stopping');
  server.close();
  await sequelize.close();
  process.exit(0);
}
process.once('SIGINT', () => void stop('SIGINT'));
process.once('SIGTERM', () => void stop('SIGTERM'));
