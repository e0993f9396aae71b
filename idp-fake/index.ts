/**
 * Local fake SAML 2.0 identity provider for developing and testing Cartouche's single sign-on.
 *
 * Built on the npm package `saml-idp`, which mints and signs the SAML responses (Express 4 app,
 * `samlp` underneath). `saml-idp` offers only `runServer(options)`, which builds its app and
 * listens by itself without handing back the server; so `startFakeIdp` captures the app that
 * `runServer` passes to `http.createServer` and serves it from a server of its own, in front of
 * which sit the pages this module adds:
 *
 *   GET  /                 sign-in page without a request (an IdP-initiated sign-in)
 *   GET  /saml/sso         HTTP-Redirect binding: parses (and, when signed, verifies) the
 *   POST /saml/sso         HTTP-POST binding      AuthnRequest, then shows the sign-in page
 *   POST /choose           the person picked on the sign-in page; continues to saml-idp's
 *                          `POST /signin` with that person's profile, which answers with the
 *                          auto-posting form carrying the signed SAMLResponse to the ACS URL
 *   everything else        saml-idp itself: GET /metadata, /saml/slo, /signout, /settings, …
 *
 * saml-idp writes to the console (a banner, every request through `morgan`, each response's XML and
 * the options it signs with, key included); that output goes to the given pino logger at `debug`
 * level instead (or nowhere without a logger).
 *
 * It listens only on a loopback address: anyone who reaches it can sign in as any demo person.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import { createPrivateKey, randomUUID } from 'node:crypto';
import type { IncomingMessage, RequestListener, Server, ServerResponse } from 'node:http';
import { createRequire } from 'node:module';
import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import { format } from 'node:util';
import type * as NodeHttp from 'node:http';
import type { Logger } from 'pino';
import { ensureDevCertificates } from '../scripts/dev-certs.ts';
import { ROLE_ATTRIBUTE, demoIdentities, findDemoIdentity, type DemoIdentity } from './identities.ts';

const require = createRequire(import.meta.url);
// the CommonJS module object itself: saml-idp reads http.createServer from it, so it is replaced there
const nodeHttp = require('node:http') as typeof NodeHttp;

interface SamlIdpModule {
  runServer(options: Record<string, unknown>): void;
}
interface ParsedAuthnRequest {
  id?: string;
  issuer?: string;
  destination?: string;
  assertionConsumerServiceURL?: string;
  forceAuthn?: string;
}
interface SamlpModule {
  parseRequest(
    req: { query: Record<string, string>; body: Record<string, string> },
    options: { signingCert?: string },
    callback: (error: Error | null | undefined, data?: ParsedAuthnRequest) => void,
  ): void;
}

const samlIdp = require('saml-idp') as SamlIdpModule;
// the same samlp that saml-idp uses (one copy in node_modules, pinned by an npm override)
const samlp = require('samlp') as SamlpModule;

export interface FakeIdpOptions {
  port: number;
  /** loopback address to listen on; default 127.0.0.1 */
  host?: string;
  /** where the development certificates live (generated on first use) */
  certDir: string;
  /** the service provider's Assertion Consumer Service URL */
  spAcsUrl: string;
  /** the service provider's entity id (the assertion's Audience) */
  spEntityId: string;
  logger?: Logger;
}

export interface FakeIdp {
  /** base URL, e.g. http://127.0.0.1:4312 */
  url: string;
  /** SAML metadata of this identity provider (also its entity id) */
  metadataUrl: string;
  /** SingleSignOnService location (HTTP-Redirect and HTTP-POST) */
  ssoUrl: string;
  /** the identity provider's entity id / Issuer */
  entityId: string;
  /** PEM certificate the SAML responses are signed with */
  cert: string;
  close(): Promise<void>;
}

/** The attributes the fake sends, in saml-idp's attribute-metadata shape. */
const ATTRIBUTE_METADATA = [
  { id: 'email', optional: false, displayName: 'E-mail address', description: 'Work e-mail address', multiValue: false },
  { id: 'displayName', optional: false, displayName: 'Display name', description: 'Name shown in Cartouche', multiValue: false },
  { id: 'firstName', optional: true, displayName: 'Given name', description: 'Given name', multiValue: false },
  { id: 'lastName', optional: true, displayName: 'Family name', description: 'Family name', multiValue: false },
  { id: ROLE_ATTRIBUTE, optional: false, displayName: 'Cartouche role', description: 'Role value for Cartouche', multiValue: false },
];

const NAME_ID_FORMAT_EMAIL = 'urn:oasis:names:tc:SAML:1.1:nameid-format:emailAddress';
const MAX_FORM_BYTES = 512 * 1024;

/** The profile saml-idp signs in with: its `userName`/`nameIdFormat` plus one key per attribute. */
export function samlProfile(identity: DemoIdentity): Record<string, string> {
  return {
    userName: identity.email,
    nameIdFormat: NAME_ID_FORMAT_EMAIL,
    email: identity.email,
    displayName: identity.displayName,
    firstName: identity.firstName,
    lastName: identity.lastName,
    [ROLE_ATTRIBUTE]: identity.role,
  };
}

export function isLoopbackHost(host: string): boolean {
  return host === 'localhost' || host === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(host);
}

export async function startFakeIdp(opts: FakeIdpOptions): Promise<FakeIdp> {
  const host = opts.host ?? '127.0.0.1';
  if (!isLoopbackHost(host)) {
    throw new Error(`the fake identity provider only listens on a loopback address, not "${host}"`);
  }
  for (const [name, value] of [['spAcsUrl', opts.spAcsUrl], ['spEntityId', opts.spEntityId]] as const) {
    if (!value) throw new Error(`startFakeIdp: ${name} is required`);
  }
  new URL(opts.spAcsUrl); // throws on a malformed ACS URL

  const certs = await ensureDevCertificates(opts.certDir);

  let handler: RequestListener = (_req, res) => {
    res.statusCode = 503;
    res.end('starting');
  };
  const server = nodeHttp.createServer((req, res) => handler(req, res));
  await listen(server, opts.port, host);
  const { port } = server.address() as AddressInfo;
  const url = `http://${host.includes(':') ? `[${host}]` : host}:${port}`;
  const metadataUrl = `${url}/metadata`;
  const ssoUrl = `${url}/saml/sso`;

  const idpApp = createSamlIdpApp({
    host,
    port,
    cert: certs.idp.cert,
    // saml-idp only accepts an inline key in PKCS#1 ("BEGIN RSA PRIVATE KEY") form
    key: createPrivateKey(certs.idp.key).export({ format: 'pem', type: 'pkcs1' }).toString(),
    issuer: metadataUrl,
    acsUrl: opts.spAcsUrl,
    audience: opts.spEntityId,
    serviceProviderId: opts.spEntityId,
    // the response always goes to the configured ACS URL, whatever a request asks for
    disableRequestAcsUrl: true,
    signResponse: true,
    https: false,
    config: { user: samlProfile(demoIdentities[0]!), metadata: ATTRIBUTE_METADATA },
  }, lineSink(opts.logger));

  handler = frontHandler({
    idpApp,
    spAcsUrl: opts.spAcsUrl,
    spEntityId: opts.spEntityId,
    spCert: certs.sp.cert,
    metadataUrl,
    ssoUrl,
    logger: opts.logger,
  });

  opts.logger?.info({ url, metadataUrl, ssoUrl, spEntityId: opts.spEntityId, spAcsUrl: opts.spAcsUrl }, 'fake identity provider listening');

  let closing: Promise<void> | undefined;
  return {
    url,
    metadataUrl,
    ssoUrl,
    entityId: metadataUrl,
    cert: certs.idp.cert,
    close() {
      closing ??= new Promise<void>((resolve, reject) => {
        server.close((error) => (error ? reject(error) : resolve()));
        server.closeAllConnections();
      });
      return closing;
    },
  };
}

function listen(server: Server, port: number, host: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const onError = (error: Error) => reject(error);
    server.once('error', onError);
    server.listen(port, host, () => {
      server.off('error', onError);
      resolve();
    });
  });
}

/** Where saml-idp's console output goes while it serves a request (see `withSamlIdpConsole`). */
type LineSink = (line: string) => void;
const samlIdpConsole = new AsyncLocalStorage<LineSink>();
let consoleRedirectInstalled = false;

/**
 * Replaces `console.log` once by a function that behaves as before, except inside a request that
 * saml-idp is serving (tracked with AsyncLocalStorage), where the line goes to that request's sink.
 */
function installConsoleRedirect(): void {
  if (consoleRedirectInstalled) return;
  consoleRedirectInstalled = true;
  const original = console.log;
  console.log = function log(...args: unknown[]): void {
    const sink = samlIdpConsole.getStore();
    if (sink) sink(format(...args));
    else original.apply(console, args);
  };
}

// eslint-disable-next-line no-control-regex -- stripping terminal colour codes is the point
const ANSI_ESCAPES = /\u001b\[[0-9;]*m/g;

function lineSink(logger: Logger | undefined): LineSink {
  return (text) => {
    if (!logger?.isLevelEnabled('debug')) return;
    const clean = text
      .replace(ANSI_ESCAPES, '')
      .replace(/-----BEGIN [A-Z ]*PRIVATE KEY-----[\s\S]*?-----END [A-Z ]*PRIVATE KEY-----/g, '[private key]')
      .trimEnd();
    if (clean) logger.debug({ source: 'saml-idp' }, clean);
  };
}

/**
 * Runs saml-idp's `runServer` with `options` and returns the Express app it builds, without letting
 * it listen: `http.createServer` is replaced for the duration of the (synchronous) call. Its
 * start-up banner (console.log) and its request log (morgan, which takes `process.stdout` when the
 * app is built) are sent to `sink`.
 */
function createSamlIdpApp(options: Record<string, unknown>, sink: LineSink): RequestListener {
  let captured: RequestListener | undefined;
  const originalCreateServer = nodeHttp.createServer;
  const originalLog = console.log;
  const stdoutDescriptor = Object.getOwnPropertyDescriptor(process, 'stdout');
  const requestLog = new Writable({
    write(chunk: Buffer | string, _encoding, callback) {
      sink(chunk.toString());
      callback();
    },
  });
  const inert = { listen: () => inert, address: () => null, on: () => inert, once: () => inert };
  nodeHttp.createServer = ((...args: unknown[]) => {
    captured = args.find((arg): arg is RequestListener => typeof arg === 'function');
    return inert;
  }) as unknown as typeof nodeHttp.createServer;
  console.log = (...args: unknown[]) => sink(format(...args));
  Object.defineProperty(process, 'stdout', { value: requestLog, configurable: true, enumerable: true });
  try {
    samlIdp.runServer(options);
  } finally {
    if (stdoutDescriptor) Object.defineProperty(process, 'stdout', stdoutDescriptor);
    nodeHttp.createServer = originalCreateServer;
    console.log = originalLog;
  }
  if (!captured) throw new Error('saml-idp did not build its app (unexpected saml-idp version?)');
  const app = captured;
  installConsoleRedirect();
  return (req, res) => samlIdpConsole.run(sink, () => app(req, res));
}

interface FrontOptions {
  idpApp: RequestListener;
  spAcsUrl: string;
  spEntityId: string;
  spCert: string;
  metadataUrl: string;
  ssoUrl: string;
  logger?: Logger;
}

/** What the sign-in page carries from the AuthnRequest to `POST /choose` (saml-idp's `_authnRequest`). */
interface PendingRequest {
  id?: string;
  issuer?: string;
  destination?: string;
  acsUrl?: string;
  forceAuthn?: boolean;
  relayState?: string;
}

class BadRequest extends Error {}

function frontHandler(front: FrontOptions): RequestListener {
  return (req, res) => {
    handle(front, req, res).catch((error: unknown) => {
      const status = error instanceof BadRequest ? 400 : 500;
      if (status === 500) front.logger?.error({ err: error }, 'fake identity provider failed');
      else front.logger?.warn({ reason: (error as Error).message }, 'sign-in request refused');
      if (res.headersSent) {
        res.destroy();
        return;
      }
      sendPage(res, status, errorPage(front, error instanceof Error ? error.message : String(error)));
    });
  };
}

async function handle(front: FrontOptions, req: IncomingMessage, res: ServerResponse): Promise<void> {
  const url = new URL(req.url ?? '/', 'http://fake-idp.invalid');
  const path = url.pathname.replace(/\/+$/, '') || '/';
  const method = req.method ?? 'GET';

  if ((method === 'GET' || method === 'HEAD') && (path === '/' || path === '/saml/sso' || path === '/idp')) {
    const query = Object.fromEntries(url.searchParams);
    const pending = await parseAuthnRequest(front, query, {}, 'redirect');
    sendPage(res, 200, chooserPage(front, pending));
    return;
  }
  if (method === 'POST' && (path === '/saml/sso' || path === '/idp')) {
    const body = await readForm(req);
    const pending = await parseAuthnRequest(front, {}, body, 'post');
    sendPage(res, 200, chooserPage(front, pending));
    return;
  }
  if (method === 'POST' && path === '/choose') {
    const body = await readForm(req);
    const identity = findDemoIdentity(body.identity ?? '');
    if (!identity) throw new BadRequest('Choose one of the demo people listed on the sign-in page.');
    const pending = body.request ? decodePending(front, body.request) : undefined;
    front.logger?.info(
      { email: identity.email, role: identity.role, inResponseTo: pending?.id ?? null },
      'signing in as demo person',
    );
    continueToSamlIdp(front, req, res, identity, pending);
    return;
  }
  front.idpApp(req, res);
}

/**
 * Hands the request to saml-idp as its `POST /signin` with the chosen person's profile as the form
 * body (body-parser leaves a request alone once `req._body` is set). saml-idp copies the body onto
 * its user, mints the signed response and renders its `samlresponse` view, which is replaced here
 * by a page in Cartouche's words.
 */
function continueToSamlIdp(
  front: FrontOptions,
  req: IncomingMessage,
  res: ServerResponse,
  identity: DemoIdentity,
  pending: PendingRequest | undefined,
): void {
  const body: Record<string, string> = { ...samlProfile(identity) };
  if (pending) body._authnRequest = Buffer.from(JSON.stringify(pending), 'utf8').toString('base64');
  Object.assign(req, { url: '/signin', method: 'POST', body, _body: true });

  type RenderingResponse = ServerResponse & {
    render?: (view: string, locals?: Record<string, unknown>, callback?: unknown) => void;
  };
  const rendering = res as RenderingResponse;
  rendering.render = function render(view, locals, callback) {
    if (view === 'samlresponse' && locals) {
      sendPage(res, 200, autoPostPage(front, identity, {
        acsUrl: String(locals.AcsUrl ?? ''),
        samlResponse: String(locals.SAMLResponse ?? ''),
        relayState: locals.RelayState === undefined || locals.RelayState === null ? '' : String(locals.RelayState),
      }), "script-src 'unsafe-inline'");
      return;
    }
    // any other view (saml-idp's error page): saml-idp's own rendering
    const inherited = (Object.getPrototypeOf(res) as RenderingResponse).render;
    inherited?.call(res, view, locals, callback);
  };
  front.idpApp(req, res);
}

async function parseAuthnRequest(
  front: FrontOptions,
  query: Record<string, string>,
  body: Record<string, string>,
  binding: 'redirect' | 'post',
): Promise<PendingRequest | undefined> {
  const samlRequest = query.SAMLRequest ?? body.SAMLRequest;
  if (!samlRequest) return undefined;
  const relayState = query.RelayState ?? body.RelayState;
  const signed =
    Boolean(query.Signature) ||
    (binding === 'post' && /<([\w-]+:)?Signature[\s>]/.test(Buffer.from(samlRequest, 'base64').toString('utf8')));

  const data = await new Promise<ParsedAuthnRequest>((resolve, reject) => {
    samlp.parseRequest({ query, body }, signed ? { signingCert: front.spCert } : {}, (error, parsed) => {
      if (error) reject(new BadRequest(`The SAML AuthnRequest could not be read: ${error.message}`));
      else if (!parsed) reject(new BadRequest('The SAML AuthnRequest is empty.'));
      else resolve(parsed);
    });
  });
  return checkPending(front, {
    id: data.id,
    issuer: data.issuer,
    destination: data.destination,
    acsUrl: data.assertionConsumerServiceURL,
    forceAuthn: data.forceAuthn === 'true',
    relayState: relayState || undefined,
  });
}

/** The same rules for a request read from the SP and one coming back from the sign-in page. */
function checkPending(front: FrontOptions, pending: PendingRequest): PendingRequest {
  if (pending.issuer !== undefined && pending.issuer !== front.spEntityId) {
    throw new BadRequest(
      `This identity provider only serves the service provider "${front.spEntityId}"; the request came from "${pending.issuer}".`,
    );
  }
  if (pending.acsUrl !== undefined && pending.acsUrl !== front.spAcsUrl) {
    throw new BadRequest(
      `The request asks for the answer to go to "${pending.acsUrl}", but this identity provider is set up to answer at "${front.spAcsUrl}".`,
    );
  }
  if (pending.id !== undefined && !/^[A-Za-z_][\w.-]{0,255}$/.test(pending.id)) {
    throw new BadRequest('The request ID is not a valid XML ID.');
  }
  return pending;
}

function decodePending(front: FrontOptions, encoded: string): PendingRequest {
  let raw: unknown;
  try {
    raw = JSON.parse(Buffer.from(encoded, 'base64').toString('utf8'));
  } catch {
    throw new BadRequest('The sign-in request carried by the page is damaged; start again from Cartouche.');
  }
  if (!raw || typeof raw !== 'object') throw new BadRequest('The sign-in request carried by the page is damaged.');
  const r = raw as Record<string, unknown>;
  const str = (v: unknown) => (typeof v === 'string' ? v : undefined);
  return checkPending(front, {
    id: str(r.id),
    issuer: str(r.issuer),
    destination: str(r.destination),
    acsUrl: str(r.acsUrl),
    forceAuthn: r.forceAuthn === true,
    relayState: str(r.relayState),
  });
}

async function readForm(req: IncomingMessage): Promise<Record<string, string>> {
  const type = (req.headers['content-type'] ?? '').split(';')[0]!.trim().toLowerCase();
  if (type !== 'application/x-www-form-urlencoded') {
    throw new BadRequest('Expected an HTML form (application/x-www-form-urlencoded).');
  }
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > MAX_FORM_BYTES) throw new BadRequest('The form is too large.');
    chunks.push(chunk as Buffer);
  }
  return Object.fromEntries(new URLSearchParams(Buffer.concat(chunks).toString('utf8')));
}

/* ------------------------------------------------------------------ pages */

function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

const STYLE = `
  :root { color-scheme: light; --paper: #f6f3ec; --card: #fffdf8; --ink: #1c2228; --muted: #4a525b;
          --rule: #cfc7b8; --accent: #0d5c63; --accent-ink: #ffffff; --warn: #fbeed0; --warn-rule: #a86a00; }
  * { box-sizing: border-box; }
  body { margin: 0; background: var(--paper); color: var(--ink);
         font: 1.0625rem/1.55 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "DejaVu Sans", sans-serif; }
  main { max-width: 46rem; margin: 0 auto; padding: 2rem 1.25rem 3rem; }
  h1 { font-size: 1.75rem; line-height: 1.25; margin: 0 0 .25rem; }
  h2 { font-size: 1.2rem; margin: 2rem 0 .75rem; }
  .kicker { margin: 0 0 1rem; color: var(--muted); font-weight: 600; letter-spacing: .02em; }
  .notice { background: var(--warn); border-left: .35rem solid var(--warn-rule); padding: .9rem 1rem; margin: 1rem 0 1.5rem; }
  .notice p { margin: .25rem 0; }
  dl.request { display: grid; grid-template-columns: max-content 1fr; gap: .25rem 1rem; margin: 0; }
  dl.request dt { font-weight: 600; }
  dl.request dd { margin: 0; overflow-wrap: anywhere; font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: .95rem; }
  form { margin-top: 2rem; }
  fieldset { border: 0; padding: 0; margin: 0; }
  legend { font-size: 1.2rem; font-weight: 700; margin: 0 0 .75rem; padding: 0; }
  ul.people { list-style: none; margin: 0; padding: 0; display: grid; gap: .75rem; }
  button.person { display: block; width: 100%; min-height: 3.5rem; text-align: left; cursor: pointer;
                  background: var(--card); color: var(--ink); border: 2px solid var(--rule); border-radius: .5rem;
                  padding: .85rem 1rem; font: inherit; }
  button.person:hover { border-color: var(--accent); }
  button.person:focus-visible { outline: 3px solid var(--accent); outline-offset: 3px; border-color: var(--accent); }
  .person-name { display: block; font-size: 1.15rem; font-weight: 700; }
  .person-role { display: inline-block; margin: .2rem 0; padding: .05rem .5rem; border-radius: 1rem;
                 background: var(--accent); color: var(--accent-ink); font-size: .9rem; font-weight: 600; }
  .person-detail { display: block; color: var(--muted); }
  .primary { display: inline-block; min-height: 3rem; padding: .7rem 1.4rem; border: 0; border-radius: .5rem;
             background: var(--accent); color: var(--accent-ink); font: inherit; font-weight: 700; cursor: pointer; }
  .primary:focus-visible { outline: 3px solid var(--ink); outline-offset: 3px; }
  a { color: var(--accent); }
  footer { margin-top: 2.5rem; color: var(--muted); font-size: .95rem; }
`;

function layout(title: string, content: string, head = ''): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<title>${escapeHtml(title)}</title>
<style>${STYLE}</style>
${head}
</head>
<body>
<main>
${content}
</main>
</body>
</html>
`;
}

function notice(): string {
  return `<div class="notice" role="note">
  <p><strong>Local development identity provider for Cartouche.</strong></p>
  <p>This is not a real sign-in service. It runs on this computer only, asks for no password and lets
  anyone who can reach it sign in as any of the demo people of the invented Kestrelmouth Harbour Museum.</p>
</div>`;
}

function chooserPage(front: FrontOptions, pending: PendingRequest | undefined): string {
  const people = demoIdentities
    .map((person) => {
      const id = `person-${escapeHtml(person.key)}`;
      return `<li><button class="person" type="submit" name="identity" value="${escapeHtml(person.key)}" id="${id}"
  aria-labelledby="${id}-name" aria-describedby="${id}-role ${id}-email ${id}-about">
  <span class="person-name" id="${id}-name">Sign in as ${escapeHtml(person.displayName)}</span>
  <span class="person-role" id="${id}-role">role: ${escapeHtml(person.role)}</span>
  <span class="person-detail" id="${id}-email">${escapeHtml(person.email)}</span>
  <span class="person-detail" id="${id}-about">${escapeHtml(person.description)}</span>
</button></li>`;
    })
    .join('\n');
  const requestInfo = pending
    ? `<dl class="request">
  <dt>Service provider</dt><dd>${escapeHtml(pending.issuer ?? front.spEntityId)}</dd>
  <dt>Answer goes to</dt><dd>${escapeHtml(front.spAcsUrl)}</dd>
  <dt>Request ID</dt><dd>${escapeHtml(pending.id ?? '(none)')}</dd>
</dl>`
    : `<p>No sign-in request came from Cartouche, so this starts a sign-in from the identity provider's side
(an unsolicited response) for the service provider <code>${escapeHtml(front.spEntityId)}</code>, answered at
<code>${escapeHtml(front.spAcsUrl)}</code>. Cartouche may refuse it; to test the usual path, start from Cartouche's
sign-in button instead.</p>`;
  const hidden = pending
    ? `<input type="hidden" name="request" value="${escapeHtml(Buffer.from(JSON.stringify(pending), 'utf8').toString('base64'))}">`
    : '';
  return layout(
    'Sign in to Cartouche (local development)',
    `<p class="kicker">Cartouche · local development sign-in</p>
<h1>Who do you want to sign in as?</h1>
${notice()}
<h2>Sign-in request</h2>
${requestInfo}
<form method="post" action="/choose">
${hidden}
<fieldset>
<legend>Demo people</legend>
<ul class="people">
${people}
</ul>
</fieldset>
</form>
<footer>
<p>The answer is a SAML 2.0 response signed with this provider's development key. Its metadata:
<a href="${escapeHtml(front.metadataUrl)}">${escapeHtml(front.metadataUrl)}</a>.</p>
</footer>`,
  );
}

function autoPostPage(
  front: FrontOptions,
  identity: DemoIdentity,
  form: { acsUrl: string; samlResponse: string; relayState: string },
): string {
  const nonce = randomUUID();
  return layout(
    'Returning to Cartouche (local development)',
    `<p class="kicker">Cartouche · local development sign-in</p>
<h1>Returning to Cartouche</h1>
<p>Signed in as <strong>${escapeHtml(identity.displayName)}</strong> (${escapeHtml(identity.email)}).
Your browser now sends the signed answer to <code>${escapeHtml(form.acsUrl || front.spAcsUrl)}</code>.</p>
<form method="post" action="${escapeHtml(form.acsUrl)}" id="saml-answer-${nonce}">
<input type="hidden" name="SAMLResponse" value="${escapeHtml(form.samlResponse)}">
${form.relayState ? `<input type="hidden" name="RelayState" value="${escapeHtml(form.relayState)}">` : ''}
<button class="primary" type="submit">Continue to Cartouche</button>
</form>
<script>document.getElementById(${JSON.stringify(`saml-answer-${nonce}`)}).submit();</script>`,
  );
}

function errorPage(front: FrontOptions, message: string): string {
  return layout(
    'Sign-in problem (Cartouche local development)',
    `<p class="kicker">Cartouche · local development sign-in</p>
<h1>This sign-in cannot go on</h1>
${notice()}
<p role="alert">${escapeHtml(message)}</p>
<p>This identity provider is set up for the service provider <code>${escapeHtml(front.spEntityId)}</code>,
answered at <code>${escapeHtml(front.spAcsUrl)}</code>.</p>
<p><a href="/">Open the sign-in page without a request</a></p>`,
  );
}

function sendPage(res: ServerResponse, status: number, html: string, scriptPolicy = "script-src 'none'"): void {
  res.statusCode = status;
  res.setHeader('Content-Type', 'text/html; charset=utf-8');
  res.setHeader('Cache-Control', 'no-store');
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Referrer-Policy', 'no-referrer');
  res.setHeader(
    'Content-Security-Policy',
    `default-src 'none'; style-src 'unsafe-inline'; ${scriptPolicy}; img-src 'self'; base-uri 'none'; frame-ancestors 'none'`,
  );
  res.end(html);
}
