import { hash, verify } from '@node-rs/argon2';

// Argon2id with m = 19 MiB, t = 2, p = 1: the first of the equivalent minimum configurations in
// the OWASP Password Storage Cheat Sheet (Argon2id section, 2024 revision). Algorithm 2 = Argon2id.
const ARGON2ID = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

/** Password policy after OWASP ASVS 4.0.3 V2.1.1–V2.1.2: 12 to 128 characters, any characters. */
export const PASSWORD_MIN = 12;
export const PASSWORD_MAX = 128;

/**
 * Why a password of allowed length is still refused, as a phrase ("must not …"), or null when it is
 * fine. NIST SP 800-63B rev. 3 (Grassi et al., 2017) §5.1.1.2 asks for at least 8 characters (we ask 12, see
 * PASSWORD_MIN) and for refusing context-specific words (the service's name, the user name) and
 * repetitive or sequential characters. We refuse: the e-mail address or its local part (4 or more
 * characters) anywhere in the password, the product's name, one group of 1–4 characters repeated
 * ("aaaaaaaaaaaa", "abcabcabcabc") and one run of consecutive characters up or down ("abcdefghijkl").
 */
export function passwordProblem(password: string, email: string): string | null {
  const lower = password.toLowerCase();
  const address = email.toLowerCase();
  const local = address.split('@')[0];
  if (lower.includes(address) || (local.length >= 4 && lower.includes(local))) return 'must not contain your e-mail address or its part before the @';
  if (lower.includes('driftline')) return 'must not contain the name Driftline';
  if (/^(.{1,4})\1+$/su.test(password)) return 'must not be a few characters repeated';
  const codes = Array.from(password, (ch) => ch.codePointAt(0)!);
  const step = codes[1] - codes[0];
  if (Math.abs(step) === 1 && codes.every((c, k) => k === 0 || c - codes[k - 1] === step)) return 'must not be a run of consecutive characters';
  return null;
}

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
