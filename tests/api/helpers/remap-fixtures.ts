import type { Actor } from '../../../server/auth/actor.js';
import { User } from '../../../server/entities/index.js';
import { insertZone } from './fixtures.js';
import type { TestApp } from './test-app.js';

/** The demo user with this e-mail as a service actor. */
export async function actorByEmail(t: TestApp, email: string): Promise<Actor> {
  const u = await t.dataSource.getRepository(User).findOneByOrFail({ email });
  return { id: u.id, email: u.email, name: u.name, role: u.role, organizationId: u.organizationId };
}

export const MAPPER_EMAIL = 'tomas.mapper@kestrelway.example';
export const ADMIN_EMAIL = 'iris.admin@kestrelway.example';

let zoneNumber = 5000;

/** An open zone of the site's active floor map (the test room's single-cell zone), returning its id. */
export async function openZone(t: TestApp, siteId: string): Promise<string> {
  const active = await t.services.mapVersions.activeFloor(siteId);
  if (!active) throw new Error('the site has no active floor map');
  return insertZone(t.dataSource, siteId, active.id, zoneNumber++);
}

/**
 * A remap request of one fresh zone brought to `stage`: 'proposed' (by a mapper, not approved),
 * 'approved' (requested by an admin), 'scheduled' (tomorrow, assigned to the mapper) or 'in_progress'.
 */
export async function remapAt(t: TestApp, siteId: string, stage: 'proposed' | 'approved' | 'scheduled' | 'in_progress'): Promise<string> {
  const admin = await actorByEmail(t, ADMIN_EMAIL);
  const mapper = await actorByEmail(t, MAPPER_EMAIL);
  const zoneId = await openZone(t, siteId);
  const remap = await t.services.remaps.create(stage === 'proposed' ? mapper : admin, siteId, { zoneIds: [zoneId] });
  if (stage === 'proposed' || stage === 'approved') return remap.id;
  await t.services.remaps.schedule(mapper, siteId, remap.id, { start: new Date(Date.now() + 86_400_000), assigneeId: mapper.id });
  if (stage === 'in_progress') await t.services.remaps.start(mapper, siteId, remap.id);
  return remap.id;
}
