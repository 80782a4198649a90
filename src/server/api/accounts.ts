/**
 * /api/v1/users and /api/v1/tokens: people and API tokens for administrators (the accounts page), on
 * the same repository functions and schemas as `npm run saltus -- user …` / `token …`. Admin only (see
 * the permission table). A token's secret appears once, in the answer that creates it.
 */
import { DomainError } from '@/domain/errors';
import {
  createToken,
  createUser,
  disableUser,
  listTokens,
  listUsers,
  revokeToken,
  tokenCreateSchema,
  userCreateSchema,
} from '@/server/auth/accounts';
import { jsonResponse, readJson, type Caller } from './http';
import { parseWith } from './validation';

const userDisableSchema = userCreateSchema.pick({ email: true });
const tokenRevokeSchema = tokenCreateSchema.pick({ name: true });

export const listUsersHandler = async () => ({ users: await listUsers() });

export const createUserHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const input = parseWith(userCreateSchema, await readJson(req));
  return jsonResponse(await createUser(input, c.actor), 201);
};

export const disableUserHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const { email } = parseWith(userDisableSchema, await readJson(req));
  // a signed-in admin would lock themselves out (and could leave no admin at all): another admin does it
  if (c.kind === 'session' && c.actor.trim().toLowerCase() === email) {
    throw new DomainError('conflict', `${email} is your own account: you cannot disable it yourself; ask another admin, or use \`npm run saltus -- user disable\``, 'email');
  }
  return disableUser(email, c.actor);
};

export const listTokensHandler = async () => ({ tokens: await listTokens() });

export const createTokenHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const input = parseWith(tokenCreateSchema, await readJson(req));
  const { token, view } = await createToken(input, c.actor);
  return jsonResponse({ token, ...view }, 201);
};

export const revokeTokenHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const { name } = parseWith(tokenRevokeSchema, await readJson(req));
  return revokeToken(name, c.actor);
};
