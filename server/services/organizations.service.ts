import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { isOperator } from '../auth/actor.js';
import { Organization, Site, User } from '../entities/index.js';
import { conflict } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { newId } from './ids.js';

/** Organizations: admins see all, everyone else their own. */
export class OrganizationsService {
  constructor(
    private readonly db: DataSource,
    private readonly audit: AuditService,
  ) {}

  /** Organizations visible to the actor, with site and user counts. */
  async list(actor: Actor) {
    const orgs = await this.db.getRepository(Organization).find({
      where: actor.role === 'admin' ? {} : { id: actor.organizationId },
      order: { kind: 'DESC', name: 'ASC' },
    });
    const count = async (entity: typeof Site | typeof User, orgId: string) =>
      this.db.getRepository(entity).countBy({ organizationId: orgId });
    return Promise.all(
      orgs.map(async (o) => ({
        id: o.id,
        name: o.name,
        kind: o.kind,
        timezone: o.timezone,
        siteCount: await count(Site, o.id),
        userCount: await count(User, o.id),
        createdAt: o.createdAt.toISOString(),
      })),
    );
  }

  /** Creates a customer organization (there is one operator, made by the seed). */
  async create(actor: Actor, input: { name: string; timezone: string }) {
    const repo = this.db.getRepository(Organization);
    if (await repo.existsBy({ name: input.name })) throw conflict(`An organization named ${input.name} already exists.`);
    const org = repo.create({ id: newId(), name: input.name, kind: 'customer', timezone: input.timezone });
    await this.db.transaction(async (m) => {
      await m.save(org);
      await this.audit.record(actor, { action: 'organization.create', targetType: 'organization', targetId: org.id, organizationId: org.id, summary: `${actor.name} created the customer organization ${org.name}.` }, m);
    });
    const [view] = (await this.list({ ...actor, role: 'admin' })).filter((o) => o.id === org.id);
    return view;
  }

  /** Whether the actor may see this organization at all. */
  canSee(actor: Actor, organizationId: string): boolean {
    return isOperator(actor) || actor.organizationId === organizationId;
  }
}
