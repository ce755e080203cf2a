/** The shared schemas: the rules both the forms and the server enforce. */
import {
  describeIssues,
  invitationCreateSchema,
  passwordSchema,
  signInSchema,
  signUpSchema,
} from '../../shared/schemas';

const firstMessage = (result: { success: boolean; error?: { issues: { message: string }[] } }) =>
  result.success ? undefined : result.error!.issues[0].message;

describe('passwordSchema', () => {
  it.each([
    ['7 characters', 'abcdefg', 'at least 8'],
    ['73 ASCII bytes', 'a'.repeat(73), '72 bytes'],
    // "é" is two bytes in UTF-8: 37 of them are 74 bytes though only 37 characters.
    ['37 two-byte characters (74 bytes)', 'é'.repeat(37), '72 bytes'],
  ])('refuses %s', (_label, password, expected) => {
    expect(firstMessage(passwordSchema.safeParse(password))).toContain(expected);
  });

  it.each([
    ['8 characters', 'abcdefgh'],
    ['72 ASCII bytes', 'a'.repeat(72)],
    ['36 two-byte characters (72 bytes)', 'é'.repeat(36)],
  ])('accepts %s', (_label, password) => {
    expect(passwordSchema.safeParse(password).success).toBe(true);
  });
});

describe('signUpSchema', () => {
  const valid = { email: '  Coach@Example.COM ', password: 'long-enough', displayName: ' Rink Coach ', teamName: 'Oval Club' };

  it('normalises the e-mail and trims names', () => {
    const parsed = signUpSchema.parse(valid);
    expect(parsed.email).toBe('coach@example.com');
    expect(parsed.displayName).toBe('Rink Coach');
  });

  it('refuses unknown fields', () => {
    expect(signUpSchema.safeParse({ ...valid, role: 'head_coach' }).success).toBe(false);
  });

  it('names the bad e-mail', () => {
    expect(firstMessage(signUpSchema.safeParse({ ...valid, email: 'not-an-address' }))).toBe('Enter a valid e-mail address');
  });
});

describe('signInSchema', () => {
  it('says a missing password is required', () => {
    expect(firstMessage(signInSchema.safeParse({ email: 'a@b.example', password: '' }))).toBe('Password is required');
  });
});

describe('invitationCreateSchema', () => {
  it('accepts a coach invitation without a skater', () => {
    expect(invitationCreateSchema.safeParse({ email: 'c@club.example', role: 'coach' }).success).toBe(true);
  });

  it.each(['skater', 'guardian'])('requires a skater profile for a %s invitation', (role) => {
    const result = invitationCreateSchema.safeParse({ email: 's@club.example', role });
    expect(result.success).toBe(false);
    expect(result.error!.issues[0].path).toEqual(['skaterId']);
  });

  it('refuses the head coach role', () => {
    expect(invitationCreateSchema.safeParse({ email: 'h@club.example', role: 'head_coach' }).success).toBe(false);
  });
});

describe('describeIssues', () => {
  it('keeps the first message per field and joins them into one sentence', () => {
    const { message, fields } = describeIssues([
      { path: ['email'], message: 'Enter a valid e-mail address' },
      { path: ['email'], message: 'second' },
      { path: [], message: 'Body is wrong' },
    ]);
    expect(fields).toEqual({ email: 'Enter a valid e-mail address', _: 'Body is wrong' });
    expect(message).toBe('email: Enter a valid e-mail address; Body is wrong');
  });
});
