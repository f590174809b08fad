import { hash, verify } from '@node-rs/argon2';

// Argon2id with m = 19 MiB, t = 2, p = 1: the first of the equivalent minimum configurations in
// the OWASP Password Storage Cheat Sheet (Argon2id section, 2024 revision). Algorithm 2 = Argon2id.
const ARGON2ID = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

/** Password policy after OWASP ASVS 4.0.3 V2.1.1–V2.1.2: 12 to 128 characters, any characters. */
export const PASSWORD_MIN = 12;
export const PASSWORD_MAX = 128;

/** Returns the PHC string of an Argon2id hash of the password. */
export function hashPassword(password: string): Promise<string> {
  return hash(password, ARGON2ID);
}

/** True when the password matches the stored PHC hash. */
export async function verifyPassword(stored: string, password: string): Promise<boolean> {
  try {
    return await verify(stored, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | null = null;

/** Spends the same time as a real verification, so an unknown e-mail answers as slowly as a wrong password. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword('driftline-dummy-password-for-timing');
  await verifyPassword(await dummyHash, password);
  return false;
}
