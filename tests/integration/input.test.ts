/**
 * Malformed, missing, unexpected and oversized input on every route that reads a body: each is
 * a 4xx in the one error shape, naming the field where there is one; never a 500 or a stack trace.
 */
import request from 'supertest';
import {
  addSkater,
  expectError,
  expectNoStack,
  PASSWORD,
  signUpCoach,
  startTestServer,
  uniqueEmail,
  type Coach,
  type TestServer,
} from './helpers';

let server: TestServer;
let head: Coach;
beforeAll(async () => {
  server = await startTestServer();
  head = await signUpCoach(server.app, 'input');
});
afterAll(async () => {
  await server.close();
});

const signUpBody = (overrides: Record<string, unknown> = {}) => ({
  email: uniqueEmail('input'),
  password: PASSWORD,
  displayName: 'Wessel Ijsbaan',
  teamName: 'Frost Lane',
  ...overrides,
});
const signUp = (body: unknown) => request(server.app).post('/api/auth/sign-up').send(body as object);
const raw = (path: string, body: string | Buffer, contentType = 'application/json') =>
  request(server.app).post(path).set(head.auth).set('Content-Type', contentType).send(body);

/** Every route that reads a JSON body (paths are resolved after sign-up). */
const bodyRoutes = () => [
  '/api/auth/sign-up',
  '/api/auth/sign-in',
  '/api/auth/password-reset',
  '/api/auth/password-reset/confirm',
  '/api/invitations/accept',
  `/api/teams/${head.teamId}/skaters`,
  `/api/teams/${head.teamId}/invitations`,
];

describe('invalid JSON', () => {
  it.each([
    ['a truncated object', '{"email": "a@b.example", "password":'],
    ['single quotes', "{'email': 'a@b.example'}"],
    ['a trailing comma', '{"email": "a@b.example",}'],
    ['a bare word', 'hello'],
    ['a JSON primitive (strict mode takes only objects and arrays)', 'null'],
    ['a JSON string', '"just a string"'],
  ])('%s is 400 saying the body is not valid JSON, on every route', async (_label, body) => {
    for (const path of bodyRoutes()) {
      const res = await raw(path, body);
      expectError(res, 400, 'validation');
      expect(res.body.error.message).toBe('Request body is not valid JSON');
    }
  });

  it('a JSON array is 400 (expected an object), not a server error', async () => {
    const res = await raw('/api/auth/sign-up', '[1, 2, 3]');
    expectError(res, 400, 'validation');
  });

  it('an empty body is 400 naming the missing fields', async () => {
    const res = await raw('/api/auth/sign-in', '');
    expectError(res, 400, 'validation');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'password']);
  });

  it('a body that is not JSON at all (text/plain) is read as missing fields, 400', async () => {
    const res = await raw('/api/auth/sign-in', 'email=a@b.example&password=x', 'text/plain');
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('email');
  });

  it('a charset other than UTF-8 is 415', async () => {
    const res = await raw('/api/auth/sign-in', '{"email":"a@b.example","password":"x"}', 'application/json; charset=latin1');
    expectError(res, 415, 'unsupported_media_type');
  });

  it('an unknown content encoding is 415', async () => {
    const res = await request(server.app)
      .post('/api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'compress-9000')
      .send('{"email":"a@b.example","password":"x"}');
    expectError(res, 415, 'unsupported_media_type');
  });

  it('a body claiming gzip that is not gzip is a 4xx', async () => {
    const res = await request(server.app)
      .post('/api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'gzip')
      .send('{"email":"a@b.example","password":"x"}');
    expect(res.status).toBeGreaterThanOrEqual(400);
    expectError(res, res.status);
  });

  it('very deep nesting is a 400, not a crash', async () => {
    const depth = 50_000;
    const res = await raw('/api/auth/sign-in', `{"email":${'['.repeat(depth)}${']'.repeat(depth)},"password":"x"}`);
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('email');
  });
});

describe('missing fields', () => {
  it('sign-up without any field names each one in error.fields', async () => {
    const res = await signUp({});
    expectError(res, 400, 'validation');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['displayName', 'email', 'password', 'teamName']);
    expect(res.body.error.fields.email).toBe('E-mail is required');
    expect(res.body.error.message).toContain('email: E-mail is required');
  });

  it.each(['email', 'password', 'displayName', 'teamName'])('sign-up without %s names only that field', async (field) => {
    const body = signUpBody();
    delete (body as Record<string, unknown>)[field];
    const res = await signUp(body);
    expectError(res, 400, 'validation');
    expect(Object.keys(res.body.error.fields)).toEqual([field]);
  });

  it('sign-in without a password names it', async () => {
    const res = await request(server.app).post('/api/auth/sign-in').send({ email: head.email });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toEqual({ password: 'Password is required' });
  });

  it('accepting an invitation without a token and password names both (the name is asked only for new accounts)', async () => {
    const res = await request(server.app).post('/api/invitations/accept').send({});
    expectError(res, 400, 'validation');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['password', 'token']);
  });

  it('an invitation without a role names it', async () => {
    const res = await request(server.app).post(`/api/teams/${head.teamId}/invitations`).set(head.auth).send({ email: uniqueEmail('x') });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.role).toMatch(/coach, skater or guardian/);
  });

  it('a skater without a name names it', async () => {
    const res = await request(server.app).post(`/api/teams/${head.teamId}/skaters`).set(head.auth).send({ displayName: '   ' });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toEqual({ displayName: 'Name is required' });
  });
});

describe('wrong types and values', () => {
  it.each([
    ['email as a number', { email: 42 }, 'email'],
    ['email as an object', { email: { $ne: '' } }, 'email'],
    ['an invalid e-mail', { email: 'not-an-email' }, 'email'],
    ['an e-mail over 254 characters', { email: `${'a'.repeat(250)}@test.example` }, 'email'],
    ['password as an array', { password: ['rink-side-pass-1'] }, 'password'],
    ['a name over 80 characters', { displayName: 'N'.repeat(81) }, 'displayName'],
    ['a one-letter team name', { teamName: 'X' }, 'teamName'],
  ])('%s is 400 naming the field', async (_label, overrides, field) => {
    const res = await signUp(signUpBody(overrides));
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty(field);
  });

  it('an unknown role in an invitation is 400', async () => {
    const res = await request(server.app)
      .post(`/api/teams/${head.teamId}/invitations`)
      .set(head.auth)
      .send({ email: uniqueEmail('x'), role: 'head_coach' });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('role');
  });

  it('a skater id that is not a UUID is 400 naming it', async () => {
    const res = await request(server.app).post(`/api/teams/${head.teamId}/skaters`).set(head.auth).send({ id: '123', displayName: 'Lars Bochtveld' });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toEqual({ id: 'id must be a UUID' });
  });

  it.each([
    ['a NUL character', 'Ann\u0000eke'],
    ['a control character', 'Ann\u0007eke'],
    ['a line break', 'Ann\neke'],
  ])('a name with %s is refused with 400, not a database error', async (_label, name) => {
    const res = await signUp(signUpBody({ displayName: name }));
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('displayName');
    const skater = await request(server.app).post(`/api/teams/${head.teamId}/skaters`).set(head.auth).send({ displayName: name });
    expectError(skater, 400, 'validation');
    const team = await signUp(signUpBody({ teamName: `Club ${name}` }));
    expectError(team, 400, 'validation');
    expect(team.body.error.fields).toHaveProperty('teamName');
  });

  it('names in other scripts and with accents are fine', async () => {
    const skater = await addSkater(server.app, head, 'Ærøskøbing Łucja Ōtani-Müller');
    expect(skater.displayName).toBe('Ærøskøbing Łucja Ōtani-Müller');
  });
});

describe('unknown fields (the schemas are strict)', () => {
  it('sign-up with an extra field is 400 naming the field', async () => {
    const res = await signUp(signUpBody({ role: 'admin' }));
    expectError(res, 400, 'validation');
    expect(res.body.error.message).toMatch(/role/);
  });

  it.each([
    ['sign-in', '/api/auth/sign-in', () => ({ email: head.email, password: PASSWORD, remember: true })],
    ['password reset', '/api/auth/password-reset', () => ({ email: head.email, admin: true })],
    ['skater', () => `/api/teams/${head.teamId}/skaters`, () => ({ displayName: 'Mila Sloepstra', teamId: head.teamId })],
    ['invitation', () => `/api/teams/${head.teamId}/invitations`, () => ({ email: uniqueEmail('x'), role: 'coach', teamId: head.teamId })],
  ])('%s with an extra field is 400', async (_label, path, body) => {
    const res = await request(server.app)
      .post(typeof path === 'function' ? path() : path)
      .set(head.auth)
      .send(body());
    expectError(res, 400, 'validation');
  });

  it('an extra field does not sign in even with the right password', async () => {
    const res = await request(server.app).post('/api/auth/sign-in').send({ email: head.email, password: PASSWORD, isAdmin: true });
    expect(res.status).toBe(400);
    expect(res.headers['set-cookie']).toBeUndefined();
  });

  it('a __proto__ key is refused and pollutes nothing', async () => {
    const res = await raw('/api/auth/sign-up', `{"email":"${uniqueEmail('proto')}","password":"${PASSWORD}","displayName":"Proto","teamName":"Proto Club","__proto__":{"polluted":true}}`);
    expect(res.status).toBe(400);
    expectNoStack(res);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('size limits', () => {
  it('a body over the JSON limit (1mb) is 413 on every route', async () => {
    const big = JSON.stringify({ email: 'big@test.example', password: 'p'.repeat(1024 * 1024 + 10) });
    for (const path of bodyRoutes()) {
      const res = await raw(path, big);
      expectError(res, 413, 'payload_too_large');
      expect(res.body.error.message).toMatch(/1mb/);
    }
  });

  it('a body just under the limit is read, and a huge sign-in password is refused before hashing (400)', async () => {
    const res = await request(server.app)
      .post('/api/auth/sign-in')
      .send({ email: head.email, password: 'p'.repeat(900 * 1024) });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.password).toMatch(/too long/);
  });

  it('a password under 8 characters is 400', async () => {
    const res = await signUp(signUpBody({ password: 'seven77' }));
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.password).toBe('Password must be at least 8 characters');
  });

  it('a password of exactly 8 characters is accepted', async () => {
    await signUp(signUpBody({ password: 'eight888' })).expect(201);
  });

  it('a password over 72 bytes (40 two-byte characters) is 400 mentioning 72', async () => {
    const password = 'é'.repeat(40);
    expect(password.length).toBe(40);
    const res = await signUp(signUpBody({ password }));
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.password).toMatch(/72/);
  });

  it('the limit counts bytes: 72 bytes are accepted, 73 are not', async () => {
    await signUp(signUpBody({ password: 'é'.repeat(36) })).expect(201);
    await signUp(signUpBody({ password: 'a'.repeat(72) })).expect(201);
    expectError(await signUp(signUpBody({ password: 'a'.repeat(73) })), 400, 'validation');
    expectError(await signUp(signUpBody({ password: `${'a'.repeat(70)}🧊` })), 400, 'validation');
  });

  it('the 72-byte rule also applies to the new password of a reset and of an invitation', async () => {
    const tooLong = 'ß'.repeat(37);
    const reset = await request(server.app).post('/api/auth/password-reset/confirm').send({ token: 'A'.repeat(43), password: tooLong });
    expectError(reset, 400, 'validation');
    expect(reset.body.error.fields.password).toMatch(/72/);
    const invite = await request(server.app).post('/api/invitations/accept').send({ token: 'A'.repeat(43), displayName: 'Nel', password: tooLong });
    expectError(invite, 400, 'validation');
    expect(invite.body.error.fields.password).toMatch(/72/);
  });
});

describe('odd requests', () => {
  it('an unknown API route is 404 in the error shape', async () => {
    const res = await request(server.app).get('/api/does-not-exist');
    expectError(res, 404, 'not_found');
  });

  it('a wrong method on a known path is 404, not 500', async () => {
    expectError(await request(server.app).get('/api/auth/sign-in'), 404, 'not_found');
    expectError(await request(server.app).delete('/api/me').set(head.auth), 404, 'not_found');
  });

  it('a malformed percent-encoding in the path is 400', async () => {
    const res = await request(server.app).get('/api/invitations/%E0%A4%A');
    expectError(res, 400);
  });

  it('a very long invitation token in the path is 400', async () => {
    expectError(await request(server.app).get(`/api/invitations/${'a'.repeat(5000)}`), 400, 'validation');
  });
});
