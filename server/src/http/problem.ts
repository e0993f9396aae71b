import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { logger } from '../logger.ts';

/** RFC 9457 problem details: the one shape every error of the API takes. */
export interface ProblemDetails {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  errors?: Array<{ path: string; message: string }>;
}

const TYPE_BASE = '/problems/';

export class HttpProblem extends Error {
  readonly status: number;
  readonly title: string;
  readonly type: string;
  readonly errors: ProblemDetails['errors'];

  constructor(status: number, title: string, detail?: string, opts: { type?: string; errors?: ProblemDetails['errors'] } = {}) {
    super(detail ?? title);
    this.status = status;
    this.title = title;
    this.type = opts.type ?? `${TYPE_BASE}${slug(title)}`;
    this.errors = opts.errors;
  }
}

function slug(s: string): string {
  return s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
}

export function fromZodError(err: ZodError, where: string): HttpProblem {
  return new HttpProblem(400, 'Invalid request', `The ${where} did not pass validation.`, {
    type: `${TYPE_BASE}invalid-request`,
    errors: err.issues.map((i) => ({ path: i.path.join('.') || '(root)', message: i.message })),
  });
}

export function sendProblem(res: Parameters<RequestHandler>[1], problem: ProblemDetails): void {
  res.status(problem.status).type('application/problem+json').send(JSON.stringify(problem));
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpProblem(404, 'Not found', `No API route answers ${req.method} ${req.originalUrl}.`));
};

/** Turns anything thrown in a route into problem details; unexpected errors are logged, never leaked. */
export const problemHandler: ErrorRequestHandler = (err: unknown, req, res, next) => {
  if (res.headersSent) return next(err);
  let problem: ProblemDetails;
  if (err instanceof HttpProblem) {
    problem = { type: err.type, title: err.title, status: err.status, detail: err.message, errors: err.errors };
  } else if (err instanceof ZodError) {
    const p = fromZodError(err, 'request');
    problem = { type: p.type, title: p.title, status: p.status, detail: p.message, errors: p.errors };
  } else if (isBodyParserError(err)) {
    problem = {
      type: `${TYPE_BASE}${err.type === 'entity.too.large' ? 'payload-too-large' : 'malformed-body'}`,
      title: err.type === 'entity.too.large' ? 'Payload too large' : 'Malformed request body',
      status: err.status,
      detail: err.type === 'entity.too.large' ? 'The request body is larger than this route accepts.' : 'The request body is not valid JSON.',
    };
  } else {
    logger.error({ err, url: req.originalUrl, method: req.method }, 'unhandled error');
    problem = { type: `${TYPE_BASE}internal-error`, title: 'Internal error', status: 500, detail: 'Something went wrong on the server; it has been logged.' };
  }
  problem.instance = req.originalUrl;
  if (problem.errors === undefined) delete problem.errors;
  sendProblem(res, problem);
};

function isBodyParserError(err: unknown): err is { type: string; status: number } {
  return typeof err === 'object' && err !== null && 'type' in err && 'status' in err && typeof (err as { status: unknown }).status === 'number' && String((err as { type: unknown }).type).startsWith('entity.');
}
