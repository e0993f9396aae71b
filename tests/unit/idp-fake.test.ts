import { X509Certificate, createPrivateKey, sign } from 'node:crypto';
import { copyFile, mkdtemp, readFile, rm, stat, unlink, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stringify } from 'node:querystring';
import { deflateRawSync } from 'node:zlib';
import { DOMParser, type Element } from '@xmldom/xmldom';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SignedXml } from 'xml-crypto';
import { demoIdentities, ROLE_ATTRIBUTE, ROLE_VALUES } from '../../idp-fake/identities.ts';
import { startFakeIdp, type FakeIdp } from '../../idp-fake/index.ts';
import { certificateBody, ensureDevCertificates, type DevCertificates } from '../../scripts/dev-certs.ts';

// signatures are checked for real with xml-crypto (XML-DSig) over an @xmldom/xmldom document
type SignatureScope = 'response' | 'assertion';

function signatureNodes(xml: string, scope: SignatureScope): Element[] {
  const doc = new DOMParser().parseFromString(xml, 'text/xml');
  const root = doc.documentElement!;
  const parents = scope === 'response' ? [root] : Array.from(doc.getElementsByTagNameNS('urn:oasis:names:tc:SAML:2.0:assertion', 'Assertion'));
  return parents.flatMap((p) => Array.from(p.childNodes).filter((n): n is Element => n.nodeType === 1 && (n as Element).localName === 'Signature' && (n as Element).namespaceURI === DSIG));
}

function signatureVerifies(xml: string, node: Element, certPem: string): boolean {
  const check = new SignedXml({ publicCert: certPem });
  check.loadSignature(node as unknown as Node);
  try {
    return check.checkSignature(xml);
  } catch {
    return false;
  }
}

const SP_ENTITY_ID = 'http://127.0.0.1:4310/api/auth/saml/metadata';
const SP_ACS_URL = 'http://127.0.0.1:4310/api/auth/saml/acs';
const DSIG = 'http://www.w3.org/2000/09/xmldsig#';

function unescapeHtml(value: string): string {
  return value.replace(/&#(\d+);/g, (_, code: string) => String.fromCharCode(Number(code))).replace(/&amp;/g, '&');
}

function hiddenField(html: string, name: string): string | undefined {
  const match = new RegExp(`<input type="hidden" name="${name}" value="([^"]*)"`).exec(html);
  return match?.[1] === undefined ? undefined : unescapeHtml(match[1]);
}

function authnRequestXml(idpSsoUrl: string, opts: { id: string; issuer?: string; acsUrl?: string }): string {
  return (
    '<samlp:AuthnRequest xmlns:samlp="urn:oasis:names:tc:SAML:2.0:protocol" ' +
    'xmlns:saml="urn:oasis:names:tc:SAML:2.0:assertion" ' +
    `ID="${opts.id}" Version="2.0" IssueInstant="${new Date().toISOString()}" Destination="${idpSsoUrl}" ` +
    `AssertionConsumerServiceURL="${opts.acsUrl ?? SP_ACS_URL}" ProtocolBinding="urn:oasis:names:tc:SAML:2.0:bindings:HTTP-POST">` +
    `<saml:Issuer>${opts.issuer ?? SP_ENTITY_ID}</saml:Issuer>` +
    '<samlp:NameIDPolicy Format="urn:oasis:names:tc:SAML:1.1:nameid-format:emailAddress" AllowCreate="true"/>' +
    '</samlp:AuthnRequest>'
  );
}

/** HTTP-Redirect binding: raw DEFLATE, base64, URL-encoded (SAML bindings §3.4.4.1). */
function redirectQuery(xml: string, relayState?: string): Record<string, string> {
  const query: Record<string, string> = { SAMLRequest: deflateRawSync(Buffer.from(xml, 'utf8')).toString('base64') };
  if (relayState !== undefined) query.RelayState = relayState;
  return query;
}

/** Signs a redirect-binding query with the SP key (SAML bindings §3.4.4.1: SAMLRequest, RelayState, SigAlg). */
function signRedirectQuery(query: Record<string, string>, spKey: string): string {
  const signed = stringify({ ...query, SigAlg: 'http://www.w3.org/2001/04/xmldsig-more#rsa-sha256' });
  const signature = sign('RSA-SHA256', Buffer.from(signed, 'utf8'), createPrivateKey(spKey)).toString('base64');
  return `${signed}&${stringify({ Signature: signature })}`;
}

function decodeSamlResponse(html: string): string {
  const encoded = hiddenField(html, 'SAMLResponse');
  expect(encoded, 'the page carries a SAMLResponse').toBeTruthy();
  return Buffer.from(encoded!, 'base64').toString('utf8');
}

/** Verifies every XML-DSig signature of the scope against `certPem`; returns how many were checked. */
function verifySignatures(xml: string, scope: SignatureScope, certPem: string): number {
  const nodes = signatureNodes(xml, scope);
  for (const node of nodes) expect(signatureVerifies(xml, node, certPem), `${scope} signature`).toBe(true);
  return nodes.length;
}

describe('ensureDevCertificates', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'cartouche-certs-'));
  });
  afterAll(async () => {
    if (dir) await rm(dir, { recursive: true, force: true });
  });

  it('generates RSA 2048 certificates valid for about ten years, keys readable by the owner only', async () => {
    // two callers at once (the API and the fake IdP start together) must end up with one set
    const [certs, concurrent] = await Promise.all([ensureDevCertificates(dir), ensureDevCertificates(dir)]);
    expect(concurrent).toEqual(certs);
    for (const name of ['idp', 'sp'] as const) {
      const x509 = new X509Certificate(certs[name].cert);
      expect(x509.checkPrivateKey(createPrivateKey(certs[name].key))).toBe(true);
      expect(x509.publicKey.asymmetricKeyDetails?.modulusLength).toBe(2048);
      const years = (Date.parse(x509.validTo) - Date.parse(x509.validFrom)) / (365.25 * 24 * 3600 * 1000);
      expect(years).toBeGreaterThan(9.9);
      expect(years).toBeLessThan(10.1);
      expect((await stat(join(dir, `${name}.key`))).mode & 0o777).toBe(0o600);
      expect(certs[name].cert).toBe(await readFile(join(dir, `${name}.crt`), 'utf8'));
    }
    expect(certs.idp.cert).not.toBe(certs.sp.cert);
  });

  it('returns the same certificates on later calls', async () => {
    const first = await ensureDevCertificates(dir);
    const second = await ensureDevCertificates(dir);
    expect(second).toEqual(first);
  });

  it('regenerates only a pair whose key was deleted, or that is corrupt or mismatched', async () => {
    const before = await ensureDevCertificates(dir);
    await unlink(join(dir, 'sp.key'));
    const afterDelete = await ensureDevCertificates(dir);
    expect(afterDelete.idp).toEqual(before.idp);
    expect(afterDelete.sp.cert).not.toBe(before.sp.cert);
    expect(afterDelete.sp.key).not.toBe(before.sp.key);
    expect(new X509Certificate(afterDelete.sp.cert).checkPrivateKey(createPrivateKey(afterDelete.sp.key))).toBe(true);

    await writeFile(join(dir, 'idp.crt'), '-----BEGIN CERTIFICATE-----\nbm90IGEgY2VydGlmaWNhdGU=\n-----END CERTIFICATE-----\n');
    const afterCorrupt = await ensureDevCertificates(dir);
    expect(afterCorrupt.sp).toEqual(afterDelete.sp);
    expect(afterCorrupt.idp.cert).not.toBe(before.idp.cert);
    expect(new X509Certificate(afterCorrupt.idp.cert).checkPrivateKey(createPrivateKey(afterCorrupt.idp.key))).toBe(true);

    await copyFile(join(dir, 'sp.key'), join(dir, 'idp.key'));
    const afterMismatch = await ensureDevCertificates(dir);
    expect(afterMismatch.idp.key).not.toBe(afterMismatch.sp.key);
    expect(new X509Certificate(afterMismatch.idp.cert).checkPrivateKey(createPrivateKey(afterMismatch.idp.key))).toBe(true);
  });
});

describe('fake identity provider', () => {
  let certDir: string;
  let idp: FakeIdp;
  let certs: DevCertificates;

  beforeAll(async () => {
    certDir = await mkdtemp(join(tmpdir(), 'cartouche-idp-'));
    idp = await startFakeIdp({ port: 0, certDir, spAcsUrl: SP_ACS_URL, spEntityId: SP_ENTITY_ID });
    certs = await ensureDevCertificates(certDir);
  });

  afterAll(async () => {
    await idp?.close();
    if (certDir) await rm(certDir, { recursive: true, force: true });
  });

  it('refuses to listen anywhere but loopback', async () => {
    await expect(
      startFakeIdp({ port: 0, host: '0.0.0.0', certDir, spAcsUrl: SP_ACS_URL, spEntityId: SP_ENTITY_ID }),
    ).rejects.toThrow(/loopback/);
  });

  it('publishes SAML metadata with its signing certificate and SSO location', async () => {
    expect(idp.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    const response = await fetch(idp.metadataUrl);
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toMatch(/xml/);
    const xml = await response.text();
    expect(xml).toMatch(new RegExp(`<EntityDescriptor entityID="${idp.entityId}" xmlns="urn:oasis:names:tc:SAML:2.0:metadata">`));
    expect(xml).toContain('<IDPSSODescriptor protocolSupportEnumeration="urn:oasis:names:tc:SAML:2.0:protocol">');
    const published = /<X509Certificate>([^<]+)<\/X509Certificate>/.exec(xml)?.[1];
    expect(published).toBe(certificateBody(certs.idp.cert));
    expect(published).not.toBe(certificateBody(certs.sp.cert));
    expect(xml).toContain(
      `<SingleSignOnService Binding="urn:oasis:names:tc:SAML:2.0:bindings:HTTP-Redirect" Location="${idp.ssoUrl}"/>`,
    );
    expect(xml).toContain(`<Attribute Name="${ROLE_ATTRIBUTE}"`);
  });

  it('has a demo person for every role, and one with an unmapped role value', () => {
    const roles = new Set(demoIdentities.map((person) => person.role));
    for (const value of Object.values(ROLE_VALUES)) expect(roles).toContain(value);
    expect(demoIdentities.some((person) => !Object.values<string>(ROLE_VALUES).includes(person.role))).toBe(true);
    for (const person of demoIdentities) expect(person.email).toMatch(/^[a-z.]+@kestrelmouth-harbour\.example$/);
    expect(new Set(demoIdentities.map((person) => person.key)).size).toBe(demoIdentities.length);
  });

  it('signs in a chosen demo person for an SP-initiated request (HTTP-Redirect AuthnRequest)', async () => {
    const requestId = '_cartouche-test-request-1';
    const query = redirectQuery(authnRequestXml(idp.ssoUrl, { id: requestId }), '/review-desk?collection=7');
    const chooser = await fetch(`${idp.ssoUrl}?${stringify(query)}`);
    expect(chooser.status).toBe(200);
    const page = await chooser.text();
    expect(page).toContain('<html lang="en">');
    expect(page).toMatch(/<h1>[^<]+<\/h1>/);
    expect(page).toContain('Local development identity provider for Cartouche');
    for (const person of demoIdentities) {
      expect(page).toContain(`name="identity" value="${person.key}"`);
      expect(page).toContain(`Sign in as ${person.displayName}`);
    }
    const pending = hiddenField(page, 'request');
    expect(pending).toBeTruthy();

    const archivist = demoIdentities.find((person) => person.role === ROLE_VALUES.archivist)!;
    const answer = await fetch(`${idp.url}/choose`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ request: pending!, identity: archivist.key }),
    });
    expect(answer.status).toBe(200);
    const html = await answer.text();
    expect(html).toContain(`<form method="post" action="${SP_ACS_URL}"`);
    expect(hiddenField(html, 'RelayState')).toBe('/review-desk?collection=7');

    const xml = decodeSamlResponse(html);
    expect(xml).toMatch(new RegExp(`<Signature xmlns="${DSIG}">|<ds:Signature xmlns:ds="${DSIG}">`));
    expect(xml).toContain(`Destination="${SP_ACS_URL}"`);
    expect(xml).toContain(`InResponseTo="${requestId}"`);
    expect(xml).toContain(`Recipient="${SP_ACS_URL}"`);
    expect(xml).toContain(`<saml:Audience>${SP_ENTITY_ID}</saml:Audience>`);
    expect(xml).toContain(`<saml:Issuer>${idp.entityId}</saml:Issuer>`);
    expect(xml).toContain(`>${archivist.email}</saml:NameID>`);
    expect(xml).toMatch(
      new RegExp(`<saml:Attribute Name="email"[^>]*><saml:AttributeValue[^>]*>${archivist.email}</saml:AttributeValue>`),
    );
    expect(xml).toMatch(
      new RegExp(`<saml:Attribute Name="displayName"[^>]*><saml:AttributeValue[^>]*>${archivist.displayName}</saml:AttributeValue>`),
    );
    expect(xml).toMatch(
      new RegExp(`<saml:Attribute Name="${ROLE_ATTRIBUTE}"[^>]*><saml:AttributeValue[^>]*>cartouche-archivist</saml:AttributeValue>`),
    );

    // both the response and the assertion carry a signature that verifies with the IdP certificate
    const responseSignatures = verifySignatures(xml, 'response', certs.idp.cert);
    const assertionSignatures = verifySignatures(xml, 'assertion', certs.idp.cert);
    expect(responseSignatures).toBe(1);
    expect(assertionSignatures).toBe(1);
    // and not with another key
    expect(signatureVerifies(xml, signatureNodes(xml, 'response')[0]!, certs.sp.cert)).toBe(false);
  });

  it('signs in from its own sign-in page without a request (IdP-initiated), e.g. the unmapped role', async () => {
    const start = await fetch(`${idp.url}/`);
    expect(start.status).toBe(200);
    const page = await start.text();
    expect(hiddenField(page, 'request')).toBeUndefined();
    const volunteer = demoIdentities.find((person) => !Object.values<string>(ROLE_VALUES).includes(person.role))!;
    const answer = await fetch(`${idp.url}/choose`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ identity: volunteer.key }),
    });
    expect(answer.status).toBe(200);
    const xml = decodeSamlResponse(await answer.text());
    expect(xml).not.toContain('InResponseTo=');
    expect(xml).toContain(`>${volunteer.email}</saml:NameID>`);
    expect(xml).toContain(`>${volunteer.role}</saml:AttributeValue>`);
    expect(xml).toContain(`<saml:Audience>${SP_ENTITY_ID}</saml:Audience>`);
  });

  it('accepts a redirect AuthnRequest signed with the SP key and refuses a tampered one', async () => {
    const query = redirectQuery(authnRequestXml(idp.ssoUrl, { id: '_cartouche-signed-1' }), 'signed-state');
    const signed = signRedirectQuery(query, certs.sp.key);
    const good = await fetch(`${idp.ssoUrl}?${signed}`);
    expect(good.status).toBe(200);
    expect(await good.text()).toContain('_cartouche-signed-1');

    const tampered = signed.replace('RelayState=signed-state', 'RelayState=other-state');
    expect(tampered).not.toBe(signed);
    const bad = await fetch(`${idp.ssoUrl}?${tampered}`);
    expect(bad.status).toBe(400);
    expect(await bad.text()).toMatch(/signature/i);
  });

  it('refuses requests from another service provider or for another ACS URL, and unknown people', async () => {
    const foreign = redirectQuery(authnRequestXml(idp.ssoUrl, { id: '_x1', issuer: 'https://elsewhere.example/sp' }));
    const foreignResponse = await fetch(`${idp.ssoUrl}?${stringify(foreign)}`);
    expect(foreignResponse.status).toBe(400);
    expect(await foreignResponse.text()).toContain('https://elsewhere.example/sp');

    const otherAcs = redirectQuery(authnRequestXml(idp.ssoUrl, { id: '_x2', acsUrl: 'https://elsewhere.example/acs' }));
    expect((await fetch(`${idp.ssoUrl}?${stringify(otherAcs)}`)).status).toBe(400);

    const forged = Buffer.from(JSON.stringify({ id: '_x3', acsUrl: 'https://elsewhere.example/acs' })).toString('base64');
    const forgedAnswer = await fetch(`${idp.url}/choose`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ request: forged, identity: 'admin' }),
    });
    expect(forgedAnswer.status).toBe(400);
    expect(await forgedAnswer.text()).not.toContain('SAMLResponse');

    const nobody = await fetch(`${idp.url}/choose`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ identity: 'nobody' }),
    });
    expect(nobody.status).toBe(400);
  });

  it('accepts the HTTP-POST binding too', async () => {
    const xml = authnRequestXml(idp.ssoUrl, { id: '_cartouche-post-1' });
    const response = await fetch(idp.ssoUrl, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ SAMLRequest: Buffer.from(xml).toString('base64'), RelayState: 'post-state' }),
    });
    expect(response.status).toBe(200);
    const page = await response.text();
    const pending = JSON.parse(Buffer.from(hiddenField(page, 'request')!, 'base64').toString('utf8')) as Record<string, unknown>;
    expect(pending).toMatchObject({ id: '_cartouche-post-1', issuer: SP_ENTITY_ID, relayState: 'post-state' });
  });

  it('closes cleanly', async () => {
    const other = await startFakeIdp({ port: 0, certDir, spAcsUrl: SP_ACS_URL, spEntityId: SP_ENTITY_ID });
    expect((await fetch(other.metadataUrl)).status).toBe(200);
    await other.close();
    await expect(fetch(other.metadataUrl)).rejects.toThrow();
  });
});
