import { randomUUID } from 'node:crypto';
import { SignedXml } from 'xml-crypto';

export interface AssertionSpec {
  issuer: string;
  nameId: string;
  audience: string;
  recipient: string;
  destination?: string;
  notBefore?: Date;
  notOnOrAfter?: Date;
  attributes: Record<string, string>;
}

const iso = (d: Date) => d.toISOString().replace(/\.\d{3}Z$/, 'Z');
const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/"/g, '&quot;');

/**
 * A SAML 2.0 Response (OASIS SAML 2.0 Core §2–3, Web Browser SSO profile §4.1) whose Assertion is signed
 * with the given key (enveloped XML signature, exclusive C14N, RSA-SHA256), for tests that must craft
 * good and bad answers the way an identity provider would.
 */
export function signedResponse(spec: AssertionSpec, key: string, cert: string): string {
  const now = new Date();
  const nb = spec.notBefore ?? new Date(now.getTime() - 60_000);
  const noa = spec.notOnOrAfter ?? new Date(now.getTime() + 5 * 60_000);
  const id = randomUUID().replace(/-/g, '');
  const attrs = Object.entries(spec.attributes)
    .map(([n, v]) => `<saml:Attribute Name="${esc(n)}"><saml:AttributeValue xmlns:xs="http://www.w3.org/2001/XMLSchema" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:type="xs:string">${esc(v)}</saml:AttributeValue></saml:Attribute>`)
    .join('');
  const xml =
    `<samlp:Response xmlns:samlp="urn:oasis:names:tc:SAML:2.0:protocol" xmlns:saml="urn:oasis:names:tc:SAML:2.0:assertion" ID="_r${id}" Version="2.0" IssueInstant="${iso(now)}" Destination="${esc(spec.destination ?? spec.recipient)}">` +
    `<saml:Issuer>${esc(spec.issuer)}</saml:Issuer>` +
    `<samlp:Status><samlp:StatusCode Value="urn:oasis:names:tc:SAML:2.0:status:Success"/></samlp:Status>` +
    `<saml:Assertion ID="_a${id}" Version="2.0" IssueInstant="${iso(now)}">` +
    `<saml:Issuer>${esc(spec.issuer)}</saml:Issuer>` +
    `<saml:Subject><saml:NameID Format="urn:oasis:names:tc:SAML:1.1:nameid-format:emailAddress">${esc(spec.nameId)}</saml:NameID>` +
    `<saml:SubjectConfirmation Method="urn:oasis:names:tc:SAML:2.0:cm:bearer"><saml:SubjectConfirmationData NotOnOrAfter="${iso(noa)}" Recipient="${esc(spec.recipient)}"/></saml:SubjectConfirmation></saml:Subject>` +
    `<saml:Conditions NotBefore="${iso(nb)}" NotOnOrAfter="${iso(noa)}"><saml:AudienceRestriction><saml:Audience>${esc(spec.audience)}</saml:Audience></saml:AudienceRestriction></saml:Conditions>` +
    `<saml:AuthnStatement AuthnInstant="${iso(now)}" SessionIndex="_s${id}"><saml:AuthnContext><saml:AuthnContextClassRef>urn:oasis:names:tc:SAML:2.0:ac:classes:PasswordProtectedTransport</saml:AuthnContextClassRef></saml:AuthnContext></saml:AuthnStatement>` +
    `<saml:AttributeStatement>${attrs}</saml:AttributeStatement>` +
    `</saml:Assertion></samlp:Response>`;
  const sig = new SignedXml({
    privateKey: key,
    publicCert: cert,
    canonicalizationAlgorithm: 'http://www.w3.org/2001/10/xml-exc-c14n#',
    signatureAlgorithm: 'http://www.w3.org/2001/04/xmldsig-more#rsa-sha256',
    getKeyInfoContent: SignedXml.getKeyInfoContent,
  });
  sig.addReference({
    xpath: "//*[local-name(.)='Assertion']",
    transforms: ['http://www.w3.org/2000/09/xmldsig#enveloped-signature', 'http://www.w3.org/2001/10/xml-exc-c14n#'],
    digestAlgorithm: 'http://www.w3.org/2001/04/xmlenc#sha256',
  });
  sig.computeSignature(xml, { location: { reference: "//*[local-name(.)='Assertion']/*[local-name(.)='Issuer']", action: 'after' } });
  return sig.getSignedXml();
}
