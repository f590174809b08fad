import { createHash, randomBytes, randomUUID } from 'node:crypto';

/** A new random id for a row. */
export const newId = (): string => randomUUID();

/** A URL-safe secret with 256 bits of entropy, with an optional readable prefix. */
export const newSecret = (prefix = ''): string => prefix + randomBytes(32).toString('base64url');

/** Hex SHA-256 of a high-entropy secret; such secrets need no slow hash. */
export const sha256 = (secret: string): string => createHash('sha256').update(secret).digest('hex');
