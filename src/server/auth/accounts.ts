/**
 * Accounts and API tokens in the database. Passwords are argon2id hashes; token secrets are shown
 * once and stored as SHA-256 with a short prefix kept for listing. Every change writes an audit event.
 */
import { z } from 'zod';
import { DomainError } from '@/domain/errors';
import { parseWith } from '@/server/api/validation';
import { db } from '@/server/db/client';
import { audit } from '@/server/repos/audit';
import { forgetCredentials } from './credential-cache';
import { checkPasswordStrength, hashPassword } from './passwords';
import { ROLES, type Role } from './roles';
import { randomSecret, sha256 } from './secrets';

export const userCreateSchema = z.object({
  email: z.string().trim().toLowerCase().email('give an e-mail address such as name@lab.example').max(200),
  name: z.string().trim().min(1, 'give the person a name').max(200),
  role: z.enum(ROLES, { message: `role must be one of ${ROLES.join(', ')}` }),
  password: z.string(),
});
export type UserCreate = z.input<typeof userCreateSchema>;

export const tokenCreateSchema = z.object({
  name: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9._-]{1,60}$/, 'a token name is 1–60 letters, digits or . _ - (e.g. rig-pc)'),
  role: z.enum(ROLES, { message: `role must be one of ${ROLES.join(', ')}` }),
  expiresDays: z.number().int().min(1, 'expiry is at least 1 day').max(3650, 'expiry is at most 3650 days').optional(),
});
export type TokenCreate = z.input<typeof tokenCreateSchema>;

export interface UserView {
  id: string;
  email: string;
  name: string;
  role: Role;
  createdAt: string;
  disabledAt: string | null;
}

type UserRow = { id: string; email: string; name: string; role: string; createdAt: Date; disabledAt: Date | null };
const userView = (u: UserRow): UserView => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role as Role,
  createdAt: u.createdAt.toISOString(),
  disabledAt: u.disabledAt?.toISOString() ?? null,
});

export async function createUser(input: UserCreate, actor: string): Promise<UserView> {
  const data = parseWith(userCreateSchema, input);
  checkPasswordStrength(data.password);
  const client = await db();
  if (await client.user.findUnique({ where: { email: data.email } })) {
    throw new DomainError('conflict', `an account for ${data.email} already exists; pick another e-mail or disable the old account first`, 'email');
  }
  const passwordHash = await hashPassword(data.password);
  const user = await client.$transaction(async (tx) => {
    const u = await tx.user.create({ data: { email: data.email, name: data.name, role: data.role, passwordHash } });
    await audit(tx, actor, 'create', 'user', u.id, null, { email: u.email, name: u.name, role: u.role });
    return u;
  });
  return userView(user);
}

export async function listUsers(): Promise<UserView[]> {
  const client = await db();
  return (await client.user.findMany({ orderBy: { createdAt: 'asc' } })).map(userView);
}

/** Disabling signs the person out everywhere and stops their tokens; the account and its history stay. */
export async function disableUser(email: string, actor: string): Promise<UserView> {
  const client = await db();
  const user = await client.user.findUnique({ where: { email: email.trim().toLowerCase() } });
  if (!user) throw new DomainError('not_found', `no account has the e-mail ${email}; see "user list"`, 'email');
  const updated = await client.$transaction(async (tx) => {
    const u = await tx.user.update({ where: { id: user.id }, data: { disabledAt: user.disabledAt ?? new Date() } });
    await tx.session.deleteMany({ where: { userId: user.id } });
    await audit(tx, actor, 'disable', 'user', u.id, { disabledAt: null }, { disabledAt: u.disabledAt?.toISOString() });
    return u;
  });
  forgetCredentials();
  return userView(updated);
}

export async function countUsers(): Promise<number> {
  return (await db()).user.count();
}

export const TOKEN_PREFIX = 'saltus_';

export interface TokenView {
  id: string;
  name: string;
  role: Role;
  prefix: string;
  createdAt: string;
  expiresAt: string | null;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

type TokenRow = { id: string; name: string; role: string; prefix: string; createdAt: Date; expiresAt: Date | null; lastUsedAt: Date | null; revokedAt: Date | null };
const tokenView = (t: TokenRow): TokenView => ({
  id: t.id,
  name: t.name,
  role: t.role as Role,
  prefix: t.prefix,
  createdAt: t.createdAt.toISOString(),
  expiresAt: t.expiresAt?.toISOString() ?? null,
  lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
  revokedAt: t.revokedAt?.toISOString() ?? null,
});

/** Creates a token and returns its secret: the only time it is ever shown. */
export async function createToken(input: TokenCreate, actor: string, now = new Date()): Promise<{ token: string; view: TokenView }> {
  const data = parseWith(tokenCreateSchema, input);
  const client = await db();
  if (await client.apiToken.findFirst({ where: { name: data.name, revokedAt: null } })) {
    throw new DomainError('conflict', `a token named ${data.name} is already in use; revoke it first or pick another name`, 'name');
  }
  const token = TOKEN_PREFIX + randomSecret(32);
  const row = await client.$transaction(async (tx) => {
    const t = await tx.apiToken.create({
      data: {
        name: data.name,
        role: data.role,
        tokenHash: sha256(token),
        prefix: token.slice(0, TOKEN_PREFIX.length + 6),
        expiresAt: data.expiresDays ? new Date(now.getTime() + data.expiresDays * 86_400_000) : null,
      },
    });
    await audit(tx, actor, 'create', 'api-token', t.id, null, { name: t.name, role: t.role, prefix: t.prefix, expiresAt: t.expiresAt?.toISOString() ?? null });
    return t;
  });
  return { token, view: tokenView(row) };
}

export async function listTokens(): Promise<TokenView[]> {
  const client = await db();
  return (await client.apiToken.findMany({ orderBy: { createdAt: 'asc' } })).map(tokenView);
}

export async function revokeToken(name: string, actor: string, now = new Date()): Promise<TokenView> {
  const client = await db();
  const t = await client.apiToken.findFirst({ where: { name, revokedAt: null } });
  if (!t) throw new DomainError('not_found', `no active token is named ${name}; see "token list"`, 'name');
  const row = await client.$transaction(async (tx) => {
    const r = await tx.apiToken.update({ where: { id: t.id }, data: { revokedAt: now } });
    await audit(tx, actor, 'revoke', 'api-token', r.id, { revokedAt: null }, { revokedAt: now.toISOString() });
    return r;
  });
  forgetCredentials();
  return tokenView(row);
}
