import { BetterSqlite3Adapter } from '@lucia-auth/adapter-sqlite';
import { Lucia, TimeSpan } from 'lucia';
import type { DataSource } from 'typeorm';
import type { Config } from '../config.js';
import type { Role, UserStatus } from '../entities/user.entity.js';

// The session library is kept behind this one module so that it can be replaced without
// touching routes or services.

interface UserRow {
  email: string;
  name: string;
  role: Role;
  organization_id: string;
  status: UserStatus;
}

/** Creates the session manager over the DataSource's own SQLite handle. */
export function createSessions(dataSource: DataSource, config: Config) {
  const db = (dataSource.driver as unknown as { databaseConnection: ConstructorParameters<typeof BetterSqlite3Adapter>[0] })
    .databaseConnection;
  const adapter = new BetterSqlite3Adapter(db, { user: 'users', session: 'sessions' });
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(7, 'd'),
    sessionCookie: {
      // On https the __Host- prefix makes browsers refuse the cookie unless it is Secure, for Path=/
      // and without Domain, so a sibling subdomain cannot plant one (RFC 6265bis, cookie prefixes).
      name: config.secureCookies ? '__Host-driftline_session' : 'driftline_session',
      expires: true,
      attributes: { secure: config.secureCookies, sameSite: 'lax', path: '/' },
    },
    getUserAttributes: (row) => {
      const u = row as unknown as UserRow;
      return { email: u.email, name: u.name, role: u.role, organizationId: u.organization_id, status: u.status };
    },
  });
}

export type Sessions = ReturnType<typeof createSessions>;
