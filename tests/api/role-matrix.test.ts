import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { OutgoingMail, Robot, RobotFlag } from '../../server/entities/index.js';
import { listRoutes } from '../../server/routes/index.js';
import { previousMonth } from '../../server/services/report-figures.service.js';
import { insertZone, roomMap, scanLine } from './helpers/fixtures.js';
import { dockingLine, uploadStationModel } from './helpers/docking-fixtures.js';
import { actorByEmail, MAPPER_EMAIL, openZone, remapAt } from './helpers/remap-fixtures.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';
import { insertCapturedMail } from './helpers/mail-fixtures.js';

// Every API route, called by every role and by an anonymous client, must answer the status
// written here. A route added without a row here makes the first test fail, so none escapes.

type Who = 'anon' | 'admin' | 'mapper' | 'site_manager' | 'viewer';
const WHO: Who[] = ['anon', 'viewer', 'site_manager', 'mapper', 'admin'];
type Ids = Awaited<ReturnType<typeof demoIds>>;
interface Ctx { t: TestApp; ids: Ids; who: Who; n: number }
interface Prepared { path?: string; body?: unknown; cookie?: string | null }
interface Case { route: string; expect: Record<Who, number>; prepare?: (c: Ctx) => Promise<Prepared> | Prepared; body?: (c: Ctx) => unknown; attach?: (req: request.Test) => request.Test }

const all = (s: number): Record<Who, number> => ({ anon: s, admin: s, mapper: s, site_manager: s, viewer: s });
const signedIn = (s: number): Record<Who, number> => ({ ...all(s), anon: 401 });
const adminOnly = (s: number): Record<Who, number> => ({ anon: 401, admin: s, mapper: 403, site_manager: 403, viewer: 403 });
const managers = (s: number): Record<Who, number> => ({ anon: 401, admin: s, mapper: s, site_manager: s, viewer: 403 });

async function newInvitation(c: Ctx) {
  return c.t.services.invitations.create(c.ids.admin, { email: `matrix-${c.who}-${c.n}@ambergate.example`, name: 'Matrix Invitee', role: 'viewer', organizationId: c.ids.ambergate });
}
const operator = (c: Ctx) => c.ids.admin;
const mapFiles = (req: request.Test) => req.attach('image', roomMap().pgm, 'room.pgm').attach('metadata', roomMap().yaml, 'room.yaml');
async function newDraft(c: Ctx) {
  const { pgm, yaml } = roomMap();
  return c.t.services.mapVersions.upload(operator(c), c.ids.ambergateSite, { kind: 'floor', label: '', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
}
const mapPath = (c: Ctx, rest = '') => `/api/sites/${c.ids.ambergateSite}/map-versions${rest}`;
const operatorOnly = (s: number): Record<Who, number> => ({ anon: 401, admin: s, mapper: s, site_manager: 403, viewer: 403 });
let fixture: { mapVersionId: string; batchId: string; zoneId: string };
let zoneNumber = 100;
const zonePath = (c: Ctx, id: string, rest = '') => `/api/sites/${c.ids.ambergateSite}/zones/${id}${rest}`;
const remapPath = (c: Ctx, rest = '') => `/api/sites/${c.ids.ambergateSite}/remaps${rest}`;
async function newFlag(c: Ctx) {
  const flag = c.t.dataSource.getRepository(RobotFlag).create({ id: crypto.randomUUID(), robotId: c.ids.ambergateRobot, scanner: 'front', status: 'active', raisedAt: new Date(), figures: { days: [], meanAgreement: 0.8, fleetMedian: 0.97, medianZ: -6 }, mount: null });
  await c.t.dataSource.getRepository(RobotFlag).save(flag);
  return flag.id;
}
async function newStation(c: Ctx) {
  return c.t.services.docking.create(operator(c), c.ids.ambergateSite, { name: `MX station ${c.who} ${c.n}` });
}
/** Site managers of the organization and admins keep report recipients and read reports. */
const reportKeepers = (s: number): Record<Who, number> => ({ anon: 401, admin: s, mapper: 403, site_manager: s, viewer: 403 });
const lastMonth = () => previousMonth('Europe/London', new Date());
async function newRecipient(c: Ctx) {
  return c.t.services.recipients.add(operator(c), c.ids.ambergate, { email: `mx-${c.who}-${c.n}-${crypto.randomUUID().slice(0, 8)}@ambergate.example` });
}
/** A reset link of a new user (joined through an invitation), read from the queued reset mail. */
async function newResetToken(c: Ctx) {
  const invitation = await newInvitation(c);
  await c.t.services.invitations.accept(invitation.link.split('/').pop()!, 'a-long-enough-password');
  const email = `matrix-${c.who}-${c.n}@ambergate.example`;
  await c.t.services.passwordReset.request(email, null);
  const mail = await c.t.dataSource.getRepository(OutgoingMail).findOneByOrFail({ toEmail: email, kind: 'password_reset' });
  return /\/reset\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
}
async function newRobot(c: Ctx) {
  return c.t.services.robots.create(operator(c), c.ids.ambergateSite, { name: `MX-${c.who}-${c.n}`, model: 'Matrix test', mounts: [] });
}

const CASES: Case[] = [
  { route: 'GET /api/health', expect: all(200) },
  { route: 'POST /api/auth/sign-in', expect: all(200), body: () => ({ email: 'priya.manager@corvane.example', password: 'demo-manager-2026' }) },
  { route: 'POST /api/auth/sign-out', expect: all(204), prepare: async (c) => ({ cookie: c.who === 'anon' ? null : await signIn(c.t.app, demoAccount(c.who).email, demoAccount(c.who).password) }) },
  { route: 'GET /api/auth/me', expect: signedIn(200) },
  // Public: a reset request answers 202 whatever the address; the link's token is the authority for the other two.
  { route: 'POST /api/auth/password-reset', expect: all(202), body: () => ({ email: 'matrix-nobody@ambergate.example' }) },
  { route: 'GET /api/auth/password-reset/:token', expect: all(204), prepare: async (c) => ({ path: `/api/auth/password-reset/${await newResetToken(c)}` }) },
  { route: 'POST /api/auth/password-reset/:token', expect: all(204), body: () => ({ password: 'another-long-enough-password' }), prepare: async (c) => ({ path: `/api/auth/password-reset/${await newResetToken(c)}` }) },
  { route: 'GET /api/invitations', expect: adminOnly(200) },
  { route: 'POST /api/invitations', expect: adminOnly(201), body: (c) => ({ email: `new-${c.who}-${c.n}@ambergate.example`, name: 'New Person', role: 'viewer', organizationId: c.ids.ambergate }) },
  { route: 'DELETE /api/invitations/:id', expect: adminOnly(204), prepare: async (c) => ({ path: `/api/invitations/${(await newInvitation(c)).invitation.id}` }) },
  { route: 'GET /api/invitations/token/:token', expect: all(200), prepare: async (c) => ({ path: `/api/invitations/token/${(await newInvitation(c)).link.split('/').pop()}` }) },
  { route: 'POST /api/invitations/token/:token/accept', expect: all(200), body: () => ({ password: 'a-long-enough-password' }), prepare: async (c) => ({ path: `/api/invitations/token/${(await newInvitation(c)).link.split('/').pop()}/accept` }) },
  { route: 'GET /api/users', expect: adminOnly(200) },
  { route: 'PATCH /api/users/:id', expect: adminOnly(200), body: () => ({ status: 'active' }), prepare: (c) => ({ path: `/api/users/${c.ids.priya}` }) },
  { route: 'GET /api/organizations', expect: signedIn(200) },
  { route: 'POST /api/organizations', expect: adminOnly(201), body: (c) => ({ name: `Matrix Org ${c.who} ${c.n}`, timezone: 'Europe/Berlin' }) },
  { route: 'GET /api/organizations/:orgId/recipients', expect: reportKeepers(200), prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/recipients` }) },
  { route: 'POST /api/organizations/:orgId/recipients', expect: reportKeepers(201), body: (c) => ({ email: `reader-${c.who}-${c.n}@ambergate.example` }), prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/recipients` }) },
  { route: 'DELETE /api/organizations/:orgId/recipients/:recipientId', expect: reportKeepers(204), prepare: async (c) => ({ path: `/api/organizations/${c.ids.ambergate}/recipients/${(await newRecipient(c)).id}` }) },
  { route: 'GET /api/organizations/:orgId/reports', expect: { ...reportKeepers(200), viewer: 200 }, prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/reports` }) },
  // Viewers read sent reports only; last month's was not sent here.
  // The read-only figures page: like the preview, viewers read a sent month only.
  { route: 'GET /api/organizations/:orgId/reports/:month', expect: { ...reportKeepers(200), viewer: 404 }, prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/reports/${lastMonth()}` }) },
  { route: 'GET /api/organizations/:orgId/reports/:month/preview', expect: { ...reportKeepers(200), viewer: 404 }, prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/reports/${lastMonth()}/preview` }) },
  { route: 'POST /api/organizations/:orgId/reports/:month/send', expect: adminOnly(200), body: () => ({}), prepare: (c) => ({ path: `/api/organizations/${c.ids.ambergate}/reports/${lastMonth()}/send` }) },
  // Public: the signed token is the authority; GET only reads whom it names, POST unsubscribes (RFC 8058 one-click).
  { route: 'GET /api/unsubscribe/:token', expect: all(200), prepare: async (c) => ({ path: new URL(c.t.services.recipients.oneClickLink((await newRecipient(c)).id)).pathname }) },
  { route: 'POST /api/unsubscribe/:token', expect: all(200), body: () => ({}), prepare: async (c) => ({ path: new URL(c.t.services.recipients.oneClickLink((await newRecipient(c)).id)).pathname }) },
  { route: 'GET /api/sites', expect: signedIn(200) },
  { route: 'POST /api/sites', expect: adminOnly(201), body: (c) => ({ name: `Matrix Site ${c.who} ${c.n}`, city: 'Nowhere', timezone: 'Europe/London', organizationId: c.ids.ambergate }) },
  { route: 'GET /api/sites/:siteId', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}` }) },
  { route: 'GET /api/sites/:siteId/robots', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots` }) },
  { route: 'POST /api/sites/:siteId/robots', expect: managers(201), body: (c) => ({ name: `MXP-${c.who}-${c.n}`, model: 'Matrix', mounts: [{ name: 'front', x: 0.3, y: 0, yaw: 0 }] }), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots` }) },
  { route: 'PATCH /api/sites/:siteId/robots/:robotId', expect: managers(200), body: () => ({ model: 'Renamed model' }), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots/${c.ids.ambergateRobot}` }) },
  { route: 'DELETE /api/sites/:siteId/robots/:robotId', expect: managers(204), prepare: async (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots/${(await newRobot(c)).id}` }) },
  { route: 'GET /api/sites/:siteId/robots/:robotId/tokens', expect: managers(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots/${c.ids.ambergateRobot}/tokens` }) },
  { route: 'POST /api/sites/:siteId/robots/:robotId/tokens', expect: managers(201), body: () => ({ label: 'matrix' }), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots/${c.ids.ambergateRobot}/tokens` }) },
  {
    route: 'DELETE /api/sites/:siteId/robots/:robotId/tokens/:tokenId',
    expect: managers(204),
    prepare: async (c) => {
      const { token } = await c.t.services.robots.createToken(operator(c), c.ids.ambergateSite, c.ids.ambergateRobot, 'to revoke');
      return { path: `/api/sites/${c.ids.ambergateSite}/robots/${c.ids.ambergateRobot}/tokens/${token.id}` };
    },
  },
  { route: 'GET /api/audit-events', expect: adminOnly(200) },
  { route: 'GET /api/sites/:siteId/map-versions', expect: signedIn(200), prepare: (c) => ({ path: mapPath(c) }) },
  { route: 'POST /api/sites/:siteId/map-versions', expect: operatorOnly(201), attach: mapFiles, prepare: (c) => ({ path: mapPath(c) }) },
  { route: 'GET /api/sites/:siteId/map-versions/:versionId', expect: signedIn(200), prepare: (c) => ({ path: mapPath(c, `/${fixture.mapVersionId}`) }) },
  { route: 'GET /api/sites/:siteId/map-versions/:versionId/preview.png', expect: signedIn(200), prepare: (c) => ({ path: mapPath(c, `/${fixture.mapVersionId}/preview.png`) }) },
  { route: 'GET /api/sites/:siteId/map-versions/:versionId/tiles/:z/:x/:y.png', expect: signedIn(200), prepare: (c) => ({ path: mapPath(c, `/${fixture.mapVersionId}/tiles/0/0/0.png`) }) },
  { route: 'GET /api/sites/:siteId/map-versions/:versionId/diff', expect: signedIn(200), prepare: async (c) => ({ path: mapPath(c, `/${fixture.mapVersionId}/diff?against=${(await newDraft(c)).id}`) }) },
  { route: 'GET /api/sites/:siteId/map-versions/:versionId/diff-tiles/:z/:x/:y.png', expect: signedIn(200), prepare: async (c) => ({ path: mapPath(c, `/${fixture.mapVersionId}/diff-tiles/0/0/0.png?against=${(await newDraft(c)).id}`) }) },
  { route: 'POST /api/sites/:siteId/map-versions/:versionId/activate', expect: operatorOnly(200), prepare: async (c) => ({ path: mapPath(c, `/${(await newDraft(c)).id}/activate`) }) },
  { route: 'GET /api/sites/:siteId/scan-batches', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/scan-batches` }) },
  { route: 'POST /api/sites/:siteId/scan-batches', expect: { ...operatorOnly(202) }, attach: (req) => req.attach('log', Buffer.from(scanLine({}) + '\n'), 'drive.jsonl'), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/scan-batches` }) },
  { route: 'GET /api/sites/:siteId/scan-batches/:batchId', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/scan-batches/${fixture.batchId}` }) },
  { route: 'GET /api/sites/:siteId/agreement', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/agreement` }) },
  { route: 'GET /api/sites/:siteId/paths', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/paths` }) },
  { route: 'GET /api/sites/:siteId/settings', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/settings` }) },
  { route: 'PATCH /api/sites/:siteId/settings', expect: adminOnly(200), body: () => ({ detectionHour: 3 }), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/settings` }) },
  { route: 'GET /api/sites/:siteId/zones', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/zones` }) },
  { route: 'GET /api/sites/:siteId/zones/:zoneId', expect: signedIn(200), prepare: (c) => ({ path: zonePath(c, fixture.zoneId) }) },
  {
    route: 'POST /api/sites/:siteId/zones/:zoneId/acknowledge',
    expect: { anon: 401, admin: 200, mapper: 403, site_manager: 200, viewer: 403 },
    body: () => ({ note: 'seen it' }),
    prepare: async (c) => ({ path: zonePath(c, await insertZone(c.t.dataSource, c.ids.ambergateSite, fixture.mapVersionId, zoneNumber++), '/acknowledge') }),
  },
  {
    route: 'POST /api/sites/:siteId/zones/:zoneId/dismiss',
    expect: { anon: 401, admin: 200, mapper: 200, site_manager: 403, viewer: 403 },
    body: () => ({ reason: 'volatile area' }),
    prepare: async (c) => ({ path: zonePath(c, await insertZone(c.t.dataSource, c.ids.ambergateSite, fixture.mapVersionId, zoneNumber++), '/dismiss') }),
  },
  {
    route: 'POST /api/sites/:siteId/robots/:robotId/flags/:flagId/clear',
    expect: managers(200),
    body: () => ({ note: 'window cleaned' }),
    prepare: async (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/robots/${c.ids.ambergateRobot}/flags/${await newFlag(c)}/clear` }),
  },
  { route: 'GET /api/sites/:siteId/remaps', expect: signedIn(200), prepare: (c) => ({ path: remapPath(c) }) },
  { route: 'POST /api/sites/:siteId/remaps', expect: { anon: 401, admin: 201, mapper: 201, site_manager: 201, viewer: 403 }, prepare: async (c) => ({ path: remapPath(c), body: { zoneIds: [await openZone(c.t, c.ids.ambergateSite)] } }) },
  { route: 'GET /api/sites/:siteId/remaps/assignees', expect: operatorOnly(200), prepare: (c) => ({ path: remapPath(c, '/assignees') }) },
  { route: 'GET /api/sites/:siteId/remaps/:remapId', expect: signedIn(200), prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'approved')}`) }) },
  { route: 'GET /api/sites/:siteId/remaps/:remapId/quiet-windows', expect: signedIn(200), prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'approved')}/quiet-windows`) }) },
  { route: 'POST /api/sites/:siteId/remaps/:remapId/approve', expect: { anon: 401, admin: 200, mapper: 403, site_manager: 200, viewer: 403 }, prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'proposed')}/approve`), body: {} }) },
  {
    route: 'POST /api/sites/:siteId/remaps/:remapId/schedule',
    expect: operatorOnly(200),
    prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'approved')}/schedule`), body: { start: new Date(Date.now() + 86_400_000).toISOString(), assigneeId: (await actorByEmail(c.t, MAPPER_EMAIL)).id } }),
  },
  { route: 'GET /api/sites/:siteId/remaps/:remapId/calendar.ics', expect: signedIn(200), prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'scheduled')}/calendar.ics`) }) },
  { route: 'POST /api/sites/:siteId/remaps/:remapId/start', expect: operatorOnly(200), prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'scheduled')}/start`), body: {} }) },
  {
    route: 'POST /api/sites/:siteId/remaps/:remapId/attach-map',
    expect: operatorOnly(200),
    prepare: async (c) => {
      const remapId = await remapAt(c.t, c.ids.ambergateSite, 'in_progress');
      return { path: remapPath(c, `/${remapId}/attach-map`), body: { mapVersionId: (await newDraft(c)).id } };
    },
  },
  { route: 'POST /api/sites/:siteId/remaps/:remapId/cancel', expect: managers(200), prepare: async (c) => ({ path: remapPath(c, `/${await remapAt(c.t, c.ids.ambergateSite, 'approved')}/cancel`), body: { reason: 'matrix' } }) },
  { route: 'GET /api/remaps', expect: signedIn(200), prepare: () => ({ path: `/api/remaps?from=${new Date(Date.now() - 86_400_000).toISOString()}&to=${new Date(Date.now() + 7 * 86_400_000).toISOString()}` }) },
  { route: 'GET /api/sites/:siteId/stations', expect: signedIn(200), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/stations` }) },
  { route: 'POST /api/sites/:siteId/stations', expect: managers(201), body: (c) => ({ name: `Matrix bay ${c.who} ${c.n}` }), prepare: (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/stations` }) },
  { route: 'GET /api/sites/:siteId/stations/:stationId', expect: signedIn(200), prepare: async (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/stations/${(await newStation(c)).id}` }) },
  { route: 'PATCH /api/sites/:siteId/stations/:stationId', expect: managers(200), body: (c) => ({ name: `Matrix renamed ${c.who} ${c.n}` }), prepare: async (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/stations/${(await newStation(c)).id}` }) },
  {
    route: 'PUT /api/sites/:siteId/stations/:stationId/model',
    expect: operatorOnly(200),
    prepare: async (c) => {
      const station = await newStation(c);
      const model = await uploadStationModel(c.t.services, operator(c), c.ids.ambergateSite, station.name);
      return { path: `/api/sites/${c.ids.ambergateSite}/stations/${station.id}/model`, body: { mapVersionId: model.id } };
    },
  },
  { route: 'PUT /api/sites/:siteId/stations/:stationId/tolerance', expect: adminOnly(200), body: () => ({ toleranceMm: 12, toleranceDeg: null }), prepare: async (c) => ({ path: `/api/sites/${c.ids.ambergateSite}/stations/${(await newStation(c)).id}/tolerance` }) },
  { route: 'GET /api/outbox', expect: adminOnly(200) },
  { route: 'GET /api/outbox/:id', expect: adminOnly(200), prepare: async (c) => ({ path: `/api/outbox/${await insertCapturedMail(c.t)}` }) },
  { route: 'GET /api/outbox/:id/parts/:partId', expect: adminOnly(200), prepare: async (c) => ({ path: `/api/outbox/${await insertCapturedMail(c.t)}/parts/pixel` }) },
  { route: 'GET /api/mail', expect: reportKeepers(200) },
  { route: 'GET /api/job-runs', expect: adminOnly(200) },
  { route: 'POST /api/job-runs', expect: adminOnly(202), body: () => ({ job: 'retention' }) },
  // Robots post with bearer tokens; a person's session is not enough.
  { route: 'POST /api/ingest/scans', expect: all(401), body: () => scanLine({}) },
  { route: 'POST /api/ingest/docking', expect: all(401), body: () => dockingLine({}) },
  // Last: it changes each role's password (the role's session stays open).
  {
    route: 'POST /api/auth/change-password',
    expect: signedIn(204),
    body: (c) => (c.who === 'anon' ? { currentPassword: 'whatever-it-is', newPassword: 'whatever-it-is-2' } : { currentPassword: demoAccount(c.who).password, newPassword: `${demoAccount(c.who).password}-changed` }),
  },
];

describe('role matrix', () => {
  let t: TestApp;
  let ids: Ids;
  const cookies = new Map<Who, string>();

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    for (const who of WHO) if (who !== 'anon') cookies.set(who, await signIn(t.app, demoAccount(who).email, demoAccount(who).password));
    const ctx: Ctx = { t, ids, who: 'admin', n: -1 };
    const map = await newDraft(ctx);
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    const { batch } = await t.services.ingest.ingestRobotBatch(robot, Buffer.from(scanLine({})), 'matrix');
    fixture = { mapVersionId: map.id, batchId: batch.id, zoneId: await insertZone(t.dataSource, ids.ambergateSite, map.id, 1) };
  });
  afterAll(() => t.close());

  it('when the route table is listed, then every route has a row in the matrix and every row a route', () => {
    const served = listRoutes(t.routes).sort();
    const described = CASES.map((c) => c.route).sort();
    expect(described).toEqual(served);
  });

  let n = 0;
  for (const c of CASES) {
    it(`when every role calls ${c.route}, then each gets its expected status`, async () => {
      const got: Record<string, number> = {};
      for (const who of WHO) {
        const ctx: Ctx = { t, ids, who, n: n++ };
        const prepared = (await c.prepare?.(ctx)) ?? {};
        const [method, path] = c.route.split(' ');
        let req = request(t.app)[method.toLowerCase() as 'get'](prepared.path ?? path);
        const cookie = prepared.cookie !== undefined ? prepared.cookie : cookies.get(who);
        if (cookie) req = req.set('Cookie', cookie);
        if (c.attach) req = c.attach(req);
        const body = prepared.body ?? c.body?.(ctx);
        const res = body === undefined ? await req : await req.send(body as object);
        got[who] = res.status;
      }
      expect(got).toEqual(c.expect);
    });
  }

  afterAll(() => Promise.all(t.services.ingest.pending));
});
