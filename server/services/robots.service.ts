import { IsNull, type DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { Robot, RobotToken } from '../entities/index.js';
import type { ScannerMount } from '../entities/robot.entity.js';
import { conflict, HttpError, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { newId, newSecret, sha256 } from './ids.js';
import type { SitesService } from './sites.service.js';

/** Robot bearer tokens start with this, so a leaked one is easy to recognise in logs and scanners. */
export const ROBOT_TOKEN_PREFIX = 'dlr_';

interface RobotInput {
  name: string;
  model: string;
  mounts: ScannerMount[];
}

/** Robots of a site and their ingest tokens; every call first checks that the actor may see the site. */
export class RobotsService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly audit: AuditService,
  ) {}

  private async view(r: Robot) {
    return {
      id: r.id,
      siteId: r.siteId,
      name: r.name,
      model: r.model,
      mounts: r.mounts,
      activeTokenCount: await this.db.getRepository(RobotToken).countBy({ robotId: r.id, revokedAt: IsNull() }),
      createdAt: r.createdAt.toISOString(),
    };
  }

  private async robotOf(actor: Actor, siteId: string, robotId: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const robot = await this.db.getRepository(Robot).findOneBy({ id: robotId, siteId: site.id });
    if (!robot) throw notFound('The robot');
    return { site, robot };
  }

  /** Robots of a visible site, by name. */
  async list(actor: Actor, siteId: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const robots = await this.db.getRepository(Robot).find({ where: { siteId: site.id }, order: { name: 'ASC' } });
    return Promise.all(robots.map((r) => this.view(r)));
  }

  /** Adds a robot; its name must be unique in the site because scan logs name robots. */
  async create(actor: Actor, siteId: string, input: RobotInput) {
    const site = await this.sites.getVisible(actor, siteId);
    if (await this.db.getRepository(Robot).existsBy({ siteId: site.id, name: input.name })) {
      throw conflict(`${site.name} already has a robot named ${input.name}.`);
    }
    const robot = this.db.getRepository(Robot).create({ id: newId(), siteId: site.id, ...input });
    await this.db.transaction(async (m) => {
      await m.save(robot);
      await this.audit.record(actor, { action: 'robot.create', targetType: 'robot', targetId: robot.id, organizationId: site.organizationId, summary: `${actor.name} added the robot ${robot.name} to ${site.name}.` }, m);
    });
    return this.view(await this.db.getRepository(Robot).findOneByOrFail({ id: robot.id }));
  }

  /** Changes name, model or mounts. */
  async update(actor: Actor, siteId: string, robotId: string, patch: Partial<RobotInput>) {
    const { site, robot } = await this.robotOf(actor, siteId, robotId);
    if (patch.name && patch.name !== robot.name && (await this.db.getRepository(Robot).existsBy({ siteId: site.id, name: patch.name }))) {
      throw conflict(`${site.name} already has a robot named ${patch.name}.`);
    }
    Object.assign(robot, patch);
    await this.db.transaction(async (m) => {
      await m.save(robot);
      await this.audit.record(actor, { action: 'robot.update', targetType: 'robot', targetId: robot.id, organizationId: site.organizationId, summary: `${actor.name} changed the robot ${robot.name} (${Object.keys(patch).join(', ')}).`, details: patch as Record<string, unknown> }, m);
    });
    return this.view(robot);
  }

  /** Removes a robot and its tokens. */
  async remove(actor: Actor, siteId: string, robotId: string) {
    const { site, robot } = await this.robotOf(actor, siteId, robotId);
    await this.db.transaction(async (m) => {
      await m.delete(Robot, robot.id);
      await this.audit.record(actor, { action: 'robot.delete', targetType: 'robot', targetId: robot.id, organizationId: site.organizationId, summary: `${actor.name} removed the robot ${robot.name} from ${site.name}.` }, m);
    });
  }

  /** The robot's tokens, without secrets. */
  async listTokens(actor: Actor, siteId: string, robotId: string) {
    const { robot } = await this.robotOf(actor, siteId, robotId);
    const tokens = await this.db.getRepository(RobotToken).find({ where: { robotId: robot.id }, relations: { createdBy: true }, order: { createdAt: 'DESC' } });
    return tokens.map(tokenView);
  }

  /** Creates a token; the secret is returned this once and only its hash is kept. */
  async createToken(actor: Actor, siteId: string, robotId: string, label: string) {
    const { site, robot } = await this.robotOf(actor, siteId, robotId);
    const secret = newSecret(ROBOT_TOKEN_PREFIX);
    const token = this.db.getRepository(RobotToken).create({ id: newId(), robotId: robot.id, label, prefix: secret.slice(0, 8), tokenHash: sha256(secret), createdById: actor.id });
    await this.db.transaction(async (m) => {
      await m.save(token);
      await this.audit.record(actor, { action: 'token.create', targetType: 'robot_token', targetId: token.id, organizationId: site.organizationId, summary: `${actor.name} created the token "${label}" for ${robot.name}.` }, m);
    });
    const saved = await this.db.getRepository(RobotToken).findOneOrFail({ where: { id: token.id }, relations: { createdBy: true } });
    return { token: tokenView(saved), secret };
  }

  /** Revokes a token at once; requests with it are refused from then on. */
  async revokeToken(actor: Actor, siteId: string, robotId: string, tokenId: string) {
    const { site, robot } = await this.robotOf(actor, siteId, robotId);
    const token = await this.db.getRepository(RobotToken).findOneBy({ id: tokenId, robotId: robot.id });
    if (!token) throw notFound('The token');
    if (token.revokedAt) throw conflict('This token is already revoked.');
    await this.db.transaction(async (m) => {
      await m.update(RobotToken, token.id, { revokedAt: new Date() });
      await this.audit.record(actor, { action: 'token.revoke', targetType: 'robot_token', targetId: token.id, organizationId: site.organizationId, summary: `${actor.name} revoked the token "${token.label}" of ${robot.name}.` }, m);
    });
  }

  /** The robot a bearer secret belongs to, or 401; records when the token was last used. */
  async robotForToken(secret: string): Promise<Robot> {
    const token = await this.db.getRepository(RobotToken).findOne({ where: { tokenHash: sha256(secret), revokedAt: IsNull() }, relations: { robot: true } });
    if (!token) throw new HttpError(401, 'invalid_token', 'The robot token is unknown or revoked.');
    await this.db.getRepository(RobotToken).update(token.id, { lastUsedAt: new Date() });
    return token.robot;
  }
}

function tokenView(t: RobotToken) {
  return {
    id: t.id,
    label: t.label,
    prefix: t.prefix,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
    createdBy: t.createdBy ? { id: t.createdBy.id, name: t.createdBy.name } : null,
  };
}
