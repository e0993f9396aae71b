import { existsSync, readFileSync } from 'node:fs';
import { DOMParser } from '@xmldom/xmldom';
import { Strategy as SamlStrategy, ValidateInResponseTo, type Profile, type VerifiedCallback } from '@node-saml/passport-saml';
import type { SamlConfig } from '../config.ts';
import type { Role } from '../models/user.ts';

export interface SamlIdentity {
  nameId: string;
  email: string;
  displayName: string;
  mappedRole: Role | null;
  roleValue: string | null;
}

export class SamlRejection extends Error {
  constructor(
    message: string,
    readonly code: 'saml-invalid' | 'saml-deactivated' | 'saml-no-role',
  ) {
    super(message);
  }
}

const SAML_ASSERTION_NS = 'urn:oasis:names:tc:SAML:2.0:assertion';

/**
 * node-saml checks the signature, the Audience and the NotBefore/NotOnOrAfter window; it does not check
 * that the assertion was meant for us. SAML 2.0 Profiles §4.1.4.3: the bearer SubjectConfirmationData
 * must name our assertion consumer service as Recipient. This reads the verified assertion only.
 */
export function checkRecipient(assertionXml: string, acsUrl: string): void {
  const doc = new DOMParser().parseFromString(assertionXml, 'text/xml');
  const data = Array.from(doc.getElementsByTagNameNS(SAML_ASSERTION_NS, 'SubjectConfirmationData'));
  if (data.length === 0) throw new SamlRejection('the assertion has no SubjectConfirmationData', 'saml-invalid');
  for (const d of data) {
    const recipient = d.getAttribute('Recipient');
    if (recipient !== acsUrl) throw new SamlRejection(`the assertion is addressed to ${JSON.stringify(recipient)}, not to ${acsUrl}`, 'saml-invalid');
  }
}

function attr(profile: Profile, name: string): string | null {
  const v = (profile as Record<string, unknown>)[name] ?? (profile.attributes as Record<string, unknown> | undefined)?.[name];
  if (Array.isArray(v)) return v.length ? String(v[0]) : null;
  return v === undefined || v === null ? null : String(v);
}

export function identityFromProfile(profile: Profile, config: SamlConfig): SamlIdentity {
  const email = (attr(profile, config.emailAttribute) ?? (profile.nameID?.includes('@') ? profile.nameID : null))?.trim().toLowerCase();
  if (!profile.nameID) throw new SamlRejection('the assertion carries no NameID', 'saml-invalid');
  if (!email) throw new SamlRejection(`the assertion carries no ${config.emailAttribute} attribute`, 'saml-invalid');
  const roleValue = attr(profile, config.roleAttribute);
  return {
    nameId: profile.nameID,
    email,
    displayName: attr(profile, config.nameAttribute) ?? email,
    roleValue,
    mappedRole: roleValue ? (config.roleMap[roleValue] ?? null) : null,
  };
}

function readPem(file: string, what: string): string {
  if (!existsSync(file)) throw new Error(`SAML ${what} not found at ${file}`);
  return readFileSync(file, 'utf8');
}

/** The SAML strategy for passport: signed assertions required, requests signed with our key. */
export function createSamlStrategy(config: SamlConfig, onIdentity: (identity: SamlIdentity) => Promise<Express.User>): SamlStrategy {
  const verify = (profile: Profile | null, done: VerifiedCallback) => {
    (async () => {
      if (!profile) throw new SamlRejection('no profile in the response', 'saml-invalid');
      const assertionXml = profile.getAssertionXml?.();
      if (!assertionXml) throw new SamlRejection("no verified assertion in the response", "saml-invalid");
      checkRecipient(assertionXml, config.acsUrl);
      return onIdentity(identityFromProfile(profile, config));
    })().then(
      (user) => done(null, user as unknown as Record<string, unknown>),
      (err: unknown) => done(err instanceof Error ? err : new Error(String(err))),
    );
  };
  return new SamlStrategy(
    {
      name: 'saml',
      entryPoint: config.entryPoint,
      issuer: config.spEntityId,
      callbackUrl: config.acsUrl,
      audience: config.spEntityId,
      idpIssuer: config.idpIssuer ?? undefined,
      idpCert: readPem(config.idpCertFile, 'identity provider certificate'),
      privateKey: readPem(config.spKeyFile, 'service provider key'),
      publicCert: readPem(config.spCertFile, 'service provider certificate'),
      signatureAlgorithm: 'sha256',
      digestAlgorithm: 'sha256',
      wantAssertionsSigned: true,
      wantAuthnResponseSigned: false,
      acceptedClockSkewMs: config.clockSkewMs,
      validateInResponseTo: ValidateInResponseTo.ifPresent,
      requestIdExpirationPeriodMs: 10 * 60_000,
      disableRequestedAuthnContext: true,
      identifierFormat: null,
    },
    verify,
    verify,
  );
}
