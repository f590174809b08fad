import { z } from 'zod';
import { PASSWORD_MAX, PASSWORD_MIN } from '../auth/password.js';
import { ROLES } from '../entities/user.entity.js';

/** An id path parameter (UUID). */
export const id = z.uuid({ message: 'must be a valid id' });

/** An IANA time zone name the runtime knows. */
export const timezone = z.string().refine((tz) => {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}, 'must be an IANA time zone such as Europe/London');

export const email = z.email({ message: 'must be an e-mail address' }).max(254);
export const password = z
  .string()
  .min(PASSWORD_MIN, `must have at least ${PASSWORD_MIN} characters`)
  .max(PASSWORD_MAX, `must have at most ${PASSWORD_MAX} characters`);
export const role = z.enum(ROLES as [string, ...string[]]);
export const name = (max = 120) => z.string().trim().min(1, 'must not be empty').max(max);

/** A scanner mount in the robot frame: metres and radians, within sensible bounds. */
export const mount = z.strictObject({
  name: z.string().trim().min(1).max(40).regex(/^[A-Za-z0-9_.-]+$/, 'may use letters, digits, _ . - only'),
  x: z.number().finite().min(-5).max(5),
  y: z.number().finite().min(-5).max(5),
  yaw: z.number().finite().min(-Math.PI).max(Math.PI),
});
export const mounts = z
  .array(mount)
  .max(8)
  .refine((ms) => new Set(ms.map((m) => m.name)).size === ms.length, 'mount names must be unique');
