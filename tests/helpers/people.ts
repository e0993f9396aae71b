import argon2 from 'argon2';
import request from 'supertest';
type App = Parameters<typeof request.agent>[0];
import { User, type Role } from '../../server/src/models/index.ts';

export const TEST_PASSWORD = 'correct horse battery staple';
let hash: Promise<string> | null = null;
let n = 0;

/** A person with a local password (hashed once per test file: argon2 is slow on purpose). */
export async function makePerson(role: Role, fields: Partial<{ email: string; active: boolean; displayName: string }> = {}): Promise<User> {
  hash ??= argon2.hash(TEST_PASSWORD, { type: argon2.argon2id });
  return User.create({
    email: fields.email ?? `${role}${++n}@people.example`,
    displayName: fields.displayName ?? `Test ${role} ${n}`,
    role,
    passwordHash: await hash,
    samlNameId: null,
    active: fields.active ?? true,
    lastSignInAt: null,
  });
}

export interface SignedIn {
  agent: ReturnType<typeof request.agent>;
  csrf: string;
  user: User;
}

/** A supertest agent (keeps cookies) signed in as a new person of the role, with the session's CSRF token. */
export async function signIn(app: App, role: Role): Promise<SignedIn> {
  const user = await makePerson(role);
  const agent = request.agent(app);
  const first = await agent.get('/api/auth/session').expect(200);
  const res = await agent
    .post('/api/auth/login')
    .set('x-csrf-token', first.body.csrfToken)
    .send({ email: user.email, password: TEST_PASSWORD })
    .expect(200);
  return { agent, csrf: res.body.csrfToken, user };
}
