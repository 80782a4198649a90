/**
 * Password hashing with argon2id. Parameters follow the OWASP Password Storage Cheat Sheet's first
 * recommended argon2id setting: m = 19 MiB (19456 KiB), t = 2 iterations, p = 1 lane. Hashing happens
 * only at sign-in and account creation, never per API request (those check a SHA-256 of a random secret).
 */
import { hash, verify, type Algorithm } from '@node-rs/argon2';
import { DomainError } from '@/domain/errors';

const ARGON2ID = 2 as Algorithm; // Algorithm.Argon2id (a const enum, not importable under isolatedModules)
const OPTIONS = { algorithm: ARGON2ID, memoryCost: 19456, timeCost: 2, parallelism: 1 };

export const MIN_PASSWORD_LENGTH = 12;

export function checkPasswordStrength(password: string): void {
  if (typeof password !== 'string' || [...password].length < MIN_PASSWORD_LENGTH) {
    throw new DomainError('invalid_input', `the password must have at least ${MIN_PASSWORD_LENGTH} characters; a few unrelated words make a good one`, 'password');
  }
  if (password.length > 1024) throw new DomainError('invalid_input', 'the password is longer than 1024 characters; use a shorter one', 'password');
}

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(stored: string, password: string): Promise<boolean> {
  try {
    return await verify(stored, password);
  } catch {
    return false;
  }
}

/** A hash to verify against when the account does not exist, so timing does not tell accounts apart. */
let dummy: Promise<string> | null = null;
export function dummyHash(): Promise<string> {
  dummy ??= hash('not-a-real-password-for-timing', OPTIONS);
  return dummy;
}
