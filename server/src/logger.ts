import { pino } from 'pino';

export const logger = pino({
  level: process.env.CARTOUCHE_LOG_LEVEL ?? (process.env.NODE_ENV === 'test' ? 'silent' : 'info'),
  base: { service: process.env.CARTOUCHE_SERVICE ?? 'cartouche' },
  redact: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'],
});
